"""Numbers for screens: SI values in lab units, to significant figures, fast.

``units.convert`` goes through pint, which is right for one value but slow for a table of
thousands of cells. Every lab unit we show is an affine function of the SI value, so the
slope and offset are taken from pint once per (kind, unit) and reused.
"""

from __future__ import annotations

import math
from functools import cache

from scaleup import units


@cache
def _affine(kind: str, unit: str | None) -> tuple[float, float]:
    offset = units.convert(0.0, kind, unit)
    return units.convert(1.0, kind, unit) - offset, offset


def warm(kinds: tuple[str, ...] = ("speed", "temperature", "pressure", "kla", "volume",
                                     "power_per_volume", "velocity", "time")) -> None:
    """Build the unit registry and the common factors (call it from a worker thread, so
    the first table does not wait a third of a second for pint)."""
    for kind in kinds:
        _affine(kind, None)


def to_lab(value_si: float | None, kind: str, unit: str | None = None) -> float | None:
    """An SI value of ``kind`` in ``unit`` (the kind's lab unit by default)."""
    if value_si is None:
        return None
    slope, offset = _affine(kind, unit)
    return value_si * slope + offset


def unit_label(kind: str, unit: str | None = None) -> str:
    """What the header of a column of ``kind`` says, e.g. ``rpm`` or ``degC``."""
    if kind == "gas_flow":
        return unit or "NL/min"
    k = units.KINDS[kind]
    return k.display_label if unit in (None, k.display) else unit


def lab(value_si: float | None, kind: str, unit: str | None = None, digits: int = 4) -> str:
    """An SI value as a plain number in the lab unit, e.g. ``lab(5.0, "speed") == "300"``."""
    if value_si is None or (isinstance(value_si, float) and math.isnan(value_si)):
        return "-"
    if kind == "gas_flow":
        return units.sig(units.gas_flow_to(value_si, unit or "NL/min"), digits)
    return units.sig(to_lab(value_si, kind, unit), digits)


def quantity(value_si: float | None, kind: str, unit: str | None = None,
             digits: int = 4) -> str:
    """An SI value with its lab unit, e.g. ``"300 rpm"``; ``"-"`` when unknown."""
    text = lab(value_si, kind, unit, digits)
    if text == "-":
        return text
    label = unit_label(kind, unit)
    return f"{text} {label}" if label and label != "-" else text


def vvm(gas_flow_mol_s: float | None, liquid_volume_m3: float | None) -> str:
    """Gas flow as normal volumes per liquid volume per minute."""
    if gas_flow_mol_s is None or not liquid_volume_m3:
        return "-"
    return units.sig(units.gas_flow_to(gas_flow_mol_s, "vvm", liquid_volume_m3), 3)


def typed(value_si: object, kind: str, unit: str | None = None) -> str:
    """A stored value written back the way a person would type it in a form field."""
    if value_si is None or value_si == "":
        return ""
    if kind in ("text", "date", "choice"):
        return str(value_si)
    if kind == "int":
        return str(int(value_si))
    if kind == "fraction":
        return units.sig(float(value_si), 6)
    return quantity(float(value_si), kind, unit, digits=6)
