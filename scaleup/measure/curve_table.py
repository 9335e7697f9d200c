"""Read a DO curve from table rows whose header cells say ``name [unit]``.

The rows come from a CSV or spreadsheet (the caller opens the file): a header such as
``t [s], DO [mg/L]`` or ``time [min], DO [%]``, then one sample per row. Times become seconds;
DO values are kept in their own unit (kLa does not depend on it) with the factor to mol/m3
when there is one (% saturation has none without C*).
"""

from __future__ import annotations

import math
import re
from collections.abc import Iterable, Sequence
from dataclasses import dataclass

import numpy as np

from scaleup import units
from scaleup.errors import ImportRejected, InputError

_HEADER = re.compile(r"^\s*(.*?)\s*\[\s*(.*?)\s*\]\s*$")
_MISSING = {"", "nan", "na", "n/a", "-", "--", "null", "none"}
_PERCENT = {"%", "% sat", "%sat", "% air saturation", "percent"}
_TIME_NAMES = {"t", "time", "elapsed", "elapsed time"}
_DO_NAMES = {"do", "dot", "po2", "o2", "c", "dissolved oxygen", "oxygen"}


@dataclass(frozen=True, eq=False)
class CurveTable:
    """A curve read from rows: times [s] and DO values in ``unit``.

    ``to_mol_m3`` multiplies a value in ``unit`` to mol/m3 (None for % saturation).
    """

    time_s: np.ndarray
    values: np.ndarray
    unit: str
    to_mol_m3: float | None
    time_column: str
    do_column: str
    warnings: tuple[str, ...]

    @property
    def is_percent(self) -> bool:
        return self.to_mol_m3 is None


def split_header(cell: str) -> tuple[str, str]:
    """Split a header cell into its name and its bracketed unit.

    Parameters
    ----------
    cell : str
        A header cell such as ``"DO [mg/L]"``.

    Returns
    -------
    (str, str)
        Name and unit; a cell without brackets has unit ``""``.

    Examples
    --------
    >>> split_header(" t [min] ")
    ('t', 'min')
    """
    m = _HEADER.match(cell or "")
    return (m.group(1), m.group(2)) if m else ((cell or "").strip(), "")


def _is_time_unit(unit: str) -> bool:
    try:
        units.parse(f"1 {unit}", "time")
    except InputError:
        return False
    return True


def _do_factor(unit: str, field: str) -> float | None:
    """Factor to mol/m3 for a DO unit, None for % saturation; InputError for anything else."""
    if unit.strip().lower() in _PERCENT:
        return None
    try:
        return units.parse(f"1 {unit}", "dissolved_oxygen", field)
    except InputError as exc:
        raise InputError(f'"{unit}" is not a DO unit; use %, mg/L, mmol/L or mol/m3',
                         field, unit) from exc


def _pick(headers: list[tuple[str, str]], wanted: str | None, test, names: set[str],
          what: str, option: str) -> int:
    if wanted is not None:
        for i, (name, unit) in enumerate(headers):
            if wanted.strip().lower() in (name.lower(), f"{name} [{unit}]".lower()):
                return i
        raise InputError(f'no column "{wanted}"; the columns are '
                         + ", ".join(f"{n} [{u}]" if u else n for n, u in headers), option)
    for i, (_, unit) in enumerate(headers):
        if unit and test(unit):
            return i
    for i, (name, _) in enumerate(headers):
        if name.lower() in names:
            return i
    raise InputError(f"no {what} column: name it like {'t [s]' if what == 'time' else 'DO [%]'}"
                     f" or choose it with {option}", option)


def read_curve_rows(rows: Iterable[Sequence[str]], *, time_col: str | None = None,
                    do_col: str | None = None, source: str = "") -> CurveTable:
    """Turn header + data rows into a :class:`CurveTable`.

    Parameters
    ----------
    rows : iterable of sequences of str
        The header row first, then one row per sample.
    time_col, do_col : str, optional
        Column names (without or with the bracketed unit); found from the units otherwise.
    source : str
        File name for messages.

    Returns
    -------
    CurveTable
        Times [s] and values in the DO column's unit.

    Raises
    ------
    ImportRejected
        Listing every cell that is not a number.

    Examples
    --------
    >>> tab = read_curve_rows([["t [min]", "DO [%]"], ["0", "5"], ["0.5", "40"], ["1", ""]])
    >>> tab.time_s.tolist(), tab.unit, tab.values[:2].tolist()
    ([0.0, 30.0, 60.0], '%', [5.0, 40.0])
    """
    it = iter(rows)
    try:
        header = next(it)
    except StopIteration:
        raise InputError("the file is empty; expected a header such as 't [s], DO [%]'",
                         source or "file") from None
    headers = [split_header(c) for c in header]
    ti = _pick(headers, time_col, _is_time_unit, _TIME_NAMES, "time", "--time-col")
    di = _pick(headers, do_col, _is_do_unit, _DO_NAMES, "DO", "--do-col")
    if ti == di:
        raise InputError("the time and DO columns are the same column", "--do-col")
    t_unit = headers[ti][1] or "s"
    do_unit = headers[di][1]
    if not do_unit:
        raise InputError(f'the DO column "{headers[di][0]}" has no unit; write it as '
                         f'"{headers[di][0]} [%]" or "[mg/L]"', "--do-col")
    to_s = units.parse(f"1 {t_unit}", "time", "time unit")
    factor = _do_factor(do_unit, "DO unit")
    times, values, problems = [], [], []
    for r, row in enumerate(it, start=2):
        cells = [row[i] if i < len(row) else "" for i in (ti, di)]
        if all((c or "").strip() == "" for c in row):
            continue
        parsed = []
        for cell, col in zip(cells, (ti, di), strict=True):
            text = (cell or "").strip()
            if text.lower() in _MISSING:
                parsed.append(math.nan)
                continue
            try:
                parsed.append(float(text))
            except ValueError:
                hint = " (a point is the decimal separator)" if re.fullmatch(
                    r"[-+]?\d+,\d+", text) else ""
                problems.append({"row": r, "column": header[col], "value": text,
                                 "reason": f"not a number{hint}"})
                parsed.append(math.nan)
        times.append(parsed[0])
        values.append(parsed[1])
    if problems:
        raise ImportRejected(problems, source)
    warnings = []
    if not headers[ti][1]:
        warnings.append(f'the time column "{headers[ti][0]}" has no unit; read as seconds')
    return CurveTable(time_s=np.array(times) * to_s, values=np.array(values), unit=do_unit,
                      to_mol_m3=factor, time_column=header[ti], do_column=header[di],
                      warnings=tuple(warnings))


def _is_do_unit(unit: str) -> bool:
    try:
        _do_factor(unit, "DO unit")
    except InputError:
        return False
    return True
