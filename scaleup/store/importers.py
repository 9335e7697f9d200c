"""Read spreadsheets of runs, vessels and flux tests into a campaign: checked whole, written
all or nothing.

Header cells read ``name [unit]`` (``speed [rpm]``, ``gas flow [NL/min]``); any unit of the
right kind is accepted. Column names match the field labels of :mod:`scaleup.fields`, case-
and space-insensitively (``Gas_Flow`` = ``gas flow``). Every row is checked before anything
is kept; one bad row rejects the file, and the report lists every bad row with its column,
value and reason. A workbook may hold a ``vessels`` sheet beside its ``runs`` sheet: the
vessels go in first, in the same transaction, so the runs may refer to them.

DO logger files (curves) are read by :mod:`scaleup.store.curve_import`.
"""

from __future__ import annotations

import re
from collections.abc import Callable, Iterable
from pathlib import Path

from scaleup import fields as F
from scaleup.errors import ImportRejected, InputError, MediumNotFound, NotFound, VesselNotFound
from scaleup.store import records
from scaleup.store.tables import (
    Table,
    cell_text,
    match_columns,
    normalise,
    problem,
    read_table,
    sheet_names,
    too_many,
)

DUPLICATE_CHOICES = ("refuse", "skip", "replace")
ENTITIES = {"runs": "scaleup.store.importers:import_runs",
            "vessels": "scaleup.store.vessel_import:import_vessels",
            "fluxes": "scaleup.store.importers:import_fluxes",
            "curves": "scaleup.store.curve_import:import_curves"}
RUN_COLUMN = {"run": ("run", "run ref", "ref", "run id")}
# progress(stage, done, total): the command line draws a bar from it; the store stays quiet
Progress = Callable[[str, int, int], None]
_RUN_KEY_TEXT = "same vessel, medium, speed, gas flow, date and time"


class _RollBack(Exception):
    """Raised inside the transaction of a dry run so that nothing is kept."""


def check_on_duplicate(value: str) -> str:
    if value not in DUPLICATE_CHOICES:
        raise InputError(f'"{value}" is not one of {", ".join(DUPLICATE_CHOICES)}',
                         "on-duplicate", value)
    return value


def import_file(campaign, entity: str, path: str | Path, **options) -> dict:
    """Import a file of ``entity`` (runs, vessels, fluxes, curves); see each importer."""
    import importlib

    if entity not in ENTITIES:
        raise InputError(f'cannot import "{entity}"; choose one of {", ".join(ENTITIES)}',
                         "entity", entity)
    module, name = ENTITIES[entity].split(":")
    return getattr(importlib.import_module(module), name)(campaign, path, **options)


def _quiet(stage: str, done: int, total: int) -> None:
    """No progress display."""


def kept_unless_dry(campaign, work: Callable[[], dict], dry_run: bool) -> dict:
    """Run ``work`` in one transaction; a dry run (or any error, or Ctrl-C) keeps nothing."""
    outcome: dict = {}
    try:
        with campaign.transaction():
            outcome = work()
            if dry_run:
                raise _RollBack
    except _RollBack:
        pass
    outcome["dry_run"] = dry_run
    return outcome


def split_message(message: str, labels: Iterable[str]) -> list[tuple[str | None, str]]:
    """Split a validation message ``"speed: ...; temperature: ..."`` into (column, reason).

    Reasons may contain "; " themselves, so the split happens only before a known label.
    """
    names = sorted(set(labels), key=len, reverse=True)
    pattern = "|".join(re.escape(n) for n in names)
    parts = re.split(rf"; (?=(?:{pattern}): )", message)
    out = []
    for part in parts:
        m = re.match(rf"^({pattern}): (.*)$", part, re.S)
        out.append((m.group(1), m.group(2)) if m else (None, part))
    return out


def row_values(table: Table, mapping: dict, number: int, cells: list[str],
               problems: list[dict], decimal_comma: bool = False) -> tuple[dict, dict, set]:
    """Cells of one row as ``{label: "value unit"}`` and ``{extra key: text}``.

    Cells that cannot be read (decimal comma, text in a number column) go to ``problems``;
    their labels are returned so that the "is required" echo of them is not reported twice.
    """
    values, extra, bad = {}, {}, set()
    for i, target in mapping.items():
        raw = cells[i]
        if isinstance(target, str):
            if raw.strip():
                extra[target] = raw.strip()
            continue
        unit = table.units[i] if target.kind not in ("text", "choice", "date") else ""
        try:
            text = cell_text(raw, unit, decimal_comma=decimal_comma) if target.kind not in (
                "text", "choice", "date") else raw.strip()
        except InputError as exc:
            problems.append(problem(number, table.names[i], raw, str(exc)))
            bad.add(target.label)
            continue
        if text:
            values[target.label] = text
    return values, extra, bad


def report_error(problems: list[dict], number: int, exc: InputError, labels: Iterable[str],
                 values: dict, bad: set = frozenset()) -> None:
    """Add the parts of a validation error to ``problems``, each under its column."""
    if isinstance(exc, NotFound):
        column = "vessel" if isinstance(exc, VesselNotFound) else \
            "medium" if isinstance(exc, MediumNotFound) else exc.field
        problems.append(problem(number, column, values.get(column), str(exc)))
        return
    for column, reason in split_message(str(exc), labels):
        if column in bad and reason == "is required":
            continue
        problems.append(problem(number, column, values.get(column), reason))


def rejected_if(problems: list[dict], source: str) -> None:
    if problems:
        raise ImportRejected(sorted(problems, key=lambda p: (p["row"] or 0)), source)


def run_by_reference(campaign, text: str) -> int:
    """A run by its ``ref``, or by its id written as a plain whole number."""
    found = campaign.rows("SELECT id, deleted_at FROM run WHERE ref = ?", (text,))
    if not found and re.fullmatch(r"#?\d+", text):
        found = campaign.rows("SELECT id, deleted_at FROM run WHERE id = ?",
                              (int(text.lstrip("#")),))
    if not found:
        raise NotFound(f'no run with ref or id "{text}"', "run", text)
    if found[0]["deleted_at"]:
        raise NotFound(f'run "{text}" is deleted; restore it first', "run", text)
    return found[0]["id"]


# ------------------------------------------------------------------------------------ runs
def import_runs(campaign, path: str | Path, *, sheet: str | None = None, dry_run: bool = False,
                on_duplicate: str = "refuse", decimal_comma: bool = False,
                progress: Progress | None = None) -> dict:
    """Check every row of a runs file, then write them in one transaction.

    Returns ``{"entity": "runs", "added", "skipped", "replaced", "rows": [...],
    "dry_run", "source"}`` (and ``"vessels"``, the summary of a vessels sheet of the same
    workbook). Raises :class:`ImportRejected` listing every bad row; nothing is written then.
    """
    check_on_duplicate(on_duplicate)
    progress = progress or _quiet
    table = read_table(path, sheet, entity="runs")
    vessel_sheet = next((s for s in sheet_names(path) if normalise(s) == "vessels"), None)
    if vessel_sheet is not None and not table.source.endswith(f":{vessel_sheet}"):
        from scaleup.store.vessel_import import apply_vessels

        vessels = read_table(path, vessel_sheet, allow_empty=True)

        def work() -> dict:
            vessel_summary = apply_vessels(campaign, vessels, on_duplicate, decimal_comma,
                                           progress)
            plan = plan_runs(campaign, table, on_duplicate, decimal_comma, progress)
            return {**write_runs(campaign, plan, progress, table.source),
                    "vessels": vessel_summary}
        return kept_unless_dry(campaign, work, dry_run)
    plan = plan_runs(campaign, table, on_duplicate, decimal_comma, progress)
    return kept_unless_dry(campaign, lambda: write_runs(campaign, plan, progress, table.source),
                           dry_run)


def _close(a: float, b: float) -> bool:
    return abs(a - b) <= 1e-9 * max(abs(a), abs(b)) + 1e-15


def _stored_runs(campaign) -> tuple[dict, dict]:
    keys: dict[tuple, list] = {}
    for r in campaign.rows("SELECT id, vessel_id, medium_id, run_at, speed_rps, gas_flow_mol_s "
                           "FROM run WHERE deleted_at IS NULL"):
        keys.setdefault((r["vessel_id"], r["medium_id"], r["run_at"]), []).append(
            (r["id"], r["speed_rps"], r["gas_flow_mol_s"]))
    refs = {r["ref"]: (r["id"], r["deleted_at"]) for r in campaign.rows(
        "SELECT id, ref, deleted_at FROM run WHERE ref IS NOT NULL")}
    return keys, refs


def _match(candidates: dict, clean: dict):
    key = (clean["vessel_id"], clean["medium_id"], clean["run_at"])
    for ident, speed, gas in candidates.get(key, ()):
        if _close(speed, clean["speed_rps"]) and _close(gas, clean["gas_flow_mol_s"]):
            return ident
    return None


def plan_runs(campaign, table: Table, on_duplicate: str, decimal_comma: bool,
              progress: Progress) -> list[tuple[int, dict, int | None, str]]:
    """Every row checked: (row, clean record, stored duplicate's id, add|skip|replace)."""
    mapping = match_columns(table, F.RUN)
    labels = [s.label for s in F.RUN]
    problems = list(table.problems)
    stored, stored_refs = _stored_runs(campaign)
    in_file: dict[tuple, list] = {}
    file_refs: dict[str, int] = {}
    plan = []
    total = len(table.rows)
    known: dict = {}  # vessels and media by name, looked up once for the file
    for done, (number, cells) in enumerate(table.numbered(), start=1):
        if done % 200 == 0 or done == total:
            progress("checking runs", done, total)
        if too_many(problems):
            break
        values, _, bad = row_values(table, mapping, number, cells, problems, decimal_comma)
        try:
            clean = campaign._clean_run(values, known=known)
        except InputError as exc:
            report_error(problems, number, exc, labels, values, bad)
            continue
        if bad:
            continue
        twin = _match(in_file, clean)
        if twin is not None:
            problems.append(problem(number, None, None,
                                    f"duplicate of row {twin} ({_RUN_KEY_TEXT})"))
            continue
        key = (clean["vessel_id"], clean["medium_id"], clean["run_at"])
        in_file.setdefault(key, []).append((number, clean["speed_rps"], clean["gas_flow_mol_s"]))
        existing = _match(stored, clean)
        if existing is not None and on_duplicate == "refuse":
            problems.append(problem(number, None, None,
                                    f"duplicate of stored run {existing} ({_RUN_KEY_TEXT}); "
                                    "use --on-duplicate skip or replace"))
            continue
        ref = clean.get("ref")
        if ref is not None and not (existing is not None and on_duplicate == "skip"):
            if ref in file_refs:
                problems.append(problem(number, "ref", ref, f"also used on row {file_refs[ref]};"
                                        " a ref is unique in the campaign"))
                continue
            file_refs[ref] = number
            owner = stored_refs.get(ref)
            if owner is not None and owner[0] != existing:
                reason = (f"belongs to deleted run {owner[0]}; restore it or choose another ref"
                          if owner[1] else f"is already used by stored run {owner[0]}, a "
                          "different run; a ref is unique in the campaign")
                problems.append(problem(number, "ref", ref, reason))
                continue
        action = "add" if existing is None else on_duplicate
        plan.append((number, clean, existing, action))
    rejected_if(problems, table.source)
    return plan


def write_plan(campaign, entity: str, plan: list, add_many: Callable[[list[dict]], list[int]],
               progress: Progress, source: str) -> dict:
    """Carry out a checked plan of (row, clean record, stored duplicate, action) in the
    caller's transaction, in the plan's order; ``add_many(cleans)`` stores new records and
    returns their ids. New records go in batches of up to 200, between the progress reports."""
    table = {"runs": "run", "fluxes": "flux"}[entity]
    key = f"{table}_id"
    counts = {"add": 0, "skip": 0, "replace": 0}
    rows, waiting = [], []

    def add_waiting() -> None:
        for row, ident in zip(waiting, add_many([r["record"] for r in waiting]), strict=True):
            row[key] = ident
        waiting.clear()

    for done, (number, clean, existing, action) in enumerate(plan, start=1):
        row = {"row": number, "action": action, key: existing, "record": clean}
        if action == "add":
            waiting.append(row)
        elif action == "replace":
            add_waiting()
            records.update(campaign.conn, table, existing, clean, actor=campaign.actor)
        counts[action] += 1
        rows.append(row)
        if done % 200 == 0 or done == len(plan):
            add_waiting()
            progress(f"writing {entity}", done, len(plan))
    return {"entity": entity, "added": counts["add"], "skipped": counts["skip"],
            "replaced": counts["replace"], "rows": rows, "source": source}


def write_runs(campaign, plan: list, progress: Progress, source: str) -> dict:
    return write_plan(campaign, "runs", plan, lambda cleans: records.insert_many(
        campaign.conn, "run", cleans, actor=campaign.actor, action="import"), progress, source)


# ---------------------------------------------------------------------------------- fluxes
_FLUX_KEY = ("solute", "interfacial_area_m2", "c_interface_mol_m3", "c_bulk_mol_m3",
             "characteristic_length_m", "velocity_m_s", "temperature_k")


def import_fluxes(campaign, path: str | Path, *, sheet: str | None = None,
                  dry_run: bool = False, on_duplicate: str = "refuse",
                  decimal_comma: bool = False, progress: Progress | None = None) -> dict:
    """Import flux measurements; an optional ``run`` column names the run (ref or id).

    A duplicate is a test with the same run, solute, area, concentrations, length, velocity
    and temperature; ``replace`` overwrites its flux and the other fields.
    """
    from scaleup.campaign import validate

    check_on_duplicate(on_duplicate)
    progress = progress or _quiet
    table = read_table(path, sheet, entity="fluxes")
    mapping = match_columns(table, F.FLUX, RUN_COLUMN)
    labels = [s.label for s in F.FLUX]
    problems = list(table.problems)
    stored = campaign.fluxes()
    plan, seen = [], []
    for number, cells in table.numbered():
        if too_many(problems):
            break
        values, extra, bad = row_values(table, mapping, number, cells, problems, decimal_comma)
        run_id = None
        if "run" in extra:
            try:
                run_id = run_by_reference(campaign, extra["run"])
            except NotFound as exc:
                problems.append(problem(number, "run", extra["run"], str(exc).split(": ", 1)[-1]))
        try:
            clean = validate(F.FLUX, values)
        except InputError as exc:
            report_error(problems, number, exc, labels, values, bad)
            continue
        if bad:
            continue
        if clean["c_interface_mol_m3"] == clean["c_bulk_mol_m3"]:
            problems.append(problem(number, "bulk concentration", values.get(
                "bulk concentration"), "equals the interface concentration: no driving force"))
            continue
        twin = next((row for row, other, rid in seen if rid == run_id and _same_flux(other, clean)),
                    None)
        if twin is not None:
            problems.append(problem(number, None, None, f"duplicate of row {twin} (same run, "
                                    "solute, area, concentrations, length, velocity and "
                                    "temperature)"))
            continue
        seen.append((number, clean, run_id))
        existing = next((f["id"] for f in stored if f["run_id"] == run_id
                         and _same_flux(f, clean)), None)
        if existing is not None and on_duplicate == "refuse":
            problems.append(problem(number, None, None, f"duplicate of stored flux test "
                                    f"{existing}; use --on-duplicate skip or replace"))
            continue
        plan.append((number, {**clean, "run_id": run_id}, existing,
                     "add" if existing is None else on_duplicate))
    rejected_if(problems, table.source)

    def add_many(cleans: list[dict]) -> list[int]:
        return [campaign.add_flux({k: v for k, v in clean.items() if k != "run_id"},
                                  clean["run_id"]) for clean in cleans]
    return kept_unless_dry(campaign, lambda: write_plan(campaign, "fluxes", plan, add_many,
                                                        progress, table.source), dry_run)


def _same_flux(a: dict, b: dict) -> bool:
    return all(a[k] == b[k] if isinstance(a[k], str) else _close(a[k], b[k]) for k in _FLUX_KEY)
