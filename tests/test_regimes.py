"""Flooding, loading and complete dispersion (Nienow et al. 1985)."""

from __future__ import annotations

import numpy as np
import pytest
from hypothesis import given, settings
from hypothesis import strategies as st

from scaleup.hydro import regimes
from scaleup.units import G


@settings(max_examples=50, deadline=None)
@given(st.floats(1e-5, 1.0), st.floats(0.05, 2.0), st.floats(0.2, 0.5))
def test_minimum_speeds_solve_the_transition_equations(q, D, d_t):
    T = D / d_t
    n_f = regimes.flooding_speed(q, D, T)
    fr = n_f ** 2 * D / G
    assert q / (n_f * D ** 3) == pytest.approx(regimes.flooding_flow_number_Nienow(fr, d_t),
                                               rel=1e-9)
    n_cd = regimes.complete_dispersion_speed(q, D, T)
    fr = n_cd ** 2 * D / G
    assert q / (n_cd * D ** 3) == pytest.approx(
        regimes.complete_dispersion_flow_number_Nienow(fr, d_t), rel=1e-9)


def test_regime_changes_at_the_minimum_speeds():
    q, D, T = 0.002, 0.1, 0.3
    n_f = regimes.flooding_speed(q, D, T)
    n_cd = regimes.complete_dispersion_speed(q, D, T)
    assert n_f < n_cd
    speeds = np.array([0.9 * n_f, 1.1 * n_f, 0.9 * n_cd, 1.1 * n_cd])
    assert regimes.regime(speeds, q, D, T).tolist() == [
        "flooded", "loaded", "loaded", "completely dispersed"]


def test_no_gas_is_completely_dispersed_with_infinite_margin():
    assert regimes.regime(5.0, 0.0, 0.1, 0.3) == "completely dispersed"
    assert regimes.flooding_margin(5.0, 0.0, 0.1, 0.3) == np.inf


def test_flooding_margin_is_zero_at_the_flooding_speed_and_grows_with_speed():
    q, D, T = 0.05, 0.5, 1.5
    n_f = regimes.flooding_speed(q, D, T)
    assert regimes.flooding_margin(n_f, q, D, T) == pytest.approx(0.0, abs=1e-12)
    m = regimes.flooding_margin(np.array([1.0, 2.0, 3.0]) * n_f, q, D, T)
    assert m.tolist() == pytest.approx([0.0, 1.0, 2.0])


def test_more_gas_needs_more_speed():
    q = np.array([1e-3, 1e-2, 1e-1])
    assert np.all(np.diff(regimes.flooding_speed(q, 0.5, 1.5)) > 0)
    assert np.all(np.diff(regimes.complete_dispersion_speed(q, 0.5, 1.5)) > 0)


def test_warnings_outside_the_stated_geometry():
    assert regimes.regime_warnings("disc-turbine", 0.33, 0.25) == []
    w = regimes.regime_warnings("disc-turbine", 0.6, 0.05)
    assert any("D/T = 0.6" in x for x in w) and any("C/T = 0.05" in x for x in w)
    assert "not established for hydrofoil-wide" in regimes.regime_warnings(
        "hydrofoil-wide", 0.4, 0.3)[0]
    assert "conservative" in regimes.regime_warnings("concave-disc-turbine", 0.4, 0.3)[0]
