"""Open a campaign file and bring its schema up to date.

The schema is built only by the numbered SQL files in ``db/migrations`` (shipped in the wheel
as :mod:`scaleup.migrations`); the version applied is kept in ``PRAGMA user_version``. Opening
an older file backs it up with SQLite's online backup API, then migrates it forward in one
transaction; opening a file from a newer version of the tool is refused.

Nothing is written to a file until it has been recognised as a campaign (or is being created):
a text file, an empty file, another program's SQLite file, a newer schema or a file marked
read-only is refused with a message and left exactly as it was.

Reads that carry a user's filter run under :func:`guarded_reads`: an SQLite authorizer that
permits only reading the campaign's own tables and views and a short list of functions, so
even an expression that slipped past the filter grammar could not write, attach another file,
run a pragma or load an extension.
"""

from __future__ import annotations

import os
import re
import sqlite3
import stat
import threading
from collections.abc import Iterator
from contextlib import contextmanager
from dataclasses import dataclass
from importlib import resources
from pathlib import Path

from scaleup.errors import InputError, StoreError

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
    from a newer version, or cannot be opened for writing; such a file is left unchanged.
    """
    path = Path(path)
    _check_file(path, create)
    try:
        conn = sqlite3.connect(path, timeout=BUSY_TIMEOUT_MS / 1000, isolation_level=None,
                               check_same_thread=False)
    except sqlite3.Error as exc:
        raise StoreError(f"cannot open {path}: {exc}") from exc
    try:
        conn.execute(f"PRAGMA busy_timeout = {BUSY_TIMEOUT_MS}")
        conn.execute("PRAGMA foreign_keys = ON")
        _check_identity(conn, path, create)
        mode = conn.execute("PRAGMA journal_mode = WAL").fetchone()[0]
        if mode.lower() != "wal":
            raise StoreError(f"{path}: cannot switch to WAL journal (got {mode})")
        conn.execute("PRAGMA synchronous = NORMAL")
        migrate(conn, path)
        conn.set_authorizer(_authorize)
    except sqlite3.DatabaseError as exc:
        conn.close()
        if is_busy(exc):
            raise StoreError(busy_message(path)) from exc
        raise StoreError(f"{path} is not a usable campaign file: {exc}; nothing was changed"
                         ) from exc
    except BaseException:
        conn.close()
        raise
    return conn


def _writable(path: Path) -> bool:
    """Writable, and not marked read-only: root ignores permission bits, we do not."""
    try:
        return os.access(path, os.W_OK) and bool(path.stat().st_mode & (stat.S_IWUSR
                                                                         | stat.S_IWGRP
                                                                         | stat.S_IWOTH))
    except OSError:
        return False


def _check_file(path: Path, create: bool) -> None:
    """Refuse, before SQLite touches it, a path that cannot hold a campaign we may write."""
    if path.is_dir():
        raise StoreError(f"{path} is a folder, not a campaign file")
    folder = path.parent if str(path.parent) else Path(".")
    exists = path.exists()
    if not exists and not create:
        raise StoreError(f"{path} does not exist; create it with `scaleup init {path}` "
                         "or build the demo with `scaleup demo`")
    if not folder.is_dir():
        raise StoreError(f"cannot use {path}: the folder {folder} does not exist")
    if exists:
        if not path.is_file():
            raise StoreError(f"{path} is not a regular file; nothing was changed")
        size = path.stat().st_size
        if size == 0 and not create:
            raise StoreError(f"{path} is an empty file, not a campaign; nothing was changed "
                             f"(create a campaign with `scaleup init NEW_FILE`)")
        if size > 0:
            try:
                with open(path, "rb") as fh:
                    header = fh.read(16)
            except OSError as exc:
                raise StoreError(f"cannot read {path}: {exc.strerror}") from exc
            if header != b"SQLite format 3\x00":
                raise StoreError(f"{path} is not a campaign file (not an SQLite database); "
                                 "nothing was changed")
        if not _writable(path):
            raise StoreError(f"{path} is read-only; copy it or change its permissions to edit "
                             "it; nothing was changed")
    # SQLite keeps its write-ahead log and lock files beside the campaign
    if not _writable(folder):
        what = "create" if not exists else "open"
        raise StoreError(f"cannot {what} {path}: the folder {folder} is read-only (a campaign "
                         "needs to write its journal beside it); nothing was changed")


def is_busy(exc: BaseException) -> bool:
    """True when SQLite gave up waiting for another program's lock."""
    text = str(exc).lower()
    return isinstance(exc, sqlite3.OperationalError) and ("locked" in text or "busy" in text)


def busy_message(path: Path | str | None = None) -> str:
    where = f"{path} " if path else "the campaign "
    return (f"{where}is busy: another program held it for more than "
            f"{BUSY_TIMEOUT_MS // 1000} s; nothing was written, please try again")


def failure_message(exc: BaseException) -> str | None:
    """A readable message for an SQLite error caused by the file or the disk, else None.

    None means the error is not the file's fault (a bug in a query, say) and should be
    reported as such rather than blamed on the user's file.
    """
    # constraint failures, misuse and bad SQL are not the file's fault
    if type(exc) not in (sqlite3.DatabaseError, sqlite3.OperationalError):
        return None
    text = str(exc).lower()
    if is_busy(exc):
        return busy_message()
    if "malformed" in text or "not a database" in text or "corrupt" in text:
        return (f"the campaign file is damaged ({exc}); nothing was written. Run `scaleup "
                "check` for a report and go back to a backup copy")
    if "full" in text:
        return "the disk is full; nothing was written"
    if "readonly" in text or "read-only" in text:
        return "the campaign file has become read-only; nothing was written"
    if "disk i/o" in text or "unable to open" in text:
        return (f"the disk reported an error ({exc}); nothing was written. Run `scaleup "
                "check` and keep a backup")
    return None


def _check_identity(conn: sqlite3.Connection, path: Path, create: bool = False) -> None:
    app_id = conn.execute("PRAGMA application_id").fetchone()[0]
    version = conn.execute("PRAGMA user_version").fetchone()[0]
    tables = conn.execute("SELECT count(*) FROM sqlite_master").fetchone()[0]
    if app_id not in (0, APPLICATION_ID) or (app_id == 0 and tables > 0):
        raise StoreError(f"{path} is an SQLite file but not a scaleup campaign; nothing was "
                         "changed")
    if version == 0 and tables == 0 and not create:
        # e.g. an `init` that was interrupted before its first transaction committed
        raise StoreError(f"{path} is an SQLite file that holds no campaign; nothing was "
                         "changed (create a campaign with `scaleup init NEW_FILE`)")
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
        # another program may have migrated the file while this one waited for the lock
        current = conn.execute("PRAGMA user_version").fetchone()[0]
        pending = [m for m in migrations() if m.version > current]
        if not pending:
            conn.execute("COMMIT")
            return current
        for mig in pending:
            for statement in split_sql(mig.sql):
                conn.execute(statement)
        conn.execute(f"PRAGMA application_id = {APPLICATION_ID}")
        conn.execute(f"PRAGMA user_version = {pending[-1].version}")
        conn.execute("COMMIT")
    except BaseException:
        if conn.in_transaction:
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
    """Copy the open campaign to ``target`` with SQLite's online backup API.

    The copy is written under a temporary name and renamed when complete, so a backup that is
    interrupted never leaves a half-written file under the name asked for.
    """
    target = Path(target)
    folder = target.parent if str(target.parent) else Path(".")
    if not folder.is_dir():
        raise InputError(f"the folder {folder} does not exist", "backup", str(target))
    if not _writable(folder):
        raise InputError(f"the folder {folder} is read-only", "backup", str(target))
    if target.is_dir():
        raise InputError(f"{target} is a folder; give a file name", "backup", str(target))
    partial = target.with_name(target.name + ".part")
    partial.unlink(missing_ok=True)
    try:
        dest = sqlite3.connect(partial)
        try:
            conn.backup(dest)
            dest.execute("PRAGMA journal_mode = DELETE")  # one self-contained file
        finally:
            dest.close()
        with open(partial, "rb+") as fh:
            os.fsync(fh.fileno())
        os.replace(partial, target)
    except BaseException:
        partial.unlink(missing_ok=True)
        raise
    return target


def check(conn: sqlite3.Connection) -> dict:
    """Integrity and foreign-key check; returns ``{"integrity": [...], "foreign_keys": [...]}``."""
    try:
        integrity = [row[0] for row in conn.execute("PRAGMA integrity_check")]
    except sqlite3.DatabaseError as exc:  # damaged beyond what the check can walk
        integrity = [f"the file cannot be read: {exc}"]
    try:
        fks = [dict(zip(("table", "rowid", "parent", "fk_index"), row, strict=False))
               for row in conn.execute("PRAGMA foreign_key_check")]
    except sqlite3.DatabaseError as exc:
        fks = [{"table": None, "rowid": None, "parent": None, "fk_index": None,
                "problem": f"references cannot be checked: {exc}"}]
    return {"integrity": integrity, "foreign_keys": fks,
            "ok": integrity == ["ok"] and not fks,
            "schema_version": conn.execute("PRAGMA user_version").fetchone()[0]}


# ---- the guarded read path ------------------------------------------------------------------
# Functions a generated read may call: the filter grammar produces only LIKE; the views use
# count and coalesce. Everything else (load_extension above all) is refused.
READ_FUNCTIONS = frozenset({"like", "count", "coalesce", "ifnull", "abs", "min", "max", "sum",
                            "avg", "total", "lower", "upper", "length", "round"})
_guard = threading.local()


def _authorize(action: int, arg1, arg2, database, source) -> int:
    """SQLite authorizer: a no-op unless this thread is inside :func:`guarded_reads`."""
    allowed = getattr(_guard, "tables", None)
    if allowed is None:
        return sqlite3.SQLITE_OK
    if action == sqlite3.SQLITE_SELECT:
        return sqlite3.SQLITE_OK
    if action == sqlite3.SQLITE_READ:
        # SQLite names no database when count(*) reads a table without a column
        if database in ("main", None) and arg1 in allowed:
            return sqlite3.SQLITE_OK
        where = f"{database}.{arg1}" if database not in (None, "main") else arg1
        return _deny(f"reads {where}, which is not one of the campaign's tables")
    if action == sqlite3.SQLITE_FUNCTION:
        if arg2.lower() in READ_FUNCTIONS:
            return sqlite3.SQLITE_OK
        return _deny(f"calls the function {arg2}()")
    if arg1 in ("sqlite_master", "sqlite_temp_master"):
        # asked first when a statement would create or drop something (pragma functions too)
        return _deny("changes the database schema or calls a pragma")
    return _deny(_ACTIONS.get(action, f"asks for SQLite action {action}")
                 + (f" ({arg1})" if isinstance(arg1, str) and arg1 else ""))


def _deny(reason: str) -> int:
    if _guard.refused is None:
        _guard.refused = reason
    return sqlite3.SQLITE_DENY


_ACTIONS = {
    sqlite3.SQLITE_ATTACH: "attaches another database file",
    sqlite3.SQLITE_DETACH: "detaches a database",
    sqlite3.SQLITE_PRAGMA: "runs a pragma",
    sqlite3.SQLITE_RECURSIVE: "uses a recursive query",
    sqlite3.SQLITE_INSERT: "writes (insert)", sqlite3.SQLITE_UPDATE: "writes (update)",
    sqlite3.SQLITE_DELETE: "writes (delete)", sqlite3.SQLITE_TRANSACTION: "opens a transaction",
    sqlite3.SQLITE_SAVEPOINT: "opens a savepoint", sqlite3.SQLITE_DROP_TABLE: "drops a table",
    sqlite3.SQLITE_DROP_VIEW: "drops a view", sqlite3.SQLITE_CREATE_TABLE: "creates a table",
    sqlite3.SQLITE_CREATE_TEMP_TABLE: "creates a table", sqlite3.SQLITE_ALTER_TABLE:
        "alters a table", sqlite3.SQLITE_CREATE_VIEW: "creates a view",
    sqlite3.SQLITE_CREATE_TRIGGER: "creates a trigger", sqlite3.SQLITE_CREATE_INDEX:
        "creates an index", sqlite3.SQLITE_CREATE_VTABLE: "creates a virtual table",
}


def campaign_tables(conn: sqlite3.Connection) -> frozenset[str]:
    """Names of the campaign's own tables and views (SQLite's internal tables excluded)."""
    return frozenset(r[0] for r in conn.execute(
        "SELECT name FROM main.sqlite_master WHERE type IN ('table', 'view') "
        "AND name NOT LIKE 'sqlite^_%' ESCAPE '^'"))


@contextmanager
def guarded_reads(conn: sqlite3.Connection) -> Iterator[None]:
    """Within this block, this thread may only read the campaign's tables and views.

    Anything else that SQLite is asked to prepare is refused; the refusal becomes an
    :class:`~scaleup.errors.InputError` naming what was attempted. Other threads using the same
    connection are not affected.
    """
    if getattr(_guard, "tables", None) is not None:  # already guarded further up
        yield
        return
    _guard.tables, _guard.refused = campaign_tables(conn), None
    try:
        yield
    except sqlite3.DatabaseError as exc:
        reason = _guard.refused
        if reason is None and "not authorized" not in str(exc):
            raise
        raise InputError(f"refused: the query {reason or 'is not a plain read'}; a filter may "
                         "only read the campaign's runs", "filter") from None
    finally:
        _guard.tables = _guard.refused = None
