"""operating_point: the end-to-end evaluation the other layers call."""

from __future__ import annotations

import inspect
import re

import numpy as np
import pytest

from scaleup.errors import InputError
from scaleup.hydro import dispersion, geometry, impellers, mixing, point, power, regimes
from scaleup.hydro.geometry import Impeller, Vessel, standard_vessel
from scaleup.hydro.point import operating_point

WATER = {"temperature": 303.15, "rho": 995.6, "mu": 0.797e-3, "sigma": 0.0712}


def pilot() -> Vessel:
    return standard_vessel(0.3)


def test_scalar_and_vector_evaluations_agree():
    v = pilot()
    speeds = np.array([5.0, 10.0, 15.0])
    flows = np.array([0.0, 0.002, 0.004])
    grid = operating_point(v, speeds[:, None], flows[None, :], **WATER)
    assert grid.power.shape == (3, 3)
    for i, n in enumerate(speeds):
        for j, q in enumerate(flows):
            one = operating_point(v, float(n), float(q), **WATER)
            assert isinstance(one.power, float) and isinstance(one.regime, str)
            assert grid.gassed_power[i, j] == pytest.approx(one.gassed_power, rel=1e-12)
            assert grid.regime[i, j] == one.regime
            assert grid.blend_time_95[i, j] == pytest.approx(one.blend_time_95, rel=1e-12)


def test_pieces_add_up():
    v = pilot()
    op = operating_point(v, 10.0, 0.003, **WATER)
    D = v.impellers[0].diameter
    assert op.power == pytest.approx(5.0 * WATER["rho"] * 10.0 ** 3 * D ** 5, rel=1e-12)
    assert op.power_per_volume == pytest.approx(op.power / v.volume)
    assert op.gassed_power == pytest.approx(op.power * power.gassed_power_ratio_Cui(
        op.flow_number), rel=1e-12)
    assert op.tip_speed == pytest.approx(np.pi * 10.0 * D)
    assert op.regime == regimes.regime(10.0, op.gas_flow_at_impeller, D, v.T)
    assert op.vvm == pytest.approx(dispersion.vvm(0.003, v.volume))
    assert op.interfacial_area == pytest.approx(6 * op.gas_holdup / op.sauter_diameter)
    assert op.blend_method == "Ruszkowski"
    assert op.warnings == ()


def test_deeply_flooded_disc_turbine_keeps_its_held_power_and_says_so():
    v = pilot()
    op = operating_point(v, 3.0, 0.2, **WATER)  # Fl about 1.5: far above Cui's range
    assert op.flow_number > 1.0
    assert op.gassed_power == pytest.approx(op.power * power.CUI_RATIO_FLOOR, rel=1e-12)
    assert any("above the range of Cui et al. (1996), Fl <= 0.1: Pg/P held at 0.435" in w
               for w in op.warnings)
    # inside the range there is no such note
    assert not any("Cui" in w for w in operating_point(v, 10.0, 0.003, **WATER).warnings)


def test_pressure_basis_changes_only_the_superficial_velocity():
    v = Vessel(2.0, 6.0, (Impeller("disc-turbine", 0.7, 0.7),), head_pressure=1.5e5)
    kw = dict(speed=1.5, gas_flow=2.0, **WATER)
    mid = operating_point(v, **kw)
    head = operating_point(v, pressure_basis="head", **kw)
    sparger = operating_point(v, pressure_basis="sparger", **kw)
    assert sparger.superficial_gas_velocity < mid.superficial_gas_velocity \
        < head.superficial_gas_velocity
    assert mid.gas_pressure == pytest.approx(1.5e5 + WATER["rho"] * 9.80665 * 3.0)
    assert mid.flow_number == head.flow_number == sparger.flow_number
    assert mid.gassed_power == head.gassed_power


def test_measured_power_and_torque_override_the_estimate():
    v = pilot()
    estimate = operating_point(v, 10.0, 0.003, **WATER)
    measured = operating_point(v, 10.0, 0.003, measured_power=30.0, **WATER)
    assert measured.gassed_power == pytest.approx(30.0)
    assert measured.power == pytest.approx(estimate.power)  # ungassed P stays estimated
    assert any("measured power" in w for w in measured.warnings)
    torque = operating_point(v, 10.0, 0.0, measured_torque=0.5, **WATER)
    assert torque.power == pytest.approx(2 * np.pi * 10.0 * 0.5)


def test_flooded_point_warns():
    op = operating_point(pilot(), 2.0, 0.02, **WATER)
    assert op.regime == "flooded"
    assert op.flooding_margin < 0
    assert any("flooded" in w for w in op.warnings)


def test_axial_impeller_and_transitional_flow_warn():
    v = standard_vessel(0.3, impeller_type="hydrofoil-wide")
    op = operating_point(v, 5.0, 0.001, 303.15, 1100.0, 0.5, 0.05)
    text = " ".join(op.warnings)
    assert "not established for hydrofoil-wide" in text
    assert "transitional" in text


def test_multiple_impellers_use_cooke_blend_time():
    v = standard_vessel(2.0, count=3)
    op = operating_point(v, 1.5, 0.5, **WATER)
    assert op.blend_method == "Cooke"
    assert len(op.power_numbers) == 3
    assert op.blend_time_95 == pytest.approx(mixing.blend_time_Cooke(
        1.5, v.impellers[0].diameter, 2.0, 6.0, op.power_number))


@pytest.mark.parametrize("kwargs,field", [
    ({"speed": 0.0}, "speed"),
    ({"speed": -1.0}, "speed"),
    ({"gas_flow": -0.1}, "gas flow"),
    ({"rho": 0.0}, "density"),
    ({"gassed_method": "guess"}, "gassed method"),
    ({"pressure_basis": "bottom"}, "pressure basis"),
])
def test_bad_input_is_refused(kwargs, field):
    args = {"speed": 5.0, "gas_flow": 0.001, **WATER, **kwargs}
    with pytest.raises(InputError) as err:
        operating_point(pilot(), **args)
    assert err.value.field == field


def test_a_vessel_without_impellers_is_refused():
    with pytest.raises(InputError, match="no impeller"):
        operating_point(Vessel(1.0, 1.0), 1.0, 0.0, **WATER)


def test_to_dict_has_the_command_line_contract_keys():
    keys = operating_point(pilot(), 10.0, 0.003, **WATER).to_dict()
    for key in ("power_w", "gassed_power_w", "power_per_volume_w_m3", "reynolds",
                "power_number", "flow_number", "froude", "regime", "n_flood_rps", "n_cd_rps",
                "tip_speed_m_s", "blend_time_95_s", "superficial_gas_velocity_m_s", "vvm",
                "warnings"):
        assert key in keys


MODULES = (dispersion, geometry, impellers, mixing, point, power, regimes)


def _public_functions():
    for module in MODULES:
        for name, func in inspect.getmembers(module, inspect.isfunction):
            if not name.startswith("_") and func.__module__ == module.__name__:
                yield f"{module.__name__}.{name}", func


@pytest.mark.parametrize("name,func", list(_public_functions()))
def test_docstrings_give_a_unit_for_every_numeric_parameter(name, func):
    doc = inspect.getdoc(func) or ""
    if "Parameters\n----------" not in doc:
        return
    params = re.split(r"\n(?=\S)", doc.split("Parameters\n----------", 1)[1].split(
        "\nReturns")[0])
    documented = {}
    for block in params:
        head, _, body = block.partition("\n")
        names, _, kind = head.partition(" : ")
        for n in names.split(","):
            documented[n.strip()] = (kind, body)
    for param in inspect.signature(func).parameters:
        assert param in documented, f"{name}: parameter {param} is not documented"
        kind, body = documented[param]
        if "float" in kind:
            assert re.search(r"\[[^\]]*\]", body), f"{name}: {param} has no [unit]"
