"""`scaleup power` end to end through the installed entry point."""

from __future__ import annotations

import json

import pytest

from .cli_helpers import scaleup, scaleup_json

BASE = ("power", "--impeller", "disc-turbine", "--diameter", "0.1 m", "--tank-diameter",
        "0.3 m", "--liquid-height", "0.3 m", "--speed", "600 rpm")


def test_json_contract_and_values():
    out = scaleup_json(*BASE, "--gas-flow", "5 NL/min", "--temp", "30 degC")
    for key in ("power_w", "gassed_power_w", "power_per_volume_w_m3", "reynolds",
                "power_number", "flow_number", "froude", "regime", "n_flood_rps", "n_cd_rps",
                "tip_speed_m_s", "blend_time_95_s", "superficial_gas_velocity_m_s", "vvm",
                "warnings", "cautions"):
        assert key in out, key
    assert out["speed_rps"] == pytest.approx(10.0)
    assert out["temperature_k"] == pytest.approx(303.15)
    # P = Np rho N^3 D^5 with the catalogue Np 5 and water at 30 degC (IAPWS: 995.6 kg/m3)
    assert out["power_w"] == pytest.approx(5.0 * out["density_kg_m3"] * 1000 * 1e-5, rel=1e-9)
    assert out["density_kg_m3"] == pytest.approx(995.65, abs=0.05)
    assert out["regime"] in ("flooded", "loaded", "completely dispersed")
    assert out["gassed_power_w"] < out["power_w"]
    assert out["vvm"] == pytest.approx(5e-3 / (3.14159265 * 0.0225 * 0.3), rel=1e-4)
    assert isinstance(out["warnings"], list) and out["cautions"]


def test_several_impellers_from_a_volume_and_table_output():
    out = scaleup_json("power", "--impeller", "disc-turbine", "--impeller", "pitched-blade-6",
                       "--diameter", "0.5 m", "--tank-diameter", "1.5 m", "--volume", "5 m3",
                       "--spacing", "1.5 m", "--speed", "120 rpm", "--gas-flow", "0.5 vvm",
                       "--bottom", "elliptical")
    assert out["liquid_volume_m3"] == pytest.approx(5.0, rel=1e-9)
    assert len(out["power_numbers"]) == 2
    assert out["blend_method"] == "Cooke"
    table = scaleup(*BASE, "--gas-flow", "5 NL/min", check=True)
    assert "gassed power" in table.stdout and "caution:" in table.stdout


def test_list_impellers():
    out = scaleup_json("power", "--list-impellers")
    ids = [i["id"] for i in out["impellers"]]
    assert "disc-turbine" in ids and "helical-ribbon" in ids
    assert all(i["sources"]["power_number"] for i in out["impellers"])
    assert "Bujalski" in scaleup("power", "--list-impellers", check=True).stdout


@pytest.mark.parametrize("args,message", [
    (("--impeller", "turbo-9000"), "known types: disc-turbine"),
    (("--diameter", "0.3 m"), "not smaller than the tank diameter"),
    (("--gas-flow", "-2 NL/min"), "negative"),
    (("--speed", "600 kg"), "expected a rotational speed"),
])
def test_bad_input_exits_2_with_a_clear_message(args, message):
    base = list(BASE)
    for flag, value in zip(args[::2], args[1::2], strict=True):
        if flag in base:
            base[base.index(flag) + 1] = value
        else:
            base += [flag, value]
    out = scaleup(*base, "--json")
    assert out.returncode == 2, out.stderr
    assert message in out.stderr
    assert "Traceback" not in out.stderr
    with pytest.raises(json.JSONDecodeError):
        json.loads(out.stdout or "x")
