"""Blend time: branches, homogeneity, several impellers."""

from __future__ import annotations

import math

import fluids.mixing
import numpy as np
import pytest

from scaleup.hydro import mixing


def test_homogeneity_factor_matches_fluids():
    # fluids.mixing.adjust_homogeneity implements the same first-order rule
    for x in (0.5, 0.9, 0.95, 0.99, 0.999):
        assert mixing.homogeneity_factor(x) == pytest.approx(
            fluids.mixing.adjust_homogeneity(x), rel=1e-12)
    assert mixing.homogeneity_factor(0.95) == pytest.approx(1.0)


@pytest.mark.parametrize("x", [0.0, 1.0, 1.5])
def test_homogeneity_outside_zero_one_is_refused(x):
    with pytest.raises(ValueError, match="strictly between 0 and 1"):
        mixing.homogeneity_factor(x)


def test_branches_meet_at_the_regime_boundary():
    # at Re Np^(1/3) = 6370 the two forms differ by 183^2/6370 vs 5.2: 1 % (Grenville 1992)
    Np = 5.0
    re = mixing.TURBULENT_REGIME_CONSTANT / Np ** (1 / 3)
    turb = mixing.blend_time_Ruszkowski(1.0, 0.3, 1.0, 1.0, Np)
    trans = mixing.blend_time_Grenville_transitional(1.0, 0.3, 1.0, 1.0, Np, re)
    assert trans == pytest.approx(turb, rel=0.012)


def test_turbulent_blend_time_scales_as_one_over_n():
    n = np.array([1.0, 2.0, 4.0])
    t = mixing.blend_time(n, 0.3, 1.0, 1.0, 5.0, 1e6)
    assert (t * n).tolist() == pytest.approx([t[0]] * 3)


def test_blend_time_picks_the_branch_by_regime_constant():
    turbulent = mixing.blend_time(1.0, 0.3, 1.0, 1.0, 5.0, 1e5)
    assert turbulent == pytest.approx(mixing.blend_time_Ruszkowski(1.0, 0.3, 1.0, 1.0, 5.0))
    trans = mixing.blend_time(1.0, 0.3, 1.0, 1.0, 5.0, 500.0)
    assert trans == pytest.approx(
        mixing.blend_time_Grenville_transitional(1.0, 0.3, 1.0, 1.0, 5.0, 500.0))
    assert mixing.blend_time_methods(1, 500.0) == ["Grenville_transitional"]
    assert mixing.blend_time_methods(3, 1e6) == ["Cooke"]


def test_several_impellers_use_cooke_and_tall_vessels_mix_slower():
    heights = np.array([1.0, 2.0, 3.0])
    t = np.array([mixing.blend_time(1.0, 1 / 3, 1.0, h, 9.4, 1e6, impellers=3)
                  for h in heights])
    assert np.all(np.diff(t) > 0)
    # the H/T exponent is 2.43
    assert t[2] / t[0] == pytest.approx(3 ** 2.43, rel=1e-9)


def test_forced_method_and_unknown_method():
    forced = mixing.blend_time(1.0, 0.3, 1.0, 1.0, 5.0, 500.0, method="Ruszkowski")
    assert forced == pytest.approx(mixing.blend_time_Ruszkowski(1.0, 0.3, 1.0, 1.0, 5.0))
    with pytest.raises(ValueError, match="unknown blend-time method"):
        mixing.blend_time(1.0, 0.3, 1.0, 1.0, 5.0, 500.0, method="guess")


def test_ruszkowski_constant():
    # Ruszkowski (1994): N theta95 = 5.20 (T/D)^2 / Np^(1/3) at H = T
    N, D, T, Np = 2.0, 0.25, 0.75, 1.27
    expected = 5.20 * (T / D) ** 2 / Np ** (1 / 3) / N
    assert mixing.blend_time_Ruszkowski(N, D, T, T, Np) == pytest.approx(expected, rel=1e-12)
    assert math.isfinite(expected)
