"""Diffusivity: registry, dispatcher, comparison, diaphragm cell, trends and bad input."""

from __future__ import annotations

import numpy as np
import pytest
from hypothesis import given, settings
from hypothesis import strategies as st
from scipy.integrate import solve_ivp

from scaleup.errors import InputError, OutOfRange
from scaleup.props import diffusivity as dif
from scaleup.props import water

GASES = ["O2", "N2", "CO2", "H2", "CH4"]


def test_default_is_measured_inside_the_table_then_scaled_outside():
    assert dif.estimate("CO2", "water", 298.15).method == "measured"
    outside = dif.estimate("CO2", "water", 323.15)
    assert outside.method == "stokes-einstein"
    assert "nearest measured temperature" in outside.warnings[0]
    assert dif.estimate("O2", "methanol", 298.15, viscosity=0.544e-3).method == "wilke-chang"
    assert dif.estimate("O2", "air", 298.15).method == "fuller"


def test_source_is_named_for_measured_values():
    assert dif.estimate("H2", "water", 298.15).source.startswith("Jahne")
    assert "Han and Bartels" in dif.estimate("O2", "water", 330.0).source


def test_stokes_einstein_is_the_identity_inside_the_table():
    for T in (283.15, 298.15, 308.15):
        assert dif.diffusivity("CH4", "water", T, "stokes-einstein") == pytest.approx(
            dif.diffusivity_measured("CH4", T))


def test_a_medium_viscosity_scales_the_measured_value():
    mu = 2.0 * water.viscosity(303.15)
    e = dif.estimate("O2", "water", 303.15, viscosity=mu)
    assert e.method == "stokes-einstein"
    assert e.diffusivity_m2_s == pytest.approx(dif.diffusivity_measured("O2", 303.15) / 2)


def test_measured_interpolation_lies_between_neighbours():
    D = dif.diffusivity_measured("H2", np.array([290.65, 293.15, 295.65]))
    assert D[0] < D[1] < D[2]


def test_compare_lists_every_applicable_method_with_the_spread():
    c = dif.compare("CO2", "water", 298.15)
    methods = [e.method for e in c.estimates]
    applicable = dif.diffusivity_methods("CO2", "water", 298.15)
    assert methods == [m for m in applicable if m != "stokes-einstein"]  # same as measured
    assert [e.method for e in dif.compare("CO2", "water", 323.15).estimates][0] == (
        "stokes-einstein")
    values = [e.diffusivity_m2_s for e in c.estimates]
    assert c.minimum_m2_s == min(values) and c.maximum_m2_s == max(values)
    assert c.spread_fraction == pytest.approx((max(values) - min(values)) / np.mean(values))


def test_compare_vectorises_over_temperature():
    T = np.array([283.15, 298.15, 308.15])
    c = dif.compare("CH4", "water", T)
    assert np.shape(c.mean_m2_s) == (3,) and np.all(np.diff(c.mean_m2_s) > 0)


def test_paraffin_solvent_uses_the_paraffin_form_and_needs_a_viscosity():
    with pytest.raises(InputError, match="needs the viscosity of n-heptane"):
        dif.diffusivity("H2", "n-heptane", 298.15, "hayduk-minhas")
    D = dif.diffusivity("H2", "n-heptane", 298.15, "hayduk-minhas", viscosity=0.387e-3)
    assert D == pytest.approx(
        dif.diffusivity_Hayduk_Minhas_paraffin(298.15, 0.387e-3, 14.3e-6))


def test_user_molar_volume_opens_the_estimators_for_other_solutes():
    D = dif.diffusivity("ethanol", "water", 298.15, "wilke-chang", molar_volume=59.2e-6)
    assert 0.8e-9 < D < 1.6e-9  # measured 1.24e-9 (CRC Handbook; from memory)


@pytest.mark.parametrize("call, error, match", [
    (lambda: dif.diffusivity("O2", "mercury", 298.15), InputError, "unknown solvent"),
    (lambda: dif.diffusivity("O2", "water", 298.15, "guess"), InputError,
     "unknown diffusivity method"),
    (lambda: dif.diffusivity("O2", "water", 298.15, "fuller"), InputError,
     "fuller is for gas mixtures"),
    (lambda: dif.diffusivity("O2", "water", 400.0), OutOfRange, "400 K"),
    (lambda: dif.diffusivity("O2", "ethanol", 298.15, "hayduk-laudie", viscosity=1e-3),
     InputError, "is for water"),
    (lambda: dif.diffusivity_measured("CO2", 320.0), OutOfRange, "283.15 to 308.15 K"),
    (lambda: dif.diffusivity_measured("Ar", 298.15), InputError, "no measured diffusivity"),
    (lambda: dif.diffusivity("X", "water", 298.15), InputError, "no diffusivity method"),
    (lambda: dif.diffusivity_Wilke_Chang(298.15, -1e-3, 0.018, 25e-6), OutOfRange,
     "viscosity"),
])
def test_bad_input_gives_a_clear_message(call, error, match):
    with pytest.raises(error, match=match):
        call()


@given(st.floats(274.0, 372.0), st.floats(274.0, 372.0), st.sampled_from(GASES),
       st.sampled_from(["stokes-einstein", "wilke-chang", "wilke-chang-2.26",
                        "hayduk-laudie", "hayduk-minhas"]))
@settings(max_examples=60, deadline=None)
def test_diffusivity_rises_with_temperature(T1, T2, gas, method):
    lo, hi = sorted((T1, T2))
    if hi - lo < 0.01:
        return
    assert dif.diffusivity(gas, "water", hi, method) > dif.diffusivity(gas, "water", lo, method)


@given(st.floats(250.0, 500.0), st.floats(0.2e5, 10e5))
@settings(max_examples=30, deadline=None)
def test_gas_diffusivity_inverse_in_pressure(T, P):
    D1 = dif.diffusivity("CO2", "air", T, pressure=P)
    D2 = dif.diffusivity("CO2", "air", T, pressure=2 * P)
    assert D1 == pytest.approx(2 * D2, rel=1e-12)


def test_schmidt_number_of_o2_in_water():
    D = dif.diffusivity("O2", "water", 298.15)
    Sc = dif.schmidt_number(water.viscosity(298.15), water.density(298.15), D)
    assert 400 < Sc < 500


def _simulate_cell(D: float, beta_geometry: dict, hours: float, c1: float, c2: float) -> float:
    """Two stirred compartments joined by a porous diaphragm; returns dC at the end."""
    A, L, V1, V2, eps = (beta_geometry[k] for k in ("A", "L", "V1", "V2", "eps"))

    def rhs(_t, c):
        flux = D * eps * A / L * (c[0] - c[1])  # mol/s through the diaphragm
        return [-flux / V1, flux / V2]

    sol = solve_ivp(rhs, (0.0, hours * 3600.0), [c1, c2], rtol=1e-10, atol=1e-12)
    return float(sol.y[0, -1] - sol.y[1, -1])


def test_diaphragm_cell_recovers_a_diffusivity_from_a_calibrated_cell():
    # synthetic recovery: calibrate with KCl-like D, then measure an unknown solute
    geometry = {"A": 1.2e-3, "L": 2.5e-3, "V1": 40e-6, "V2": 45e-6, "eps": 0.35}
    D_calibration, D_unknown = 1.87e-9, 2.1e-9
    dc_cal = _simulate_cell(D_calibration, geometry, 30.0, 100.0, 0.0)
    beta = dif.diaphragm_cell_constant(D_calibration, 30 * 3600.0, 100.0, dc_cal)
    assert beta == pytest.approx(dif.diaphragm_cell_constant_geometry(
        geometry["A"], geometry["L"], geometry["V1"], geometry["V2"], geometry["eps"]),
        rel=1e-6)
    dc = _simulate_cell(D_unknown, geometry, 20.0, 0.25, 0.05)
    D = dif.diffusivity_diaphragm_cell(beta, 20 * 3600.0, 0.20, dc)
    assert D == pytest.approx(D_unknown, rel=1e-6)


def test_diaphragm_cell_refuses_a_difference_that_grew():
    with pytest.raises(InputError, match="must fall"):
        dif.diaphragm_cell_constant(1.87e-9, 3600.0, 10.0, 12.0)
    with pytest.raises(OutOfRange, match="time"):
        dif.diffusivity_diaphragm_cell(3000.0, -1.0, 10.0, 5.0)
