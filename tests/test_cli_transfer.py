"""`scaleup import`, `scaleup export` end to end through the installed command."""

from __future__ import annotations

import json
import os
import signal
import subprocess
import time

import numpy as np
import pytest

from scaleup.campaign import Campaign

from .cli_helpers import SCRIPT, scaleup, scaleup_json

VESSELS = ("name,tank diameter [m],liquid height [m],impeller type,impeller diameter [m],"
           "clearance [m]\nV-1,0.3,0.3,disc-turbine,0.1,0.1\n")
RUNS = ("ref,vessel,medium,date,speed [rpm],gas flow [NL/min],temperature [degC]\n"
        "A-1,V-1,water,2026-03-01T09:00,400,10,30\nA-2,V-1,water,2026-03-01T10:00,600,10,30\n")


def _campaign(path, tmp_path):
    """A campaign with vessel V-1 and medium water, made in-process (it is not under test)."""
    (tmp_path / "v.csv").write_text(VESSELS)
    with Campaign.create(path) as c:
        c.import_file("vessels", tmp_path / "v.csv")
        c.add_medium({"name": "water"})
    return path


@pytest.fixture
def db(tmp_path):
    return _campaign(tmp_path / "c.db", tmp_path)


def _runs(path) -> list[dict]:
    with Campaign(path) as c:
        return c.runs()


def test_templates_and_a_rejected_file(db, tmp_path):
    out = scaleup("import", "template", "runs", str(tmp_path / "t.xlsx"), check=True)
    assert "wrote" in out.stdout and (tmp_path / "t.xlsx").exists()
    bad = tmp_path / "bad.csv"
    bad.write_text(RUNS.replace(",400,", ",fast,").replace("V-1,water,2026-03-01T10", "V-9,water,"
                                                            "2026-03-01T10"))
    before = db.read_bytes()
    out = scaleup("import", "runs", str(bad), db=db)
    assert out.returncode == 2 and "Traceback" not in out.stderr
    assert "2 problem(s); nothing was imported" in out.stderr
    assert "row 2, column 'speed', value 'fast'" in out.stderr
    assert "row 3, column 'vessel'" in out.stderr
    rejected = scaleup("import", "runs", str(bad), "--json", db=db)
    assert rejected.returncode == 2
    report = json.loads(rejected.stdout)
    assert report["rejected"] and [p["row"] for p in report["problems"]] == [2, 3]
    assert db.read_bytes() == before


def test_dry_run_import_export_round_trip(db, tmp_path):
    runs = tmp_path / "runs.csv"
    runs.write_text(RUNS)
    dry = scaleup("import", "runs", str(runs), "--dry-run", db=db, check=True).stdout
    assert "would add 2 run(s)" in dry and "speed 400 rpm" in dry
    assert _runs(db) == []
    assert scaleup_json("import", "runs", str(runs), db=db)["added"] == 2
    scaleup("export", "runs", str(tmp_path / "back.xlsx"), "--si", "--units-row", db=db,
            check=True)
    other = _campaign(tmp_path / "other.db", tmp_path)
    again = scaleup("import", "runs", str(tmp_path / "back.xlsx"), db=other, check=True)
    assert "added 2 run(s)" in again.stdout
    for ra, rb in zip(_runs(db), _runs(other), strict=True):
        assert rb["speed_rps"] == pytest.approx(ra["speed_rps"], rel=1e-14)
        assert rb["ref"] == ra["ref"]


def test_logger_curves_with_start_and_analysis(db, tmp_path):
    (tmp_path / "runs.csv").write_text(RUNS)
    with Campaign(db) as c:
        c.import_file("runs", tmp_path / "runs.csv")
    t = np.arange(0.0, 240.0, 2.0)
    do = np.where(t < 20, 2.0, 100 - 98 * np.exp(-0.025 * np.clip(t - 20, 0, None)))
    lines = ["time [s],DO [%]"] + [f"{a:g},{b!r}" for a, b in zip(t, do.tolist(), strict=True)]
    (tmp_path / "log.csv").write_text("\n".join(lines))
    result = scaleup_json("import", "curves", str(tmp_path / "log.csv"), "--run", "A-1",
                          "--start", "20 s", db=db)
    row = result["rows"][0]
    assert row["n_samples"] == t.size and row["gas_on_s"] == 20.0
    assert row["analysis"]["kla_per_s"] == pytest.approx(0.025, rel=0.02)
    scaleup("export", "curves", str(tmp_path / "curves.json"), db=db, check=True)
    exported = json.loads((tmp_path / "curves.json").read_text())
    assert exported["columns"][:4] == ["run", "curve", "kind", "time [s]"]
    assert len(exported["rows"]) == t.size


def test_study_export(db, tmp_path):
    from scaleup.campaign import Campaign

    with Campaign(db) as c:
        c.save_study("invented", "design", {"process": {"our": 0.01}},
                     {"speed_rps": 2.0, "total_power_w": 5e4, "warnings": [], "cautions": []})
    out = scaleup_json("export", "study", str(tmp_path / "s.csv"), db=db)
    assert out["entity"] == "study" and out["n_rows"] > 2
    text = (tmp_path / "s.csv").read_text()
    assert "results.speed_rps,120.0,rpm" in text
    missing = scaleup("export", "study", str(tmp_path / "x.json"), "--study", "nope", db=db)
    assert missing.returncode == 2 and "saved studies: invented" in missing.stderr


def test_ctrl_c_stops_an_import_with_nothing_written(db, tmp_path):
    rows = [f"R-{i},V-1,water,2026-03-01T{9 + i // 3600:02d}:{i // 60 % 60:02d}:{i % 60:02d},"
            f"{300 + i % 500},10,30" for i in range(6000)]
    (tmp_path / "big.csv").write_text(RUNS.splitlines()[0] + "\n" + "\n".join(rows) + "\n")
    before = db.read_bytes()
    command = [str(SCRIPT), "--db", str(db), "import", "runs", str(tmp_path / "big.csv")]
    process = subprocess.Popen(command, stdout=subprocess.PIPE, stderr=subprocess.PIPE,
                               text=True, env={**os.environ, "COLUMNS": "200"})
    time.sleep(1.5)
    process.send_signal(signal.SIGINT)
    _, err = process.communicate(timeout=60)
    if process.returncode == 0:
        pytest.skip("the import finished before the interrupt arrived")
    assert process.returncode == 130 and "nothing partial was written" in err
    assert "Traceback" not in err
    assert db.read_bytes() == before
