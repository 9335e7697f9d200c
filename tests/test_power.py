"""Power curve, multiple impellers and gassed power."""

from __future__ import annotations

import numpy as np
import pytest
from hypothesis import given, settings
from hypothesis import strategies as st

from scaleup.hydro import power
from scaleup.hydro.impellers import CATALOGUE


@pytest.mark.parametrize("type_id", list(CATALOGUE))
def test_power_curve_is_continuous_and_meets_its_nodes(type_id):
    spec = CATALOGUE[type_id]
    re = np.logspace(-1, 6, 2000)
    curve = power.power_number_curve(re, spec)
    edges = [spec.re_laminar, spec.re_turbulent]
    if spec.np_transitional is None:
        # without a published transitional point the curve is one falling log-log line
        assert np.all(np.diff(curve) <= 1e-12)
    else:
        re_mid, np_mid = spec.np_transitional
        assert spec.re_laminar < re_mid < spec.re_turbulent
        assert power.power_number_curve(re_mid, spec) == pytest.approx(np_mid, rel=1e-12)
        edges.append(re_mid)
    for edge in edges:
        below = power.power_number_curve(edge * (1 - 1e-9), spec)
        above = power.power_number_curve(edge * (1 + 1e-9), spec)
        assert below == pytest.approx(above, rel=1e-6)
    # the laminar branch falls; a measured plateau moves only the last segment
    assert np.all(np.diff(curve[re <= spec.re_laminar]) < 0)
    assert curve[-1] == pytest.approx(spec.power_number)
    assert power.power_number_curve(1e6, spec, np_turbulent=2 * spec.power_number) == \
        pytest.approx(2 * spec.power_number)


def test_power_curve_accepts_scalars_and_returns_floats():
    assert isinstance(power.power_number_curve(1e5, "pitched-blade-4"), float)
    assert power.power_number_curve(np.array([1e5, 1e5]), "pitched-blade-4").shape == (2,)


@settings(max_examples=60, deadline=None)
@given(st.floats(0.05, 50.0), st.floats(0.05, 50.0), st.sampled_from(list(CATALOGUE)),
       st.floats(1e-3, 10.0))
def test_power_rises_with_speed(n1, n2, type_id, mu):
    # P = Np(Re) rho N^3 D^5 rises with N over the whole Reynolds range
    lo, hi = sorted((n1, n2))
    if hi - lo < 1e-6:
        return
    D, rho = 0.2, 1000.0

    def p(n):
        re = rho * n * D ** 2 / mu
        return power.power_ungassed(power.power_number_curve(re, type_id), rho, n, D)

    assert p(hi) > p(lo)


def test_interaction_factor_is_one_beyond_one_diameter_and_reduced_below():
    f = power.interaction_factors([2.0, 1.0, 0.75, 0.5, 0.1])
    assert f.tolist() == pytest.approx([1.0, 1.0, 1.0, 0.7, 0.4, 0.4])
    assert power.interaction_factors([]).tolist() == [1.0]


def test_michel_miller_is_capped_at_the_ungassed_power():
    # at a tiny gas flow the dimensional correlation would exceed P
    assert power.gassed_power_Michel_Miller(100.0, 10.0, 0.1, 1e-9) == pytest.approx(100.0)


def test_michel_miller_falls_with_gas_flow_and_is_vectorised():
    q = np.array([1e-4, 1e-3, 1e-2])
    pg = power.gassed_power_Michel_Miller(500.0, 8.0, 0.15, q)
    assert pg.shape == (3,) and np.all(np.diff(pg) < 0)


def test_hughmark_falls_with_gas_flow_and_stays_at_most_one():
    q = np.logspace(-6, -2, 20)
    ratio = power.gassed_power_ratio_Hughmark(8.0, 0.1, q, 0.02, 0.02)
    assert np.all(ratio <= 1.0) and np.all(np.diff(ratio) <= 0)


def test_cui_is_one_without_gas_and_falls_monotonically():
    fl = np.linspace(0.0, 0.2, 500)
    ratio = power.gassed_power_ratio_Cui(fl)
    assert ratio[0] == pytest.approx(1.0)
    # the small step at 0.035 (about 0.004) is the published mismatch of the two branches
    steps = np.diff(ratio)
    assert np.all(steps < 0.005)


def test_cui_is_held_at_its_fl_0_1_value_beyond_its_range():
    # below Fl = 0.1 the published lines, unchanged
    assert power.gassed_power_ratio_Cui(0.08) == pytest.approx(0.62 - 1.85 * 0.08, abs=1e-12)
    assert power.gassed_power_ratio_Cui(0.1) == pytest.approx(0.435, abs=1e-12)
    # above it held, never zero or negative (the line itself is 0 at 0.335, -0.31 at 0.5)
    fl = np.array([0.1001, 0.2, 0.335, 0.5, 5.0])
    assert power.gassed_power_ratio_Cui(fl) == pytest.approx([0.435] * 5, abs=1e-12)
    assert power.CUI_RATIO_FLOOR == pytest.approx(0.435, abs=1e-12)


def test_gassed_power_stays_positive_when_deeply_flooded():
    q = np.array([1e-3, 1e-2, 1e-1])  # Fl = 0.1, 1, 10 at N = 10 rev/s, D = 0.1 m
    pg = power.gassed_power(100.0, 10.0, 0.1, q, impeller="disc-turbine", method="Cui")
    assert pg == pytest.approx([43.5] * 3, rel=1e-12)


def test_linear_ratio_has_its_floor():
    assert power.gassed_power_ratio_linear(1.0, "pitched-blade-4") == pytest.approx(0.55)
    assert power.gassed_power_ratio_linear(0.0, "hydrofoil-wide") == pytest.approx(1.0)
    # disc turbines use Cui in the per-type model
    assert power.gassed_power_ratio_linear(0.02, "disc-turbine") == pytest.approx(
        power.gassed_power_ratio_Cui(0.02))


def test_gassed_power_dispatcher_broadcasts_and_keeps_p_without_gas():
    p = np.array([100.0, 200.0])
    q = np.array([0.0, 5e-4])
    for method in power.gassed_power_methods():
        pg = power.gassed_power(p, 10.0, 0.1, q, impeller="disc-turbine", method=method,
                                liquid_volume=0.02, blade_width=0.02)
        assert pg[0] == pytest.approx(100.0)
        assert 0 < pg[1] < 200.0


def test_gassed_power_unknown_method():
    with pytest.raises(ValueError, match="unknown gassed-power method 'Smith'; use one of Cui"):
        power.gassed_power(1.0, 1.0, 0.1, 1e-4, impeller="disc-turbine", method="Smith")


def test_hughmark_needs_volume_and_blade_width():
    with pytest.raises(ValueError, match="Hughmark needs"):
        power.gassed_power(1.0, 1.0, 0.1, 1e-4, impeller="disc-turbine", method="Hughmark")


def test_methods_for_an_axial_impeller_are_only_the_per_type_ratio():
    assert power.gassed_power_methods("hydrofoil-wide") == ["type"]
    assert "Michel_Miller" in power.gassed_power_methods("disc-turbine")
