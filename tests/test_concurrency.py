"""Two programs on one campaign at once: no lost update, no 'database is locked' traceback.

Two worker processes (the service layer, as the terminal app uses it) and one command-line
user edit the same run and their own runs for a bounded time, every edit carrying the row
version it read. Afterwards every edit reported as saved must be in the audit log, in one
unbroken chain of versions per run, and the stored value must be the last saved one.
"""

from __future__ import annotations

import json
import os
import subprocess
import sys
import time
from pathlib import Path

from scaleup.campaign import Campaign

from .cli_helpers import SCRIPT
from .conftest import DISC, P20, add_run

ROOT = Path(__file__).resolve().parents[1]
SECONDS = 1.5
SHARED_RUN = 1


def worker(path: str, actor: str, own_run: str, start_at: str, seconds: str) -> dict:
    """Edit the shared run and our own run until the time is up; report what happened."""
    import random

    from scaleup.errors import ConflictError

    rng = random.Random(actor)
    saved, attempted, conflicts, own_conflicts, batches = [], 0, 0, 0, 0
    with Campaign(path, actor=actor) as c:
        # warm up (the unit parser loads its registry on first use): an edit that changes nothing
        c.edit_run(int(own_run), {"notes": c.run(int(own_run))["notes"]})
        c.runs("speed > 100 rpm", limit=5)
        time.sleep(max(0.0, float(start_at) - time.time()))
        deadline = time.time() + float(seconds)
        k = 0
        while time.time() < deadline:
            k += 1
            if k % 25 == 0:  # now and then a longer write: a small batch in one transaction
                with c.transaction():
                    for i in range(20):
                        add_run(c, date=f"2026-03-01T{i:02d}:00", notes=f"{actor} batch {k}")
                batches += 1
                continue
            run_id = SHARED_RUN if rng.random() < 0.6 else int(own_run)
            version = c.run(run_id)["row_version"]
            c.runs("speed > 100 rpm", limit=5)  # a filtered read between read and write
            time.sleep(0.003)  # a person's moment between seeing a value and changing it
            value = f"{actor}:{k}"
            attempted += 1
            try:
                c.edit_run(run_id, {"notes": value}, expected_version=version)
            except ConflictError as exc:
                assert "changed elsewhere" in str(exc) and "stored" in str(exc)
                conflicts += 1
                own_conflicts += run_id != SHARED_RUN
                continue
            saved.append({"run": run_id, "from_version": version, "value": value})
    return {"actor": actor, "attempted": attempted, "saved": saved, "conflicts": conflicts,
            "own_conflicts": own_conflicts, "batches": batches}


def _cli_editor(db: Path, start_at: float, edits: int) -> dict:
    """A person at the command line: show the run, then edit it with the version shown."""
    time.sleep(max(0.0, start_at - time.time()))
    env = {**os.environ, "SCALEUP_USER": "cli"}
    env.pop("SCALEUP_DB", None)
    command = [str(SCRIPT)] if SCRIPT.exists() else [sys.executable, "-m", "scaleup"]
    saved, attempted, conflicts, errors = [], 0, 0, []
    for k in range(edits):
        shown = subprocess.run([*command, "--db", str(db), "run", "show", str(SHARED_RUN),
                                "--json"], capture_output=True, text=True, env=env, timeout=60)
        if shown.returncode != 0:
            errors.append(shown.stderr)
            continue
        version = json.loads(shown.stdout)["run"]["row_version"]
        value = f"cli:{k}"
        attempted += 1
        edit = subprocess.run([*command, "--db", str(db), "run", "edit", str(SHARED_RUN),
                               "--notes", value, "--expected-version", str(version)],
                              capture_output=True, text=True, env=env, timeout=60)
        if edit.returncode == 0:
            saved.append({"run": SHARED_RUN, "from_version": version, "value": value})
        elif edit.returncode == 2 and "changed elsewhere" in edit.stderr:
            conflicts += 1
        else:
            errors.append(edit.stderr)
    return {"actor": "cli", "attempted": attempted, "saved": saved, "conflicts": conflicts,
            "errors": errors}


def lost_updates(c: Campaign, saved: list[dict]) -> list[str]:
    """Every saved edit must be in the audit chain of its run, which must not fork or skip."""
    problems = []
    for run_id in sorted({s["run"] for s in saved}):
        history = c.rows("SELECT old_json, new_json FROM audit_log WHERE table_name = 'run' AND "
                         "record_id = ? AND action = 'update' ORDER BY id", (run_id,))
        chain = [(json.loads(h["old_json"]), json.loads(h["new_json"])) for h in history]
        for (_, prev_new), (old, _) in zip(chain, chain[1:], strict=False):
            if old["row_version"] != prev_new["row_version"]:
                problems.append(f"run {run_id}: version chain broken at {old['row_version']}")
        logged = {(old["row_version"], new["notes"]) for old, new in chain}
        mine = [s for s in saved if s["run"] == run_id]
        for s in mine:
            if (s["from_version"], s["value"]) not in logged:
                problems.append(f"run {run_id}: saved edit {s['value']} is not in the history")
        if len({s["from_version"] for s in mine}) != len(mine):
            problems.append(f"run {run_id}: two edits were saved over the same version")
        final = c.run(run_id)
        if chain and final["notes"] != chain[-1][1]["notes"]:
            problems.append(f"run {run_id}: stored {final['notes']!r} is not the last saved edit")
        if final["row_version"] != 1 + len(chain):
            problems.append(f"run {run_id}: version {final['row_version']} after "
                            f"{len(chain)} edits")
    return problems


def test_two_programs_and_the_command_line_edit_without_losing_anything(tmp_path):
    from concurrent.futures import ThreadPoolExecutor

    db = tmp_path / "shared.db"
    with Campaign.create(db) as c:
        c.add_vessel(P20, DISC)
        c.add_medium({"name": "tap water"})
        for rpm in (300, 400, 500):
            add_run(c, speed=f"{rpm} rpm")
    start_at = time.time() + 1.0  # both workers import and open the file first
    code = ("import json, sys; from tests.test_concurrency import worker; "
            "print(json.dumps(worker(*sys.argv[1:])))")
    env = {**os.environ, "PYTHONPATH": str(ROOT)}
    procs = [subprocess.Popen([sys.executable, "-c", code, str(db), actor, own, str(start_at),
                               str(SECONDS)], cwd=ROOT, env=env, stdout=subprocess.PIPE,
                              stderr=subprocess.PIPE, text=True)
             for actor, own in (("tui-1", "2"), ("tui-2", "3"))]
    with ThreadPoolExecutor(1) as pool:
        cli = pool.submit(_cli_editor, db, start_at, 2)
        outputs = [p.communicate(timeout=60) for p in procs]
        cli_report = cli.result(timeout=120)
    stderr = "".join(err for _, err in outputs) + "".join(cli_report["errors"])
    assert all(p.returncode == 0 for p in procs), stderr
    reports = [json.loads(out) for out, _ in outputs] + [cli_report]

    attempted = sum(r["attempted"] for r in reports)
    saved = [s for r in reports for s in r["saved"]]
    with Campaign(db) as c:
        lost = lost_updates(c, saved)
        batches = sum(r.get("batches", 0) for r in reports)
        assert c.count_runs() == 3 + 20 * batches  # every batch whole
        assert c.check()["ok"]
    print(f"concurrent edits: attempted {attempted}, saved {len(saved)}, refused as conflicts "
          f"{sum(r['conflicts'] for r in reports)}, lost {len(lost)}, "
          f"'database is locked' {stderr.count('database is locked')}")
    assert lost == []
    assert "database is locked" not in stderr and "Traceback" not in stderr
    assert cli_report["errors"] == []
    assert all(r.get("own_conflicts", 0) == 0 for r in reports)  # different runs never clash
    assert attempted >= 20 and len(saved) >= 10  # the workers really overlapped
    assert sum(r["conflicts"] for r in reports) > 0  # ... and really competed for run 1


def test_a_lock_held_too_long_is_a_clear_busy_message(tmp_path, monkeypatch):
    """Another program keeps the write lock past the busy timeout: refused, nothing written."""
    import sqlite3

    from scaleup.errors import StoreError
    from scaleup.store import db as store_db

    from .cli_inprocess import invoke

    path = tmp_path / "busy.db"
    Campaign.create(path).close()
    monkeypatch.setattr(store_db, "BUSY_TIMEOUT_MS", 300)
    holder = sqlite3.connect(path, isolation_level=None)
    holder.execute("BEGIN IMMEDIATE")
    try:
        with Campaign(path) as c:
            started = time.perf_counter()
            try:
                c.add_medium({"name": "water"})
            except StoreError as exc:
                assert "busy" in str(exc) and "nothing was written" in str(exc)
            else:
                raise AssertionError("the write went through a held lock")
            assert time.perf_counter() - started < 5
            assert not c.conn.in_transaction
        outcome = invoke(["--db", str(path), "medium", "add", "--name", "water"])
        assert outcome.code == 2 and "busy" in outcome.err and not outcome.crashed
    finally:
        holder.execute("ROLLBACK")
        holder.close()
    with Campaign(path) as c:
        assert c.media() == []
        c.add_medium({"name": "water"})  # and the file works once the lock is gone
        assert [m["name"] for m in c.media()] == ["water"]


def test_undo_never_overwrites_someone_elses_later_edit(tmp_path):
    """A edits, B edits the same run, A undoes: refused, B's value stays."""
    from scaleup.errors import ConflictError

    path = tmp_path / "undo.db"
    with Campaign.create(path) as c:
        c.add_vessel(P20, DISC)
        c.add_medium({"name": "tap water"})
        run_id = add_run(c, notes="as measured")
    with Campaign(path, actor="anna") as anna, Campaign(path, actor="ben") as ben:
        anna.edit_run(run_id, {"notes": "anna's note"})
        ben.edit_run(run_id, {"notes": "ben's note"},
                     expected_version=ben.run(run_id)["row_version"])
        try:
            anna.undo()
        except ConflictError as exc:
            assert "ben" in str(exc) and "nothing was written" in str(exc)
        else:
            raise AssertionError("undo overwrote a later edit by someone else")
        assert anna.run(run_id)["notes"] == "ben's note"
        assert ben.undo()["undid"] == "update"  # ben's own undo is his to make
        assert anna.run(run_id)["notes"] == "anna's note"
