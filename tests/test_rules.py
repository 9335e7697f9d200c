"""Scale-up rules: each rule holds its quantity between pilot and full scale."""

from __future__ import annotations

import numpy as np
import pytest

from scaleup.errors import InputError
from scaleup.hydro.geometry import scale_to_volume, standard_vessel
from scaleup.scaling.correlation import KlaModel
from scaleup.scaling.evaluate import Limits, Liquid, Process
from scaleup.scaling.rules import PilotPoint, compare_rules
from scaleup.units import MOL_PER_NORMAL_M3

WATER_30C = Liquid(303.15, 995.65, 0.797e-3, 0.0712)
MODEL = KlaModel.from_published("vant-riet-coalescing")
PILOT = standard_vessel(0.3)
PILOT_POINT = PilotPoint(PILOT, 8.0, 0.5 * PILOT.volume / 60.0 * MOL_PER_NORMAL_M3)


@pytest.fixture(scope="module")
def comparison():
    return compare_rules(PILOT_POINT, scale_to_volume(PILOT, 10.0), WATER_30C,
                         Process(our=20 / 3600), MODEL, Limits(max_tip_speed=6.0))


def by_rule(c):
    return {p.rule: p for p in c.projections}


def test_each_rule_holds_its_quantity(comparison):
    c = comparison
    pilot = c.pilot.op
    p = by_rule(c)
    ev = {k: v.evaluation for k, v in p.items()}
    assert float(ev["p-per-v"].op.power_per_volume) == pytest.approx(
        float(pilot.power_per_volume), rel=1e-6)
    assert float(ev["pg-per-v"].op.gassed_power_per_volume) == pytest.approx(
        float(pilot.gassed_power_per_volume), rel=1e-6)
    assert float(ev["tip-speed"].op.tip_speed) == pytest.approx(float(pilot.tip_speed),
                                                                 rel=1e-12)
    assert p["speed"].speed == pytest.approx(PILOT_POINT.speed)
    assert float(ev["reynolds"].op.reynolds) == pytest.approx(float(pilot.reynolds), rel=1e-12)
    assert float(ev["kla"].kla) == pytest.approx(c.kla_target, rel=1e-6)
    assert float(ev["otr"].transfer.otr) == pytest.approx(c.otr_target, rel=1e-6)


def test_vvm_rule_keeps_vvm(comparison):
    for p in comparison.projections:
        if p.evaluation is not None:
            assert float(p.evaluation.op.vvm) == pytest.approx(float(comparison.pilot.op.vvm),
                                                               rel=1e-12)


@pytest.mark.parametrize("gas_rule,attribute", [("superficial", "superficial_gas_velocity"),
                                                ("flow-number", "flow_number")])
def test_gas_rules_keep_their_quantity(gas_rule, attribute):
    c = compare_rules(PILOT_POINT, scale_to_volume(PILOT, 10.0), WATER_30C, Process(), MODEL,
                      rules=("p-per-v", "tip-speed"), gas_rule=gas_rule)
    for p in c.projections:
        assert float(getattr(p.evaluation.op, attribute)) == pytest.approx(
            float(getattr(c.pilot.op, attribute)), rel=1e-9)


def test_same_volume_returns_the_pilot_speed():
    c = compare_rules(PILOT_POINT, scale_to_volume(PILOT, PILOT.volume), WATER_30C, Process(),
                      MODEL)
    for p in c.projections:
        assert p.speed == pytest.approx(PILOT_POINT.speed, rel=1e-6), p.rule


def test_limits_and_extrapolation_are_reported(comparison):
    p = by_rule(comparison)
    assert any("tip speed" in v for v in p["speed"].violations)
    # van't Riet states V < 2.6 m3: a 10 m3 vessel lies outside its stated range
    assert any("vessel_volume_m3" in m for m in p["p-per-v"].extrapolation)


def test_unreachable_rule_has_no_solution():
    # a measured kLa of 5 1/s would need Pg/V ~ 1e8 W/m3 by van't Riet at full scale: beyond
    # a 60 m/s tip speed, so the rule has no solution and says so
    fast = PilotPoint(PILOT, 8.0, PILOT_POINT.gas_flow, kla_measured=5.0)
    c = compare_rules(fast, scale_to_volume(PILOT, 10.0), WATER_30C, Process(), MODEL,
                      rules=("kla",))
    assert c.kla_target_source == "measured"
    assert c.projections[0].evaluation is None and c.projections[0].note == "no solution"
    assert np.isnan(c.projections[0].speed)


def test_bad_rule_names_refused():
    with pytest.raises(InputError):
        compare_rules(PILOT_POINT, PILOT, WATER_30C, Process(), MODEL, rules=("fast",))
    with pytest.raises(InputError):
        compare_rules(PILOT_POINT, PILOT, WATER_30C, Process(), MODEL, gas_rule="lots")
    with pytest.raises(InputError):
        compare_rules(PilotPoint(PILOT, 8.0, 0.0), PILOT, WATER_30C, Process(), MODEL)
