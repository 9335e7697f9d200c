"""Quantities typed by people, to SI and back.

Everything inside the package is SI: m, s, kg, mol, Pa (absolute), K, W, speeds in rev/s and
gas flows as molar flows in mol/s. This module is the one place that reads what people type
("600 rpm", "1.2 vvm", "30 NL/min", "0.5 barg", "37 degC") and writes values back in the lab
units of the trade. It is built on pint, with the trade's own units defined once here.

Conventions stated once:

* **Normal conditions** for NL/min, Nm3/h and vvm: 0 degC (273.15 K) and 101.325 kPa (the
  DIN 1343 "normal" state). A normal volumetric flow is converted to a molar flow with the
  ideal-gas law, ``n = Q_N * 101325 / (8.314462618 * 273.15)`` (44.615 mol per Nm3).
* **vvm** is normal gas volume per liquid volume per minute, so it needs the liquid volume.
* **Actual** volumetric flows (L/min, m3/h) need the gas temperature and absolute pressure.
* **Gauge pressure** (barg, psig, kPag) is converted to absolute by adding 101.325 kPa at the
  edge; gauge pressure never enters a calculation.
* **% air saturation** of dissolved oxygen needs the saturation concentration C* to become a
  concentration; mg/L of O2 uses M(O2) = 31.998 g/mol.

pint is imported only when a quantity is first parsed, so that ``scaleup --help`` stays fast.
"""

from __future__ import annotations

import math
import re
from collections.abc import Sequence
from dataclasses import dataclass
from functools import lru_cache
from typing import NamedTuple

from scaleup.errors import InputError, MissingUnit, UnknownUnit, WrongDimension

R = 8.314462618  # J/(mol K), CODATA 2018 exact
T_NORMAL = 273.15  # K, normal temperature for NL and Nm3
P_NORMAL = 101325.0  # Pa, normal pressure for NL and Nm3
P_ATM = 101325.0  # Pa, the atmosphere added to gauge pressures
G = 9.80665  # m/s2, standard gravity
M_O2 = 31.998e-3  # kg/mol
MOL_PER_NORMAL_M3 = P_NORMAL / (R * T_NORMAL)  # 44.615 mol/Nm3


@dataclass(frozen=True)
class Kind:
    """What sort of quantity a field holds."""

    name: str
    si: str  # pint spelling of the SI unit used inside
    label: str  # SI label for people
    description: str  # "a rotational speed"
    example: str  # "600 rpm"
    display: str  # default lab unit shown to people (pint spelling)
    display_label: str


KINDS: dict[str, Kind] = {
    k.name: k
    for k in [
        Kind("length", "m", "m", "a length", "0.3 m", "m", "m"),
        Kind("area", "m**2", "m2", "an area", "2.5 m2", "m**2", "m2"),
        Kind("volume", "m**3", "m3", "a volume", "300 L", "L", "L"),
        Kind("time", "s", "s", "a time", "8 s", "s", "s"),
        Kind("speed", "revolution/s", "rev/s", "a rotational speed", "600 rpm",
             "revolution/minute", "rpm"),
        Kind("velocity", "m/s", "m/s", "a velocity", "0.02 m/s", "m/s", "m/s"),
        Kind("temperature", "K", "K", "a temperature", "37 degC", "degC", "degC"),
        Kind("temperature_difference", "K", "K", "a temperature difference", "10 K", "K", "K"),
        Kind("pressure", "Pa", "Pa", "an absolute pressure", "1.5 bara", "bar", "bara"),
        Kind("power", "W", "W", "a power", "15 kW", "kW", "kW"),
        Kind("power_per_volume", "W/m**3", "W/m3", "a power per volume", "1.5 kW/m3",
             "kW/m**3", "kW/m3"),
        Kind("kla", "1/s", "1/s", "a volumetric mass-transfer coefficient", "120 1/h", "1/h",
             "1/h"),
        Kind("mass_transfer_coefficient", "m/s", "m/s", "a mass-transfer coefficient",
             "2e-4 m/s", "m/s", "m/s"),
        Kind("concentration", "mol/m**3", "mol/m3", "a molar concentration", "0.25 mol/m3",
             "mmol/L", "mmol/L"),
        Kind("rate", "mol/m**3/s", "mol/(m3 s)", "a volumetric rate such as OTR or OUR",
             "60 mmol/(L h)", "mmol/L/h", "mmol/(L h)"),
        Kind("molar_flow", "mol/s", "mol/s", "a molar flow", "0.02 mol/s", "mol/s", "mol/s"),
        Kind("molar_flux", "mol/m**2/s", "mol/(m2 s)", "a molar flux", "1e-4 mol/(m2 s)",
             "mol/m**2/s", "mol/(m2 s)"),
        Kind("mass_flux", "kg/m**2/s", "kg/(m2 s)", "a mass flux", "0.5 kg/(m2 s)",
             "kg/m**2/s", "kg/(m2 s)"),
        Kind("heat_flux", "W/m**2", "W/m2", "a heat flux", "2 kW/m2", "W/m**2", "W/m2"),
        Kind("volumetric_flow", "m**3/s", "m3/s", "an actual volumetric flow", "30 L/min",
             "L/min", "L/min"),
        Kind("density", "kg/m**3", "kg/m3", "a density", "1010 kg/m3", "kg/m**3", "kg/m3"),
        Kind("viscosity", "Pa*s", "Pa s", "a dynamic viscosity", "1.2 mPa s", "mPa*s",
             "mPa s"),
        Kind("surface_tension", "N/m", "N/m", "a surface tension", "70 mN/m", "mN/m", "mN/m"),
        Kind("diffusivity", "m**2/s", "m2/s", "a diffusivity", "2.1e-9 m2/s", "m**2/s", "m2/s"),
        Kind("torque", "N*m", "N m", "a torque", "1.5 N m", "N*m", "N m"),
        Kind("heat_transfer_coefficient", "W/m**2/K", "W/(m2 K)",
             "a heat-transfer coefficient", "500 W/(m2 K)", "W/m**2/K", "W/(m2 K)"),
        Kind("specific_heat", "J/kg/K", "J/(kg K)", "a specific heat capacity", "4.18 kJ/(kg K)",
             "kJ/kg/K", "kJ/(kg K)"),
        Kind("molar_volume", "m**3/mol", "m3/mol", "a molar volume", "25.6 cm3/mol",
             "cm**3/mol", "cm3/mol"),
        Kind("molar_mass", "kg/mol", "kg/mol", "a molar mass", "32 g/mol", "g/mol", "g/mol"),
        Kind("mass_concentration", "kg/m**3", "kg/m3", "a mass concentration", "8 mg/L",
             "mg/L", "mg/L"),
        Kind("salinity", "dimensionless", "kg/kg", "a salinity (mass fraction)", "10 g/kg",
             "g/kg", "g/kg"),
        Kind("fraction", "dimensionless", "-", "a fraction", "0.2095", "dimensionless", "-"),
        Kind("frequency", "1/s", "1/s", "a rate per unit time", "5 1/s", "1/s", "1/s"),
        Kind("concentration_gradient", "mol/m**4", "mol/m4", "a concentration gradient",
             "-1e4 mol/m4", "mol/m**4", "mol/m4"),
        Kind("per_area", "1/m**2", "1/m2", "a reciprocal area such as a cell constant",
             "3000 1/m2", "1/m**2", "1/m2"),
    ]
}

# Words people use for the dimension they typed by mistake, for error messages.
_DIMENSION_WORDS = {
    "[mass]": "a mass",
    "[length]": "a length",
    "[length] ** 2": "an area",
    "[length] ** 3": "a volume",
    "[time]": "a time",
    "1 / [time]": "a frequency or rotational speed",
    "[temperature]": "a temperature",
    "[length] / [time]": "a velocity",
    "[mass] / [length] / [time] ** 2": "a pressure",
    "[length] ** 2 * [mass] / [time] ** 3": "a power",
    "[mass] / [length] / [time] ** 3": "a power per volume",
    "[mass] / [length] ** 3": "a density or mass concentration",
    "[substance] / [length] ** 3": "a molar concentration",
    "[substance] / [length] ** 3 / [time]": "a volumetric rate",
    "[substance] / [time]": "a molar flow",
    "[length] ** 3 / [time]": "a volumetric flow",
    "[mass] / [length] / [time]": "a dynamic viscosity",
    "[mass] / [time] ** 2": "a surface tension",
    "[length] ** 2 / [time]": "a diffusivity or kinematic viscosity",
    "[substance]": "an amount of substance",
    "dimensionless": "a plain number",
}

_NUMBER = re.compile(r"^\s*([-+]?(?:\d+\.?\d*|\.\d+)(?:[eE][-+]?\d+)?)\s*(.*?)\s*$")
_GAUGE = re.compile(r"^(bar|psi|kPa|MPa|Pa|atm)(g|a)$")
_NORMAL = re.compile(r"^N(m3|m\^3|m\*\*3|L|l)(/.+)$")
_ALIASES = {
    "°C": "degC", "ºC": "degC", "C°": "degC", "celsius": "degC", "°F": "degF", "degF": "degF",
    "rps": "revolution/second", "rpm": "revolution/minute", "rev/s": "revolution/second",
    "rev/min": "revolution/minute", "1/h": "1/hour", "h-1": "1/hour", "h^-1": "1/hour",
    "1/min": "1/minute", "1/s": "1/second", "s-1": "1/second", "s^-1": "1/second",
    "Hz": "1/second", "/h": "1/hour", "/s": "1/second", "/min": "1/minute",
    "m3": "m**3", "m2": "m**2", "cm3": "cm**3", "cm2": "cm**2", "mm2": "mm**2",
    "L": "liter", "l": "liter", "mL": "milliliter", "ml": "milliliter",
    "mbar": "millibar", "mPa s": "mPa*s", "mPas": "mPa*s", "mPa.s": "mPa*s", "Pa s": "Pa*s",
    "Pas": "Pa*s", "Pa.s": "Pa*s", "cP": "centipoise", "cp": "centipoise", "N m": "N*m",
    "Nm": "N*m",
}


@lru_cache(maxsize=1)
def registry():
    """The shared pint registry with the trade's units defined (built on first use)."""
    import pint

    ureg = pint.UnitRegistry(cache_folder=":auto:")
    ureg.define("percent_saturation = [] = pctsat")
    return ureg


def _clean_unit(unit: str) -> str:
    u = unit.strip()
    u = u.replace("³", "**3").replace("²", "**2").replace("·", "*").replace("−", "-")
    u = u.replace("µ", "u").replace("μ", "u")
    if u in _ALIASES:
        return _ALIASES[u]
    # m3/h, L/min, W/m3, kW/m3, mmol/(L h): spell powers and the litre the pint way
    u = re.sub(r"(?<![A-Za-z])(c?m|mm|km)([234])(?![0-9])", r"\1**\2", u)
    u = re.sub(r"(?<![A-Za-z])L(?![A-Za-z])", "liter", u)
    u = re.sub(r"\(([^()]*?) ([^()]*?)\)", r"(\1*\2)", u)
    u = u.replace("rpm", "revolution/minute") if u == "rpm" else u
    return u


def split_number(text: str, field: str) -> tuple[float, str]:
    """Split "600 rpm" into (600.0, "rpm"); refuse decimal commas and empty text."""
    if text is None:
        raise InputError("no value given", field)
    s = str(text).strip()
    if not s:
        raise InputError("empty value; expected a number with a unit", field, text)
    if re.match(r"^\s*[-+]?\d+,\d+", s):
        raise InputError(f'"{text}" uses a decimal comma; write "{s.replace(",", ".", 1)}"'
                         " (a point is the decimal separator)", field, text)
    m = _NUMBER.match(s)
    if not m:
        raise InputError(f'"{text}" does not start with a number', field, text)
    value = float(m.group(1))
    if not math.isfinite(value):
        raise InputError(f'"{text}" is not a finite number', field, text)
    return value, m.group(2)


def _expected(kind: Kind) -> str:
    return f'expected {kind.description} such as "{kind.example}"'


def parse(text: str | float, kind: str, field: str | None = None, *,
          liquid_volume_m3: float | None = None, temperature_k: float | None = None,
          pressure_pa: float | None = None, c_star_mol_m3: float | None = None,
          molar_mass_kg_mol: float | None = None, default_unit: str | None = None) -> float:
    """Read a quantity typed by a person and return its SI value.

    Parameters
    ----------
    text : str
        What was typed, e.g. ``"600 rpm"``. A bare number is refused unless ``default_unit``
        is given or the kind is dimensionless.
    kind : str
        A key of :data:`KINDS`, or ``"gas_flow"`` (returns mol/s) or ``"dissolved_oxygen"``
        (returns mol/m3).
    field : str
        The field name used in error messages.
    liquid_volume_m3 : float, optional
        Liquid volume [m3], needed for vvm.
    temperature_k, pressure_pa : float, optional
        Gas temperature [K] and absolute pressure [Pa], needed for actual volumetric gas flows.
    c_star_mol_m3 : float, optional
        Saturation concentration [mol/m3], needed for DO in % saturation.
    molar_mass_kg_mol : float, optional
        Molar mass [kg/mol] for mass concentrations given where a molar one is asked for.

    Examples
    --------
    >>> parse("600 rpm", "speed")
    10.0
    >>> parse("0.5 barg", "pressure")
    151325.0
    >>> round(parse("37 degC", "temperature"), 2)
    310.15
    >>> round(parse("22.4 NL/min", "gas_flow"), 5)  # 22.4 NL is about one mole
    0.01666
    """
    field = field or kind
    if kind == "gas_flow":
        return parse_gas_flow(text, field, liquid_volume_m3=liquid_volume_m3,
                              temperature_k=temperature_k, pressure_pa=pressure_pa)
    if kind == "dissolved_oxygen":
        return parse_dissolved_oxygen(text, field, c_star_mol_m3=c_star_mol_m3)
    if kind not in KINDS:
        raise KeyError(f"unknown quantity kind {kind!r}")
    k = KINDS[kind]
    if isinstance(text, (int, float)) and not isinstance(text, bool):
        if k.si == "dimensionless":
            return _finite(float(text), field, text)
        if default_unit is None:
            raise MissingUnit(f'"{text}" has no unit; {_expected(k)}', field, text)
        text = f"{text} {default_unit}"
    value, unit = split_number(str(text), field)
    if not unit:
        if k.si == "dimensionless":
            return value
        if default_unit is None:
            raise MissingUnit(f'"{text}" has no unit; {_expected(k)}', field, text)
        unit = default_unit
    if kind == "pressure":
        g = _GAUGE.match(unit)
        if g:
            absolute = _to_si(value, g.group(1), k, field, text)
            return absolute + P_ATM if g.group(2) == "g" else absolute
    if kind in ("salinity", "fraction") and unit in ("%", "percent"):
        return value / 100.0
    if kind == "concentration" and molar_mass_kg_mol:
        q = _quantity(value, unit, field, text)
        if q.check("[mass] / [length] ** 3"):
            return float(q.to("kg/m**3").magnitude) / molar_mass_kg_mol
    return _to_si(value, unit, k, field, text)


def _finite(value: float, field: str, text) -> float:
    if not math.isfinite(value):
        raise InputError(f'"{text}" is not a finite number', field, text)
    return value


def _quantity(value: float, unit: str, field: str, text):
    import pint

    ureg = registry()
    try:
        q = ureg.Quantity(value, _clean_unit(unit))
        q.dimensionality  # noqa: B018 - a logarithmic unit inside a compound ("1/dB") has none
        return q
    except (pint.errors.UndefinedUnitError, pint.errors.DefinitionSyntaxError,
            AttributeError, TypeError, ValueError, SyntaxError, AssertionError) as exc:
        raise UnknownUnit(f'"{text}": unknown unit "{unit}"', field, text) from exc
    except Exception as exc:  # pint raises a few odd types on malformed input
        raise UnknownUnit(f'"{text}": cannot read the unit "{unit}"', field, text) from exc


_EXOTIC_PREFIXES = ("ronto", "quecto", "ronna", "quetta")


class _Linear(NamedTuple):
    """A learnt conversion: ``(value * scale + offset) * factor``, pint's own arithmetic."""

    scale: float
    offset: float | None  # None: a plain factor, ``value * scale``
    factor: float
    finite: bool  # refuse an overflow to infinity (as the first reading did)
    basis: str = ""  # gas flows: "normal", "molar" or "actual"

    def apply(self, value: float) -> float:
        if self.offset is None:
            return value * self.scale
        return (value * self.scale + self.offset) * self.factor


# pint takes ~50 us to read a unit; a file of 100,000 runs repeats a few units, so each unit
# (as typed, per kind) is read by pint once and then converted by a multiply-add. Only
# successful readings are kept: a refused unit goes through pint again and gets its message.
_LEARNT: dict[tuple[str, str], _Linear] = {}
_LEARNT_MAX = 4096
_PROBES = (0.0, 1.0, -40.0, 37.0, 0.1, 1e3, 123.456, 1e-7)


def _learn(key: tuple[str, str], q, target: str, value: float, out: float, *,
           finite: bool = True, basis: str = "") -> None:
    """Remember how ``q``'s unit converts to ``target`` if it is affine and pint's arithmetic
    is reproduced exactly (checked on the value read and on probes); otherwise nothing.

    Logarithmic units (dB, pH) are not affine and are always read by pint.
    """
    if len(_LEARNT) >= _LEARNT_MAX:
        return
    ureg = registry()
    try:
        offset_unit = ureg._validate_and_extract(q._units)
        if offset_unit is None:
            rule = _Linear(float(ureg.Quantity(1.0, q.units).to(target).magnitude), None, 1.0,
                           finite, basis)
        else:
            from pint.facets.nonmultiplicative.definitions import OffsetConverter

            definition = ureg._units[offset_unit]
            if type(definition.converter) is not OffsetConverter:
                return
            factor = float(ureg.Quantity(1.0, definition.reference).to(target).magnitude)
            rule = _Linear(float(definition.converter.scale),
                           float(definition.converter.offset), factor, finite, basis)
        same = rule.apply(value) == out and all(
            rule.apply(p) == float(ureg.Quantity(p, q.units).to(target).magnitude)
            for p in _PROBES)
    except Exception:  # pint internals changed: keep reading this unit with pint
        return
    if same:
        _LEARNT[key] = rule


def _to_si(value: float, unit: str, k: Kind, field: str, text) -> float:
    import pint

    rule = _LEARNT.get((unit, k.name))
    if rule is not None:
        out = rule.apply(value)
        return _finite(out, field, text) if rule.finite else out
    q = _quantity(value, unit, field, text)
    if any(p in str(q.units) for p in _EXOTIC_PREFIXES):
        # "rpx" would otherwise read as ronto-pixels: nobody means that
        raise UnknownUnit(f'"{text}": unknown unit "{unit}"; {_expected(k)}', field, text)
    if k.name == "speed" and not any(w in str(q.units) for w in ("revolution", "radian",
                                                               "turn", "degree")):
        # a bare frequency (1/s, Hz) is read as revolutions per second
        if q.check("1 / [time]"):
            out = float(q.to("1/s").magnitude)
            _learn((unit, k.name), q, "1/s", value, out, finite=False)
            return out
    try:
        out = float(q.to(k.si).magnitude)
    except pint.errors.DimensionalityError as exc:
        dim = str(q.dimensionality)
        what = _DIMENSION_WORDS.get(dim, f"of dimension {dim}")
        raise WrongDimension(f'"{text}" is {what}; {_expected(k)}', field, text) from exc
    except Exception as exc:
        raise UnknownUnit(f'"{text}": cannot convert "{unit}" to {k.label}', field,
                          text) from exc
    _learn((unit, k.name), q, k.si, value, out)
    return _finite(out, field, text)


def parse_gas_flow(text: str, field: str = "gas_flow", *, liquid_volume_m3: float | None = None,
                   temperature_k: float | None = None, pressure_pa: float | None = None) -> float:
    """Read a gas flow and return it as a molar flow [mol/s].

    Accepts normal volumetric flows (``"30 NL/min"``, ``"12 Nm3/h"``; 0 degC, 101.325 kPa),
    ``"1.2 vvm"`` (normal volume; needs ``liquid_volume_m3``), molar flows (``"0.02 mol/s"``)
    and actual volumetric flows (``"30 L/min"``; needs ``temperature_k`` and ``pressure_pa``).

    Examples
    --------
    >>> round(parse_gas_flow("1 vvm", liquid_volume_m3=0.3), 5)
    0.22308
    """
    value, unit = split_number(str(text), field)
    example = 'expected a gas flow such as "30 NL/min", "1 vvm" or "0.02 mol/s"'
    if not unit:
        raise MissingUnit(f'"{text}" has no unit; {example}', field, text)
    if value < 0:
        raise InputError(f'"{text}" is negative; a gas flow must be zero or more', field, text)
    if unit.lower() == "vvm":
        if not liquid_volume_m3:
            raise InputError(f'"{text}": vvm needs the liquid volume of the vessel', field, text)
        return value * liquid_volume_m3 / 60.0 * MOL_PER_NORMAL_M3
    rule = _LEARNT.get((unit, "gas_flow"))
    if rule is not None:
        basis, flow = rule.basis, rule.apply(value)
    else:
        basis, flow = _gas_flow_pint(value, unit, field, text, example)
    if basis == "normal":
        return flow * MOL_PER_NORMAL_M3
    if basis == "molar":
        return flow
    if temperature_k is None or pressure_pa is None:
        raise InputError(f'"{text}" is an actual volumetric flow; give it at normal '
                         'conditions ("NL/min", "Nm3/h", 0 degC and 101.325 kPa) or in vvm',
                         field, text)
    return flow * pressure_pa / (R * temperature_k)


def _gas_flow_pint(value: float, unit: str, field: str, text: str, example: str
                   ) -> tuple[str, float]:
    """A gas flow read by pint: its basis (normal, molar, actual) and the flow in m3/s
    (normal or actual) or mol/s; the unit's conversion is learnt for the next cells."""
    n = _NORMAL.match(unit)
    if n:
        volume_unit = "m**3" if n.group(1).startswith("m") else "liter"
        q = _quantity(value, volume_unit + n.group(2), field, text)
        if not q.check("[length] ** 3 / [time]"):
            raise WrongDimension(f'"{text}" is not a volume per time; {example}', field, text)
        basis, target = "normal", "m**3/s"
    else:
        q = _quantity(value, unit, field, text)
        if q.check("[substance] / [time]"):
            basis, target = "molar", "mol/s"
        elif q.check("[length] ** 3 / [time]"):
            basis, target = "actual", "m**3/s"
        else:
            dim = str(q.dimensionality)
            what = _DIMENSION_WORDS.get(dim, f"of dimension {dim}")
            raise WrongDimension(f'"{text}" is {what}; {example}', field, text)
    flow = float(q.to(target).magnitude)
    _learn((unit, "gas_flow"), q, target, value, flow, finite=False, basis=basis)
    return basis, flow


def parse_dissolved_oxygen(text: str, field: str = "dissolved_oxygen", *,
                           c_star_mol_m3: float | None = None) -> float:
    """Read a dissolved-oxygen level and return it in mol/m3.

    ``"20 %"`` (% of air saturation) needs ``c_star_mol_m3``; ``"8 mg/L"`` uses M(O2).
    """
    value, unit = split_number(str(text), field)
    if unit in ("%", "% sat", "%sat", "percent", "% air saturation"):
        if c_star_mol_m3 is None:
            raise InputError(f'"{text}" is in % saturation; the saturation concentration is '
                             "needed to convert it", field, text)
        return value / 100.0 * c_star_mol_m3
    return parse(text, "concentration", field, molar_mass_kg_mol=M_O2)


def convert(value_si: float, kind: str, unit: str | None = None) -> float:
    """Convert an SI value of ``kind`` to ``unit`` (default: the kind's lab unit).

    Examples
    --------
    >>> convert(10.0, "speed")
    600.0
    >>> convert(151325.0, "pressure", "barg")
    0.5
    """
    k = KINDS[kind]
    unit = unit or k.display
    if kind == "pressure":
        g = _GAUGE.match(unit)
        if g:
            v = value_si - P_ATM if g.group(2) == "g" else value_si
            return convert(v, "pressure", g.group(1))
    if kind == "temperature" and unit in ("degC", "°C"):
        return value_si - 273.15
    rule = _LEARNT.get((unit, "to " + kind))
    if rule is not None:
        return float(rule.apply(value_si))
    target = _clean_unit(unit)
    q = registry().Quantity(value_si, k.si)
    out = float(q.to(target).magnitude)
    _learn((unit, "to " + kind), q, target, value_si, out, finite=False)
    return out


def convert_many(values_si: Sequence[float | None], kind: str, unit: str | None = None
                 ) -> list[float | None]:
    """:func:`convert` over a column at once (None stays None), with the same arithmetic.

    Examples
    --------
    >>> convert_many([10.0, None, 5.0], "speed")
    [600.0, None, 300.0]
    """
    import numpy as np

    k = KINDS[kind]
    unit = unit or k.display
    a = np.array([np.nan if v is None else v for v in values_si], dtype=float)
    if kind == "pressure" and (g := _GAUGE.match(unit)):
        out = convert_many((a - P_ATM if g.group(2) == "g" else a).tolist(), kind, g.group(1))
    elif kind == "temperature" and unit in ("degC", "°C"):
        out = (a - 273.15).tolist()
    else:
        first = next((v for v in values_si if v is not None and math.isfinite(v)), None)
        if first is not None:
            convert(first, kind, unit)  # learns the unit's conversion
        rule = _LEARNT.get((unit, "to " + kind))
        out = rule.apply(a).tolist() if rule is not None else [
            None if v is None else convert(v, kind, unit) for v in values_si]
    return [None if v is None else o for v, o in zip(values_si, out, strict=True)]


def gas_flow_to(value_mol_s: float, unit: str, liquid_volume_m3: float | None = None) -> float:
    """Express a molar gas flow in NL/min, Nm3/h or vvm (normal basis).

    Examples
    --------
    >>> round(gas_flow_to(0.01666, "NL/min"), 2)
    22.4
    """
    q_normal = value_mol_s / MOL_PER_NORMAL_M3  # Nm3/s
    if unit == "NL/min":
        return q_normal * 1000.0 * 60.0
    if unit == "Nm3/h":
        return q_normal * 3600.0
    if unit == "vvm":
        if not liquid_volume_m3:
            raise ValueError("vvm needs the liquid volume")
        return q_normal * 60.0 / liquid_volume_m3
    if unit == "mol/s":
        return value_mol_s
    raise ValueError(f"unknown gas-flow unit {unit!r}; use NL/min, Nm3/h, vvm or mol/s")


def sig(value: float | None, digits: int = 4) -> str:
    """Format a number to ``digits`` significant figures, plainly (no trailing zeros).

    Examples
    --------
    >>> sig(0.012345)
    '0.01235'
    >>> sig(123456.0)
    '1.235e+05'
    >>> sig(600.0)
    '600'
    """
    if value is None:
        return "-"
    if isinstance(value, float) and not math.isfinite(value):
        return "nan" if math.isnan(value) else ("inf" if value > 0 else "-inf")
    if value == 0:
        return "0"
    mag = math.floor(math.log10(abs(value)))
    if mag >= 5 or mag <= -4:
        return f"{value:.{digits - 1}e}"
    decimals = max(digits - 1 - mag, 0)
    text = f"{value:.{decimals}f}"
    if "." in text:
        text = text.rstrip("0").rstrip(".")
    return text


def format_quantity(value_si: float | None, kind: str, unit: str | None = None,
                    digits: int = 4) -> str:
    """Format an SI value in a lab unit: ``format_quantity(10, "speed") == "600 rpm"``.

    Examples
    --------
    >>> format_quantity(10.0, "speed")
    '600 rpm'
    >>> format_quantity(310.15, "temperature")
    '37 degC'
    """
    if value_si is None:
        return "-"
    k = KINDS[kind]
    unit = unit or k.display
    label = k.display_label if unit == k.display else unit
    return f"{sig(convert(value_si, kind, unit), digits)} {label}".strip()
