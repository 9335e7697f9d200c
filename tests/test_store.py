"""The campaign file: migrations, constraints, audit log, soft delete, identity checks."""

from __future__ import annotations

import sqlite3

import pytest

from scaleup.campaign import Campaign
from scaleup.errors import ConflictError, InputError, NotFound, StoreError
from scaleup.store import db, records

from .conftest import add_run


def test_new_file_has_current_schema_and_pragmas(tmp_path):
    with Campaign.create(tmp_path / "a.db") as c:
        assert c.conn.execute("PRAGMA user_version").fetchone()[0] == db.schema_version()
        assert c.conn.execute("PRAGMA foreign_keys").fetchone()[0] == 1
        assert c.conn.execute("PRAGMA journal_mode").fetchone()[0] == "wal"
        assert c.conn.execute("PRAGMA busy_timeout").fetchone()[0] == db.BUSY_TIMEOUT_MS
        tables = {r[0] for r in c.conn.execute("SELECT name FROM sqlite_master WHERE type='table'")}
    assert {"vessel", "impeller", "sparger", "medium", "medium_salt", "run", "curve", "offgas",
            "flux", "fit", "fit_run", "study", "audit_log"} <= tables


def test_migration_from_previous_version_keeps_data_and_backs_up(tmp_path, monkeypatch):
    """Build a file at version N-1 by hand, then open it with the full set of migrations."""
    path = tmp_path / "old.db"
    all_migrations = db.migrations()
    extra = db.Migration(len(all_migrations) + 1, "add_probe",
                         "CREATE TABLE probe (id INTEGER PRIMARY KEY, name TEXT NOT NULL);")
    with Campaign.create(path) as c:
        c.add_medium({"name": "keep me"})
    monkeypatch.setattr(db, "migrations", lambda: [*all_migrations, extra])
    with Campaign(path) as c:
        assert c.conn.execute("PRAGMA user_version").fetchone()[0] == extra.version
        assert c.medium("keep me")["name"] == "keep me"
        c.conn.execute("INSERT INTO probe (name) VALUES ('p1')")
    backup = path.with_name(f"old.db.v{len(all_migrations)}.bak")
    assert backup.exists()
    with sqlite3.connect(backup) as old:
        assert old.execute("PRAGMA user_version").fetchone()[0] == len(all_migrations)


def test_failed_migration_changes_nothing(tmp_path, monkeypatch):
    path = tmp_path / "old.db"
    all_migrations = db.migrations()
    with Campaign.create(path) as c:
        c.add_medium({"name": "keep me"})
    broken = db.Migration(len(all_migrations) + 1, "broken",
                          "CREATE TABLE x (id INTEGER);\nINSERT INTO nowhere VALUES (1);")
    monkeypatch.setattr(db, "migrations", lambda: [*all_migrations, broken])
    with pytest.raises(StoreError):
        Campaign(path)
    monkeypatch.undo()
    with Campaign(path) as c:
        assert c.conn.execute("PRAGMA user_version").fetchone()[0] == len(all_migrations)
        assert not c.rows("SELECT name FROM sqlite_master WHERE name = 'x'")


def test_newer_file_is_refused(tmp_path):
    path = tmp_path / "new.db"
    Campaign.create(path).close()
    with sqlite3.connect(path) as raw:
        raw.execute("PRAGMA user_version = 99")
    with pytest.raises(StoreError, match="newer scaleup"):
        Campaign(path)


@pytest.mark.parametrize("content,message", [
    (b"hello, this is a text file\n", "not an SQLite database"),
    (b"SQLite format 3\x00" + b"\x00" * 100, "not a usable campaign"),
])
def test_not_a_campaign(tmp_path, content, message):
    path = tmp_path / "x.db"
    path.write_bytes(content)
    before = path.read_bytes()
    with pytest.raises(StoreError, match=message):
        Campaign(path)
    assert path.read_bytes() == before


def test_foreign_sqlite_file_is_refused(tmp_path):
    path = tmp_path / "other.db"
    with sqlite3.connect(path) as raw:
        raw.execute("CREATE TABLE t (a)")
    with pytest.raises(StoreError, match="not a scaleup campaign"):
        Campaign(path)


def test_missing_file_and_folder(tmp_path):
    with pytest.raises(StoreError, match="does not exist"):
        Campaign(tmp_path / "nope.db")
    with pytest.raises(StoreError, match="is a folder"):
        Campaign(tmp_path)


@pytest.mark.parametrize("sql,params", [
    ("INSERT INTO vessel (name, tank_diameter_m, liquid_height_m) VALUES (?, ?, ?)",
     ("neg", -1.0, 1.0)),
    ("INSERT INTO run (vessel_id, medium_id, run_at, speed_rps, gas_flow_mol_s, o2_fraction_in,"
     " temperature_k) VALUES (1, 1, '2026-01-01', 5, 0.1, 1.5, 300)", ()),
    ("INSERT INTO run (vessel_id, medium_id, run_at, speed_rps, gas_flow_mol_s, temperature_k)"
     " VALUES (1, 1, '2026-01-01', 5, 0.1, -3)", ()),
    ("INSERT INTO impeller (vessel_id, impeller_type, impeller_diameter_m, clearance_m, position)"
     " VALUES (1, 'disc-turbine', 0.5, 0.1, 2)", ()),
    ("INSERT INTO run (vessel_id, medium_id, run_at, speed_rps, gas_flow_mol_s, temperature_k)"
     " VALUES (99, 1, '2026-01-01', 5, 0.1, 300)", ()),
])
def test_constraints_reject_impossible_values(campaign, sql, params):
    with pytest.raises(sqlite3.IntegrityError):
        campaign.conn.execute(sql, params)


def test_audit_log_records_old_and_new_in_same_transaction(campaign):
    run_id = add_run(campaign)
    campaign.edit_run(run_id, {"speed": "550 rpm"})
    history = campaign.history("run", run_id)
    assert [h["action"] for h in history] == ["update", "insert"]
    import json

    old, new = json.loads(history[0]["old_json"]), json.loads(history[0]["new_json"])
    assert old["speed_rps"] == pytest.approx(500 / 60)
    assert new["speed_rps"] == pytest.approx(550 / 60)
    assert new["row_version"] == old["row_version"] + 1


def test_soft_delete_and_restore(campaign):
    run_id = add_run(campaign)
    campaign.delete_run(run_id)
    assert campaign.runs() == []
    with pytest.raises(NotFound, match="deleted"):
        campaign.run(run_id)
    assert campaign.rows("SELECT count(*) AS n FROM run")[0]["n"] == 1  # nothing lost
    campaign.restore_run(run_id)
    assert [r["id"] for r in campaign.runs()] == [run_id]


def test_stale_version_is_refused_with_both_values(campaign):
    run_id = add_run(campaign)
    version = campaign.run(run_id)["row_version"]
    campaign.edit_run(run_id, {"speed": "520 rpm"}, expected_version=version)
    with pytest.raises(ConflictError) as info:
        campaign.edit_run(run_id, {"speed": "530 rpm"}, expected_version=version)
    assert "changed elsewhere" in str(info.value) and "stored" in str(info.value)
    assert campaign.run(run_id)["speed_rps"] == pytest.approx(520 / 60)


def test_transaction_rolls_back_everything(campaign):
    before = campaign.summary()
    with pytest.raises(InputError):
        with campaign.transaction():
            add_run(campaign)
            add_run(campaign, speed="600 kg")
    assert campaign.summary() == before


def test_check_reports_ok(campaign):
    report = campaign.check()
    assert report["ok"] and report["integrity"] == ["ok"]


def test_backup_is_a_readable_copy(campaign, tmp_path):
    add_run(campaign)
    target = campaign.backup(tmp_path / "copy.db")
    with Campaign(target) as copy:
        assert copy.summary()["runs"] == 1
    with pytest.raises(InputError, match="already exists"):
        campaign.backup(target)


def test_split_sql_keeps_triggers_whole():
    script = "CREATE TABLE a (x);\nCREATE TRIGGER t AFTER INSERT ON a BEGIN\n  SELECT 1;\nEND;\n"
    assert len(db.split_sql(script)) == 2


def test_constraint_error_names_the_column():
    exc = sqlite3.IntegrityError("CHECK constraint failed: speed_rps > 0 AND speed_rps <= 100")
    err = records.constraint_error(exc, "run", {"speed_rps": -1.0})
    assert "run.speed_rps" in str(err) and "-1.0" in str(err)


def test_insert_many_audits_each_record_as_stored(campaign):
    import json

    vessel_id = campaign.vessel("T-20")["id"]
    medium_id = campaign.medium("tap water")["id"]
    base = {"vessel_id": vessel_id, "medium_id": medium_id, "run_at": "2026-03-01",
            "speed_rps": 5.0, "gas_flow_mol_s": 0.01, "temperature_k": 303.15}
    ids = records.insert_many(campaign.conn, "run", [
        {**base, "speed_rps": 5.0 + i} for i in range(3)] + [{**base, "notes": "last"}],
        actor="lab", action="import")
    assert ids == sorted(ids) and len(set(ids)) == 4
    for run_id in ids:
        (entry,) = campaign.rows("SELECT * FROM audit_log WHERE table_name = 'run' AND "
                                 "record_id = ?", (run_id,))
        stored = records.get(campaign.conn, "run", run_id)
        assert (entry["actor"], entry["action"], entry["old_json"]) == ("lab", "import", None)
        assert json.loads(entry["new_json"]) == stored  # defaults (row version, times) too
    # a refused record names its column, and nothing of the batch stays
    before = campaign.summary()
    with pytest.raises(InputError, match="speed_rps"):
        records.insert_many(campaign.conn, "run", [base, {**base, "speed_rps": -1.0}])
    assert campaign.summary() == before


def test_update_many_changes_and_audits_as_update_does(campaign):
    import json

    ids = [add_run(campaign, speed=f"{400 + 50 * i} rpm") for i in range(4)]
    twin = [add_run(campaign, speed=f"{400 + 50 * i} rpm") for i in range(4)]
    changes = {ids[0]: {"speed_rps": 9.0}, ids[1]: {"notes": "baffles checked"},
               ids[2]: {"speed_rps": records.get(campaign.conn, "run", ids[2])["speed_rps"]},
               ids[3]: {"speed_rps": 7.0, "temperature_k": 310.0}}
    now = records.update_many(campaign.conn, "run", changes, actor="lab")
    for run_id, other in zip(ids, twin, strict=True):
        records.update(campaign.conn, "run", other, changes[run_id], actor="lab")
    for run_id, other in zip(ids, twin, strict=True):
        a, b = (records.get(campaign.conn, "run", i) for i in (run_id, other))
        assert now[run_id] == a
        assert {k: v for k, v in a.items() if k not in ("id", "created_at", "updated_at",
                                                         "run_at", "ref")} == \
            {k: v for k, v in b.items() if k not in ("id", "created_at", "updated_at",
                                                      "run_at", "ref")}
        logs = [campaign.history("run", i) for i in (run_id, other)]
        assert [h["action"] for h in logs[0]] == [h["action"] for h in logs[1]]
        if logs[0][0]["action"] == "update":
            old, new = json.loads(logs[0][0]["old_json"]), json.loads(logs[0][0]["new_json"])
            assert new == a and new["row_version"] == old["row_version"] + 1
    assert [h["action"] for h in campaign.history("run", ids[2])] == ["insert"]  # no change
    # a deleted record or a bad value refuses the whole batch, and nothing is written
    before = [records.get(campaign.conn, "run", i) for i in ids]
    with pytest.raises(InputError, match="speed_rps"):
        records.update_many(campaign.conn, "run", {ids[0]: {"speed_rps": 1.0},
                                                    ids[1]: {"speed_rps": -1.0}})
    campaign.delete_run(twin[0])
    with pytest.raises(NotFound, match="deleted"):
        records.update_many(campaign.conn, "run", {ids[0]: {"speed_rps": 1.0},
                                                    twin[0]: {"speed_rps": 2.0}})
    assert [records.get(campaign.conn, "run", i) for i in ids] == before


def test_undo_puts_back_a_curve_analysis_and_keeps_the_samples(demo_path, tmp_path):
    import shutil

    path = tmp_path / "copy.db"
    shutil.copy(demo_path, path)
    with Campaign(path) as c:
        curve_id = c.rows("SELECT id FROM curve WHERE deleted_at IS NULL LIMIT 1")[0]["id"]
        c.analyse_curves([curve_id], tau_p_s=2.0)
        before = c.curve(curve_id)
        # the same analysis again leaves the run's kLa as it was, so the newest change is
        # the curve's (its analysis time); undo must put that back and leave the samples
        c.analyse_curves([curve_id], tau_p_s=2.0)
        entry = c.history(limit=1)[0]
        assert (entry["table_name"], entry["record_id"]) == ("curve", curve_id)
        assert "time_s" not in entry["old_json"]  # samples are not copied into the log
        assert c.undo() == {"table": "curve", "record_id": curve_id, "undid": "update"}
        row = c.curve(curve_id)
        assert row["analysed_at"] == before["analysed_at"]
        assert row["kla_per_s"] == before["kla_per_s"]
        assert (row["do_values"] == before["do_values"]).all()
        assert (row["time_s"] == before["time_s"]).all()
