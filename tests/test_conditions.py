"""Stored runs to their operating points: many at once the same as one by one."""

from __future__ import annotations

import pytest

from scaleup.conditions import DERIVED_KEYS, derived_columns

from .conftest import add_run


@pytest.fixture
def runs(campaign):
    """Runs that fall into several groups (temperature, head pressure) and two that carry a
    measured power or torque, so they are evaluated one by one."""
    for i, (speed, temperature) in enumerate([(300, 20), (450, 20), (600, 20), (450, 37),
                                              (700, 37)]):
        add_run(campaign, speed=f"{speed} rpm", temperature=f"{temperature} degC",
                date=f"2026-02-0{i + 1}T10:00", kla="60 1/h")
    add_run(campaign, speed="500 rpm", **{"head pressure": "1.5 bara"}, kla="70 1/h")
    add_run(campaign, speed="550 rpm", **{"measured power": "30 W"}, date="2026-03-01")
    add_run(campaign, speed="650 rpm", **{"measured torque": "0.5 N m"}, date="2026-03-02")
    return campaign


def test_derived_runs_equal_each_run_evaluated_alone(runs):
    table = runs.runs_derived()
    assert len(table) == 8
    for row in table:
        alone = runs.run_conditions(row["id"])
        point, liquid = alone.point, alone.liquid
        expected = {"power_w": point.power, "gassed_power_w": point.gassed_power,
                    "gassed_power_per_volume_w_m3": point.gassed_power_per_volume,
                    "superficial_gas_velocity_m_s": point.superficial_gas_velocity,
                    "vvm": point.vvm, "reynolds": point.reynolds,
                    "tip_speed_m_s": point.tip_speed, "blend_time_95_s": point.blend_time_95,
                    "density_kg_m3": liquid.density_kg_m3,
                    "viscosity_pa_s": liquid.viscosity_pa_s}
        for key, value in expected.items():
            assert row[key] == pytest.approx(float(value), rel=1e-12), key
        assert row["regime"] == str(point.regime)
        assert all(type(row[key]) in (float, str) for key in DERIVED_KEYS)


def test_columns_hold_what_the_table_holds(runs):
    table = runs.runs_derived()
    columns = runs.runs_derived_columns()
    assert columns["id"] == [row["id"] for row in table]
    for key in (*DERIVED_KEYS, "kla_per_s", "vessel", "coalescence"):
        assert list(columns[key]) == [row[key] for row in table], key


def test_no_runs_give_empty_columns(campaign):
    columns = {key: [] for key in ("id", "vessel_id", "medium_id", "temperature_k",
                                   "head_pressure_pa", "speed_rps", "gas_flow_mol_s",
                                   "power_measured_w", "torque_measured_n_m")}
    out = derived_columns(columns, {}, {})
    assert set(out) == set(DERIVED_KEYS) and all(len(v) == 0 for v in out.values())
    assert campaign.runs_derived() == []
