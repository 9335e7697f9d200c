"""Liquid water and media: shapes, ranges, overrides, and docstrings of the props modules."""

from __future__ import annotations

import importlib
import inspect
import re

import numpy as np
import pytest
from hypothesis import given, settings
from hypothesis import strategies as st

from scaleup.errors import InputError, OutOfRange
from scaleup.props import seawater, water

liquid_T = st.floats(273.15, 373.15)


def test_scalar_in_scalar_out_array_in_array_out():
    assert isinstance(water.density(300.0), float)
    T = np.array([[280.0, 300.0], [320.0, 340.0]])
    for f in (water.density, water.viscosity, water.surface_tension, water.vapour_pressure,
              water.heat_capacity, water.kinematic_viscosity):
        values = f(T)
        assert values.shape == T.shape
        assert float(values[0, 1]) == pytest.approx(f(300.0), rel=1e-12)


def test_pressure_broadcasts_with_temperature():
    rho = water.density(298.15, np.array([1e5, 1e6, 1e7]))
    assert rho.shape == (3,)
    assert np.all(np.diff(rho) > 0)  # compressed liquid is denser


def test_density_maximum_near_4C():
    # the density maximum of water lies at 3.98 degC (Kell 1975; from memory)
    T = np.linspace(273.15, 283.15, 1001)
    assert T[np.argmax(water.density(T))] - 273.15 == pytest.approx(3.98, abs=0.05)


@given(liquid_T, liquid_T)
@settings(max_examples=60, deadline=None)
def test_viscosity_and_surface_tension_fall_vapour_pressure_rises(T1, T2):
    lo, hi = sorted((T1, T2))
    if hi - lo < 1e-6:
        return
    assert water.viscosity(hi) < water.viscosity(lo)
    assert water.surface_tension(hi) < water.surface_tension(lo)
    assert water.vapour_pressure(hi) > water.vapour_pressure(lo)


@pytest.mark.parametrize("T", [273.0, 373.5, -5.0])
def test_temperature_outside_liquid_range_is_refused_with_range(T):
    with pytest.raises(OutOfRange) as info:
        water.density(T)
    message = str(info.value)
    assert "temperature" in message and f"{T:g}" in message and "273.15 to 373.15 K" in message


def test_array_with_one_bad_temperature_names_that_value():
    with pytest.raises(OutOfRange, match="400 K"):
        water.viscosity(np.array([300.0, 400.0, 310.0]))


def test_nan_temperature_is_refused():
    with pytest.raises(InputError, match="not a number"):
        water.surface_tension(float("nan"))


def test_liquid_properties_overrides_and_sources():
    props = water.liquid_properties(310.15, overrides={"density": 1010.0,
                                                        "surface_tension": 0.055})
    assert props.density_kg_m3 == 1010.0 and props.sources["density"] == "measured"
    assert props.surface_tension_n_m == 0.055
    assert props.viscosity_pa_s == pytest.approx(water.viscosity(310.15))
    assert props.sources["viscosity"] == "IAPWS 2008"
    assert props.kinematic_viscosity_m2_s == pytest.approx(props.viscosity_pa_s / 1010.0)


def test_liquid_properties_salinity_uses_seawater_model():
    props = water.liquid_properties(298.15, salinity=0.035)
    assert props.sources["density"].startswith("Sharqawy")
    assert props.density_kg_m3 > water.density(298.15) + 20


def test_unknown_or_negative_override_is_refused():
    with pytest.raises(ValueError, match="cannot override colour"):
        water.liquid_properties(300.0, overrides={"colour": 1.0})
    with pytest.raises(OutOfRange, match="density"):
        water.liquid_properties(300.0, overrides={"density": -1.0})


def test_salinity_outside_sharqawy_range_is_refused():
    with pytest.raises(OutOfRange, match="0 to 0.16 kg/kg"):
        seawater.density_Sharqawy(300.0, 0.2)


@given(st.floats(0.0, 0.15), liquid_T)
@settings(max_examples=40, deadline=None)
def test_salt_makes_water_denser_and_more_viscous(salinity, T):
    assert seawater.density_Sharqawy(T, salinity) >= water.density(T) - 1e-9
    assert seawater.viscosity_Sharqawy(T, salinity) >= water.viscosity(T) * (1 - 1e-12)


PROPS_MODULES = ["water", "seawater", "henry", "oxygen", "salting", "solubility",
                 "diffusion_estimates", "diffusion_measured", "diffusivity", "transport"]


def _public_functions():
    for name in PROPS_MODULES:
        module = importlib.import_module(f"scaleup.props.{name}")
        for attr, obj in vars(module).items():
            if (inspect.isfunction(obj) and not attr.startswith("_")
                    and obj.__module__ == module.__name__):
                yield f"{name}.{attr}", obj


@pytest.mark.parametrize("qualname, func", list(_public_functions()))
def test_docstring_documents_every_parameter_with_a_unit(qualname, func):
    doc = inspect.getdoc(func) or ""
    assert "Examples" in doc, f"{qualname} has no Examples section"
    returns = doc.split("Returns\n-------\n", 1)
    assert len(returns) == 2 and re.search(r"\[[^\]]+\]", returns[1].split("\n\n", 1)[0]), (
        f"{qualname}: Returns has no [unit]")
    for parameter in inspect.signature(func).parameters:
        pattern = rf"^(?:\w+, )*{parameter}(?:, \w+)* : [^\n]*\n((?:    [^\n]*\n?)+)"
        match = re.search(pattern, doc, flags=re.M)
        assert match, f"{qualname}: parameter {parameter} is not documented"
        assert re.search(r"\[[^\]]+\]", match.group(1)), (
            f"{qualname}: parameter {parameter} has no [unit]")
