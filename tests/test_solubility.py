"""Gas solubility: dispatcher, defaults, warnings, bad input, trends and tall vessels."""

from __future__ import annotations

import warnings

import numpy as np
import pytest
from hypothesis import given, settings
from hypothesis import strategies as st

from scaleup import units
from scaleup.errors import InputError, OutOfRange
from scaleup.props import RangeWarning, salting, solubility
from scaleup.units import M_O2

fermenter_T = st.floats(273.15, 313.15)
pressures = st.floats(0.5e5, 8e5)
fractions = st.floats(0.01, 1.0)


def test_default_methods_follow_the_registry_order():
    assert solubility.saturation("O2", 303.15).method == "benson-krause"
    assert solubility.saturation("O2", 318.15).method == "henry-iapws"  # BK only warns there
    assert solubility.saturation("CO2", 303.15).method == "henry"
    assert solubility.saturation("CH4", 350.0).method == "henry-iapws"


def test_explicit_method_outside_its_fitted_range_warns_but_answers():
    result = solubility.saturation("O2", 318.15, method="benson-krause")
    assert result.c_star_mol_m3 > 0
    assert any("extrapolated" in w and "benson-krause" in w for w in result.warnings)
    with pytest.warns(RangeWarning, match="benson-krause"):
        solubility.c_star("O2", 318.15, method="benson-krause")


def test_no_warning_inside_the_fitted_range():
    with warnings.catch_warnings():
        warnings.simplefilter("error")
        solubility.c_star("O2", 310.15)
    assert solubility.saturation("O2", 310.15).warnings == ()


def test_method_without_extrapolation_refuses_with_its_range():
    with pytest.raises(OutOfRange, match="garcia-gordon.*273.15 to 313.15 K"):
        solubility.saturation("O2", 318.15, method="garcia-gordon")


@pytest.mark.parametrize("call, match", [
    (lambda: solubility.c_star("Xe", 300.0), "unknown gas 'Xe'; known: O2, N2, CO2, H2, CH4"),
    (lambda: solubility.c_star("O2", 300.0, method="winkler"), "unknown solubility method"),
    (lambda: solubility.c_star("H2", 300.0, method="benson-krause"), "covers O2 only"),
    (lambda: solubility.c_star("O2", 300.0, salts={"Xy+": 100.0}), "unknown salt or ion"),
    (lambda: solubility.c_star("O2", 300.0, salts={"NaCl": -5.0}), "-5 mol/m3 must be zero"),
    (lambda: solubility.c_star("O2", 380.0), "no solubility method"),
    (lambda: solubility.c_star("O2", 300.0, mole_fraction=1.2), "1.2 - is outside"),
    (lambda: solubility.c_star("O2", 360.0, pressure_pa=5e4), "the liquid boils"),
    (lambda: solubility.c_star("N2", 300.0, salinity=0.03), "applies to O2 only"),
    (lambda: solubility.c_star("N2", 300.0, salinity=0.03, method="henry"),
     "salinity is outside"),
])
def test_bad_input_gives_a_clear_message(call, match):
    with pytest.raises(InputError, match=match):
        call()


def test_schumpe_refuses_an_ion_it_has_no_parameter_for():
    with pytest.raises(InputError, match="no Weisenberger-Schumpe parameter for ion 'Xy\\+'"):
        salting.salting_out_Weisenberger_Schumpe("O2", 298.15, {"Xy+": 10.0})


def test_salts_outside_the_schumpe_range_warn():
    result = solubility.saturation("O2", 368.15, salts={"NaCl": 500.0}, method="henry-iapws")
    assert any("Weisenberger-Schumpe" in w for w in result.warnings)


def test_salting_applies_to_every_method():
    for method in solubility.solubility_methods("O2", 298.15):
        fresh = solubility.c_star("O2", 298.15, method=method)
        salty = solubility.c_star("O2", 298.15, method=method, salts={"NaCl": 1000.0})
        assert salty / fresh == pytest.approx(0.7143, rel=1e-3)


def test_vectorised_over_temperature_and_pressure():
    T = np.array([283.15, 298.15, 310.15])
    c = solubility.c_star("O2", T, pressure_pa=np.array([1e5, 2e5, 3e5]))
    assert c.shape == (3,)
    for i in range(3):
        assert c[i] == pytest.approx(solubility.c_star("O2", T[i], (1e5, 2e5, 3e5)[i]))


def test_mg_per_l_and_mol_per_m3_are_the_same_quantity():
    s = solubility.saturation("O2", 298.15)
    assert s.c_star_mg_l == pytest.approx(s.c_star_mol_m3 * M_O2 * 1000)
    assert units.parse(f"{s.c_star_mg_l} mg/L", "dissolved_oxygen") == pytest.approx(
        s.c_star_mol_m3)


def test_partial_pressure_is_reported():
    s = solubility.saturation("O2", 298.15, 101325.0, 0.5)
    assert s.partial_pressure_pa == pytest.approx(0.5 * (101325.0 - 3169.82), rel=1e-5)


@pytest.mark.filterwarnings("ignore::scaleup.props.RangeWarning")  # henry-iapws below 274 K
@given(fermenter_T, fermenter_T, st.sampled_from(["benson-krause", "henry", "henry-iapws"]))
@settings(max_examples=40, deadline=None)
def test_solubility_falls_with_temperature(T1, T2, method):
    lo, hi = sorted((T1, T2))
    if hi - lo < 0.01:
        return
    gas = "O2"
    assert solubility.c_star(gas, hi, method=method) < solubility.c_star(gas, lo, method=method)


@given(fermenter_T, pressures, pressures, st.sampled_from(["O2", "N2", "CO2", "H2", "CH4"]))
@settings(max_examples=40, deadline=None)
def test_solubility_rises_with_pressure(T, P1, P2, gas):
    lo, hi = sorted((P1, P2))
    if hi - lo < 10.0:
        return
    assert solubility.c_star(gas, T, hi) > solubility.c_star(gas, T, lo)


@given(fermenter_T, fractions, fractions)
@settings(max_examples=40, deadline=None)
def test_solubility_rises_with_o2_fraction(T, y1, y2):
    lo, hi = sorted((y1, y2))
    if hi - lo < 1e-6:
        return
    assert solubility.c_star("O2", T, mole_fraction=hi) > solubility.c_star("O2", T,
                                                                            mole_fraction=lo)


@given(fermenter_T, st.floats(1.0, 2000.0), st.floats(1.0, 2000.0),
       st.sampled_from(["NaCl", "Na2SO4", "(NH4)2SO4", "KH2PO4", "MgSO4"]))
@settings(max_examples=40, deadline=None)
def test_solubility_falls_with_salt(T, c1, c2, salt):
    lo, hi = sorted((c1, c2))
    if hi - lo < 1e-3:
        return
    assert (solubility.c_star("O2", T, salts={salt: hi})
            < solubility.c_star("O2", T, salts={salt: lo}) < solubility.c_star("O2", T))


@given(fermenter_T, st.floats(0.001, 0.040), st.floats(0.001, 0.040))
@settings(max_examples=30, deadline=None)
def test_solubility_falls_with_salinity(T, s1, s2):
    lo, hi = sorted((s1, s2))
    if hi - lo < 1e-6:
        return
    assert solubility.c_star("O2", T, salinity=hi) < solubility.c_star("O2", T, salinity=lo)


def test_salt_text_round_trip_in_molar_and_mass_units():
    name, molar = salting.salt_from_text("Na2SO4=0.1 mol/L")
    _, mass = salting.salt_from_text("Na2SO4=14.204 g/L")
    assert name == "Na2SO4" and molar == pytest.approx(100.0) and mass == pytest.approx(100.0)
    with pytest.raises(InputError, match="name=concentration"):
        salting.salt_from_text("NaCl 0.5 mol/L")


def test_ions_sum_over_salts_and_ion_entries():
    ions = salting.ions_from_salts({"NaCl": 100.0, "Na+": 50.0, "SO4 2-": 10.0})
    assert ions == {"Na+": 150.0, "Cl-": 100.0, "SO4^2-": 10.0}


def test_pressure_at_depth_hydrostatic():
    P = solubility.pressure_at_depth(101325.0, np.array([0.0, 5.0, 10.0]), density=1000.0)
    np.testing.assert_allclose(P, 101325.0 + 1000.0 * 9.80665 * np.array([0, 5, 10]))


def test_log_mean_equals_the_single_value_without_height_or_depletion():
    c = solubility.c_star("O2", 303.15)
    assert solubility.c_star_log_mean("O2", 303.15, 101325.0, 0.0) == pytest.approx(c)


def test_log_mean_lies_between_top_and_bottom_and_below_the_arithmetic_mean():
    lm = solubility.log_mean_saturation("O2", 303.15, 1.3e5, 12.0, exit_fraction=0.16)
    bottom, top = lm.bottom.c_star_mol_m3, lm.top.c_star_mol_m3
    assert top < lm.c_star_log_mean_mol_m3 < (bottom + top) / 2 < bottom
    assert lm.bottom_pressure_pa == pytest.approx(1.3e5 + 995.6 * 9.80665 * 12.0, rel=1e-3)


def test_log_mean_driving_force_with_dissolved_oxygen():
    lm = solubility.log_mean_saturation("O2", 303.15, 101325.0, 10.0, c_liquid=0.1)
    d_b = lm.bottom.c_star_mol_m3 - 0.1
    d_t = lm.top.c_star_mol_m3 - 0.1
    expected = 0.1 + (d_b - d_t) / np.log(d_b / d_t)
    assert lm.c_star_log_mean_mol_m3 == pytest.approx(expected)
    with pytest.raises(InputError, match="no driving force"):
        solubility.log_mean_saturation("O2", 303.15, 101325.0, 10.0, c_liquid=5.0)


def test_high_pressure_carries_a_note():
    result = solubility.saturation("H2", 333.15, 3e6)
    assert any("10 bar" in w for w in result.warnings)


def test_log_mean_in_seawater_uses_the_seawater_density():
    fresh = solubility.log_mean_saturation("O2", 298.15, 101325.0, 10.0)
    salty = solubility.log_mean_saturation("O2", 298.15, 101325.0, 10.0, salinity=0.035)
    assert salty.bottom_pressure_pa > fresh.bottom_pressure_pa  # denser liquid, more head
    assert salty.c_star_log_mean_mol_m3 < fresh.c_star_log_mean_mol_m3
