"""The command line end to end, through the installed entry point."""

from __future__ import annotations

import time

import pytest

from .cli_helpers import scaleup, scaleup_json


def test_help_is_fast_and_lists_commands():
    start = time.perf_counter()
    out = scaleup("--help", check=True)
    elapsed = time.perf_counter() - start
    for name in ("init", "demo", "vessel", "medium", "run", "import", "export"):
        assert name in out.stdout
    assert elapsed < 2.0  # process start included; the import itself is checked below


def test_help_does_not_import_heavy_libraries():
    import subprocess
    import sys

    code = ("import sys; from scaleup import cli; "
            "heavy = [m for m in ('numpy', 'scipy', 'pandas', 'pint', 'textual', 'sqlite_utils')"
            " if m in sys.modules]; print(','.join(heavy))")
    out = subprocess.run([sys.executable, "-c", code], capture_output=True, text=True, check=True)
    assert out.stdout.strip() == ""


def test_every_command_has_help_with_an_example():
    import click

    from scaleup.cli import cli

    ctx = click.Context(cli)
    missing = []

    def walk(command, path):
        if isinstance(command, click.Group):
            names = command.list_commands(ctx)
            for name in names:
                walk(command.get_command(ctx, name), [*path, name])
        elif not command.help or "example" not in command.help.lower():
            missing.append(" ".join(path))

    walk(cli, [])
    assert missing == []


def test_init_vessel_medium_run_flow(tmp_path):
    db = tmp_path / "c.db"
    scaleup("init", str(db), check=True)
    scaleup("vessel", "add", "--name", "V-1", "--tank-diameter", "0.3 m", "--liquid-height",
            "30 cm", "--impeller", "disc-turbine:0.1 m:0.1 m:6", db=db, check=True)
    scaleup("medium", "add", "--name", "water", db=db, check=True)
    added = scaleup_json("run", "add", "--vessel", "V-1", "--medium", "water", "--date",
                         "2026-03-01", "--speed", "450 rpm", "--gas-flow", "1 vvm",
                         "--temperature", "30 degC", "--kla", "80 1/h", db=db)
    run = added["run"]
    assert run["speed_rps"] == pytest.approx(7.5)
    assert run["temperature_k"] == pytest.approx(303.15)
    assert run["kla_per_s"] == pytest.approx(80 / 3600)
    scaleup("run", "edit", str(run["id"]), "--speed", "500 rpm", db=db, check=True)
    listed = scaleup_json("run", "list", "--where", "speed > 480 rpm", db=db)
    assert listed["n_runs"] == 1 and listed["runs"][0]["speed_rps"] == pytest.approx(500 / 60)
    text = scaleup("run", "list", db=db, check=True).stdout
    assert "speed [rpm]" in text and "500" in text
    scaleup("run", "delete", str(run["id"]), db=db, check=True)
    assert scaleup_json("run", "list", db=db)["n_runs"] == 0
    scaleup("run", "restore", str(run["id"]), db=db, check=True)
    assert scaleup_json("run", "list", db=db)["n_runs"] == 1
    vessels = scaleup_json("vessel", "list", db=db)["vessels"]
    assert vessels[0]["tank_diameter_m"] == pytest.approx(0.3)


@pytest.mark.parametrize("args,message", [
    (["run", "add", "--vessel", "V-1", "--medium", "water", "--date", "2026-03-01", "--speed",
      "600 kg", "--gas-flow", "1 vvm", "--temperature", "30 degC"],
     'speed: "600 kg" is a mass; expected a rotational speed such as "600 rpm"'),
    (["run", "add", "--vessel", "V-1", "--medium", "water", "--date", "yesterday", "--speed",
      "600 rpm", "--gas-flow", "1 vvm", "--temperature", "30 degC"], "ISO 8601"),
    (["run", "add", "--vessel", "V-1", "--medium", "water", "--date", "2026-03-01", "--speed",
      "600 rpm", "--gas-flow", "1 vvm", "--temperature", "-300 degC"], "accepted range"),
    (["run", "show", "999"], "no run 999"),
    (["run", "list", "--where", "1=1; DROP TABLE run"], "filter"),
    (["vessel", "add", "--name", "bad", "--tank-diameter", "-1 m", "--liquid-height", "1 m"],
     "tank diameter"),
    (["run", "list", "--sort", "colour"], "cannot sort"),
])
def test_bad_input_exit_2_no_traceback_nothing_written(tmp_path, args, message):
    db = tmp_path / "c.db"
    scaleup("init", str(db), check=True)
    scaleup("vessel", "add", "--name", "V-1", "--tank-diameter", "0.3 m", "--liquid-height",
            "0.3 m", db=db, check=True)
    scaleup("medium", "add", "--name", "water", db=db, check=True)
    before = scaleup_json("run", "list", db=db)
    out = scaleup(*args, db=db)
    assert out.returncode == 2, out.stderr
    assert message in out.stderr
    assert "Traceback" not in out.stderr + out.stdout
    assert scaleup_json("run", "list", db=db) == before


def test_demo_no_tui_and_json_keys(tmp_path):
    db = tmp_path / "demo.db"
    out = scaleup("demo", "--no-tui", db=db, check=True)
    assert "runs" in out.stdout
    runs = scaleup_json("run", "list", db=db)["runs"]
    assert len(runs) >= 40
    for key in ("speed_rps", "gas_flow_mol_s", "temperature_k", "kla_per_s"):
        assert key in runs[0]


def test_missing_campaign_is_a_clear_error(tmp_path):
    out = scaleup("run", "list", db=tmp_path / "none.db")
    assert out.returncode == 2 and "does not exist" in out.stderr
    assert not (tmp_path / "none.db").exists()
