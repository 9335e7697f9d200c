"""Superficial velocity, vvm, hold-up, bubble size, turbulence scales."""

from __future__ import annotations

import math

import numpy as np
import pytest

from scaleup.hydro import dispersion as d
from scaleup.units import MOL_PER_NORMAL_M3, P_ATM, parse_gas_flow


def test_vvm_round_trips_through_the_units_parser():
    volume = 0.3
    n_dot = parse_gas_flow("1.5 vvm", liquid_volume_m3=volume)
    assert d.vvm(n_dot, volume) == pytest.approx(1.5, rel=1e-12)


def test_actual_flow_at_normal_conditions_is_the_normal_flow():
    n_dot = parse_gas_flow("30 NL/min")
    q = d.actual_gas_flow(n_dot, 273.15, P_ATM)
    assert q == pytest.approx(30e-3 / 60, rel=1e-9)


def test_actual_flow_halves_at_double_pressure_and_scales_with_temperature():
    assert d.actual_gas_flow(1.0, 300.0, 2 * P_ATM) == pytest.approx(
        d.actual_gas_flow(1.0, 300.0, P_ATM) / 2)
    assert d.actual_gas_flow(1.0, 360.0, P_ATM) == pytest.approx(
        1.2 * d.actual_gas_flow(1.0, 300.0, P_ATM))


def test_superficial_velocity_is_flow_over_area():
    n_dot = np.array([0.0, 0.5, 1.0])
    us = d.superficial_gas_velocity(n_dot, 303.15, 1.5e5, 0.5)
    area = math.pi * 0.25 / 4
    assert us.tolist() == pytest.approx((d.actual_gas_flow(n_dot, 303.15, 1.5e5) / area).tolist())


def test_hydrostatic_pressure_of_ten_metres_of_water():
    # 10 m of water at 1000 kg/m3 is 98.07 kPa (g = 9.80665 m/s2)
    assert d.hydrostatic_pressure(P_ATM, 1000.0, 10.0) - P_ATM == pytest.approx(98066.5)


def test_calderbank_set_is_self_consistent():
    # Calderbank (1958) gives a directly and, through his hold-up and d32 correlations, as
    # 6 eps / d32. The constants are as recalled (from memory); the three forms agree within
    # 0.4 % on this grid, which a mis-remembered constant in any of them would break.
    pv = np.array([200.0, 500.0, 1000.0, 3000.0])[:, None]
    us = np.array([0.003, 0.01, 0.02])[None, :]
    eps = d.gas_holdup_Calderbank(pv, us, 1000.0, 0.072)
    d32 = d.sauter_diameter_Calderbank(pv, eps, 1000.0, 0.072)
    a_from_parts = d.interfacial_area(eps, d32)
    a_direct = d.interfacial_area_Calderbank(pv, us, 1000.0, 0.072)
    assert np.all(np.abs(a_from_parts / a_direct - 1) < 0.01)


def test_holdup_solves_calderbanks_implicit_equation():
    pv, us, rho, sigma = 1500.0, 0.012, 1000.0, 0.07
    eps = d.gas_holdup_Calderbank(pv, us, rho, sigma)
    rhs = (math.sqrt(eps * us / 0.265)
           + 2.16e-4 * pv ** 0.4 * rho ** 0.2 / sigma ** 0.6 * math.sqrt(us / 0.265))
    assert eps == pytest.approx(rhs, rel=1e-12)


def test_calderbank_si_constants_follow_from_the_cgs_form():
    # The cgs form as usually quoted (from memory, not a checked source): hold-up constant
    # 0.0216, d32 = 4.15 (...) + 0.09 cm, u_t = 26.5 cm/s, with P/V in erg/(s cm3), rho in
    # g/cm3, sigma in dyn/cm. This checks only that the SI code is that form in SI units.
    pv, rho, sigma, us, eps = 1500.0, 1010.0, 0.070, 0.012, 0.05
    pv_cgs = pv * 10.0  # W/m3 to erg/(s cm3)
    rho_cgs = rho / 1000.0  # kg/m3 to g/cm3
    sigma_cgs = sigma * 1000.0  # N/m to dyn/cm
    us_cgs = us * 100.0  # m/s to cm/s
    group_cgs = pv_cgs ** 0.4 * rho_cgs ** 0.2 / sigma_cgs ** 0.6  # 1/cm
    d32_cgs = 4.15 / group_cgs * math.sqrt(eps) + 0.09  # cm
    assert d.sauter_diameter_Calderbank(pv, eps, rho, sigma) == pytest.approx(
        d32_cgs / 100.0, rel=1e-12)
    a_cgs = 1.44 * group_cgs * math.sqrt(us_cgs / 26.5)  # 1/cm
    assert d.interfacial_area_Calderbank(pv, us, rho, sigma) == pytest.approx(
        a_cgs * 100.0, rel=1e-12)
    h = d.gas_holdup_Calderbank(pv, us, rho, sigma)
    rhs_cgs = (math.sqrt(h * us_cgs / 26.5)
               + 0.0216 * group_cgs * math.sqrt(us_cgs / 26.5))
    assert h == pytest.approx(rhs_cgs, rel=1e-9)


def test_holdup_rises_with_gas_and_power():
    base = d.gas_holdup_Calderbank(1000.0, 0.01, 1000.0, 0.072)
    assert d.gas_holdup_Calderbank(2000.0, 0.01, 1000.0, 0.072) > base
    assert d.gas_holdup_Calderbank(1000.0, 0.02, 1000.0, 0.072) > base
    assert d.gas_holdup_Calderbank(1000.0, 0.0, 1000.0, 0.072) == 0.0


def test_kolmogorov_length_and_dissipation():
    eps = d.energy_dissipation(2000.0, 1000.0, 2.0)
    assert eps == pytest.approx(1.0)
    # (nu^3 / eps)^(1/4) with nu = 1e-6 m2/s: 31.6 um
    assert d.kolmogorov_length(1e-3, 1000.0, eps) == pytest.approx(1e-6 ** 0.75, rel=1e-12)


def test_tip_speed_and_flow_number():
    assert d.tip_speed(2.0, 1.333) == pytest.approx(math.pi * 2.0 * 1.333)
    assert d.flow_number(0.19, 2.0, 1.333) == pytest.approx(0.19 / (2.0 * 1.333 ** 3))


def test_normal_molar_volume_constant():
    # 22.414 L/mol at 0 degC and 101.325 kPa (CODATA ideal-gas molar volume)
    assert 1000.0 / MOL_PER_NORMAL_M3 == pytest.approx(22.414, abs=5e-4)
