"""O2 at scale: exit-gas balance, driving force, OTR capacity fixed point, required kLa."""

from __future__ import annotations

import numpy as np
import pytest
from hypothesis import given, settings
from hypothesis import strategies as st

from scaleup.errors import InputError
from scaleup.hydro.geometry import Vessel
from scaleup.props.solubility import log_mean_saturation
from scaleup.scaling import oxygen

SOL = oxygen.OxygenSolubility(1.6, 1.3, 1.0, 2e5, 1.5e5, 1e5, 0.21)


def test_exit_gas_balance_conserves_o2_and_inerts():
    F, y, n = 12.0, 0.20946, 0.9
    for rq in (0.0, 1.0, 1.3):
        y_out = oxygen.exit_o2_fraction(F, y, n, rq)
        f_out = F - n + rq * n
        assert y_out * f_out == pytest.approx(F * y - n, rel=1e-12)  # O2 out = in - taken up
        # inerts (N2, Ar) pass through unchanged
        assert (1 - y_out) * f_out - rq * n == pytest.approx(F * (1 - y), rel=1e-12)


def test_log_mean_agrees_with_props_layer():
    # the props layer's log-mean C* (Benson-Krause at both ends) against our driving force
    v = Vessel(3.0, 10.0)
    sol = oxygen.oxygen_solubility(v, 303.15, 995.65)
    y_out, c_l = 0.17, 0.05
    lm = log_mean_saturation("O2", 303.15, v.head_pressure, 10.0, 0.20946, y_out,
                             c_liquid=c_l, density=995.65)
    assert oxygen.driving_force(sol, 0.20946, y_out, c_l) == pytest.approx(
        lm.c_star_log_mean_mol_m3 - c_l, rel=1e-9)


def test_driving_force_methods_agree_without_depletion_in_a_flat_vessel():
    flat = oxygen.OxygenSolubility(1.0, 1.0, 1.0, 1e5, 1e5, 1e5, 0.21)
    values = [oxygen.driving_force(flat, 0.21, 0.21, 0.05, m) for m in oxygen.DRIVING_FORCES]
    assert values == pytest.approx([0.16] * len(oxygen.DRIVING_FORCES), rel=1e-9)
    with pytest.raises(InputError):
        oxygen.driving_force(flat, 0.21, 0.21, 0.05, "geometric")


def test_backmixed_driving_force_uses_exit_gas_at_mid_height():
    # well-mixed gas: the liquid everywhere sees the exit gas, at the mid-height pressure
    sol = oxygen.OxygenSolubility(1.6, 1.3, 1.0, 2e5, 1.5e5, 1e5, 0.21)
    assert oxygen.driving_force(sol, 0.21, 0.12, 0.05, "backmixed") == pytest.approx(
        1.3 * 0.12 - 0.05, rel=1e-12)
    # it is the lowest of the four once the gas is depleted (no credit for the inlet gas)
    values = {m: oxygen.driving_force(sol, 0.21, 0.12, 0.05, m) for m in oxygen.DRIVING_FORCES}
    assert min(values, key=values.get) == "backmixed"


def test_otr_capacity_is_a_consistent_fixed_point():
    t = oxygen.otr_capacity(np.array([0.01, 0.05, 0.2]), 40.0, 10.0, SOL, 0.05)
    y_out = oxygen.exit_o2_fraction(10.0, oxygen.AIR_O2_FRACTION, t.transfer)
    dc = oxygen.driving_force(SOL, oxygen.AIR_O2_FRACTION, y_out, 0.05)
    np.testing.assert_allclose(t.transfer, np.array([0.01, 0.05, 0.2]) * 40.0 * dc, rtol=1e-9)
    np.testing.assert_allclose(t.fraction_used, t.transfer / (10.0 * oxygen.AIR_O2_FRACTION),
                               rtol=1e-12)
    assert np.all(np.diff(t.otr) > 0)


def test_required_kla_inverts_otr_capacity():
    our = np.array([0.002, 0.01, 0.02])
    k = oxygen.required_kla(our, 40.0, 10.0, SOL, 0.05)
    t = oxygen.otr_capacity(k, 40.0, 10.0, SOL, 0.05)
    np.testing.assert_allclose(t.otr, our, rtol=1e-9)


def test_required_kla_is_infinite_when_the_gas_cannot_supply_the_duty():
    supplied = 10.0 * oxygen.AIR_O2_FRACTION / 40.0  # mol/(m3 s) of O2 in the gas
    assert np.isinf(oxygen.required_kla(1.01 * supplied, 40.0, 10.0, SOL, 0.05))


def test_dissolved_oxygen_at_uptake_inverts_required_kla():
    c = oxygen.dissolved_oxygen_at_uptake(0.05, 0.01, 40.0, 10.0, SOL)
    assert oxygen.required_kla(0.01, 40.0, 10.0, SOL, c) == pytest.approx(0.05, rel=1e-9)
    assert oxygen.dissolved_oxygen_at_uptake(1e-4, 0.02, 40.0, 10.0, SOL) == pytest.approx(
        0.0, abs=1e-12)  # oxygen-limited: DO driven to nil


def test_enriched_inlet_raises_capacity():
    air = oxygen.otr_capacity(0.05, 40.0, 10.0, SOL, 0.05, 0.20946).otr
    rich = oxygen.otr_capacity(0.05, 40.0, 10.0, SOL, 0.05, 0.40).otr
    assert rich > 1.8 * air


@settings(max_examples=40, deadline=None)
@given(st.floats(1e-3, 0.3), st.floats(0.5, 100.0), st.floats(0.0, 0.15))
def test_capacity_rises_with_kla_and_gas_and_never_exceeds_supply(kla, gas, c_l):
    t = oxygen.otr_capacity(np.array([kla, 1.5 * kla]), 40.0, gas, SOL, c_l)
    assert t.otr[1] >= t.otr[0] - 1e-15
    assert np.all(t.transfer <= gas * oxygen.AIR_O2_FRACTION * (1 + 1e-12))
    more_gas = oxygen.otr_capacity(kla, 40.0, 2 * gas, SOL, c_l)
    assert more_gas.otr >= t.otr[0] - 1e-15


def test_setpoint_in_percent_uses_air_at_head_pressure():
    assert oxygen.do_setpoint(30.0, SOL, True) == pytest.approx(0.063)
    with pytest.raises(InputError):
        oxygen.do_setpoint(5.0, SOL, False)  # above C* with pure O2 at the sparger
