"""What a result key's ending says about its unit, and the value in lab units.

Saved fits and studies keep SI values under keys that end in their unit (``speed_rps``,
``power_w``, ``kla_per_s``, ``otr_capacity_mol_m3_s``). Exports in lab units and the report
show them as people read them (rpm, kW, 1/h, mmol/(L h)); this is the one table that maps
an ending to its kind of quantity.
"""

from __future__ import annotations

from scaleup import units

# (key ending, kind); the longest ending that matches wins
ENDINGS: tuple[tuple[str, str], ...] = tuple(sorted((
    ("_rps", "speed"), ("_w", "power"), ("_w_m3", "power_per_volume"), ("_per_s", "kla"),
    ("_mol_m3_s", "rate"), ("_m_s", "velocity"), ("_mol_s", "gas_flow"),
    ("_mol_m3", "concentration"), ("_m3", "volume"), ("_m2", "area"), ("_m", "length"),
    ("_pa", "pressure"), ("_k", "temperature"), ("_s", "time"), ("_n_m", "torque"),
    ("_w_m2_k", "heat_transfer_coefficient"), ("_kg_m3", "density"), ("_pa_s", "viscosity"),
    ("_m2_s", "diffusivity"), ("_m3_s", "volumetric_flow"), ("_j_kg_k", "specific_heat"),
    ("_w_m2", "heat_flux"), ("_kg_s", "mass_flow"),
), key=lambda pair: -len(pair[0])))
_DIFFERENCE_WORDS = ("delta", "difference", "rise", "approach", "lmtd", "dt_")
_SI_LABELS = {"gas_flow": "mol/s", "mass_flow": "kg/s", "speed": "rev/s"}


def kind_of(key: str) -> str | None:
    """The kind of quantity a key holds by its ending (None for plain numbers and text)."""
    k = key.lower()
    for ending, kind in ENDINGS:
        if k.endswith(ending):
            if kind == "temperature" and any(w in k for w in _DIFFERENCE_WORDS):
                return "temperature_difference"
            return kind
    return None


def unit_label(kind: str | None, si: bool = False) -> str:
    """The unit shown for a kind: the lab unit, or the SI one with ``si``."""
    if kind is None:
        return ""
    if kind == "gas_flow":
        return "mol/s" if si else "NL/min"
    if kind == "mass_flow":
        return "kg/s" if si else "kg/h"
    k = units.KINDS[kind]
    return (_SI_LABELS.get(kind) or k.label) if si else k.display_label


def lab_value(value: float, kind: str | None) -> float:
    """An SI value of ``kind`` in its lab unit (gas flows as NL/min, normal basis)."""
    if kind is None or value is None:
        return value
    if kind == "gas_flow":
        return units.gas_flow_to(value, "NL/min")
    if kind == "mass_flow":
        return value * 3600.0  # kg/s to kg/h
    return units.convert(value, kind)


def base_name(key: str) -> str:
    """The key without its unit ending: ``speed_rps`` -> ``speed``."""
    k = key.lower()
    for ending, _ in ENDINGS:
        if k.endswith(ending) and len(k) > len(ending):
            return key[: -len(ending)]
    return key
