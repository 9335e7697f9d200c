"""A process killed (SIGKILL) in the middle of a large import or a migration.

Afterwards the campaign must pass ``PRAGMA integrity_check`` and hold either all of the work or
none of it; a backup interrupted half-way must not be left under the backup's name.
Each kill waits for a sign that the victim is in the middle of writing (its write-ahead log
growing, its backup file appearing), so the kill lands inside the transaction, not before it.
"""

from __future__ import annotations

import os
import signal
import sqlite3
import subprocess
import sys
import time
from pathlib import Path

import pytest

from scaleup.campaign import Campaign
from scaleup.store import db

from .cli_helpers import SCRIPT
from .conftest import DISC, P20

ROOT = Path(__file__).resolve().parents[1]
IMPORT_ROWS = 800


def _kill_when(proc: subprocess.Popen, ready, timeout_s: float = 30) -> bool:
    """SIGKILL ``proc`` as soon as ``ready()`` is true; False if it finished first."""
    deadline = time.time() + timeout_s
    while time.time() < deadline:
        if proc.poll() is not None:
            return False
        if ready():
            os.kill(proc.pid, signal.SIGKILL)
            proc.wait(10)
            return True
        time.sleep(0.001)
    proc.kill()
    raise AssertionError("the victim neither reached the point to kill it at nor finished")


def _size(path: Path) -> int:
    try:
        return path.stat().st_size
    except FileNotFoundError:
        return 0


def _integrity(path: Path) -> list[str]:
    raw = sqlite3.connect(path)
    try:
        return [r[0] for r in raw.execute("PRAGMA integrity_check")]
    finally:
        raw.close()


def _campaign_with_vessel(path: Path) -> None:
    with Campaign.create(path) as c:
        c.add_vessel(P20, DISC)
        c.add_medium({"name": "tap water"})


def _runs_file(path: Path, rows: int) -> Path:
    # long notes make the write phase long and its log large, so a kill lands inside it
    lines = ["vessel,medium,date,speed [rpm],gas flow [NL/min],temperature [degC],kla [1/h],"
             "notes"]
    lines += [f"T-20,tap water,2026-01-{1 + i // 1440:02d}T{i // 60 % 24:02d}:{i % 60:02d},"
              f"{300 + i % 400},10,30,{60 + i % 50},{'pilot note ' * 300}{i}"
              for i in range(rows)]
    path.write_text("\n".join(lines) + "\n", encoding="utf-8")
    return path


@pytest.mark.parametrize("wal_bytes", [512 * 1024, 4 * 1024 * 1024])
def test_kill_during_a_large_import_keeps_all_or_none(tmp_path, wal_bytes):
    campaign = tmp_path / "c.db"
    _campaign_with_vessel(campaign)
    source = _runs_file(tmp_path / "runs.csv", IMPORT_ROWS)
    command = [str(SCRIPT)] if SCRIPT.exists() else [sys.executable, "-m", "scaleup"]
    wal = campaign.with_name(campaign.name + "-wal")
    start = _size(wal)
    victim = subprocess.Popen([*command, "--db", str(campaign), "import", "runs", str(source)],
                              stdout=subprocess.DEVNULL, stderr=subprocess.DEVNULL)
    killed = _kill_when(victim, lambda: _size(wal) > start + wal_bytes)
    assert _integrity(campaign) == ["ok"]
    with Campaign(campaign) as c:
        n = c.count_runs()
        audited = c.rows("SELECT count(*) AS n FROM audit_log WHERE action = 'import'")[0]["n"]
        assert c.check()["ok"]
    assert n in (0, IMPORT_ROWS) and audited == n  # all or none, runs and history alike
    if killed:
        assert n == 0  # killed before its commit: nothing of it
    print(f"import of {IMPORT_ROWS} runs, killed={killed} at log > {wal_bytes} B: {n} stored")


def _big_campaign(path: Path, runs: int) -> None:
    """A campaign at the current schema with many runs, inserted directly for speed."""
    _campaign_with_vessel(path)
    raw = sqlite3.connect(path)
    with raw:
        raw.executemany(
            "INSERT INTO run (vessel_id, medium_id, run_at, speed_rps, gas_flow_mol_s, "
            "temperature_k, notes) VALUES (1, 1, ?, ?, 0.01, 303.15, ?)",
            [(f"2026-01-01T00:00:{i % 60:02d}", 5 + i % 10, "n" * 600) for i in range(runs)])
    raw.close()


# the migration a future version might ship: copies and rewrites every run
HEAVY = ("CREATE TABLE run_archive AS SELECT * FROM run;\n"
         "UPDATE run SET notes = notes || ' (migrated)';\n"
         "CREATE INDEX run_archive_speed ON run_archive (speed_rps, run_at);\n")
MIGRATE = ("import sys; from scaleup.store import db; from scaleup.campaign import Campaign; "
           "base = db.migrations(); extra = db.Migration(len(base) + 1, 'heavy', sys.argv[2]); "
           "db.migrations = lambda: [*base, extra]; Campaign(sys.argv[1]).close()")


def _migration_victim(path: Path) -> subprocess.Popen:
    return subprocess.Popen([sys.executable, "-c", MIGRATE, str(path), HEAVY], cwd=ROOT,
                            env={**os.environ, "PYTHONPATH": str(ROOT)},
                            stdout=subprocess.DEVNULL, stderr=subprocess.PIPE)


def _check_after_migration_kill(path: Path, runs: int) -> int:
    assert _integrity(path) == ["ok"]
    raw = sqlite3.connect(path)
    try:
        version = raw.execute("PRAGMA user_version").fetchone()[0]
        tables = {r[0] for r in raw.execute("SELECT name FROM sqlite_master")}
        migrated = raw.execute("SELECT count(*) FROM run WHERE notes LIKE '%(migrated)'"
                               ).fetchone()[0]
    finally:
        raw.close()
    before = db.schema_version()
    if version == before:  # none of it
        assert "run_archive" not in tables and migrated == 0
    else:  # all of it
        assert version == before + 1 and "run_archive" in tables and migrated == runs
    backup = path.with_name(f"{path.name}.v{before}.bak")
    if backup.exists():  # a backup under its real name is always whole
        assert _integrity(backup) == ["ok"]
        with sqlite3.connect(backup) as copy:
            assert copy.execute("PRAGMA user_version").fetchone()[0] == before
            assert copy.execute("SELECT count(*) FROM run").fetchone()[0] == runs
        copy.close()
    return version


@pytest.mark.parametrize("moment", ["during the backup", "during the migration"])
def test_kill_during_a_migration_keeps_all_or_none(tmp_path, moment):
    runs = 15_000
    path = tmp_path / "old.db"
    _big_campaign(path, runs)
    wal = path.with_name(path.name + "-wal")
    partial = path.with_name(f"{path.name}.v{db.schema_version()}.bak.part")
    backup = path.with_name(f"{path.name}.v{db.schema_version()}.bak")
    if moment == "during the backup":
        def ready():
            return partial.exists()
    else:
        def ready():
            return backup.exists() and _size(wal) > 2 * 1024 * 1024
    victim = _migration_victim(path)
    killed = _kill_when(victim, ready)
    version = _check_after_migration_kill(path, runs)
    if killed:
        assert version == db.schema_version()
    # and the next start migrates cleanly from where the file was left
    finish = _migration_victim(path)
    assert finish.wait(60) == 0, finish.stderr.read()
    assert _check_after_migration_kill(path, runs) == db.schema_version() + 1
    assert not partial.exists()
    print(f"migration of {runs} runs killed {moment}: killed={killed}, left at v{version}")


def test_backup_command_never_leaves_a_partial_file(tmp_path):
    path = tmp_path / "c.db"
    _big_campaign(path, 15_000)
    target = tmp_path / "copy.db"
    code = ("import sys; from scaleup.campaign import Campaign; "
            "c = Campaign(sys.argv[1]); c.backup(sys.argv[2])")
    victim = subprocess.Popen([sys.executable, "-c", code, str(path), str(target)], cwd=ROOT,
                              env={**os.environ, "PYTHONPATH": str(ROOT)})
    part = target.with_name(target.name + ".part")
    killed = _kill_when(victim, part.exists)
    assert not target.exists() if killed else _integrity(target) == ["ok"]
    assert _integrity(path) == ["ok"]
