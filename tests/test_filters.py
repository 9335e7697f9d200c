"""Safe filters: the grammar refuses SQL, the read-only authorizer refuses what slips past it."""

from __future__ import annotations

import sqlite3

import pytest
from hypothesis import given, settings
from hypothesis import strategies as st

from scaleup.errors import InputError
from scaleup.store import db, records
from scaleup.store.filters import COLUMNS, MAX_DEPTH, compile_filter

from .conftest import add_run


@pytest.fixture
def three_runs(campaign):
    for rpm in (300, 500, 700):
        add_run(campaign, speed=f"{rpm} rpm")
    return campaign


def _tables(campaign) -> set[str]:
    return {r["name"] for r in campaign.rows("SELECT name FROM sqlite_master")}


@pytest.mark.parametrize("text,refusal", [
    ("1=1; DROP TABLE run", "semicolon"),
    ("id = 1; DROP TABLE run", "semicolon"),
    ("id = 1 or 1=1", "expected a column name"),
    ("load_extension('/tmp/evil.so')", "function call"),
    ("id = load_extension('/tmp/evil.so')", "function call"),
    ("ATTACH DATABASE '/tmp/other.db' AS other", '"ATTACH" is SQL'),
    ("pragma writable_schema = 1", '"pragma" is SQL'),
    ("id in (select id from other.run)", "not subqueries"),
    ("id in (SELECT id FROM run)", "not subqueries"),
    ("exists (select 1)", "function call"),
    ("vessel = 'x' union select * from sqlite_master", 'cannot use "*"'),
    ("vessel = 'V' -- comment", 'cannot use "-"'),
    ("speed > 300 rpm /* hidden */", 'cannot use "*"'),
    ("sqlite_version() = 1", "function call"),
    ("speed_rps > 5 and not", "expected a column name"),
    ("(" * (MAX_DEPTH + 1) + "id = 1" + ")" * (MAX_DEPTH + 1), "nested more than"),
    ("not " * (MAX_DEPTH + 1) + "id = 1", "nested more than"),
    ("id = 1 " + "or id = 1 " * 400, "longer than"),
    ("speed > 300 kg", "mass"),
    ("vessel > 3 rpm", "takes no unit"),
    ("unknown_column = 3", 'unknown column "unknown_column"'),
])
def test_adversarial_filters_are_refused_and_nothing_changes(three_runs, text, refusal):
    before = (_tables(three_runs), three_runs.summary())
    with pytest.raises(InputError, match="filter") as info:
        three_runs.runs(text)
    assert refusal.lower() in str(info.value).lower()
    assert "position" in str(info.value) or "longer" in str(info.value)
    assert (_tables(three_runs), three_runs.summary()) == before


@pytest.mark.parametrize("text,n", [
    ("speed > 400 rpm", 2),
    ("speed between 400 rpm and 600 rpm", 1),
    ("speed in (300 rpm, 700 rpm)", 2),
    ("vessel like 'T-%' and not (speed < 6)", 2),
    ("kla is null", 3),
    ("(speed > 600 rpm or speed < 400 rpm) and temperature >= 30 degC", 2),
    ("notes = 'it''s'", 0),
    ('vessel = "T-20"', 3),
    ("speed > 1e999", 0),
    ("", 3),
])
def test_allowed_grammar_gives_right_counts(three_runs, text, n):
    assert three_runs.count_runs(text) == n
    assert len(three_runs.runs(text)) == n


def test_literals_are_bound_never_pasted():
    sql, params = compile_filter("vessel = 'x'' OR 1=1 --'")
    assert sql == "vessel = ?" and params == ["x' OR 1=1 --"]


# ---- defence in depth: the authorizer on the read path, fed raw SQL directly ---------------
@pytest.mark.parametrize("sql,what", [
    ("SELECT * FROM run_view WHERE load_extension('/tmp/evil.so') IS NULL", "load_extension"),
    ("SELECT * FROM run_view WHERE id IN (SELECT 1 FROM sqlite_master)", "sqlite_master"),
    ("SELECT * FROM run_view WHERE (SELECT count(*) FROM pragma_table_info('run')) > 0",
     "pragma"),
    ("SELECT * FROM temp.sqlite_master", "sqlite_temp_master"),
    ("PRAGMA writable_schema = 1", "pragma"),
    ("ATTACH DATABASE ':memory:' AS other", "attaches"),
    ("DROP TABLE run", "schema"),
    ("DELETE FROM run", "writes"),
    ("UPDATE run SET speed_rps = 1", "writes"),
    ("INSERT INTO audit_log (table_name, record_id, action) VALUES ('x', 1, 'insert')",
     "writes"),
    ("CREATE TABLE evil (x)", "schema"),
    ("WITH RECURSIVE t(x) AS (SELECT 1 UNION ALL SELECT x + 1 FROM t) SELECT x FROM t",
     "recursive"),
    ("SELECT * FROM run_view WHERE sqlite_version() > ''", "sqlite_version"),
    ("BEGIN", "transaction"),
])
def test_authorizer_refuses_everything_but_plain_reads(three_runs, sql, what):
    before = (_tables(three_runs), three_runs.summary())
    with pytest.raises(InputError, match="refused") as info:
        records.read_rows(three_runs.conn, sql)
    assert what in str(info.value)
    assert (_tables(three_runs), three_runs.summary()) == before
    assert not three_runs.conn.in_transaction


def test_authorizer_refuses_reads_of_an_attached_file(three_runs, tmp_path):
    other = tmp_path / "other.db"
    with sqlite3.connect(other) as raw:
        raw.execute("CREATE TABLE run (id)")
    # attached outside the guard (as an attacker with code execution could), read inside it
    three_runs.conn.execute("ATTACH DATABASE ? AS other", (str(other),))
    try:
        with pytest.raises(InputError, match="other.run"):
            records.read_rows(three_runs.conn, "SELECT * FROM run_view WHERE id IN "
                                               "(SELECT id FROM other.run)")
    finally:
        three_runs.conn.execute("DETACH DATABASE other")


def test_guard_lets_the_known_reads_through_and_is_lifted_afterwards(three_runs):
    assert len(records.read_rows(three_runs.conn, "SELECT r.*, v.name FROM run r JOIN vessel v "
                                                  "ON v.id = r.vessel_id")) == 3
    # outside the guard the connection works as before: writes, pragmas
    add_run(three_runs, speed="900 rpm")
    assert three_runs.conn.execute("PRAGMA user_version").fetchone()[0] == db.schema_version()


def test_guard_is_per_thread(three_runs):
    """A worker thread writing on the same connection is not refused by a guarded read."""
    import threading

    errors, started, release = [], threading.Event(), threading.Event()

    def slow_read():
        with db.guarded_reads(three_runs.conn):
            started.set()
            release.wait(5)

    reader = threading.Thread(target=slow_read)
    reader.start()
    started.wait(5)
    try:
        add_run(three_runs, speed="800 rpm")
    except Exception as exc:  # noqa: BLE001 - recorded and asserted below
        errors.append(exc)
    finally:
        release.set()
        reader.join()
    assert errors == [] and three_runs.count_runs() == 4


# ---- random text: a result or a clear refusal, and the SQL produced always runs ----------------
_PIECES = st.sampled_from([*COLUMNS, "speed", "kla", "temp", "and", "or", "not", "(", ")", ",",
                           "=", "<", ">=", "!=", "between", "in", "like", "is", "null", "'V-%'",
                           "300", "-1e3", "rpm", "1/h", "degC", ";", "--", "select", "drop",
                           "attach", "load_extension", "'", '"', "*", "?", ":x", "\x00", "é"])


@settings(max_examples=300, deadline=None)
@given(st.one_of(st.text(max_size=80), st.lists(_PIECES, max_size=14).map(" ".join)))
def test_random_filters_compile_or_are_refused_clearly(text):
    try:
        sql, params = compile_filter(text)
    except InputError as exc:
        assert str(exc).startswith("filter:")
        return
    conn = sqlite3.connect(":memory:")
    conn.execute(f"CREATE TABLE run_view ({', '.join(COLUMNS)})")
    conn.execute(f"SELECT * FROM run_view WHERE {sql}", params).fetchall()
    assert sql.count("?") == len(params)
