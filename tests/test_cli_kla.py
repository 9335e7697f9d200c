"""`scaleup kla ...`, `scaleup import curves` and `scaleup run analyse`, end to end.

Most commands run in-process through ``scaleup.cli.main`` (exit status and streams as a user
sees them, without paying for a new interpreter each time); a few go through the installed
entry point in a subprocess.
"""

from __future__ import annotations

import json
from types import SimpleNamespace

import numpy as np
import pytest

from scaleup.campaign import Campaign

from .cli_helpers import scaleup as scaleup_process
from .conftest import add_run


@pytest.fixture
def cli(capsys):
    """Run ``scaleup ARGS`` in-process; returns (returncode, stdout, stderr)."""
    from scaleup.cli import main

    def run(*args, db=None, check=False):
        argv = (["--db", str(db)] if db is not None else []) + list(args)
        with pytest.raises(SystemExit) as info:
            main(argv)
        out = capsys.readouterr()
        code = info.value.code or 0
        if check and code != 0:
            raise AssertionError(f"scaleup {' '.join(args)} failed ({code}):\n{out.err}")
        return SimpleNamespace(returncode=code, stdout=out.out, stderr=out.err)
    return run


@pytest.fixture
def cli_json(cli):
    return lambda *args, db=None: json.loads(cli(*args, "--json", db=db, check=True).stdout)


def write_curve(path, *, k=0.015, tau=6.0, start=30.0, unit="%", minutes=False, seed=3,
                scale=1.0):
    rng = np.random.default_rng(seed)
    t = np.arange(0.0, 600.0, 1.0)
    s = np.clip(t - start, 0.0, None)
    g = (np.exp(-k * s) - k * tau * np.exp(-s / tau)) / (1 - k * tau) if tau else np.exp(-k * s)
    c = (100.0 - 96.0 * g + rng.normal(0.0, 0.4, t.size)) * scale
    head = "t [min]" if minutes else "t [s]"
    rows = [f"{head},DO [{unit}]"]
    rows += [f"{(a / 60 if minutes else a):.6f},{b:.4f}" for a, b in zip(t, c, strict=True)]
    path.write_text("\n".join(rows) + "\n")
    return path


def test_kla_curve_json_keys_are_the_contract(tmp_path, cli_json):
    f = write_curve(tmp_path / "c.csv", minutes=True)
    out = cli_json("kla", "curve", str(f), "--probe-tau", "6 s", "--start", "0.5 min")
    for key in ("kla_per_s", "kla_stderr_per_s", "kla_ci95_per_s", "c_inf", "c0", "n_points",
                "warnings", "concentration_unit"):
        assert key in out
    assert out["concentration_unit"] == "%"
    assert len(out["kla_ci95_per_s"]) == 2
    lo, hi = out["kla_ci95_per_s"]
    assert lo < 0.015 < hi
    assert out["c_inf"] == pytest.approx(100.0, abs=0.5)
    assert out["start_s"] == pytest.approx(30.0)
    assert out["log_linear_kla_per_s"] > 0


def test_kla_curve_in_mg_per_litre_states_its_unit_and_mol_values(tmp_path, cli_json):
    f = write_curve(tmp_path / "c.csv", unit="mg/L", scale=0.079, tau=0.0)
    out = cli_json("kla", "curve", str(f), "--window", "0.1:0.95", "--temperature",
                       "25 degC")
    assert out["concentration_unit"] == "mg/L"
    assert out["c_inf_mol_m3"] == pytest.approx(out["c_inf"] * 1e-3 / 31.998e-3)
    assert out["window"] == [0.1, 0.95]
    assert out["kla_20_per_s"] == pytest.approx(out["kla_per_s"] * 1.024 ** -5)


def test_kla_curve_table_and_log_linear_method(tmp_path, cli):
    f = write_curve(tmp_path / "c.csv", tau=0.0)
    text = cli("kla", "curve", str(f), "--method", "log-linear", check=True).stdout
    assert "log-linear" in text and "kLa" in text and "1/h" in text


def test_a_bad_curve_exits_2_with_its_reason(tmp_path, cli):
    f = tmp_path / "flat.csv"
    f.write_text("t [s],DO [%]\n" + "".join(f"{i},50\n" for i in range(40)))
    out = scaleup_process("kla", "curve", str(f))  # through the installed entry point
    assert out.returncode == 2
    assert "flat" in out.stderr and "Traceback" not in out.stderr


def test_several_files_are_one_batch_with_rejected_entries(tmp_path, cli_json):
    good = write_curve(tmp_path / "a.csv", tau=0.0)
    bad = tmp_path / "b.csv"
    bad.write_text("t [s],DO [%]\n0,1\n1,2\n2,3\n")
    out = cli_json("kla", "curve", str(good), str(bad))
    assert out["n_curves"] == 2 and out["n_rejected"] == 1
    assert out["curves"][1]["code"] == "too_short"
    assert out["curves"][0]["kla_per_s"] == pytest.approx(0.015, rel=0.05)


def test_gas_balance_command_gives_otr_cer_rq_and_kla(cli_json):
    out = cli_json("kla", "gas-balance", "--gas-flow", "25 NL/min", "--y-o2-in", "0.2095",
                       "--y-o2-out", "0.19", "--y-co2-in", "0.0004", "--y-co2-out", "0.015",
                       "--volume", "200 L", "--c-star", "0.21 mol/m3", "--c-liquid", "40 %")
    flow = 25e-3 / 60 * 101325 / (8.314462618 * 273.15)  # NL/min at 0 degC, 1 atm to mol/s
    assert out["otr_mol_m3_s"] == pytest.approx(flow * 0.020671 / 0.2, rel=1e-4)
    assert out["rq"] == pytest.approx(0.7019, abs=1e-3)
    assert out["kla_per_s"] == pytest.approx(out["otr_mol_m3_s"] / (0.21 * 0.6))
    assert out["cer_mol_m3_s"] > 0 and out["cautions"] and out["warnings"] == []


def test_gas_balance_log_mean_and_enriched_air_caution(cli_json):
    out = cli_json("kla", "gas-balance", "--gas-flow", "1 vvm", "--y-o2-in", "30 %",
                       "--y-o2-out", "0.27", "--y-co2-out", "0.02", "--volume", "2 m3",
                       "--c-star", "0.30 mol/m3", "--c-star-bottom", "0.45 mol/m3",
                       "--c-liquid", "0.1 mol/m3")
    assert out["driving_force_mol_m3"] == pytest.approx(0.15 / np.log(0.35 / 0.2))
    assert any("Oxygen-enriched" in c for c in out["cautions"])


def test_sulfite_command_prints_the_caveats(tmp_path, cli_json, cli):
    out = cli_json("kla", "sulfite", "--rate", "0.2 mol/L/h", "--c-star", "1.0 mg/L")
    assert out["otr_mol_m3_s"] == pytest.approx(200.0 / 3600 / 2)
    assert out["kla_per_s"] == pytest.approx(out["otr_mol_m3_s"] / (1e-3 / 31.998e-3))
    assert len(out["caveats"]) == 4
    f = tmp_path / "titration.csv"
    f.write_text("t [min],sulfite [mol/L]\n0,0.50\n10,0.47\n20,0.44\n30,0.41\n")
    text = cli("kla", "sulfite", "--samples", str(f), check=True).stdout
    assert "caveat:" in text and "catalyst" in text


def test_dynamic_command(tmp_path, cli_json):
    t = np.arange(0.0, 700.0, 0.5)
    c = np.where(t < 220, 80.0 - 0.4 * np.clip(t - 120, 0, None),
                 80.0 - 40.0 * np.exp(-0.02 * (t - 220)))
    f = tmp_path / "dyn.csv"
    f.write_text("t [s],DO [%]\n" + "".join(f"{a},{b:.5f}\n" for a, b in zip(t, c, strict=True)))
    out = cli_json("kla", "dynamic", str(f))
    assert out["kla_per_s"] == pytest.approx(0.02, rel=1e-4)
    assert out["our_per_s"] == pytest.approx(0.4, rel=1e-4)
    assert out["c_star"] == pytest.approx(100.0, rel=1e-4)


@pytest.mark.parametrize("args,words", [
    (["kla", "curve", "MISSING.csv"], "does not exist"),
    (["kla", "gas-balance", "--gas-flow", "25 kg", "--y-o2-in", "0.2095", "--y-o2-out", "0.19",
      "--y-co2-out", "0.015", "--volume", "200 L"], "gas flow"),
    (["kla", "sulfite"], "either"),
])
def test_input_errors_exit_2(args, words, cli):
    out = cli(*args)
    assert out.returncode == 2 and words in out.stderr


def test_import_curves_stores_and_analyses_and_sets_the_run(tmp_path, campaign, cli_json):
    run_id = add_run(campaign)
    db = campaign.path
    campaign.close()
    f = write_curve(tmp_path / "c.csv")
    out = cli_json("import", "curves", str(f), "--run", str(run_id), "--probe-tau", "6 s",
                       "--start", "30 s", db=db)
    row = out["rows"][0]
    analysis = row["analysis"]
    assert analysis["kla_ci95_per_s"][0] < 0.015 < analysis["kla_ci95_per_s"][1]
    with Campaign(db) as c:
        run = c.run(run_id)
        curve = c.curve(row["curve_id"])
    assert run["kla_per_s"] == pytest.approx(analysis["kla_per_s"])
    assert run["kla_stderr_per_s"] == pytest.approx(analysis["kla_stderr_per_s"])
    assert run["kla_method"] == "gassing-out"
    assert curve["n_samples"] == 600 and curve["do_values"].dtype == np.dtype("<f8")
    assert curve["probe_tau_s"] == 6.0 and curve["window_low"] == 0.2
    assert json.loads(curve["analysis_json"])["tau_p_s"] == 6.0


def test_run_analyse_all_combines_replicates_and_keeps_rejections(campaign, cli_json, cli):
    r1, r2 = add_run(campaign), add_run(campaign, speed="700 rpm")
    for seed in (1, 2):
        t = np.arange(0.0, 600.0)
        c = 100 - 95 * np.exp(-0.012 * t) + np.random.default_rng(seed).normal(0, 0.4, t.size)
        campaign.add_curve(r1, t, c, "%", gas_on_s=0.0)
    campaign.add_curve(r2, np.arange(50.0), np.full(50, 7.0), "mg/L")
    db = campaign.path
    campaign.close()
    out = cli_json("run", "analyse", "--all", db=db)
    assert out["n_curves"] == 3 and out["n_rejected"] == 1
    k = [c["kla_per_s"] for c in out["curves"] if c["run_id"] == r1]
    with Campaign(db) as c:
        run = c.run(r1)
        assert c.run(r2)["kla_per_s"] is None
        stored = c.curves(r2)[0]
    assert min(k) <= run["kla_per_s"] <= max(k)
    assert run["kla_per_s"] == pytest.approx(0.012, rel=0.02)
    assert stored["kla_per_s"] is None and stored["analysed_at"]
    single = cli_json("run", "analyse", str(r1), "--window", "0.3:0.9", db=db)
    assert single["n_curves"] == 2 and single["curves"][0]["window"] == [0.3, 0.9]
    assert cli("run", "analyse", db=db).returncode == 2


def test_probe_step_curve_gives_the_runs_probe_time_constant(campaign):
    run_id = add_run(campaign)
    t = np.arange(0.0, 60.0, 0.2)
    campaign.add_curve(run_id, t, 100 * (1 - np.exp(-t / 5.0)), "%", kind="probe-step",
                       gas_on_s=0.0)
    s = np.arange(0.0, 600.0)
    k, tau = 0.02, 5.0
    c = 100 - 95 * (np.exp(-k * s) - k * tau * np.exp(-s / tau)) / (1 - k * tau)
    campaign.add_curve(run_id, s, c, "%", gas_on_s=0.0)
    results = campaign.analyse_curves(run_ids=[run_id])
    step, rise = results
    assert step["kind"] == "probe-step" and step["tau_p_s"] == pytest.approx(5.0, rel=1e-6)
    assert rise["tau_p_s"] == pytest.approx(5.0, rel=1e-6)
    assert rise["kla_per_s"] == pytest.approx(0.02, rel=1e-5)
    assert campaign.run(run_id)["kla_per_s"] == pytest.approx(0.02, rel=1e-5)
