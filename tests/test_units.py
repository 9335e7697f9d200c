"""Parsing and formatting of quantities typed by people."""

from __future__ import annotations

import math

import pytest
from hypothesis import given
from hypothesis import strategies as st

from scaleup import units
from scaleup.errors import InputError, MissingUnit, UnknownUnit, WrongDimension


@pytest.mark.parametrize("text,kind,expected", [
    ("600 rpm", "speed", 10.0),
    ("10 rps", "speed", 10.0),
    ("10 rev/s", "speed", 10.0),
    ("5 Hz", "speed", 5.0),
    ("0.5 barg", "pressure", 151325.0),
    ("1.5 bara", "pressure", 150000.0),
    ("101.325 kPa", "pressure", 101325.0),
    ("37 degC", "temperature", 310.15),
    ("37 °C", "temperature", 310.15),
    ("300 K", "temperature", 300.0),
    ("60 mmol/(L h)", "rate", 60 / 3600.0),
    ("60 mmol/L/h", "rate", 60 / 3600.0),
    ("120 1/h", "kla", 120 / 3600.0),
    ("0.02 1/s", "kla", 0.02),
    ("1.5 kW/m3", "power_per_volume", 1500.0),
    ("1500 W/m3", "power_per_volume", 1500.0),
    ("300 L", "volume", 0.3),
    ("40 m3", "volume", 40.0),
    ("8 mg/L", "mass_concentration", 0.008),
    ("1.2 mPa s", "viscosity", 0.0012),
    ("1 cP", "viscosity", 0.001),
    ("0.5 mol/L", "concentration", 500.0),
    ("25.6 cm3/mol", "molar_volume", 25.6e-6),
    ("70 mN/m", "surface_tension", 0.070),
])
def test_parse_lab_units(text, kind, expected):
    assert units.parse(text, kind) == pytest.approx(expected, rel=1e-12)


def test_gas_flows_to_molar_flow():
    n_per_m3 = units.MOL_PER_NORMAL_M3
    assert units.parse("30 NL/min", "gas_flow") == pytest.approx(0.030 / 60 * n_per_m3)
    assert units.parse("12 Nm3/h", "gas_flow") == pytest.approx(12 / 3600 * n_per_m3)
    assert units.parse("1 vvm", "gas_flow", liquid_volume_m3=0.3) == pytest.approx(
        0.3 / 60 * n_per_m3)
    assert units.parse("0.02 mol/s", "gas_flow") == pytest.approx(0.02)
    # actual flow at 30 degC and 1.5 bara: ideal gas
    actual = units.parse("30 L/min", "gas_flow", temperature_k=303.15, pressure_pa=1.5e5)
    assert actual == pytest.approx(0.030 / 60 * 1.5e5 / (units.R * 303.15))


def test_dissolved_oxygen_units():
    assert units.parse("8 mg/L", "dissolved_oxygen") == pytest.approx(8e-3 / units.M_O2)
    assert units.parse("20 %", "dissolved_oxygen", c_star_mol_m3=0.25) == pytest.approx(0.05)
    with pytest.raises(InputError, match="saturation"):
        units.parse("20 %", "dissolved_oxygen")


@pytest.mark.parametrize("text,kind,error,message", [
    ("600 kg", "speed", WrongDimension,
     'speed: "600 kg" is a mass; expected a rotational speed such as "600 rpm"'),
    ("600", "speed", MissingUnit, 'speed: "600" has no unit; expected a rotational speed'),
    ("600 rpx", "speed", UnknownUnit, 'speed: "600 rpx": unknown unit "rpx"'),
    ("6,5 rpm", "speed", InputError, "decimal comma"),
    ("fast", "speed", InputError, "does not start with a number"),
    ("", "speed", InputError, "empty value"),
    ("3 m", "temperature", WrongDimension, "is a length; expected a temperature"),
    ("5 L/min", "gas_flow", InputError, "actual volumetric flow"),
    ("1 vvm", "gas_flow", InputError, "needs the liquid volume"),
    ("-1 NL/min", "gas_flow", InputError, "negative"),
    ("2 kg", "gas_flow", WrongDimension, "a mass"),
])
def test_errors_name_field_and_expectation(text, kind, error, message):
    with pytest.raises(error) as info:
        units.parse(text, kind, "speed" if kind == "speed" else None)
    assert message in str(info.value)


def test_format_and_convert():
    assert units.format_quantity(10.0, "speed") == "600 rpm"
    assert units.format_quantity(310.15, "temperature") == "37 degC"
    assert units.format_quantity(0.02, "kla") == "72 1/h"
    assert units.convert(151325.0, "pressure", "barg") == pytest.approx(0.5)
    assert units.gas_flow_to(units.parse("1.2 vvm", "gas_flow", liquid_volume_m3=2.0), "vvm",
                             2.0) == pytest.approx(1.2)


@pytest.mark.parametrize("value,expected", [(0.012345, "0.01235"), (600.0, "600"),
                                            (1.5, "1.5"), (123456.0, "1.235e+05"),
                                            (-0.5, "-0.5"), (0.0, "0")])
def test_significant_figures(value, expected):
    assert units.sig(value) == expected


@given(st.floats(min_value=1e-3, max_value=1e4, allow_nan=False))
def test_speed_round_trip(rpm):
    si = units.parse(f"{rpm!r} rpm", "speed")
    assert units.convert(si, "speed", "rpm") == pytest.approx(rpm, rel=1e-12)


@given(st.floats(min_value=-50, max_value=200, allow_nan=False))
def test_temperature_round_trip(celsius):
    si = units.parse(f"{celsius!r} degC", "temperature")
    assert units.convert(si, "temperature", "degC") == pytest.approx(celsius, abs=1e-9)


@given(st.floats(min_value=-0.9, max_value=50, allow_nan=False))
def test_gauge_pressure_round_trip(barg):
    si = units.parse(f"{barg!r} barg", "pressure")
    assert si == pytest.approx(barg * 1e5 + units.P_ATM)
    assert units.convert(si, "pressure", "barg") == pytest.approx(barg, abs=1e-9)


@given(st.text(max_size=30))
def test_parse_never_crashes_on_junk(text):
    try:
        value = units.parse(text, "speed", "speed")
    except InputError:
        return
    assert math.isfinite(value)


# ---- learnt conversions: after pint has read a unit once, a multiply-add gives pint's number
def _pint_si(value: float, unit: str, kind: str) -> float:
    """The SI value straight from pint, without this module's shortcut."""
    ureg = units.registry()
    return float(ureg.Quantity(value, units._clean_unit(unit)).to(units.KINDS[kind].si)
                 .magnitude)


@given(st.floats(min_value=-1e6, max_value=1e6, allow_nan=False),
       st.sampled_from([("rpm", "speed"), ("degC", "temperature"), ("degF", "temperature"),
                        ("kPa", "pressure"), ("psi", "pressure"), ("1/h", "kla"),
                        ("mmol/(L h)", "rate"), ("mPa s", "viscosity"), ("L", "volume"),
                        ("kW/m3", "power_per_volume"), ("degR", "temperature")]))
def test_learnt_conversion_equals_pint_to_the_last_bit(value, unit_kind):
    unit, kind = unit_kind
    expected = _pint_si(value, unit, kind)
    for _ in range(2):  # the first reading goes through pint, the second through the rule
        try:
            got = units.parse(f"{value!r} {unit}", kind)
        except InputError:  # outside what a kind allows is refused both times
            continue
        assert got == expected


def test_gauge_pressure_and_gas_flows_after_the_first_reading():
    for _ in range(2):
        assert units.parse("0.5 barg", "pressure") == 0.5 * 1e5 + units.P_ATM
        assert units.parse("30 NL/min", "gas_flow") == pytest.approx(
            0.030 / 60 * units.MOL_PER_NORMAL_M3, rel=1e-15)
        actual = units.parse("30 L/min", "gas_flow", temperature_k=303.15, pressure_pa=1.5e5)
        assert actual == pytest.approx(0.030 / 60 * 1.5e5 / (units.R * 303.15), rel=1e-15)
        with pytest.raises(InputError, match="actual volumetric flow"):
            units.parse("30 L/min", "gas_flow")


def test_logarithmic_units_are_read_by_pint_every_time():
    # 10 dB is a factor 10 and 20 dB a factor 100 (IEC 60027-3 power level): not linear
    assert units.parse("10 dB", "fraction") == pytest.approx(10.0)
    assert units.parse("20 dB", "fraction") == pytest.approx(100.0)
    assert not any("dB" in unit for unit, _ in units._LEARNT)


def test_refusals_repeat_word_for_word_after_a_unit_was_learnt():
    units.parse("1 kPa", "pressure")
    messages = []
    for _ in range(2):
        with pytest.raises(InputError) as info:
            units.parse("1e307 kPa", "pressure", "head pressure")  # 1e310 Pa overflows
        messages.append(str(info.value))
    assert messages[0] == messages[1] == 'head pressure: "1e307 kPa" is not a finite number'
    for _ in range(2):
        with pytest.raises(WrongDimension, match='"600 kg" is a mass'):
            units.parse("600 kg", "speed")


def test_convert_many_matches_convert_and_keeps_gaps():
    values = [10.0, None, 2.5, 0.0]
    assert units.convert_many(values, "speed") == [units.convert(v, "speed") if v is not None
                                                   else None for v in values]
    pressures = [151325.0, None, 1e5]
    assert units.convert_many(pressures, "pressure", "barg") == [
        units.convert(151325.0, "pressure", "barg"), None, units.convert(1e5, "pressure", "barg")]
    assert units.convert_many([310.15], "temperature") == [pytest.approx(37.0)]
    assert units.convert_many([None, None], "kla") == [None, None]
    assert units.convert_many([], "kla") == []
