"""Exports read back unchanged (round trips), in lab units or SI, written whole or not at all."""

from __future__ import annotations

import csv
import json
import math
import os

import numpy as np
import pytest

from scaleup import fields as F
from scaleup import units
from scaleup.campaign import Campaign
from scaleup.errors import InputError

from .conftest import DISC, P20, add_run

FORMATS = [(".csv", False, False), (".xlsx", False, False), (".json", False, False),
           (".csv", True, False), (".xlsx", True, True), (".csv", False, True)]
FORMAT_IDS = ["csv", "xlsx", "json", "csv-si", "xlsx-si-units-row", "csv-units-row"]


def _same(a, b) -> bool:
    """Equal; floats to the 16 significant digits an XLSX cell keeps (lab units add the
    rounding of one conversion there and back)."""
    if isinstance(a, float) and isinstance(b, float):
        return math.isclose(a, b, rel_tol=1e-14, abs_tol=1e-15)
    return a == b


def _fresh(tmp_path, name: str) -> Campaign:
    other = Campaign.create(tmp_path / name)
    other.add_vessel(P20, DISC, {"sparger type": "ring", "sparger diameter": "70 mm",
                                 "sparger height": "40 mm"})
    other.add_medium({"name": "tap water", "coalescence": "coalescing"})
    return other


@pytest.fixture
def filled(campaign):
    """A campaign with runs (every run field used), curves in two units and flux tests."""
    first = add_run(campaign, ref="W-1", speed="400 rpm", **{
        "gas flow": "12.5 NL/min", "o2 fraction": "0.21", "head pressure": "0.35 barg",
        "measured power": "48 W", "measured torque": "1.15 N m", "kla": "61.5 1/h",
        "kla stderr": "2.2 1/h", "kla method": "dynamic", "gas holdup": "0.031",
        "notes": 'tap water, "fresh", 30 degC'})
    second = add_run(campaign, ref="W-2", speed="650 rpm", date="2026-02-02T11:30",
                     temperature="25.5 degC")
    t = np.linspace(0.0, 180.0, 91)
    campaign.add_curve(first, t, 100 * (1 - np.exp(-t / 40)), "%", probe_tau_s=5.5,
                       gas_on_s=2.0, notes="curve one")
    c = 7.9 * (1 - np.exp(-t / 25))
    c[10] = np.nan  # a dropped sample survives the trip as a missing value
    campaign.add_curve(second, t + 0.25, c, "mg/L", kind="dynamic")
    campaign.add_flux({"solute": "O2", "interfacial area": "25 cm2", "flux": "1.1e-5 mol/(m2 s)",
                       "interface concentration": "1.16 mol/m3", "bulk concentration": "0 mol/m3",
                       "length": "5 cm", "velocity": "0.04 m/s", "temperature": "30 degC",
                       "diffusivity": "2.4e-9 m2/s", "notes": "cell 1"}, first)
    return campaign


@pytest.mark.parametrize("suffix,si,units_row", FORMATS, ids=FORMAT_IDS)
def test_runs_round_trip(filled, tmp_path, suffix, si, units_row):
    out = tmp_path / f"runs{suffix}"
    result = filled.export_file("runs", out, si=si, units_row=units_row)
    assert result["n_rows"] == 2
    with _fresh(tmp_path, "other.db") as other:
        other.import_file("runs", out)
        for a, b in zip(filled.runs(), other.runs(), strict=True):
            full_a, full_b = filled.run(a["id"]), other.run(b["id"])
            for spec in F.RUN:
                assert _same(full_a[spec.column], full_b[spec.column]), spec.column
            assert full_a["kla_method"] == full_b["kla_method"]


def test_headers_are_lab_units_or_si(filled, tmp_path):
    filled.export_file("runs", tmp_path / "lab.csv")
    filled.export_file("runs", tmp_path / "si.csv", si=True)
    filled.export_file("runs", tmp_path / "two.csv", units_row=True)
    lab = next(csv.reader(open(tmp_path / "lab.csv", encoding="utf-8")))
    si = next(csv.reader(open(tmp_path / "si.csv", encoding="utf-8")))
    assert "speed [rpm]" in lab and "gas flow [NL/min]" in lab and "temperature [degC]" in lab
    assert "speed [rev/s]" in si and "gas flow [mol/s]" in si and "temperature [K]" in si
    rows = list(csv.reader(open(tmp_path / "two.csv", encoding="utf-8")))
    assert rows[0][:5] == ["ref", "vessel", "medium", "date", "speed"]
    assert rows[1][4] == "[rpm]"
    lab_rows = list(csv.DictReader(open(tmp_path / "lab.csv", encoding="utf-8")))
    # 12.5 NL/min in, 12.5 NL/min out; 0.35 barg is 1.36325 bara (101.325 kPa atmosphere)
    assert float(lab_rows[0]["gas flow [NL/min]"]) == pytest.approx(12.5, rel=1e-12)
    assert float(lab_rows[0]["head pressure [bara]"]) == pytest.approx(1.36325, rel=1e-12)


def test_vessels_round_trip(campaign, tmp_path):
    campaign.add_vessel({"name": "P-300", "tank diameter": "0.7 m", "working volume": "300 L",
                         "bottom shape": "elliptical", "jacket area": "1.6 m2",
                         "jacket u": "450 W/(m2 K)", "motor limit": "1.5 kW"},
                        [{"impeller type": "disc-turbine", "impeller diameter": "0.23 m",
                          "clearance": "0.23 m", "blade count": "6"},
                         {"impeller type": "pitched-blade-4", "impeller diameter": "0.25 m",
                          "clearance": "0.6 m", "power number": "1.3"}],
                        {"sparger type": "ring", "orifice count": "24",
                         "orifice diameter": "3 mm"})
    for suffix in (".csv", ".xlsx", ".json"):
        out = tmp_path / f"vessels{suffix}"
        campaign.export_file("vessels", out)
        with Campaign.create(tmp_path / f"v{suffix}.db") as other:
            assert other.import_file("vessels", out)["added"] == 2
            for a, b in zip(campaign.vessels(), other.vessels(), strict=True):
                for spec in F.VESSEL:
                    assert _same(a[spec.column], b[spec.column]), spec.column
                for ia, ib in zip(a["impellers"], b["impellers"], strict=True):
                    for spec in F.IMPELLER:
                        assert _same(ia[spec.column], ib[spec.column]), spec.column
                for spec in F.SPARGER:
                    assert _same(a["sparger"][spec.column], b["sparger"][spec.column])


@pytest.mark.parametrize("suffix", [".csv", ".xlsx", ".json"])
def test_curves_and_fluxes_round_trip(filled, tmp_path, suffix):
    filled.export_file("curves", tmp_path / f"curves{suffix}")
    filled.export_file("fluxes", tmp_path / f"fluxes{suffix}")
    with _fresh(tmp_path, "other.db") as other:
        other.import_file("runs", _runs_file(filled, tmp_path))
        result = other.import_file("curves", tmp_path / f"curves{suffix}")
        assert result["added"] == 2
        for a, b in zip(filled.curves(), other.curves(), strict=True):
            ca, cb = filled.curve(a["id"]), other.curve(b["id"])
            # XLSX keeps 16 significant digits, CSV and JSON every digit
            rtol = 1e-15 if suffix == ".xlsx" else 0.0
            np.testing.assert_allclose(cb["time_s"], ca["time_s"], rtol=rtol, atol=0)
            np.testing.assert_allclose(cb["do_values"], ca["do_values"], rtol=rtol, atol=0)
            assert np.isnan(cb["do_values"]).sum() == np.isnan(ca["do_values"]).sum()
            for key in ("do_unit", "kind", "probe_tau_s", "gas_on_s", "notes"):
                assert ca[key] == cb[key], key
        other.import_file("fluxes", tmp_path / f"fluxes{suffix}")
        for a, b in zip(filled.fluxes(), other.fluxes(), strict=True):
            for spec in F.FLUX:
                assert _same(a[spec.column], b[spec.column]), spec.column
            assert b["run_id"] == a["run_id"]


def _runs_file(campaign, tmp_path):
    path = tmp_path / "runs-for-curves.csv"
    campaign.export_file("runs", path)
    return path


def test_curve_export_in_si_converts_mg_per_l(filled, tmp_path):
    result = filled.export_file("curves", tmp_path / "si.csv", si=True)
    assert any("stays in %" in w for w in result["warnings"])
    rows = [r for r in csv.DictReader(open(tmp_path / "si.csv", encoding="utf-8"))
            if r["run"] == "W-2"]
    assert {r["DO unit"] for r in rows} == {"mol/m3"}
    stored = filled.curve(2)["do_values"]
    # M(O2) = 31.998 g/mol (IUPAC standard atomic weight of O, 15.999): 7.9 mg/L is 0.2469 mol/m3
    assert float(rows[-1]["DO"]) == pytest.approx(stored[-1] / 31.998, rel=1e-12)


def test_curve_export_follows_the_run_filter(filled, tmp_path):
    result = filled.export_file("curves", tmp_path / "fast.csv", where="speed > 500 rpm")
    assert result["n_rows"] == 91
    with pytest.raises(InputError, match="--where filters runs"):
        filled.export_file("vessels", tmp_path / "v.csv", where="speed > 500 rpm")


def test_study_export(campaign, tmp_path):
    results = {"kind": "design", "speed_rps": 1.75, "gas_flow_mol_s": 4.5,
               "total_power_w": 61250.0, "kla_pi95_per_s": [0.02, 0.05],
               "rules": [{"rule": "p-per-v", "speed_rps": 1.5, "power_w": 5.0e4},
                         {"rule": "tip-speed", "speed_rps": 1.2, "power_w": 3.1e4}],
               "warnings": ["an invented warning"], "cautions": ["an invented caution"]}
    study_id = campaign.save_study("trial", "design", {"process": {"our": 0.0139}}, results)
    campaign.export_file("study", tmp_path / "s.json", name="trial")
    saved = json.loads((tmp_path / "s.json").read_text())
    assert saved["study"]["results"] == results and saved["study"]["id"] == study_id
    campaign.export_file("study", tmp_path / "s.csv", name=str(study_id))
    pairs = {r["key"]: r for r in csv.DictReader(open(tmp_path / "s.csv", encoding="utf-8"))}
    assert float(pairs["results.speed_rps"]["value"]) == pytest.approx(105.0)  # rev/s * 60
    assert pairs["results.speed_rps"]["unit"] == "rpm"
    assert float(pairs["results.total_power_w"]["value"]) == pytest.approx(61.25)
    assert json.loads(pairs["results.kla_pi95_per_s"]["value"]) == pytest.approx([72.0, 180.0])
    assert float(pairs["results.gas_flow_mol_s"]["value"]) == pytest.approx(
        4.5 / units.MOL_PER_NORMAL_M3 * 60e3)  # NL/min, DIN 1343 normal conditions
    campaign.export_file("study", tmp_path / "s-si.xlsx", name="trial", si=True)
    import openpyxl

    book = openpyxl.load_workbook(tmp_path / "s-si.xlsx")
    assert book.sheetnames == ["study", "rules"]
    assert [c.value for c in book["rules"][1]] == ["rule", "speed [rev/s]", "power [W]"]
    assert book["rules"]["B2"].value == 1.5
    with pytest.raises(InputError, match="saved studies: trial"):
        campaign.export_file("study", tmp_path / "x.json", name="nope")


def test_fits_export(campaign, tmp_path):
    from scaleup.correlate import fit_kla, kla_observations

    pv = np.array([300.0, 600.0, 1200.0, 2400.0, 600.0, 2400.0, 900.0])
    us = np.array([0.004, 0.004, 0.008, 0.008, 0.016, 0.016, 0.01])
    noise = np.array([1.02, 0.97, 1.01, 0.99, 1.03, 0.98, 1.0])
    kla = 0.026 * pv**0.4 * us**0.5 * noise  # van't Riet (1979) coalescing form, perturbed
    ids = [add_run(campaign, date=f"2026-02-0{i + 1}", kla=f"{k * 3600} 1/h")
           for i, k in enumerate(kla)]
    data = kla_observations(kla, gassed_power_per_volume_w_m3=pv, superficial_velocity_m_s=us,
                            run_id=ids)
    result = fit_kla(data, power_basis="gassed")

    class Report:  # what the fitting layer's FitReport offers save_fit
        kind, selection = "kla", ""

        def __init__(self, result):
            self.result = result

        def stored(self):
            return self.result.to_dict()
    campaign.save_fit("synthetic", Report(result))
    campaign.export_file("fits", tmp_path / "fits.json")
    saved = json.loads((tmp_path / "fits.json").read_text())["fits"][0]
    assert saved["run_ids"] == ids and saved["name"] == "synthetic"
    again = type(result).from_dict(saved["model"])
    np.testing.assert_allclose(again.params, result.params, rtol=1e-15)
    campaign.export_file("fits", tmp_path / "fits.csv")
    rows = list(csv.DictReader(open(tmp_path / "fits.csv", encoding="utf-8")))
    assert [r["parameter"] for r in rows] == [p["name"] for p in result.parameters()]
    for row, p in zip(rows, result.parameters(), strict=True):
        assert float(row["value"]) == p["value"]
        assert float(row["ci95 low"]) == p["ci95"][0]
    campaign.export_file("fits", tmp_path / "fits.xlsx", name="synthetic")
    import openpyxl

    assert openpyxl.load_workbook(tmp_path / "fits.xlsx").sheetnames == ["fits", "parameters",
                                                                          "runs"]


def test_an_interrupted_export_leaves_no_file(filled, tmp_path):
    target = tmp_path / "curves.csv"
    target.write_text("the previous export\n")

    def interrupt(stage, done, total):
        raise KeyboardInterrupt
    with pytest.raises(KeyboardInterrupt):
        filled.export_file("curves", target, progress=interrupt)
    assert target.read_text() == "the previous export\n"
    assert [p for p in os.listdir(tmp_path) if not p.startswith("test.db")] == ["curves.csv"]


def test_unknown_formats_are_refused(filled, tmp_path):
    with pytest.raises(InputError, match="use .csv, .xlsx, .json"):
        filled.export_file("runs", tmp_path / "runs.ods")
    with pytest.raises(InputError, match="choose one of runs, vessels"):
        filled.export_file("media", tmp_path / "m.csv")
    with pytest.raises(InputError, match="does not exist"):
        filled.export_file("runs", tmp_path / "no" / "runs.csv")
