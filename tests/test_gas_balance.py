"""Inert-gas balance, driving forces and kLa from OTR (published checks: tests/reference)."""

from __future__ import annotations

import math

import pytest

from scaleup.errors import InputError, OutOfRange
from scaleup.measure.gas_balance import (
    gas_balance_inert,
    kla_from_otr,
    log_mean_driving_force,
)


def test_balance_closes_on_the_inert_gas():
    b = gas_balance_inert(0.02, 0.2095, 0.185, 0.0004, 0.02, 0.2)
    inert_in = 0.02 * (1 - 0.2095 - 0.0004)
    inert_out = b.outlet_flow_mol_s * (1 - 0.185 - 0.02)
    assert inert_out == pytest.approx(inert_in, rel=1e-12)
    # O2 and CO2 each close: in - out = transferred
    assert 0.02 * 0.2095 - b.outlet_flow_mol_s * 0.185 == pytest.approx(b.otr_mol_m3_s * 0.2)
    assert b.outlet_flow_mol_s * 0.02 - 0.02 * 0.0004 == pytest.approx(b.cer_mol_m3_s * 0.2)
    assert b.rq == pytest.approx(b.cer_mol_m3_s / b.otr_mol_m3_s)


def test_rates_scale_with_flow_and_inversely_with_volume():
    a = gas_balance_inert(0.01, 0.2095, 0.19, 0.0004, 0.015, 0.1)
    b = gas_balance_inert(0.02, 0.2095, 0.19, 0.0004, 0.015, 0.4)
    assert b.otr_mol_m3_s == pytest.approx(a.otr_mol_m3_s / 2)
    assert b.rq == pytest.approx(a.rq)


def test_no_uptake_and_small_uptake_are_flagged():
    none = gas_balance_inert(0.01, 0.2095, 0.2095, 0.0004, 0.0004, 0.1)
    assert none.otr_mol_m3_s == pytest.approx(0.0, abs=1e-15)
    assert math.isnan(none.rq) and "no O2 is taken up" in none.warnings[0]
    small = gas_balance_inert(0.01, 0.2095, 0.2085, 0.0004, 0.0012, 0.1)
    assert any("analyser error" in w for w in small.warnings)


@pytest.mark.parametrize("args,field", [
    ((0.01, 1.2, 0.19, 0.0, 0.01, 0.1), "y_o2_in"),
    ((0.01, 0.2095, -0.1, 0.0, 0.01, 0.1), "y_o2_out"),
    ((0.0, 0.2095, 0.19, 0.0, 0.01, 0.1), "gas_flow"),
    ((0.01, 0.2095, 0.19, 0.0, 0.01, 0.0), "volume"),
])
def test_impossible_inputs_are_refused_by_name(args, field):
    with pytest.raises(OutOfRange) as info:
        gas_balance_inert(*args)
    assert info.value.field == field


def test_pure_oxygen_feed_has_no_inert_to_balance():
    with pytest.raises(InputError, match="no inert gas"):
        gas_balance_inert(0.01, 1.0, 0.9, 0.0, 0.05, 0.1)


def test_log_mean_lies_between_the_end_driving_forces_and_tends_to_them():
    lm = log_mean_driving_force(0.40, 0.25, 0.05)
    assert 0.20 < lm < 0.35
    assert lm < (0.35 + 0.20) / 2  # a log-mean is below the arithmetic mean
    assert log_mean_driving_force(0.3, 0.3, 0.1) == pytest.approx(0.2)
    assert log_mean_driving_force(0.3 + 1e-7, 0.3, 0.1) == pytest.approx(0.2, rel=1e-6)


def test_kla_needs_a_positive_driving_force():
    assert kla_from_otr(0.01, 0.25, 0.05) == pytest.approx(0.05)
    with pytest.raises(InputError):
        kla_from_otr(0.01, 0.05, 0.25)
    with pytest.raises(InputError):
        log_mean_driving_force(0.3, 0.1, 0.2)
