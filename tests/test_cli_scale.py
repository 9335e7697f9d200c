"""`scaleup scale` and `scaleup design` end to end: JSON contract, saving, errors."""

from __future__ import annotations

import json
import shutil

import pytest
from click.testing import CliRunner

from scaleup.campaign import Campaign
from scaleup.cli import cli
from scaleup.errors import InputError
from tests.cli_helpers import scaleup

RULE_KEYS = {"speed_rps", "power_w", "gassed_power_w", "power_per_volume_w_m3", "tip_speed_m_s",
             "kla_per_s", "kla_pi95_per_s", "otr_capacity_mol_m3_s", "heat_load_w",
             "violations", "extrapolation"}
DESIGN_KEYS = {"speed_rps", "gas_flow_mol_s", "gas_flow_nl_min", "total_power_w",
               "agitator_power_w", "compressor_power_w", "binding_constraints",
               "probability_meets_duty", "window", "cautions", "warnings"}


def run_json(*args):
    result = CliRunner().invoke(cli, [*args, "--json"], catch_exceptions=False)
    assert result.exit_code == 0, result.output
    return json.loads(result.output)


@pytest.fixture
def demo_copy(demo_path, tmp_path):
    path = tmp_path / "demo.db"
    shutil.copy(demo_path, path)
    return path


def test_scale_from_run_all_rules(demo_copy):
    out = run_json("--db", str(demo_copy), "scale", "--from-run", "1", "--to-volume", "40 m3",
                   "--our", "30 mmol/L/h", "--limits", "tip-speed=6 m/s,flooding-margin=0.2")
    assert [r["rule"] for r in out["rules"]] == ["p-per-v", "pg-per-v", "tip-speed", "speed",
                                                  "reynolds", "kla", "otr"]
    for row in out["rules"]:
        assert RULE_KEYS <= set(row), row["rule"]
        lo, hi = row["kla_pi95_per_s"]
        assert lo < row["kla_per_s"] < hi
    assert out["target_volume_m3"] == pytest.approx(40.0, rel=1e-6)
    assert any("estimates" in c for c in out["cautions"])
    speed = {r["rule"]: r for r in out["rules"]}["speed"]
    assert any("tip speed" in v for v in speed["violations"])


def test_scale_from_vessel_to_vessel_saved_with_inputs(demo_copy):
    out = run_json("--db", str(demo_copy), "scale", "--vessel", "P-20", "--speed", "400 rpm",
                   "--gas-flow", "1 vvm", "--to-vessel", "P-300", "--rule", "otr",
                   "--gas-rule", "superficial", "--save", "p20-to-p300")
    assert len(out["rules"]) == 1 and out["gas_rule"] == "superficial"
    assert out["rules"][0]["otr_capacity_mol_m3_s"] == pytest.approx(
        out["otr_target_mol_m3_s"], rel=1e-5)
    with Campaign(demo_copy) as c:
        saved = c.study("p20-to-p300")
    assert saved["kind"] == "scale" and saved["package_version"]
    assert saved["inputs"]["pilot_source"]["vessel"] == "P-20"
    assert saved["inputs"]["rules"] == ["otr"]
    assert saved["results"]["rules"][0]["speed_rps"] == pytest.approx(
        out["rules"][0]["speed_rps"])


def test_design_by_volume_without_a_campaign(tmp_path, monkeypatch):
    monkeypatch.chdir(tmp_path)
    out = run_json("design", "--volume", "40 m3", "--our", "40 mmol/L/h", "--do-setpoint",
                   "20 %", "--limits", "tip-speed=7 m/s, flooding-margin=0.2", "--grid",
                   "12x10", "--jacket-u", "500")
    assert DESIGN_KEYS <= set(out)
    assert out["feasible"] is True and "duty" in out["binding_constraints"]
    assert out["total_power_w"] == pytest.approx(out["agitator_power_w"]
                                                 + out["compressor_power_w"], rel=1e-9)
    w = out["window"]
    assert len(w["speeds_rps"]) == 12 and len(w["gas_flows_mol_s"]) == 10
    assert len(w["feasible"]) == 12 and len(w["feasible"][0]) == 10
    assert 0.8 < out["probability_meets_duty"] < 1.0  # designed at 0.9 confidence
    assert out["heat"]["jacket_crossover_volume_m3"] > 0
    assert not (tmp_path / "scaleup.db").exists()


def test_design_enriched_gas_carries_the_oxygen_caution(tmp_path, monkeypatch):
    monkeypatch.chdir(tmp_path)
    out = run_json("design", "--volume", "20 m3", "--our", "60 mmol/L/h", "--o2-fraction",
                   "0.4", "--grid", "8x8", "--confidence", "0.5")
    assert any("Oxygen-enriched" in c for c in out["cautions"])


def test_bad_limit_is_an_input_error():
    with pytest.raises(InputError):
        CliRunner().invoke(cli, ["design", "--volume", "40 m3", "--our", "40 mmol/L/h",
                                 "--limits", "speedy=3"], catch_exceptions=False)


def test_errors_exit_2_with_a_message(demo_path):
    out = scaleup("scale", "--from-run", "1", "--vessel", "P-20", "--to-volume", "40 m3",
                  db=demo_path)
    assert out.returncode == 2 and "give either --from-run" in out.stderr
    assert "Traceback" not in out.stderr


@pytest.mark.parametrize("command", ["scale", "design"])
def test_help_has_an_example(command):
    result = CliRunner().invoke(cli, [command, "--help"])
    assert result.exit_code == 0 and "Examples:" in result.output


def test_scale_with_a_saved_fit_reports_its_interval(demo_copy):
    with Campaign(demo_copy) as c:
        c.save_fit("demo-fit", c.fit_kla(power_basis="gassed"))
    out = run_json("--db", str(demo_copy), "scale", "--from-run", "1", "--to-volume", "5 m3",
                   "--rule", "p-per-v", "--correlation", "demo-fit", "--save", "with-fit")
    assert out["correlation"]["kind"] == "fitted" and out["correlation"]["name"] == "demo-fit"
    row = out["rules"][0]
    lo, hi = row["kla_pi95_per_s"]
    assert lo < row["kla_per_s"] < hi
    # a 5 m3 vessel is outside the pilot vessels the fit saw: the domain check says so
    assert row["extrapolation"]["extrapolated"] is True
    with Campaign(demo_copy) as c:
        assert c.study("with-fit")["fit_id"] is not None
