"""Open a campaign file and bring its schema up to date.

The schema is built only by the numbered SQL files in ``db/migrations`` (shipped in the wheel
as :mod:`scaleup.migrations`); the version applied is kept in ``PRAGMA user_version``. Opening
an older file backs it up with SQLite's online backup API, then migrates it forward in one
transaction; opening a file from a newer version of the tool is refused.
"""

from __future__ import annotations

import os
import re
import sqlite3
from dataclasses import dataclass
from importlib import resources
from pathlib import Path

from scaleup.errors import StoreError

BUSY_TIMEOUT_MS = 10_000
APPLICATION_ID = 0x5C41_1E00  # marks a file as a scaleup campaign (PRAGMA application_id)


@dataclass(frozen=True)
class Migration:
    version: int
    name: str
    sql: str


def migrations() -> list[Migration]:
    """The migrations shipped with this version, in order."""
    found = []
    for entry in resources.files("scaleup.migrations").iterdir():
        m = re.match(r"^(\d{4})_(\w+)\.sql$", entry.name)
        if m:
            found.append(Migration(int(m.group(1)), m.group(2), entry.read_text("utf-8")))
    found.sort(key=lambda mig: mig.version)
    for i, mig in enumerate(found, start=1):
        if mig.version != i:
            raise RuntimeError(f"migrations are not numbered 1..n: {mig.version} at place {i}")
    return found


def schema_version() -> int:
    """The schema version this code writes."""
    return len(migrations())


def connect(path: str | os.PathLike, *, create: bool = False) -> sqlite3.Connection:
    """Open the file with foreign keys on, WAL, a busy timeout; migrate it if it is older.

    Raises :class:`StoreError` with a readable message when the file is not a campaign, is
    from a newer version, or cannot be opened for writing.
    """
    path = Path(path)
    if path.is_dir():
        raise StoreError(f"{path} is a folder, not a campaign file")
    exists = path.exists()
    if not exists and not create:
        raise StoreError(f"{path} does not exist; create it with `scaleup init {path}` "
                         "or build the demo with `scaleup demo`")
    if exists and path.stat().st_size > 0:
        with open(path, "rb") as fh:
            if fh.read(16) != b"SQLite format 3\x00":
                raise StoreError(f"{path} is not a campaign file (not an SQLite database); "
                                 "nothing was changed")
    if not exists and not os.access(path.parent if str(path.parent) else ".", os.W_OK):
        raise StoreError(f"cannot create {path}: the folder is not writable")
    if exists and not os.access(path, os.W_OK):
        raise StoreError(f"{path} is read-only; copy it or change its permissions to edit it")
    try:
        conn = sqlite3.connect(path, timeout=BUSY_TIMEOUT_MS / 1000, isolation_level=None,
                               check_same_thread=False)
    except sqlite3.Error as exc:
        raise StoreError(f"cannot open {path}: {exc}") from exc
    try:
        conn.execute(f"PRAGMA busy_timeout = {BUSY_TIMEOUT_MS}")
        conn.execute("PRAGMA foreign_keys = ON")
        _check_identity(conn, path)
        mode = conn.execute("PRAGMA journal_mode = WAL").fetchone()[0]
        if mode.lower() != "wal":
            raise StoreError(f"{path}: cannot switch to WAL journal (got {mode})")
        conn.execute("PRAGMA synchronous = NORMAL")
        migrate(conn, path)
    except sqlite3.DatabaseError as exc:
        conn.close()
        raise StoreError(f"{path} is not a usable campaign file: {exc}; nothing was changed"
                         ) from exc
    except BaseException:
        conn.close()
        raise
    return conn


def _check_identity(conn: sqlite3.Connection, path: Path) -> None:
    app_id = conn.execute("PRAGMA application_id").fetchone()[0]
    version = conn.execute("PRAGMA user_version").fetchone()[0]
    tables = conn.execute("SELECT count(*) FROM sqlite_master").fetchone()[0]
    if app_id not in (0, APPLICATION_ID) or (app_id == 0 and tables > 0):
        raise StoreError(f"{path} is an SQLite file but not a scaleup campaign; nothing was "
                         "changed")
    if version > schema_version():
        raise StoreError(f"{path} was written by a newer scaleup (schema {version}; this "
                         f"version reads up to {schema_version()}); upgrade scaleup to open it")


def migrate(conn: sqlite3.Connection, path: Path | None = None) -> int:
    """Apply the pending migrations in one transaction; return the new version."""
    current = conn.execute("PRAGMA user_version").fetchone()[0]
    pending = [m for m in migrations() if m.version > current]
    if not pending:
        return current
    if current > 0 and path is not None:
        backup(conn, path.with_name(f"{path.name}.v{current}.bak"))
    conn.execute("BEGIN IMMEDIATE")
    try:
        for mig in pending:
            for statement in split_sql(mig.sql):
                conn.execute(statement)
        conn.execute(f"PRAGMA application_id = {APPLICATION_ID}")
        conn.execute(f"PRAGMA user_version = {pending[-1].version}")
        conn.execute("COMMIT")
    except BaseException:
        conn.execute("ROLLBACK")
        raise
    return pending[-1].version


def split_sql(script: str) -> list[str]:
    """Split a migration into statements (``executescript`` would commit on its own)."""
    statements, buffer = [], ""
    for line in script.splitlines(keepends=True):
        if line.strip().startswith("--") and not buffer.strip():
            continue
        buffer += line
        if sqlite3.complete_statement(buffer):
            if buffer.strip():
                statements.append(buffer.strip())
            buffer = ""
    if buffer.strip():
        statements.append(buffer.strip())
    return statements


def backup(conn: sqlite3.Connection, target: str | os.PathLike) -> Path:
    """Copy the open campaign to ``target`` with SQLite's online backup API."""
    target = Path(target)
    dest = sqlite3.connect(target)
    try:
        conn.backup(dest)
    finally:
        dest.close()
    return target


def check(conn: sqlite3.Connection) -> dict:
    """Integrity and foreign-key check; returns ``{"integrity": [...], "foreign_keys": [...]}``."""
    integrity = [row[0] for row in conn.execute("PRAGMA integrity_check")]
    fks = [dict(zip(("table", "rowid", "parent", "fk_index"), row, strict=False))
           for row in conn.execute("PRAGMA foreign_key_check")]
    return {"integrity": integrity, "foreign_keys": fks,
            "ok": integrity == ["ok"] and not fks,
            "schema_version": conn.execute("PRAGMA user_version").fetchone()[0]}
