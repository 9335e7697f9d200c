"""`scaleup fit kla|sherwood`, `compare` and `predict` on a synthetic campaign.

The campaign's kLa values are generated from van't Riet (1979) coalescing, 0.026 (Pg/V)^0.4
us^0.5, at each run's Pg/V and us as the service layer computes them, with 5 % scatter; the
fluxes from Ranz and Marshall (1952), Sh = 2 + 0.6 Re^0.5 Sc^(1/3). Fitting must give those
equations back within their intervals.
"""

from __future__ import annotations

import json

import numpy as np
import pytest
from click.testing import CliRunner

from scaleup.campaign import Campaign
from scaleup.cli import cli
from scaleup.correlate.published import kla_vant_Riet

from .cli_helpers import scaleup
from .conftest import DISC, P20

T300 = {"name": "T-300", "tank diameter": "0.73 m", "liquid height": "0.73 m",
        "baffle width": "73 mm"}
DISC300 = [{"impeller type": "disc-turbine", "impeller diameter": "243 mm",
            "clearance": "243 mm"}]


@pytest.fixture(scope="module")
def campaign_path(tmp_path_factory):
    path = tmp_path_factory.mktemp("fit") / "fit.db"
    rng = np.random.default_rng(0)
    with Campaign.create(path) as c:
        c.add_vessel(P20, DISC)
        c.add_vessel(T300, DISC300)
        c.add_medium({"name": "tap water", "coalescence": "coalescing"})
        for vessel, speeds in (("T-20", (350, 500, 700, 900)), ("T-300", (150, 220, 300, 380))):
            for speed in speeds:
                for vvm in ("0.3 vvm", "0.7 vvm", "1.2 vvm"):
                    c.add_run({"vessel": vessel, "medium": "tap water",
                               "date": "2026-02-02T10:00", "speed": f"{speed} rpm",
                               "gas flow": vvm, "temperature": "30 degC"})
        for row in c.runs_derived():
            kla = float(kla_vant_Riet(row["gassed_power_per_volume_w_m3"],
                                      row["superficial_gas_velocity_m_s"]))
            kla *= float(np.exp(rng.normal(0.0, 0.05)))
            c.edit_run(row["id"], {"kla": f"{kla} 1/s", "kla stderr": f"{0.05 * kla} 1/s"})
        for re, sc in ((20, 400), (60, 500), (150, 450), (300, 600), (500, 550), (90, 700)):
            d, mu, rho, length = 2e-9, 0.9e-3, 1000.0, 0.01
            velocity = re * mu / (rho * length)
            sh = (2 + 0.6 * re**0.5 * sc ** (1 / 3)) * float(np.exp(rng.normal(0, 0.02)))
            c.add_flux({"solute": "O2", "interfacial area": "1e-3 m2",
                        "flux": f"{sh * d / length * 0.25} mol/(m2 s)",
                        "interface concentration": "0.25 mol/m3",
                        "bulk concentration": "0 mol/m3", "length": f"{length} m",
                        "velocity": f"{velocity} m/s", "temperature": "25 degC",
                        "diffusivity": f"{mu / (rho * sc) * 1e9:.6g}e-9 m2/s",
                        "density": f"{rho} kg/m3", "viscosity": f"{mu} Pa s"})
    return path


def run(*args, db=None):
    prefix = ["--db", str(db)] if db is not None else []
    result = CliRunner().invoke(cli, [*prefix, *args], catch_exceptions=False)
    assert result.exit_code == 0, result.output
    return result.output


def run_json(*args, db=None) -> dict:
    return json.loads(run(*args, "--json", db=db))


def test_fit_kla_json_contract_and_recovery(campaign_path):
    out = run_json("fit", "kla", "--weights", "stderr", db=campaign_path)
    for key in ("parameters", "r2_log", "rmse_log", "aic", "n_runs", "domain", "loo_vessel",
                "warnings"):
        assert key in out, key
    assert out["n_runs"] == 24
    params = {p["name"]: p for p in out["parameters"]}
    for name, true in (("C", 0.026), ("a_power", 0.4), ("b_gas_velocity", 0.5)):
        assert set(params[name]) >= {"name", "value", "stderr", "ci95"}
        assert params[name]["ci95"][0] < true < params[name]["ci95"][1], name
    assert out["rmse_log"] == pytest.approx(0.05, rel=0.5)
    folds = out["loo_vessel"]["folds"]
    assert {f["vessel"] for f in folds} == {"T-20", "T-300"}
    assert out["domain"]["ranges"]["vessel_volume_m3"][1] == pytest.approx(
        np.pi / 4 * 0.73**3, rel=0.02)


def test_saved_fit_predicts_with_intervals_and_flags_scale(campaign_path, tmp_path):
    run("fit", "kla", "--save", "vr", "--out", str(tmp_path / "vr.json"), db=campaign_path)
    point = ("--pg-per-volume", "1.5 kW/m3", "--superficial-velocity", "0.008 m/s")
    inside = run_json("predict", "--fit", "vr", *point, db=campaign_path)
    true = float(kla_vant_Riet(1500.0, 0.008))
    assert inside["ci95_per_s"][0] < true < inside["ci95_per_s"][1]
    assert inside["pi95_per_s"][0] < inside["ci95_per_s"][0]
    assert inside["kla_per_s"] == pytest.approx(true, rel=0.1)
    assert inside["cautions"]
    big = run_json("predict", "--fit", "vr", *point, "--volume", "30 m3", db=campaign_path)
    assert big["extrapolation"]["extrapolated"] is True
    assert big["extrapolation"]["range_factors"]["vessel_volume_m3"] > 50
    # the same fit from its JSON file, with no campaign at all
    from_file = run_json("predict", "--fit", str(tmp_path / "vr.json"), *point,
                         db=tmp_path / "absent.db")
    assert from_file["kla_per_s"] == pytest.approx(inside["kla_per_s"], rel=1e-12)
    assert from_file["pi95_per_s"] == pytest.approx(inside["pi95_per_s"], rel=1e-12)


def test_compare_on_runs_ranks_the_generating_correlation(campaign_path):
    run("fit", "kla", "--save", "vr-compare", db=campaign_path)
    out = run_json("compare", "--fit", "vr-compare", "--published", "vant-riet-coalescing",
                   "--published", "vant-riet-noncoalescing", db=campaign_path)
    rows = {r["name"]: r for r in out["comparison"]}
    assert abs(rows["vant-riet-coalescing"]["mean_bias_fraction"]) < 0.05
    assert rows["vant-riet-coalescing"]["within_20_fraction"] == 1.0
    assert out["comparison"][-1]["name"] == "vant-riet-noncoalescing"
    assert rows["vr-compare"]["n_in_domain"] == 24


def test_compare_and_predict_published_need_no_campaign(tmp_path):
    absent = tmp_path / "none.db"
    out = run_json("compare", "--published", "vant-riet-coalescing", "--published",
                   "vant-riet-noncoalescing", "--pg-per-volume", "1 kW/m3",
                   "--superficial-velocity", "0.01 m/s", db=absent)
    values = {r["name"]: r["kla_per_s"] for r in out["predictions"]}
    # van't Riet (1979) as the equations state: 0.0412 and 0.100 1/s
    assert values["vant-riet-coalescing"] == pytest.approx(0.0412, abs=5e-5)
    assert values["vant-riet-noncoalescing"] == pytest.approx(0.100, abs=5e-4)
    listing = run_json("compare", "--list", db=absent)
    assert {"vant-riet-coalescing", "ranz-marshall", "lamont-scott"} <= {
        e["key"] for e in listing["published"]}
    one = run_json("predict", "--published", "vant-riet-coalescing", "--pg-per-volume",
                   "20 kW/m3", "--superficial-velocity", "0.01 m/s", db=absent)
    assert one["ci95_per_s"] is None and one["extrapolation"]["extrapolated"] is True
    assert not absent.exists()


def test_editing_a_run_marks_the_saved_fit_stale(tmp_path, campaign_path):
    copy = tmp_path / "copy.db"
    copy.write_bytes(campaign_path.read_bytes())
    run("fit", "kla", "--save", "before-edit", db=copy)
    with Campaign(copy) as c:
        first = c.runs()[0]
        c.edit_run(first["id"], {"kla": "0.05 1/s"})
    out = run_json("predict", "--fit", "before-edit", "--pg-per-volume", "1 kW/m3",
                   "--superficial-velocity", "0.01 m/s", db=copy)
    assert any("stale" in w for w in out["warnings"])


def test_fit_sherwood_recovers_ranz_marshall(campaign_path):
    out = run_json("fit", "sherwood", "--plus-two", "--fix-sc-exponent", "0.333333333",
                   db=campaign_path)
    params = {p["name"]: p for p in out["parameters"]}
    assert params["A"]["ci95"][0] < 0.6 < params["A"]["ci95"][1]
    assert params["b_reynolds"]["ci95"][0] < 0.5 < params["b_reynolds"]["ci95"][1]
    assert params["c_schmidt"]["fixed"]
    assert out["n_runs"] == 6 and out["kind"] == "sherwood"


def test_tables_print_for_people(campaign_path):
    text = run("fit", "kla", "--robust", db=campaign_path)
    assert "Leave one vessel out" in text and "b_gas_velocity" in text


@pytest.mark.parametrize("args, message", [
    (("predict", "--pg-per-volume", "1 kW/m3"), "either --fit"),
    (("predict", "--fit", "nobody", "--pg-per-volume", "1 kW/m3"), 'no fit named "nobody"'),
    (("predict", "--published", "vant-riet-coalescing", "--pg-per-volume", "1 kg"),
     "pg-per-volume"),
    (("fit", "kla", "--where", "colour = 'red'"), "unknown column"),
    (("fit", "kla", "--fix", "a_power"), "NAME=NUMBER"),
])
def test_bad_input_exits_2_with_a_message(campaign_path, args, message):
    out = scaleup(*args, db=campaign_path)
    assert out.returncode == 2, out.stdout + out.stderr
    assert message in out.stderr and "Traceback" not in out.stderr
