"""Read DO logger exports into stored curves: time in s, min or ISO 8601 date-times, several
curves in one file, each checked before any is stored.

A file has a time column (``time [s]``, ``time [min]``, or ``time`` holding date-times such
as ``2026-03-04T09:00:05+01:00``) and a DO column (``DO [%]``, ``DO [mg/L]``,
``DO [mol/m3]``; or ``DO`` with a ``DO unit`` column). Which run a curve belongs to comes
from ``--run`` or a ``run`` column (the run's ref, or its id). Curves are split where the
run or the ``curve`` marker column changes, or, without a marker, at a gap in the sampling
longer than ten times the typical step (or ``gap_s``). Samples are stored as measured:
numeric times as given (converted to s), date-times as seconds from the curve's first sample.
``start`` marks when the gas was switched on, on the file's own clock.

The analysis of the curves (kLa) belongs to :mod:`scaleup.measure`; this module only reads.
"""

from __future__ import annotations

import datetime as _dt
import math
import re
from dataclasses import dataclass, field
from pathlib import Path

from scaleup import units
from scaleup.errors import InputError, NotFound
from scaleup.store import records
from scaleup.store.importers import (
    Progress,
    _quiet,
    check_on_duplicate,
    kept_unless_dry,
    rejected_if,
    run_by_reference,
)
from scaleup.store.tables import (
    Table,
    match_columns,
    number_cell,
    problem,
    read_table,
    reject,
    too_many,
)

COLUMNS = {
    "time": ("time", "t", "timestamp", "date time", "datetime", "elapsed time", "clock"),
    "do": ("DO", "dissolved oxygen", "o2", "po2", "do value"),
    "run": ("run", "run ref", "ref", "run id"),
    "curve": ("curve", "marker", "segment", "curve id", "test"),
    "do_unit": ("DO unit", "do units"),
    "probe_tau": ("probe tau", "probe time constant", "tau"),
    "gas_on": ("gas on", "gas switch"),
    "kind": ("kind", "curve kind"),
    "notes": ("notes", "note", "comment"),
}
DO_UNITS = {"%": ("%", 1.0), "% sat": ("%", 1.0), "%sat": ("%", 1.0),
            "% air saturation": ("%", 1.0), "% air sat": ("%", 1.0), "mg/l": ("mg/L", 1.0),
            "mol/m3": ("mol/m3", 1.0), "mmol/l": ("mol/m3", 1.0), "umol/l": ("mol/m3", 1e-3),
            "µmol/l": ("mol/m3", 1e-3)}
# Values beyond these are typing or unit mistakes, not measurements (common practice, no
# source): pure O2 under a few bar of head pressure stays below ~25x air saturation.
DO_PLAUSIBLE = {"%": (-10.0, 2500.0), "mg/L": (-1.0, 800.0), "mol/m3": (-0.03, 25.0)}
KINDS = ("gassing-out", "dynamic", "probe-step")
GAP_FACTOR = 10.0  # a step this many times the typical one starts a new curve
MIN_SAMPLES = 3
# Template and documentation rows: header cell, unit, required, valid range, meaning.
TEMPLATE = (
    ("run", "", "yes, or --run", "a stored run's ref or id",
     "The run the curve belongs to (or give --run ID for the whole file)."),
    ("curve", "", "no", "any text",
     "Marker: a new value starts a new curve; without it, gaps in time split curves."),
    ("time [s]", "s", "yes", "increasing within a curve",
     "Time in s, min or h (say which in the header), or ISO 8601 date-times with time "
     'zone in a "time" column, e.g. 2026-03-04T09:00:05+01:00.'),
    ("DO [%]", "%", "yes", "-10 % to 2500 % (or -1 to 800 mg/L)",
     "Dissolved oxygen in % air saturation, mg/L, mol/m3, mmol/L or umol/L; empty = missing."),
    ("probe tau [s]", "s", "no", "0 s or more", "First-order time constant of the probe."),
    ("gas on [s]", "s", "no", "inside the curve", "When the gas was switched on (file clock)."),
    ("kind", "", "no", "one of: " + ", ".join(KINDS), "gassing-out (default), dynamic, probe-step"),
    ("notes", "", "no", "any text", "Notes kept with the curve."),
)


@dataclass
class Curve:
    """Samples of one curve as read, before storing."""

    rows: list[int]
    run: str | None
    marker: str | None
    first_time: str = ""  # the first time cell as written, kept in the curve's notes
    time: list[float] = field(default_factory=list)  # s on the file's clock (epoch for dates)
    do: list[float] = field(default_factory=list)
    extra: dict = field(default_factory=dict)  # probe_tau, gas_on, kind, notes, do_unit


@dataclass(frozen=True)
class TimeColumn:
    """How the time column reads: seconds per unit, or date-times."""

    seconds_per_unit: float | None  # None: ISO 8601 date-times
    unit: str


def _time_column(table: Table, index: int) -> TimeColumn:
    unit = table.units[index]
    if unit.lower() in ("", "iso 8601", "iso8601", "iso", "datetime", "date time"):
        return TimeColumn(None, unit)
    try:
        return TimeColumn(units.parse(f"1 {unit}", "time", "time"), unit)
    except InputError as exc:
        reject(table.source, f"wrong unit for the time column: {str(exc).split(': ', 1)[-1]}; "
               "use s, min or h, or ISO 8601 date-times", row=1, column=table.names[index])


def _do_unit(text: str, source: str, column: str) -> tuple[str, float]:
    key = re.sub(r"\s+", " ", text.strip().lower())
    if key not in DO_UNITS:
        reject(source, f'"{text}" is not a DO unit; use %, mg/L, mol/m3, mmol/L or umol/L',
               row=1, column=column)
    return DO_UNITS[key]


def read_datetime(text: str) -> _dt.datetime:
    """An ISO 8601 date-time (``Z`` or ``+01:00`` offsets, a space for the ``T``)."""
    try:
        return _dt.datetime.fromisoformat(text.strip().replace("Z", "+00:00"))
    except ValueError:
        raise InputError(f'"{text}" is not an ISO 8601 date-time such as '
                         '"2026-03-04T09:00:05+01:00"') from None


def _seconds(moment: _dt.datetime) -> float:
    if moment.tzinfo is None:  # a wall clock with no zone: read it as UTC, consistently
        moment = moment.replace(tzinfo=_dt.UTC)
    return moment.timestamp()


@dataclass
class CurveFile:
    """A logger file read: its curves, problems, warnings and how its columns count time."""

    curves: list[Curve]
    problems: list[dict]
    warnings: list[str]
    time: TimeColumn
    seconds_per_unit: dict[str, float]  # of the probe tau and gas on columns
    has_notes: bool = False  # a notes column, even an empty one, replaces the default note

    @property
    def dated(self) -> bool:
        return self.time.seconds_per_unit is None


def _seconds_per_unit(table: Table, index: int) -> float:
    unit = table.units[index] or "s"
    try:
        return units.parse(f"1 {unit}", "time", table.names[index])
    except InputError as exc:
        reject(table.source, f"wrong unit: {str(exc).split(': ', 1)[-1]}", row=1,
               column=table.names[index])


class _Reader:
    """Turns rows into curves, collecting every problem."""

    def __init__(self, table: Table, mapping: dict, decimal_comma: bool):
        self.table, self.decimal_comma = table, decimal_comma
        self.col = {key: i for i, key in mapping.items()}
        missing = [COLUMNS[k][0] for k in ("time", "do") if k not in self.col]
        if missing:
            expected = ", ".join(c[0] for c in COLUMNS.values())
            raise _missing(table, missing, expected)
        self.time = _time_column(table, self.col["time"])
        do_header = table.units[self.col["do"]]
        if do_header:
            self.do_unit = _do_unit(do_header, table.source, table.names[self.col["do"]])
        elif "do_unit" in self.col:
            self.do_unit = None
        else:
            reject(table.source, "the DO column needs a unit: DO [%], DO [mg/L] or DO [mol/m3] "
                   "(or a DO unit column)", row=1, column=table.names[self.col["do"]])
        self.problems = list(table.problems)
        self.zone_aware: bool | None = None
        self.warnings: list[str] = []

    def cell(self, cells: list[str], key: str) -> str:
        return cells[self.col[key]].strip() if key in self.col else ""

    def read_time(self, number: int, text: str) -> float | None:
        if not text:
            self.problems.append(problem(number, self.table.names[self.col["time"]], text,
                                         "time is empty"))
            return None
        try:
            if self.time.seconds_per_unit is not None:
                return number_cell(text, decimal_comma=self.decimal_comma) * \
                    self.time.seconds_per_unit
            if re.fullmatch(r"[-+]?\d+(\.\d*)?", text):
                raise InputError(f'"{text}" is a plain number but the time column has no unit;'
                                 " write time [s] or time [min] in the header")
            moment = read_datetime(text)
        except InputError as exc:
            self.problems.append(problem(number, self.table.names[self.col["time"]], text,
                                         str(exc)))
            return None
        aware = moment.tzinfo is not None
        if self.zone_aware is None:
            self.zone_aware = aware
            if not aware:
                self.warnings.append("the date-times have no time zone: they are read as one "
                                     "clock, so a daylight-saving change inside the file "
                                     "would be misread")
        elif aware != self.zone_aware:
            self.problems.append(problem(number, self.table.names[self.col["time"]], text,
                                         "some date-times have a time zone and some do not"))
            return None
        return _seconds(moment)

    def read_do(self, number: int, text: str, unit: str) -> float | None:
        if not text or text.lower() in ("nan", "na", "n/a", "-"):
            return math.nan  # a missing sample: kept, the analysis skips it
        try:
            value = number_cell(text, decimal_comma=self.decimal_comma)
        except InputError as exc:
            self.problems.append(problem(number, self.table.names[self.col["do"]], text,
                                         str(exc)))
            return None
        low, high = DO_PLAUSIBLE[unit]
        if not low <= value <= high:
            self.problems.append(problem(number, self.table.names[self.col["do"]], text,
                                         f"{value:g} {unit} is outside the plausible range "
                                         f"{low:g} to {high:g} {unit} for dissolved oxygen"))
            return None
        return value

    def row_unit(self, number: int, cells: list[str]) -> tuple[str, float] | None:
        if self.do_unit is not None:
            return self.do_unit
        text = self.cell(cells, "do_unit")
        key = re.sub(r"\s+", " ", text.lower())
        if key not in DO_UNITS:
            self.problems.append(problem(number, "DO unit", text,
                                         "use %, mg/L, mol/m3, mmol/L or umol/L"))
            return None
        return DO_UNITS[key]


def _missing(table: Table, missing: list[str], expected: str):
    from scaleup.errors import ImportRejected

    return ImportRejected([problem(1, m, None, f"required column is missing; expected "
                                   f"columns: {expected}") for m in missing], table.source)


def read_curves(table: Table, *, run: str | None = None, gap_s: float | None = None,
                decimal_comma: bool = False) -> CurveFile:
    """Split a table into curves, collecting every problem."""
    mapping = match_columns(table, (), COLUMNS)
    reader = _Reader(table, mapping, decimal_comma)
    if run is not None and "run" in reader.col:
        reject(table.source, "give the run either with --run or in a run column, not both",
               row=1, column=table.names[reader.col["run"]])
    if run is None and "run" not in reader.col:
        reject(table.source, "which run do these curves belong to? Give --run ID, or a run "
               "column with each run's ref")
    has_marker = "curve" in reader.col
    curves: list[Curve] = []
    current: Curve | None = None
    last_time = None
    for number, cells in table.numbered():
        if too_many(reader.problems):
            break
        run_key = run if run is not None else reader.cell(cells, "run")
        marker = reader.cell(cells, "curve") if has_marker else None
        if not run_key:
            reader.problems.append(problem(number, "run", "", "the run is empty"))
            continue
        t = reader.read_time(number, reader.cell(cells, "time"))
        unit = reader.row_unit(number, cells)
        c = reader.read_do(number, reader.cell(cells, "do"), unit[0]) if unit else None
        if t is None or c is None:
            continue
        new = current is None or run_key != current.run or marker != current.marker
        if not new and t <= last_time:
            reason = ("time does not increase" if t == last_time else
                      "time goes backwards; mark separate curves with a curve column")
            reader.problems.append(problem(number, table.names[reader.col["time"]],
                                           reader.cell(cells, "time"), reason))
            continue
        if not new and not has_marker and gap_s is not None and t - last_time > gap_s:
            new = True
        if new:
            current = Curve([], run_key, marker, reader.cell(cells, "time"))
            curves.append(current)
        current.rows.append(number)
        current.time.append(t)
        current.do.append(c * unit[1])
        _per_curve(reader, current, number, cells, unit[0])
        last_time = t
    if gap_s is None and not has_marker:
        position = {n: i for i, n in enumerate(table.row_numbers)}
        curves = _split_at_gaps(curves, lambda row: reader.cell(table.rows[position[row]],
                                                                "time"))
    seconds = {key: _seconds_per_unit(table, reader.col[key]) for key in ("probe_tau", "gas_on")
               if key in reader.col}
    return CurveFile(curves, reader.problems, reader.warnings, reader.time, seconds,
                     "notes" in reader.col)


def _per_curve(reader: _Reader, curve: Curve, number: int, cells: list[str], unit: str) -> None:
    """Values that hold for a whole curve (probe tau, gas on, kind, notes, DO unit)."""
    for key in ("probe_tau", "gas_on", "kind", "notes", "do_unit"):
        text = unit if key == "do_unit" else reader.cell(cells, key)
        if not text:
            continue
        if key in curve.extra and curve.extra[key][0] != text:
            reader.problems.append(problem(number, COLUMNS[key][0], text,
                                           f'changes within a curve (row {curve.extra[key][1]}'
                                           f' has "{curve.extra[key][0]}")'))
        curve.extra.setdefault(key, (text, number))


def _split_at_gaps(curves: list[Curve], time_text) -> list[Curve]:
    """Split where a step is longer than GAP_FACTOR times the typical (median) step."""
    import numpy as np

    steps = np.concatenate([np.diff(c.time) for c in curves if len(c.time) > 1] or [[]])
    if steps.size < 2:
        return curves
    limit = GAP_FACTOR * float(np.median(steps))
    out = []
    for c in curves:
        cut = [0, *(i + 1 for i, s in enumerate(np.diff(c.time)) if s > limit), len(c.time)]
        for a, b in zip(cut[:-1], cut[1:], strict=True):
            out.append(Curve(c.rows[a:b], c.run, c.marker, time_text(c.rows[a]), c.time[a:b],
                             c.do[a:b], c.extra))
    return out


def import_curves(campaign, path: str | Path, *, run: str | None = None,
                  start: str | None = None, probe_tau: str | None = None,
                  gap: str | None = None, sheet: str | None = None, dry_run: bool = False,
                  on_duplicate: str = "refuse", decimal_comma: bool = False,
                  analyse: bool = False, analysis: dict | None = None,
                  progress: Progress | None = None) -> dict:
    """Read, check and store the DO curves of a logger file, all or none.

    ``run`` (ref or id) assigns every curve of the file; ``start`` is the gas switch on the
    file's clock (``"120 s"``, ``"2 min"``, a bare number in the time column's unit, or an
    ISO 8601 date-time); ``probe_tau`` a probe time constant (``"8 s"``); ``gap`` a time
    (``"60 s"``) or ``"none"`` to control splitting at gaps. With ``analyse`` the new curves
    are analysed in the same transaction by the campaign's ``analyse_curves`` (options in
    ``analysis``), so they are stored analysed or not at all.
    """
    check_on_duplicate(on_duplicate)
    progress = progress or _quiet
    table = read_table(path, sheet, entity="curves")
    gap_s = None if gap is None else (math.inf if gap.strip().lower() == "none"
                                      else units.parse(gap, "time", "gap"))
    tau_s = None if probe_tau is None else units.parse(probe_tau, "time", "probe tau")
    if tau_s is not None and tau_s < 0:
        raise InputError(f'"{probe_tau}" is negative', "probe tau", probe_tau)
    progress("reading samples", 0, len(table.rows))
    found = read_curves(table, run=run, gap_s=gap_s, decimal_comma=decimal_comma)
    progress("reading samples", len(table.rows), len(table.rows))
    plan = _plan(campaign, found, start, tau_s, on_duplicate)
    rejected_if(found.problems, table.source)
    name = Path(path).name

    def work() -> dict:
        counts = {"add": 0, "skip": 0, "replace": 0}
        stored = []
        for done, item in enumerate(plan, start=1):
            action, curve_id = item["action"], item["existing"]
            if action == "replace":
                records.soft_delete(campaign.conn, "curve", curve_id, actor=campaign.actor)
            if action in ("add", "replace"):
                curve_id = campaign.add_curve(
                    item["run_id"], item["time_s"], item["do_values"], item["do_unit"],
                    kind=item["kind"], probe_tau_s=item["probe_tau_s"],
                    gas_on_s=item["gas_on_s"], notes=_notes(name, item) if item["notes"] is None else item["notes"])
            counts[action] += 1
            stored.append({**{k: v for k, v in item.items()
                              if k not in ("time_s", "do_values", "existing")},
                           "curve_id": curve_id})
            progress("storing curves", done, len(plan))
        if analyse:
            new = [r["curve_id"] for r in stored if r["action"] != "skip"]
            results = {a["curve_id"]: a for a in campaign.analyse_curves(
                new, **(analysis or {}))} if new else {}
            for r in stored:
                r["analysis"] = results.get(r["curve_id"])
        return {"entity": "curves", "added": counts["add"], "skipped": counts["skip"],
                "replaced": counts["replace"], "rows": stored, "source": table.source,
                "warnings": found.warnings}
    return kept_unless_dry(campaign, work, dry_run)


def _notes(name: str, item: dict) -> str:
    started = f"; first sample at {item['started_at']}" if item["started_at"] else ""
    return f"imported from {name}{started}"


def _start_seconds(start: str, dated: bool, seconds_per_unit: float | None) -> float:
    text = start.strip()
    if dated:
        try:
            return _seconds(read_datetime(text))
        except InputError as exc:
            raise InputError(f"{exc}; the time column holds date-times, so --start is one too",
                             "start", start) from None
    if re.fullmatch(r"[-+]?(\d+\.?\d*|\.\d+)", text):
        return float(text) * (seconds_per_unit or 1.0)
    return units.parse(text, "time", "start")


def _plan(campaign, found: CurveFile, start: str | None, tau_s: float | None,
          on_duplicate: str) -> list[dict]:
    import numpy as np

    curves, problems, dated = found.curves, found.problems, found.dated
    start_s = None if start is None else _start_seconds(start, dated,
                                                        found.time.seconds_per_unit)
    plan, run_ids, used_start = [], {}, False
    for curve in curves:
        first = curve.rows[0]
        where = f"rows {first}-{curve.rows[-1]}"
        if len(curve.time) < MIN_SAMPLES:
            problems.append(problem(first, None, None, f"a curve needs at least {MIN_SAMPLES} "
                                    f"samples; {where} hold {len(curve.time)}"))
            continue
        if curve.run not in run_ids:
            try:
                run_ids[curve.run] = run_by_reference(campaign, curve.run)
            except NotFound as exc:
                problems.append(problem(first, "run", curve.run, str(exc).split(": ", 1)[-1]))
                run_ids[curve.run] = None
        run_id = run_ids[curve.run]
        t = np.asarray(curve.time, dtype=float)
        origin = float(t[0]) if dated else 0.0
        extra = {k: v[0] for k, v in curve.extra.items()}
        tau = tau_s
        try:
            if "probe_tau" in extra:
                if tau_s is not None:
                    raise InputError("give the probe tau with --probe-tau or in a column, not "
                                     "both", "probe tau")
                tau = number_cell(extra["probe_tau"]) * found.seconds_per_unit["probe_tau"]
                if tau < 0:
                    raise InputError(f'"{extra["probe_tau"]}" is negative', "probe tau")
            gas_on = None
            if "gas_on" in extra:
                on = (number_cell(extra["gas_on"]) * found.seconds_per_unit["gas_on"]
                      if not dated else _seconds(read_datetime(extra["gas_on"])))
                gas_on = float(on - origin)
            elif start_s is not None and t[0] <= start_s <= t[-1]:
                gas_on, used_start = float(start_s - origin), True
            kind = extra.get("kind", "gassing-out").lower()
            if kind not in KINDS:
                raise InputError(f'"{kind}" is not one of: {", ".join(KINDS)}', "kind")
        except InputError as exc:
            problems.append(problem(first, exc.field, None, str(exc)))
            continue
        if run_id is None:
            continue
        do = np.asarray(curve.do, dtype=float)
        if np.all(np.isnan(do)):
            problems.append(problem(first, "DO", None, f"every DO value of {where} is empty"))
            continue
        unit = extra["do_unit"]
        twin = next((p for p in plan if p["run_id"] == run_id and _same_samples(
            p["time_s"], p["do_values"], p["do_unit"], t - origin, do, unit)), None)
        if twin is not None:
            problems.append(problem(first, None, None, f"the curve of {where} duplicates the "
                                    f"curve of rows {twin['rows'][0]}-{twin['rows'][1]}"))
            continue
        existing = _stored_twin(campaign, run_id, t - origin, do, unit)
        if existing is not None and on_duplicate == "refuse":
            problems.append(problem(first, None, None, f"the curve of {where} duplicates "
                                    f"stored curve {existing} of the same run; use "
                                    "--on-duplicate skip or replace"))
            continue
        plan.append({"rows": [first, curve.rows[-1]], "run": curve.run, "run_id": run_id,
                     "marker": curve.marker, "n_samples": int(t.size), "time_s": t - origin,
                     "do_values": do, "do_unit": unit, "probe_tau_s": tau, "gas_on_s": gas_on,
                     "kind": kind, "notes": extra.get("notes", "") if found.has_notes else None,
                     "started_at": curve.first_time if dated else None,
                     "existing": existing,
                     "action": "add" if existing is None else on_duplicate})
    if start_s is not None and not used_start and curves and not problems:
        problems.append(problem(None, None, start, "--start is outside every curve of the "
                                "file; it is a time on the file's own clock"))
    return plan


def _stored_twin(campaign, run_id: int, t, do, unit: str) -> int | None:
    import numpy as np

    for row in campaign.rows("SELECT id, time_s, do_values, do_unit FROM curve WHERE run_id = ?"
                             " AND deleted_at IS NULL AND n_samples = ?", (run_id, int(t.size))):
        if _same_samples(np.frombuffer(row["time_s"], "<f8"), np.frombuffer(
                row["do_values"], "<f8"), row["do_unit"], t, do, unit):
            return row["id"]
    return None


def _same_samples(t1, c1, unit1: str, t2, c2, unit2: str) -> bool:
    import numpy as np

    return (unit1 == unit2 and t1.shape == t2.shape
            and np.allclose(t1, t2, rtol=1e-12, atol=1e-9)
            and np.allclose(c1, c2, rtol=1e-12, atol=1e-12, equal_nan=True))
