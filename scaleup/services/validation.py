"""Validation of records as people give them, shared by the service layer and importers."""

from __future__ import annotations

from collections.abc import Callable
from typing import Any

from scaleup import fields as F
from scaleup.errors import InputError


def validate(specs: tuple[F.Field, ...], values: dict[str, Any], *, partial: bool = False,
             known: dict | None = None, **context) -> dict[str, Any]:
    """Check every field of a record; return {column: SI value} or raise listing all errors.

    ``values`` may be keyed by column (``speed_rps``) or by label (``speed``); a number keyed
    by its column is taken as SI, text is read with its unit. Unknown keys are refused by
    name, so a typo is not silently dropped. ``known`` (kept by an importer for one file)
    holds the cells already read (:func:`scaleup.fields.read_known`).
    """
    by_key = _keys_of(specs)
    unknown = [k for k in values if k not in by_key]
    if unknown:
        raise InputError(f"unknown field(s) {', '.join(map(repr, unknown))}; known: "
                         f"{', '.join(s.label for s in specs)}")
    given, si_columns = {}, set()
    for k, v in values.items():
        column = by_key[k].column
        given[column] = v
        # a number keyed by its column name (tank_diameter_m) is already SI
        if k == column and isinstance(v, (int, float)) and not isinstance(v, bool):
            si_columns.add(k)
    clean, problems = {}, []
    for spec in specs:
        column = spec.column
        if column not in given:
            if partial:
                continue
            if spec.required:
                problems.append(f"{spec.label}: is required")
                continue
            if spec.default is not None:
                clean[column] = spec.default
            continue
        try:
            if known is None:
                clean[column] = F.read(spec, given[column], **context, si=column in si_columns)
            else:
                clean[column] = F.read_known(spec, given[column], known, context,
                                             column in si_columns)
        except InputError as exc:
            problems.append(str(exc))
    if problems:
        raise InputError("; ".join(problems))
    return clean


_KEYS: dict[int, tuple[tuple, dict]] = {}


def _keys_of(specs: tuple[F.Field, ...]) -> dict[str, F.Field]:
    """Every key a field may be given by (column, label, label with _ or -), built once per
    tuple of fields: an import validates each of its rows against the same tuple."""
    known = _KEYS.get(id(specs))
    if known is None or known[0] is not specs:
        if len(_KEYS) > 32:
            _KEYS.clear()
        known = _KEYS[id(specs)] = (specs, {s.column: s for s in specs} | {
            s.label: s for s in specs} | {s.label.replace(" ", "_"): s for s in specs} | {
            s.label.replace(" ", "-"): s for s in specs})
    return known[1]


def _basis(text: Any) -> str:
    s = str(text).strip().lower()
    if "vvm" in s:
        return "vvm"
    if "mol" in s:
        return "molar"
    if any(t in str(text) for t in ("NL", "Nm3", "Nm^3", "Nl")):
        return "normal"
    return "normal" if isinstance(text, (int, float)) else "actual"


def _looked_up(known: dict | None, kind: str, key: Any, look_up: Callable[[Any], Any]) -> Any:
    """``look_up(key)``, remembered in ``known`` when given (up to a bound); a failed look-up
    is not kept, so it is refused again with its message."""
    if known is None:
        return look_up(key)
    found = known.get((kind, key))
    if found is None:
        found = look_up(key)
        if len(known) < F.KNOWN_MAX:
            known[(kind, key)] = found
    return found


def liquid_volume(vessel: dict) -> float:
    """Liquid volume [m3] of a stored vessel: the stored one, or from height and bottom."""
    from scaleup.conditions import volume_for_height

    if vessel.get("working_volume_m3"):
        return vessel["working_volume_m3"]
    return volume_for_height(vessel["tank_diameter_m"], vessel["liquid_height_m"],
                             vessel.get("bottom_shape") or "flat")


def liquid_height(vessel: dict) -> float:
    """Liquid height [m] of a stored vessel: the stored one, or from volume and bottom."""
    from scaleup.conditions import height_for_volume

    if vessel.get("liquid_height_m"):
        return vessel["liquid_height_m"]
    return height_for_volume(vessel["tank_diameter_m"], vessel["working_volume_m3"],
                             vessel.get("bottom_shape") or "flat")
