"""The service layer: one open campaign and the operations people do with it.

The command line and the terminal app both call :class:`Campaign`, never the store, so both
validate the same way and write the same audit trail. Values come in as people type them
("600 rpm", "30 NL/min") or as SI numbers, and are validated against :mod:`scaleup.fields`
before anything is written; a record with several bad fields reports all of them at once.
"""

from __future__ import annotations

import getpass
import os
from pathlib import Path

from scaleup.errors import InputError
from scaleup.services.analysis import AnalysisService
from scaleup.services.equipment import EquipmentService
from scaleup.services.files import FileService
from scaleup.services.measurements import MeasurementService
from scaleup.services.runs import RunService
from scaleup.services.validation import liquid_height, liquid_volume, validate
from scaleup.store import db, records

__all__ = ["Campaign", "validate", "liquid_volume", "liquid_height"]


def _actor() -> str:
    try:
        return os.environ.get("SCALEUP_USER") or getpass.getuser()
    except Exception:  # no user database in some containers
        return "unknown"


class Campaign(EquipmentService, RunService, MeasurementService, AnalysisService,
               FileService):
    """An open campaign file.

    Use as a context manager, or call :meth:`close`.
    """

    def __init__(self, path: str | os.PathLike, *, create: bool = False,
                 actor: str | None = None):
        self.path = Path(path)
        self.conn = db.connect(self.path, create=create)
        self.actor = actor or _actor()

    @classmethod
    def create(cls, path: str | os.PathLike) -> Campaign:
        path = Path(path)
        if path.exists() and path.stat().st_size > 0:
            raise InputError(f"{path} already exists; choose another name", "path", str(path))
        return cls(path, create=True)

    def close(self) -> None:
        self.conn.close()

    def __enter__(self) -> Campaign:
        return self

    def __exit__(self, *exc) -> None:
        self.close()

    def transaction(self):
        return records.transaction(self.conn)

    def rows(self, sql: str, params: tuple | dict | list = ()) -> list[dict]:
        return records.rows(self.conn, sql, tuple(params) if isinstance(params, list)
                            else params)

    # ---- history -------------------------------------------------------------------------
    def history(self, table: str | None = None, record_id: int | None = None,
                limit: int = 50) -> list[dict]:
        sql, params = "SELECT * FROM audit_log WHERE 1", []
        if table:
            sql += " AND table_name = ?"
            params.append(table)
        if record_id is not None:
            sql += " AND record_id = ?"
            params.append(record_id)
        return self.rows(sql + " ORDER BY id DESC LIMIT ?", [*params, limit])

    def undo(self) -> dict:
        """Undo the newest change made by this user: an edit, a delete, a restore or an add."""
        import json

        last = records.last_change(self.conn, self.actor)
        if last is None:
            raise InputError("there is nothing to undo")
        table, record_id, action = last["table_name"], last["record_id"], last["action"]
        with self.transaction():
            records.unchanged_since(self.conn, last)  # never undo over someone else's edit
            if action == "update":
                old = json.loads(last["old_json"])
                replaced = [t for t, (parent, _) in records.CHILDREN.items()
                            if parent == table and t in old]
                current = records.get(self.conn, table, record_id)
                # blobs (curve samples) are not in the log; entries written before they were
                # left out hold them as null, which is not their old value either
                editable = {k: v for k, v in old.items()
                            if k not in ("id", "row_version", "created_at", "updated_at",
                                         "deleted_at", *records.CHILDREN)
                            and not (v is None and isinstance(current.get(k), bytes))}
                if replaced:  # impellers, sparger or salts were replaced: put the old back
                    child = replaced[0]
                    key = records.CHILDREN[child][1]
                    records.replace_children(
                        self.conn, child, record_id,
                        [{k: v for k, v in r.items() if k not in ("id", key)}
                         for r in old[child]], actor=self.actor)
                else:
                    records.update(self.conn, table, record_id, editable, actor=self.actor)
            elif action == "delete":
                records.restore(self.conn, table, record_id, actor=self.actor)
            elif action == "restore":
                records.soft_delete(self.conn, table, record_id, actor=self.actor)
            elif action == "insert" and table in records.VERSIONED:
                records.soft_delete(self.conn, table, record_id, actor=self.actor)
            else:
                raise InputError(f"the last change ({action} of {table} {record_id}) cannot be "
                                 "undone here")
        return {"table": table, "record_id": record_id, "undid": action}

    # ---- overview ------------------------------------------------------------------------
    def summary(self) -> dict:
        count = lambda t: self.rows(f"SELECT count(*) AS n FROM {t} WHERE deleted_at IS NULL")[0]["n"]  # noqa: E731
        return {"path": str(self.path), "schema_version": db.schema_version(),
                "vessels": count("vessel"), "media": count("medium"), "runs": count("run"),
                "curves": count("curve"), "fluxes": count("flux"), "fits": count("fit"),
                "studies": count("study")}

    def check(self) -> dict:
        return db.check(self.conn)

    def backup(self, target: str | os.PathLike) -> Path:
        target = Path(target)
        if target.exists():
            raise InputError(f"{target} already exists; choose a new file name", "backup")
        return db.backup(self.conn, target)
