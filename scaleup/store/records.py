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

from scaleup.errors import ConflictError, InputError, NotFound, StoreError
from scaleup.store import db

# tables whose rows are soft-deleted and versioned
VERSIONED = ("vessel", "medium", "run", "curve", "offgas", "flux", "fit", "study")
# rows that belong to a versioned record and are replaced with it, never soft-deleted:
# table -> (parent table, column naming the parent)
CHILDREN = {"impeller": ("vessel", "vessel_id"), "sparger": ("vessel", "vessel_id"),
            "medium_salt": ("medium", "medium_id")}
_IDENTIFIER = re.compile(r"^[a-z_][a-z0-9_]*$")
_savepoint_counter = 0


@contextmanager
def transaction(conn: sqlite3.Connection) -> Iterator[sqlite3.Connection]:
    """All or nothing: commit on success, roll back on any exception (KeyboardInterrupt too).

    The outermost call takes the write lock at once (``BEGIN IMMEDIATE``), so two programs
    never both read a record and then race to write it; waiting for the other one's lock is
    bounded by the busy timeout, after which :class:`StoreError` says the file is busy.
    """
    global _savepoint_counter
    _savepoint_counter += 1
    name = f"sp{_savepoint_counter}"
    outer = not conn.in_transaction
    if outer:
        try:
            conn.execute("BEGIN IMMEDIATE")
        except sqlite3.OperationalError as exc:
            raise _store_error(exc) from exc
    conn.execute(f"SAVEPOINT {name}")
    try:
        yield conn
    except BaseException as exc:
        _roll_back(conn, name, outer)
        if isinstance(exc, sqlite3.OperationalError):
            raise _store_error(exc) from exc
        raise
    else:
        conn.execute(f"RELEASE {name}")
        if outer:
            try:
                conn.execute("COMMIT")
            except sqlite3.OperationalError as exc:
                _roll_back(conn, None, True)
                raise _store_error(exc) from exc


def _roll_back(conn: sqlite3.Connection, savepoint: str | None, outer: bool) -> None:
    """Undo to the savepoint (and the whole transaction if outermost), whatever SQLite did.

    Some errors (a full disk, an interrupt) make SQLite roll back on its own; then there is no
    savepoint left to roll back to, and trying would hide the real error.
    """
    if not conn.in_transaction:
        return
    try:
        if savepoint is not None:
            conn.execute(f"ROLLBACK TO {savepoint}")
            conn.execute(f"RELEASE {savepoint}")
        if outer:
            conn.execute("ROLLBACK")
    except sqlite3.OperationalError:
        if outer and conn.in_transaction:
            conn.execute("ROLLBACK")


def _store_error(exc: sqlite3.OperationalError) -> StoreError:
    """A readable reason for what SQLite refused (busy, disk full, read-only ...)."""
    message = db.failure_message(exc)
    return StoreError(message or f"the campaign could not be written ({exc}); nothing was "
                                 "written")


def _name(identifier: str) -> str:
    """A table or column name, checked: names are pasted into SQL, values never are."""
    if not isinstance(identifier, str) or not _IDENTIFIER.match(identifier):
        raise InputError(f"{identifier!r} is not a known field name", "field")
    return identifier


def _execute(conn: sqlite3.Connection, sql: str, params: tuple | dict) -> sqlite3.Cursor:
    try:
        return conn.execute(sql, params)
    except OverflowError:  # an id or count typed beyond what SQLite stores (2**63 - 1)
        raise InputError("a number given is too large (at most 9223372036854775807)") from None


def rows(conn: sqlite3.Connection, sql: str, params: tuple | dict = ()) -> list[dict]:
    cur = _execute(conn, sql, params)
    names = [d[0] for d in cur.description]
    return [dict(zip(names, r, strict=True)) for r in cur.fetchall()]


def read_rows(conn: sqlite3.Connection, sql: str, params: tuple | list | dict = ()) -> list[dict]:
    """Run a read that carries a user's filter under the read-only authorizer.

    The marker comment gives these statements their own entries in the statement cache, so a
    guarded read is always prepared (and so authorized) under the guard.
    """
    with db.guarded_reads(conn):
        return rows(conn, "/* guarded read */ " + sql,
                    tuple(params) if isinstance(params, list) else params)


def read_columns(conn: sqlite3.Connection, sql: str, params: tuple | list | dict = ()
                 ) -> dict[str, list]:
    """:func:`read_rows` as ``{column: [values]}``, without a dict per row (a fit over
    100,000 runs reads a dozen columns)."""
    with db.guarded_reads(conn):
        cur = _execute(conn, "/* guarded read */ " + sql,
                       tuple(params) if isinstance(params, list) else params)
        names = [d[0] for d in cur.description]
        found = cur.fetchall()
    return {name: list(values) for name, values in zip(
        names, zip(*found, strict=True) if found else [()] * len(names), strict=True)}


def get(conn: sqlite3.Connection, table: str, record_id: int, *,
        include_deleted: bool = False) -> dict:
    found = rows(conn, f"SELECT * FROM {_name(table)} WHERE id = ?", (record_id,))
    if not found or (not include_deleted and found[0].get("deleted_at")):
        raise NotFound(f"{table} {record_id} does not exist"
                       + (" (it is deleted; restore it first)" if found else ""))
    return found[0]


def _audit(conn, table, record_id, action, old, new, actor):
    conn.execute(
        "INSERT INTO audit_log (actor, table_name, record_id, action, old_json, new_json)"
        " VALUES (?, ?, ?, ?, ?, ?)",
        (actor, table, record_id, action, _dump(old), _dump(new)))


def _no_bytes(value: object) -> None:
    """Blobs (curve samples) are not copied into the audit log."""
    if isinstance(value, bytes):
        return None
    raise TypeError(f"Object of type {type(value).__name__} is not JSON serializable")


# one encoder for every audit row (json.dumps would build one per call)
_ENCODER = json.JSONEncoder(sort_keys=True, default=_no_bytes)


def _dump(record: dict | None) -> str | None:
    """A record as audit JSON, without its blobs (curve samples): they are not copied into
    the log, and a field left out is one that undo leaves alone."""
    if record is None:
        return None
    return _ENCODER.encode({k: v for k, v in record.items() if not isinstance(v, bytes)})


def _plain_columns(conn: sqlite3.Connection, table: str) -> str:
    """The table's columns but its blobs, for reads whose rows go to the audit log."""
    names = [r[1] for r in conn.execute(f"PRAGMA table_info({_name(table)})")
             if r[2].upper() != "BLOB"]
    return ", ".join(_name(n) for n in names)


def insert(conn: sqlite3.Connection, table: str, values: dict[str, Any], *,
           actor: str = "", action: str = "insert") -> int:
    """Insert one record and audit it; returns its id."""
    return insert_many(conn, table, [values], actor=actor, action=action)[0]


def insert_many(conn: sqlite3.Connection, table: str, many: list[dict[str, Any]], *,
                actor: str = "", action: str = "insert") -> list[int]:
    """Insert records in order and audit each as :func:`insert` does; returns their ids.

    One transaction, the stored rows read back in chunks and the audit rows written by one
    ``executemany``: an import of 100,000 runs would otherwise spend most of its time in
    five statements per row.
    """
    statements: dict[tuple[str, ...], str] = {}
    ids = []
    with transaction(conn):
        for values in many:
            columns = tuple(values)
            sql = statements.get(columns)
            if sql is None:
                names = [_name(c) for c in columns]
                sql = statements[columns] = (f"INSERT INTO {_name(table)} ({', '.join(names)}) "
                                             f"VALUES ({', '.join('?' for _ in names)})")
            try:
                cur = conn.execute(sql, [values[c] for c in columns])
            except sqlite3.IntegrityError as exc:
                raise constraint_error(exc, table, values) from exc
            except OverflowError:
                raise _too_large(values) from None
            ids.append(cur.lastrowid)
        if table in VERSIONED or table in CHILDREN:
            stored = _stored(conn, table, ids)
            conn.executemany(
                "INSERT INTO audit_log (actor, table_name, record_id, action, old_json, "
                "new_json) VALUES (?, ?, ?, ?, ?, ?)",
                [(actor, table, i, action, None, _dump(stored[i])) for i in ids])
    return ids


def _stored(conn: sqlite3.Connection, table: str, ids: list[int], columns: str = "*"
            ) -> dict[int, dict]:
    """The stored rows of ``ids`` by id: one range read when they are consecutive (as new
    rows under the write lock are), else in chunks."""
    if ids and max(ids) - min(ids) == len(ids) - 1 and len(set(ids)) == len(ids):
        found = rows(conn, f"SELECT {columns} FROM {table} WHERE id BETWEEN ? AND ?",
                     (min(ids), max(ids)))
    else:
        chunks = [tuple(ids[start:start + 500]) for start in range(0, len(ids), 500)]
        found = [row for chunk in chunks for row in rows(
            conn, f"SELECT {columns} FROM {table} WHERE id IN ({', '.join('?' * len(chunk))})",
            chunk)]
    return {row["id"]: row for row in found}


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
        _apply(conn, table, record_id, changes, old["row_version"],
               _update_sql(table, tuple(changes), "updated_at" in old))
        new = get(conn, table, record_id)
        _audit(conn, table, record_id, "update", old, new, actor)
    return new


def update_many(conn: sqlite3.Connection, table: str, changes: dict[int, dict[str, Any]], *,
                actor: str = "") -> dict[int, dict]:
    """:func:`update` for many records (``{id: {field: value}}``) in one transaction, each
    changed record audited as :func:`update` audits it.

    The rows are read before and after in chunks (without their blobs, which the audit log
    does not keep), one UPDATE runs per record that changes, and the audit rows are written
    by one ``executemany``: analysing 10,000 stored curves would otherwise spend seconds in
    five statements per record. Returns the records as they are now, by id (without blobs).
    """
    ids = list(changes)
    columns = _plain_columns(conn, table)
    statements: dict[tuple[str, ...], str] = {}
    with transaction(conn):
        old = _stored(conn, table, ids, columns)
        for record_id in ids:
            if record_id not in old or old[record_id].get("deleted_at"):
                raise NotFound(f"{table} {record_id} does not exist"
                               + (" (it is deleted; restore it first)" if record_id in old
                                  else ""))
        changed = []
        for record_id in ids:
            before = old[record_id]
            diff = {k: v for k, v in changes[record_id].items()
                    if k not in before or before[k] != v}
            if not diff:
                continue
            names = tuple(diff)
            sql = statements.get(names)
            if sql is None:
                sql = statements[names] = _update_sql(table, names, "updated_at" in before)
            _apply(conn, table, record_id, diff, before["row_version"], sql)
            changed.append(record_id)
        new = _stored(conn, table, changed, columns)
        conn.executemany(
            "INSERT INTO audit_log (actor, table_name, record_id, action, old_json, new_json)"
            " VALUES (?, ?, ?, ?, ?, ?)",
            [(actor, table, i, "update", _dump(old[i]), _dump(new[i])) for i in changed])
    return {i: new.get(i, old[i]) for i in ids}


def _update_sql(table: str, names: tuple[str, ...], stamped: bool) -> str:
    """UPDATE of the fields ``names`` of one record at its row version, raising the version
    (and the update time where the table has one)."""
    extra = ", row_version = row_version + 1"
    if stamped:
        extra += ", updated_at = strftime('%Y-%m-%dT%H:%M:%fZ', 'now')"
    return (f"UPDATE {_name(table)} SET {', '.join(f'{_name(c)} = ?' for c in names)}{extra}"
            " WHERE id = ? AND row_version = ?")


def _apply(conn: sqlite3.Connection, table: str, record_id: int, changes: dict,
           version: int, sql: str) -> None:
    """Run an :func:`_update_sql` statement; a refused value names its field, and a record
    whose version moved meanwhile is a conflict."""
    try:
        cur = conn.execute(sql, [*changes.values(), record_id, version])
    except sqlite3.IntegrityError as exc:
        raise constraint_error(exc, table, changes) from exc
    except OverflowError:
        raise _too_large(changes) from None
    if cur.rowcount != 1:
        now = get(conn, table, record_id, include_deleted=True)
        raise ConflictError(conflict_message(table, record_id, now, changes, version))


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


def replace_children(conn: sqlite3.Connection, table: str, parent_id: int,
                     new_rows: list[dict[str, Any]], *, expected_version: int | None = None,
                     actor: str = "") -> dict:
    """Replace every ``table`` row of one parent (the impellers of a vessel, say) at once.

    The old rows are deleted and the new ones inserted, each audited; then the parent's row
    version is raised and audited as an update whose old and new records carry the child rows
    under the table's name, so another editor holding the old version is refused and undo can
    put the old rows back. Returns the parent as it is now.
    """
    parent_table, key = CHILDREN[table]
    with transaction(conn):
        parent = get(conn, parent_table, parent_id)
        if expected_version is not None and parent["row_version"] != expected_version:
            raise ConflictError(conflict_message(parent_table, parent_id, parent,
                                                 {table: new_rows}, expected_version))
        old_rows = rows(conn, f"SELECT * FROM {_name(table)} WHERE {key} = ? ORDER BY id",
                        (parent_id,))
        for old in old_rows:
            conn.execute(f"DELETE FROM {table} WHERE id = ?", (old["id"],))
            _audit(conn, table, old["id"], "delete", old, None, actor)
        for values in new_rows:
            insert(conn, table, {**values, key: parent_id}, actor=actor)
        stored = rows(conn, f"SELECT * FROM {table} WHERE {key} = ? ORDER BY id", (parent_id,))
        extra = (", updated_at = strftime('%Y-%m-%dT%H:%M:%fZ', 'now')"
                 if "updated_at" in parent else "")
        conn.execute(f"UPDATE {parent_table} SET row_version = row_version + 1{extra} "
                     "WHERE id = ?", (parent_id,))
        new = get(conn, parent_table, parent_id)
        _audit(conn, parent_table, parent_id, "update", {**parent, table: old_rows},
               {**new, table: stored}, actor)
    return new


def last_change(conn: sqlite3.Connection, actor: str | None = None) -> dict | None:
    """The newest audited change of a versioned record (for undo).

    Rows of child tables are written in the same transaction as their parent's insert or
    version change, so the parent's entry stands for the whole change.
    """
    sql = f"SELECT * FROM audit_log WHERE table_name IN ({', '.join('?' for _ in VERSIONED)})"
    params: tuple = VERSIONED
    if actor is not None:
        sql += " AND actor = ?"
        params = (*VERSIONED, actor)
    found = rows(conn, sql + " ORDER BY id DESC LIMIT 1", params)
    return found[0] if found else None


def _too_large(values: dict) -> InputError:
    big = next((k for k, v in values.items() if isinstance(v, int) and abs(v) >= 2**63), None)
    return InputError("is too large to store (at most 9223372036854775807)", big, values.get(big))


def unchanged_since(conn: sqlite3.Connection, change: dict) -> None:
    """Refuse to undo ``change`` (an audit row) if its record was changed after it by anyone.

    Undo writes the old values back; over a later edit from another program that would be a
    lost update, so it is refused with who changed what, and nothing is written.
    """
    newest = rows(conn, "SELECT id, actor, at, action FROM audit_log WHERE table_name = ? AND "
                        "record_id = ? ORDER BY id DESC LIMIT 1",
                  (change["table_name"], change["record_id"]))
    if newest and newest[0]["id"] != change["id"]:
        later = newest[0]
        raise ConflictError(
            f"{change['table_name']} {change['record_id']} was changed after your "
            f"{change['action']} ({later['action']} by {later['actor'] or 'someone'} at "
            f"{later['at']}); undoing would overwrite that change, so nothing was written")


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
