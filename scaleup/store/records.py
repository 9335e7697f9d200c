"""Reading and writing records, every change audited, every delete soft.

Each write runs inside :func:`transaction` (a SAVEPOINT, so calls nest and a failure rolls
back everything of the outer operation). Updates check the row version read by the caller,
so an edit made meanwhile by another process is refused instead of overwritten.
"""

from __future__ import annotations

import json
import re
import sqlite3
from collections.abc import Iterator
from contextlib import contextmanager
from typing import Any

from scaleup.errors import ConflictError, InputError, NotFound

# tables whose rows are soft-deleted and versioned
VERSIONED = ("vessel", "medium", "run", "curve", "offgas", "flux", "fit", "study")
_savepoint_counter = 0


@contextmanager
def transaction(conn: sqlite3.Connection) -> Iterator[sqlite3.Connection]:
    """All or nothing: commit on success, roll back on any exception (KeyboardInterrupt too)."""
    global _savepoint_counter
    _savepoint_counter += 1
    name = f"sp{_savepoint_counter}"
    outer = not conn.in_transaction
    if outer:
        conn.execute("BEGIN IMMEDIATE")
    conn.execute(f"SAVEPOINT {name}")
    try:
        yield conn
    except BaseException:
        conn.execute(f"ROLLBACK TO {name}")
        conn.execute(f"RELEASE {name}")
        if outer:
            conn.execute("ROLLBACK")
        raise
    else:
        conn.execute(f"RELEASE {name}")
        if outer:
            conn.execute("COMMIT")


def rows(conn: sqlite3.Connection, sql: str, params: tuple | dict = ()) -> list[dict]:
    cur = conn.execute(sql, params)
    names = [d[0] for d in cur.description]
    return [dict(zip(names, r, strict=True)) for r in cur.fetchall()]


def get(conn: sqlite3.Connection, table: str, record_id: int, *,
        include_deleted: bool = False) -> dict:
    found = rows(conn, f"SELECT * FROM {table} WHERE id = ?", (record_id,))
    if not found or (not include_deleted and found[0].get("deleted_at")):
        raise NotFound(f"{table} {record_id} does not exist"
                       + (" (it is deleted; restore it first)" if found else ""))
    return found[0]


def _audit(conn, table, record_id, action, old, new, actor):
    conn.execute(
        "INSERT INTO audit_log (actor, table_name, record_id, action, old_json, new_json)"
        " VALUES (?, ?, ?, ?, ?, ?)",
        (actor, table, record_id, action, _dump(old), _dump(new)))


def _dump(record: dict | None) -> str | None:
    if record is None:
        return None
    return json.dumps({k: (None if isinstance(v, bytes) else v) for k, v in record.items()},
                      sort_keys=True)


def insert(conn: sqlite3.Connection, table: str, values: dict[str, Any], *,
           actor: str = "", action: str = "insert") -> int:
    """Insert one record and audit it; returns its id."""
    columns = list(values)
    sql = (f"INSERT INTO {table} ({', '.join(columns)}) "
           f"VALUES ({', '.join('?' for _ in columns)})")
    with transaction(conn):
        try:
            cur = conn.execute(sql, [values[c] for c in columns])
        except sqlite3.IntegrityError as exc:
            raise constraint_error(exc, table, values) from exc
        record_id = cur.lastrowid
        if table in VERSIONED or table in ("impeller", "sparger", "medium_salt"):
            _audit(conn, table, record_id, action, None, get(conn, table, record_id,
                                                              include_deleted=True), actor)
    return record_id


def update(conn: sqlite3.Connection, table: str, record_id: int, changes: dict[str, Any], *,
           expected_version: int | None = None, actor: str = "") -> dict:
    """Change fields of one record; refuse if its row version moved since it was read."""
    with transaction(conn):
        old = get(conn, table, record_id)
        if expected_version is not None and old["row_version"] != expected_version:
            raise ConflictError(conflict_message(table, record_id, old, changes,
                                                 expected_version))
        changes = {k: v for k, v in changes.items() if old.get(k) != v}
        if not changes:
            return old
        sets = ", ".join(f"{c} = ?" for c in changes)
        extra = ", row_version = row_version + 1"
        if "updated_at" in old:
            extra += ", updated_at = strftime('%Y-%m-%dT%H:%M:%fZ', 'now')"
        try:
            cur = conn.execute(
                f"UPDATE {table} SET {sets}{extra} WHERE id = ? AND row_version = ?",
                [*changes.values(), record_id, old["row_version"]])
        except sqlite3.IntegrityError as exc:
            raise constraint_error(exc, table, changes) from exc
        if cur.rowcount != 1:
            now = get(conn, table, record_id, include_deleted=True)
            raise ConflictError(conflict_message(table, record_id, now, changes,
                                                 old["row_version"]))
        new = get(conn, table, record_id)
        _audit(conn, table, record_id, "update", old, new, actor)
    return new


def conflict_message(table, record_id, current, changes, expected_version) -> str:
    diffs = "; ".join(f"{k}: stored {current.get(k)!r}, yours {v!r}" for k, v in changes.items())
    return (f"{table} {record_id} was changed elsewhere since you read it (version "
            f"{expected_version} -> {current['row_version']}); nothing was written. {diffs}")


def soft_delete(conn: sqlite3.Connection, table: str, record_id: int, *, actor: str = "") -> dict:
    with transaction(conn):
        old = get(conn, table, record_id)
        conn.execute(f"UPDATE {table} SET deleted_at = strftime('%Y-%m-%dT%H:%M:%fZ', 'now'), "
                     "row_version = row_version + 1 WHERE id = ?", (record_id,))
        new = get(conn, table, record_id, include_deleted=True)
        _audit(conn, table, record_id, "delete", old, new, actor)
    return new


def restore(conn: sqlite3.Connection, table: str, record_id: int, *, actor: str = "") -> dict:
    with transaction(conn):
        old = get(conn, table, record_id, include_deleted=True)
        if not old.get("deleted_at"):
            raise InputError(f"{table} {record_id} is not deleted; nothing to restore")
        conn.execute(f"UPDATE {table} SET deleted_at = NULL, row_version = row_version + 1 "
                     "WHERE id = ?", (record_id,))
        new = get(conn, table, record_id)
        _audit(conn, table, record_id, "restore", old, new, actor)
    return new


def last_change(conn: sqlite3.Connection, actor: str | None = None) -> dict | None:
    """The newest audited change (for undo)."""
    sql = "SELECT * FROM audit_log"
    params: tuple = ()
    if actor is not None:
        sql += " WHERE actor = ?"
        params = (actor,)
    found = rows(conn, sql + " ORDER BY id DESC LIMIT 1", params)
    return found[0] if found else None


_CHECK = re.compile(r"CHECK constraint failed: (.*)$")


def constraint_error(exc: sqlite3.IntegrityError, table: str, values: dict) -> InputError:
    """Turn an SQLite constraint failure into a message that names the field."""
    text = str(exc)
    m = _CHECK.search(text)
    if m:
        expr = m.group(1)
        column = next((c for c in values if re.search(rf"\b{re.escape(c)}\b", expr)), None)
        value = values.get(column) if column else None
        return InputError(f"{value!r} is not allowed ({expr})", f"{table}.{column}"
                          if column else table, value)
    if "UNIQUE" in text:
        cols = text.split(":", 1)[-1].strip()
        return InputError(f"a record with the same {cols} already exists", table)
    if "FOREIGN KEY" in text:
        return InputError("refers to a record that does not exist", table)
    if "NOT NULL" in text:
        return InputError(f"{text.split(':', 1)[-1].strip()} is required", table)
    return InputError(text, table)
