"""Water and gas solubility against published tables and general-purpose reference libraries.

Every expected value carries its source; tolerances follow the stated accuracy of the
source or the rounding of the published table.
"""

from __future__ import annotations

import warnings

import numpy as np
import pytest

from scaleup.props import henry, oxygen, salting, seawater, solubility, water
from scaleup.units import M_O2

iapws = pytest.importorskip("iapws")
gsw = pytest.importorskip("gsw")
from iapws._iapws import _Henry, _Tension  # noqa: E402
from iapws.iapws97 import _PSat_T  # noqa: E402

# --- liquid water ------------------------------------------------------------------------


def test_density_25C_iapws95_value():
    # IAPWS-95 at 25 degC, 0.101325 MPa: 997.05 kg/m3 (issue 3 check value; iapws gives
    # 997.0476). IF97 region 1 is consistent with IAPWS-95 to 0.05 % in v (R7-97).
    assert water.density(298.15, 101325.0) == pytest.approx(997.05, abs=0.005)


@pytest.mark.parametrize("T, P, v, cp", [
    # IAPWS R7-97(2012) Table 5, verification values of region 1
    (300.0, 3e6, 0.100215168e-2, 0.417301218e4),
    (300.0, 80e6, 0.971180894e-3, 0.401008987e4),
    (500.0, 3e6, 0.120241800e-2, 0.465580682e4),
])
def test_if97_region1_verification_table(T, P, v, cp):
    volume, heat_capacity = water._region1(np.array(T), np.array(P))
    assert float(volume) == pytest.approx(v, rel=1e-8)
    assert float(heat_capacity) == pytest.approx(cp, rel=1e-8)


@pytest.mark.parametrize("T, rho, mu_upas", [
    (298.15, 998.0, 889.735100),  # IAPWS R12-08 Table 4 (the check value)
    (298.15, 1200.0, 1437.649467),  # IAPWS R12-08 Table 4 (from memory)
    (373.15, 1000.0, 307.883622),  # IAPWS R12-08 Table 4 (from memory)
])
def test_viscosity_r12_08_check_values(T, rho, mu_upas):
    mu = water._viscosity_from_density(np.array(T), np.array(rho)) * 1e6
    assert float(mu) == pytest.approx(mu_upas, abs=5e-6)  # table gives 6 decimals


@pytest.mark.parametrize("T", [273.16, 283.15, 298.15, 310.15, 330.0, 350.0, 370.0])
def test_water_against_iapws95(T):
    # iapws.IAPWS95 at 1 atm. IF97 vs IAPWS-95 permissible differences (R7-97): v 0.05 %,
    # cp 1 %; viscosity then differs only through the density (R12-08 is the same equation).
    state = iapws.IAPWS95(T=T, P=0.101325)
    assert water.density(T) == pytest.approx(state.rho, rel=5e-4)
    assert water.heat_capacity(T) == pytest.approx(state.cp * 1000.0, rel=1e-2)
    assert water.viscosity(T) == pytest.approx(state.mu, rel=1e-4)


@pytest.mark.parametrize("celsius, sigma_mn_m", [
    (0.01, 75.65), (25.0, 71.97), (100.0, 58.91),  # IAPWS R1-76(2014) table (from memory)
])
def test_surface_tension_iapws_table(celsius, sigma_mn_m):
    assert water.surface_tension(celsius + 273.15) * 1000 == pytest.approx(sigma_mn_m, abs=0.006)


@pytest.mark.parametrize("T", [273.15, 298.15, 323.15, 373.15])
def test_surface_tension_matches_iapws_library(T):
    assert water.surface_tension(T) == pytest.approx(_Tension(T), rel=1e-12)


@pytest.mark.parametrize("T", [273.16, 283.15, 298.15, 310.15, 333.15, 353.15, 373.15])
def test_vapour_pressure_against_if97_saturation_line(T):
    # IF97 region 4 (iapws) and Wagner-Pruss both reproduce IAPWS-95 to 0.025 %
    assert water.vapour_pressure(T) == pytest.approx(_PSat_T(T) * 1e6, rel=2.5e-4)


def test_vapour_pressure_100C():
    # IAPWS-95: 101.418 kPa at 373.15 K (ITS-90 boiling point 99.974 degC; from memory)
    assert water.vapour_pressure(373.15) == pytest.approx(101418.0, rel=2.5e-4)


@pytest.mark.parametrize("salinity_g_kg, celsius", [(10, 10), (35, 25), (35, 37), (40, 5)])
def test_sharqawy_density_against_teos10(salinity_g_kg, celsius):
    # gsw (TEOS-10) density; Sharqawy et al. (2010) state 0.1 % accuracy
    SA = salinity_g_kg * 35.16504 / 35.0  # reference-composition absolute salinity
    CT = gsw.CT_from_t(SA, celsius, 0.0)
    expected = gsw.rho(SA, CT, 0.0)
    got = seawater.density_Sharqawy(celsius + 273.15, salinity_g_kg / 1000.0)
    assert got == pytest.approx(expected, rel=1e-3)


def test_sharqawy_viscosity_seawater_25C():
    # ITTC (2011) fresh water and seawater properties: 0.9589e-3 Pa s at 25 degC, 35 g/kg
    # (from memory); Sharqawy et al. state 1.5 %.
    assert seawater.viscosity_Sharqawy(298.15, 0.035) == pytest.approx(0.9589e-3, rel=0.015)


# --- oxygen solubility -------------------------------------------------------------------

# ISO 5814 table; Standard Methods 4500-O Table 4500-O:I (Benson and Krause 1984), 1 atm,
# fresh water, mg/L to 0.01
STANDARD_METHODS_O2 = [(0.0, 14.62), (10.0, 11.29), (20.0, 9.09), (25.0, 8.26), (30.0, 7.56)]


@pytest.mark.parametrize("celsius, mg_l", STANDARD_METHODS_O2)
def test_o2_benson_krause_standard_methods_table(celsius, mg_l):
    result = solubility.saturation("O2", celsius + 273.15, 101325.0, method="benson-krause")
    assert result.c_star_mg_l == pytest.approx(mg_l, abs=0.005)


@pytest.mark.parametrize("celsius, mg_l", STANDARD_METHODS_O2)
def test_o2_garcia_gordon_reproduces_the_same_table(celsius, mg_l):
    # Garcia and Gordon (1992) fit the Benson-Krause data to 0.0034 % (their Table 1)
    c = oxygen.c_star_O2_Garcia_Gordon(celsius + 273.15)
    assert c * M_O2 * 1000 == pytest.approx(mg_l, abs=0.006)


@pytest.mark.parametrize("salinity, celsius", [(0, 0), (0, 25), (20, 10), (35, 25), (40, 2)])
def test_garcia_gordon_against_gsw(salinity, celsius):
    # gsw.O2sol_SP_pt implements Garcia and Gordon (1992) Benson-Krause coefficients in
    # umol/kg; same equation, so agreement to round-off
    T = celsius + 273.15
    c = oxygen.c_star_O2_Garcia_Gordon(T, salinity / 1000.0)
    rho = seawater.density_Sharqawy(T, salinity / 1000.0)
    assert c / rho * 1e6 == pytest.approx(gsw.O2sol_SP_pt(salinity, celsius), rel=1e-9)


@pytest.mark.parametrize("salinity", [0.010, 0.035])
def test_benson_krause_salinity_term_agrees_with_garcia_gordon(salinity):
    # both fit the Benson-Krause (1984) seawater data; they agree to about 0.03 %
    T = np.array([273.15, 288.15, 303.15, 313.15])
    bk = oxygen.c_star_O2_Benson_Krause(T, salinity)
    gg = oxygen.c_star_O2_Garcia_Gordon(T, salinity)
    np.testing.assert_allclose(bk, gg, rtol=1e-3)


def test_benson_krause_pressure_correction_standard_methods():
    # Standard Methods 4500-O: C_p = C* P (1 - Pwv/P)(1 - theta P) / ((1 - Pwv)(1 - theta));
    # at 1 atm the factor is exactly 1, at 2 atm it is a little above 2 (water vapour)
    T = np.array([283.15, 303.15])
    one = oxygen._pressure_factor_Benson_Krause(T, np.full(2, 101325.0))
    np.testing.assert_allclose(one, 1.0, rtol=1e-12)
    two = oxygen._pressure_factor_Benson_Krause(T, np.full(2, 2 * 101325.0))
    assert np.all((two > 2.0) & (two < 2.05))


# --- Henry constants and salting-out -----------------------------------------------------


@pytest.mark.parametrize("gas", ["O2", "N2", "CO2", "H2", "CH4"])
@pytest.mark.parametrize("T", [274.15, 298.15, 323.15, 353.15, 373.15])
def test_iapws_g704_matches_iapws_library(gas, T):
    # iapws._Henry implements IAPWS G7-04 (returns kH in MPa): same equation
    with warnings.catch_warnings():
        warnings.simplefilter("ignore")  # iapws warns below each gas's data range
        expected = _Henry(T, gas) * 1e6
    assert henry.henry_constant_IAPWS(gas, T) == pytest.approx(expected, rel=1e-6)


@pytest.mark.parametrize("gas", ["O2", "N2", "CO2", "H2", "CH4"])
def test_sander_against_iapws_g704_at_25C(gas):
    # Sander (2015) gives Hcp to two significant figures (half a unit in the last digit is
    # up to 4 % for these gases); IAPWS G7-04 via iapws is the reference.
    sander = henry.henry_constant_Sander(gas, 298.15)
    reference = henry.henry_constant(gas, 298.15, "iapws")
    assert sander == pytest.approx(reference, rel=0.04)


@pytest.mark.parametrize("gas", ["O2", "N2", "CO2", "H2", "CH4"])
def test_sander_van_t_hoff_within_10_percent_0_to_40C(gas):
    # two-figure constants and a constant solution enthalpy: within 10 % of IAPWS G7-04
    # over 0 to 40 degC, the range the "henry" method claims without a warning
    T = np.linspace(273.15, 313.15, 9)
    np.testing.assert_allclose(henry.henry_constant_Sander(gas, T),
                               henry.henry_constant(gas, T, "iapws"), rtol=0.10)


def test_schumpe_o2_in_1M_NaCl_25C():
    # Weisenberger and Schumpe (1996): h(Na+) 0.1143, h(Cl-) 0.0318, h(O2) 0 at 298.15 K
    # -> c/c0 = 10**-0.1461 = 0.714 (issue 3 check value)
    ions = salting.ions_from_salts({"NaCl": 1000.0})
    assert salting.salting_out_Weisenberger_Schumpe("O2", 298.15, ions) == pytest.approx(
        0.714, abs=5e-4)


def test_schumpe_temperature_term_o2():
    # h_G = h_G0 + h_T (T - 298.15), h_T(O2) = -0.334e-3 m3/(kmol K): at 323.15 K and
    # 1 kmol/m3 NaCl log10(c0/c) = 0.1461 - 2 * 0.00835
    expected = 10 ** -(0.1461 - 2 * 0.334e-3 * 25)
    got = salting.salting_out_Weisenberger_Schumpe("O2", 323.15, {"Na+": 1000, "Cl-": 1000})
    assert got == pytest.approx(expected, rel=1e-9)
