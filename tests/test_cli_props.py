"""`scaleup props ...` and `scaleup transport ...`: JSON contracts, lab units, bad input.

Most calls run :func:`scaleup.cli.main` in-process (fast); two go through the installed
entry point to check the wiring as a user meets it.
"""

from __future__ import annotations

import json

import pytest

from scaleup.cli import main

from .cli_helpers import scaleup


def run(capsys, *args: str) -> tuple[int, str, str]:
    with pytest.raises(SystemExit) as exit_info:
        main(list(args))
    captured = capsys.readouterr()
    return exit_info.value.code, captured.out, captured.err


def run_json(capsys, *args: str) -> dict:
    code, out, err = run(capsys, *args, "--json")
    assert code == 0, err
    return json.loads(out)


def test_props_water_json_keys_and_values(capsys):
    out = run_json(capsys, "props", "water", "--temp", "25 degC")
    for key in ("temperature_k", "pressure_pa", "density_kg_m3", "viscosity_pa_s",
                "surface_tension_n_m", "vapour_pressure_pa", "heat_capacity_j_kg_k",
                "kinematic_viscosity_m2_s", "sources", "warnings"):
        assert key in out, key
    assert out["density_kg_m3"] == pytest.approx(997.05, abs=0.01)  # IAPWS-95
    assert out["viscosity_pa_s"] == pytest.approx(890.0e-6, rel=1e-3)  # IAPWS 2008


def test_props_water_overrides_in_lab_units(capsys):
    out = run_json(capsys, "props", "water", "--temp", "77 degF", "--viscosity", "1.5 cP",
                   "--pressure", "0.5 barg")
    assert out["temperature_k"] == pytest.approx(298.15)
    assert out["viscosity_pa_s"] == pytest.approx(1.5e-3)
    assert out["sources"]["viscosity"] == "measured"
    assert out["pressure_pa"] == pytest.approx(151325.0)


def test_props_solubility_o2_json_contract(capsys):
    out = run_json(capsys, "props", "solubility", "--gas", "O2", "--temp", "25 degC")
    for key in ("c_star_mol_m3", "c_star_mg_l", "method", "warnings", "cautions"):
        assert key in out, key
    assert out["method"] == "benson-krause"
    assert out["c_star_mg_l"] == pytest.approx(8.26, abs=0.005)  # Standard Methods 4500-O


def test_props_solubility_salt_salinity_and_enrichment(capsys):
    base = run_json(capsys, "props", "solubility", "--gas", "o2", "--temp", "30 degC")
    salted = run_json(capsys, "props", "solubility", "--gas", "O2", "--temp", "30 degC",
                      "--salt", "NaCl=0.5 mol/L", "--salt", "KH2PO4=2 g/L")
    saline = run_json(capsys, "props", "solubility", "--gas", "O2", "--temp", "30 degC",
                      "--salinity", "10 g/kg")
    enriched = run_json(capsys, "props", "solubility", "--gas", "O2", "--temp", "30 degC",
                        "--o2-fraction", "0.5", "--pressure", "2 bara")
    assert salted["c_star_mol_m3"] < base["c_star_mol_m3"]
    assert salted["salts_mol_m3"]["KH2PO4"] == pytest.approx(2.0 / 136.08e-3)
    assert saline["c_star_mol_m3"] < base["c_star_mol_m3"]
    assert enriched["c_star_mol_m3"] > 4 * base["c_star_mol_m3"]
    assert any("Oxygen-enriched" in c for c in enriched["cautions"])


def test_props_solubility_log_mean_for_a_tall_vessel(capsys):
    out = run_json(capsys, "props", "solubility", "--gas", "O2", "--temp", "30 degC",
                   "--liquid-height", "10 m", "--exit-fraction", "0.17")
    assert out["c_star_top_mol_m3"] < out["c_star_log_mean_mol_m3"] < out["c_star_bottom_mol_m3"]
    assert out["bottom_pressure_pa"] > out["head_pressure_pa"]


def test_props_solubility_hydrogen_carries_the_flammable_caution(capsys):
    out = run_json(capsys, "props", "solubility", "--gas", "H2", "--temp", "60 degC",
                   "--pressure", "5 bara", "--method", "henry-iapws")
    assert out["method"] == "henry-iapws"
    assert any("Hydrogen" in c for c in out["cautions"])


def test_props_diffusivity_single_and_all(capsys):
    one = run_json(capsys, "props", "diffusivity", "--solute", "O2", "--solvent", "water",
                   "--temp", "25 degC")
    assert one["diffusivity_m2_s"] == pytest.approx(2.0e-9, rel=0.01)  # Han and Bartels
    assert one["schmidt"] == pytest.approx(0.8900e-3 / (997.05 * one["diffusivity_m2_s"]),
                                           rel=1e-3)
    every = run_json(capsys, "props", "diffusivity", "--solute", "O2", "--temp", "25 degC",
                     "--all")
    names = [m["method"] for m in every["methods"]]
    assert names[0] == "measured" and "wilke-chang" in names and "hayduk-minhas" in names
    assert all("diffusivity_m2_s" in m and "schmidt" in m for m in every["methods"])
    assert 0 < every["spread_fraction"] < 0.5


def test_props_diaphragm_cell_reduction(capsys):
    out = run_json(capsys, "props", "diaphragm-cell", "--ref-diffusivity", "1.87e-9 m2/s",
                   "--ref-time", "24 h", "--ref-dc0", "0.1 mol/L", "--ref-dc", "0.06 mol/L",
                   "--time", "24 h", "--dc0", "0.2 mmol/L", "--dc", "0.12 mmol/L")
    assert out["diffusivity_m2_s"] == pytest.approx(1.87e-9)  # same decay, same D


def test_transport_convective_and_fick(capsys):
    conv = run_json(capsys, "transport", "convective", "--velocity", "2 cm/s", "--density",
                    "1000 kg/m3", "--concentration", "0.2 mmol/L", "--cp", "4.2 kJ/(kg K)",
                    "--temp", "35 degC", "--ref-temp", "25 degC")
    assert conv["mass_flux_kg_m2_s"] == pytest.approx(20.0)
    assert conv["molar_flux_mol_m2_s"] == pytest.approx(0.004)
    assert conv["heat_flux_w_m2"] == pytest.approx(20.0 * 4200.0 * 10.0)
    fick = run_json(capsys, "transport", "fick", "--diffusivity", "2e-9 m2/s", "--c1",
                    "0.24 mol/m3", "--c2", "0 mol/m3", "--thickness", "20 um")
    assert fick["flux_mol_m2_s"] == pytest.approx(2.4e-5)
    assert fick["kl_m_s"] == pytest.approx(1e-4)


def test_transport_fick_profile_file(capsys, tmp_path):
    path = tmp_path / "profile.csv"
    path.write_text("z_m;c_mol_m3\n0;0.3\n1e-5;0.2\n2e-5;0.1\n3e-5;0.0\n", encoding="utf-8")
    out = run_json(capsys, "transport", "fick", "--diffusivity", "2e-9 m2/s", "--profile",
                   str(path))
    assert [p["flux_mol_m2_s"] for p in out["profile"]] == pytest.approx([2e-5] * 4)


def test_transport_film_gives_every_model_parameter(capsys):
    out = run_json(capsys, "transport", "film", "--diffusivity", "2e-9 m2/s", "--kl",
                   "1e-4 m/s")
    assert out["film_thickness_m"] == pytest.approx(2e-5)
    assert out["renewal_rate_per_s"] == pytest.approx(5.0)
    assert out["contact_time_s"] == pytest.approx(4 * 2e-9 / (3.141592653589793 * 1e-8))


def test_transport_convert_kla_o2_to_h2(capsys):
    out = run_json(capsys, "transport", "convert-kl", "--kla", "120 1/h", "--from", "O2",
                   "--to", "H2", "--temp", "25 degC")
    ratio = out["diffusivity_to_m2_s"] / out["diffusivity_from_m2_s"]
    assert out["kla_from_per_s"] == pytest.approx(120 / 3600)
    assert out["kla_film_per_s"] == pytest.approx(120 / 3600 * ratio)
    assert out["kla_penetration_per_s"] == pytest.approx(120 / 3600 * ratio ** 0.5)
    assert out["kla_low_per_s"] <= out["kla_estimate_per_s"] <= out["kla_high_per_s"]
    assert any("Hydrogen" in c for c in out["cautions"])


@pytest.mark.parametrize("args, message", [
    (("props", "solubility", "--gas", "Xe", "--temp", "30 degC"), "unknown gas 'Xe'"),
    (("props", "solubility", "--gas", "O2", "--temp", "30 degC", "--salt", "Foo=1 mol/L"),
     "unknown salt or ion 'Foo'"),
    (("props", "solubility", "--gas", "O2", "--temp", "30 degC", "--salt", "NaCl=-1 mol/L"),
     "-1000 mol/m3 must be zero or more"),
    (("props", "solubility", "--gas", "O2", "--temp", "90 degC", "--method", "garcia-gordon"),
     "363.15 K is outside the range of garcia-gordon: 273.15 to 313.15 K"),
    (("props", "water", "--temp", "120 degC"), "393.15 K is outside"),
    (("props", "water", "--temp", "30 kg"), "is a mass"),
    (("props", "diffusivity", "--solute", "O2", "--temp", "25 degC", "--method", "fuller"),
     "fuller is for gas mixtures"),
    (("transport", "fick", "--solute", "O2"), "give one of"),
    (("transport", "convert-kl", "--kl", "1e-4 m/s", "--from", "O2"), "--d-to and --to"),
])
def test_bad_input_exits_2_with_a_clear_message(capsys, args, message):
    code, out, err = run(capsys, *args)
    assert code == 2
    assert message in err and "Traceback" not in err


def test_entry_point_table_output_and_json():
    table = scaleup("props", "solubility", "--gas", "O2", "--temp", "30 degC", check=True)
    assert "7.559 mg/L" in table.stdout and "caution:" in table.stdout
    out = scaleup("transport", "film", "--solute", "O2", "--kl", "2e-4 m/s", "--json",
                  check=True)
    assert json.loads(out.stdout)["kl_m_s"] == pytest.approx(2e-4)
