"""Heat load and removal: metabolic heat, U A dT_lm, coolant flow, wall areas, crossover."""

from __future__ import annotations

import math

import numpy as np
import pytest
from hypothesis import given
from hypothesis import strategies as st
from scipy import integrate

from scaleup.errors import InputError
from scaleup.hydro.geometry import Vessel, _torispherical_parts, scale_by_factor
from scaleup.scaling import heat


def test_lmtd_limits_and_definition():
    # equal end differences: the log mean is that difference
    assert heat.log_mean_temperature_difference(310.0, 290.0, 290.0 + 1e-12) == \
        pytest.approx(20.0, rel=1e-9)
    d_in, d_out = 22.0, 12.0
    expected = (d_in - d_out) / math.log(d_in / d_out)
    assert heat.log_mean_temperature_difference(310.0, 310.0 - d_in, 310.0 - d_out) == \
        pytest.approx(expected, rel=1e-12)


def test_lmtd_refuses_coolant_warmer_than_liquid():
    with pytest.raises(InputError):
        heat.log_mean_temperature_difference(300.0, 290.0, 305.0)


def test_removal_and_coolant_flow_are_one_energy_balance():
    q = heat.heat_removal(450.0, 40.0, 310.15, 288.15, 298.15)
    w = heat.coolant_flow(q, 288.15, 298.15)
    assert w * heat.WATER_HEAT_CAPACITY * 10.0 == pytest.approx(q, rel=1e-12)


def test_elliptical_head_area_by_quadrature():
    # 2:1 head of T = 1: x^2/a^2 + (c - h)^2/c^2 = 1 with a = 0.5, c = 0.25; integrate in the
    # angle to avoid the infinite slope at the rim
    a, c = 0.5, 0.25

    def integrand(t):  # x = a sin t, h = c (1 - cos t)
        x, dx, dh = a * math.sin(t), a * math.cos(t), c * math.sin(t)
        return 2 * math.pi * x * math.hypot(dx, dh)
    area = integrate.quad(integrand, 0, math.pi / 2)[0]
    assert heat.head_area(1.0, "elliptical") == pytest.approx(area, rel=1e-9)


@pytest.mark.parametrize("knuckle", [0.1, 0.06])
def test_torispherical_head_area_by_quadrature(knuckle):
    R, r, x_c, y_c, a1, _ = _torispherical_parts(1.0, 1.0, knuckle)

    def crown(t):  # angle from the axis on the crown sphere
        return 2 * math.pi * R * math.sin(t) * R
    t1 = math.acos((R - a1) / R)
    area = integrate.quad(crown, 0, t1)[0]

    def knuckle_part(t):  # x = x_c + r sin t, h = y_c - r cos t
        return 2 * math.pi * (x_c + r * math.sin(t)) * r
    theta1 = math.asin(x_c / (R - r))
    area += integrate.quad(knuckle_part, theta1, math.pi / 2)[0]
    assert heat.head_area(1.0, "torispherical", 1.0, knuckle) == pytest.approx(area, rel=1e-9)


def test_wall_area_of_flat_vessel():
    v = Vessel(2.0, 3.0)
    assert heat.wall_area(v) == pytest.approx(math.pi * 2 * 3 + math.pi, rel=1e-12)
    assert heat.wall_area(v, include_bottom=False) == pytest.approx(6 * math.pi, rel=1e-12)


def test_crossover_volume_is_where_jacket_equals_load():
    # synthetic: scale a vessel family to the crossover volume and check U A dT = q V there
    base = Vessel(1.0, 2.0, bottom="elliptical")
    a = heat.wall_area(base) / base.tank_diameter ** 2
    b = base.volume / base.tank_diameter ** 3
    q, U, dt = 12e3, 500.0, 14.0
    v_c = heat.crossover_volume(q, U, dt, a, b)
    big = scale_by_factor(base, (v_c / base.volume) ** (1 / 3))
    assert big.volume == pytest.approx(v_c, rel=1e-9)
    assert U * heat.wall_area(big) * dt == pytest.approx(q * big.volume, rel=1e-9)


@given(st.floats(1e3, 1e5), st.floats(100.0, 2000.0), st.floats(2.0, 40.0))
def test_crossover_scales_as_the_cube_of_u_dt_over_q(q, U, dt):
    one = heat.crossover_volume(q, U, dt, 7.0, 1.5)
    assert heat.crossover_volume(q, 2 * U, dt, 7.0, 1.5) == pytest.approx(8 * one, rel=1e-9)
    assert heat.crossover_volume(2 * q, U, dt, 7.0, 1.5) == pytest.approx(one / 8, rel=1e-9)


def test_heat_balance_adds_up_and_reports_crossover():
    v = Vessel(3.0, 6.0, jacket_area=60.0, jacket_top=6.0, coil_area=30.0, coil_bottom=0.5,
               coil_top=5.5)
    our = 50.0 / 3600.0  # mol/(m3 s)
    hb = heat.heat_balance(v, our, 80e3, 310.15, heat.Cooling(jacket_u=400.0, coil_u=900.0))
    assert hb.metabolic_w == pytest.approx(460e3 * our * v.volume, rel=1e-12)
    assert hb.load_w == pytest.approx(hb.metabolic_w + 80e3, rel=1e-12)
    assert hb.removal_w == pytest.approx(hb.jacket_removal_w + hb.coil_removal_w, rel=1e-12)
    assert hb.margin == pytest.approx(hb.removal_w / hb.load_w - 1, rel=1e-12)
    assert hb.jacket_area_m2 == pytest.approx(60.0)
    assert np.isfinite(hb.crossover_volume_m3) and hb.crossover_volume_m3 > 0


def test_heat_balance_without_u_says_so():
    hb = heat.heat_balance(Vessel(1.0, 1.0), 0.01, 1e3, 310.15, heat.Cooling())
    assert hb.removal_w == 0 and np.isnan(hb.margin)
    assert any("common practice" in n for n in hb.notes)


def test_negative_our_refused():
    with pytest.raises(InputError):
        heat.metabolic_heat_Doran(-1.0, 1.0)
