"""Vessels from a spreadsheet: one row per impeller, the vessel's own fields on its first row.

A vessel with two impellers takes two rows with the same name; the second row needs only the
impeller columns (it may repeat the vessel's fields, but not change them). Impellers are
listed lowest first. The vessels are checked and added inside the caller's transaction, so
a runs workbook with a ``vessels`` sheet can refer to them and still go in all or nothing.
"""

from __future__ import annotations

from pathlib import Path

from scaleup import fields as F
from scaleup.errors import InputError
from scaleup.store.importers import (
    Progress,
    _close,
    _quiet,
    check_on_duplicate,
    kept_unless_dry,
    rejected_if,
    report_error,
    row_values,
)
from scaleup.store.tables import Table, match_columns, problem, read_table, too_many

VESSEL_SPECS = F.VESSEL + F.IMPELLER + F.SPARGER


def import_vessels(campaign, path: str | Path, *, sheet: str | None = None,
                   dry_run: bool = False, on_duplicate: str = "refuse",
                   decimal_comma: bool = False, progress: Progress | None = None) -> dict:
    """Import vessels: one row per impeller (lowest first), the vessel's own fields and its
    sparger on the first row of that vessel name (later rows may repeat them unchanged)."""
    check_on_duplicate(on_duplicate)
    table = read_table(path, sheet, entity="vessels")
    return kept_unless_dry(campaign, lambda: apply_vessels(campaign, table, on_duplicate,
                                                           decimal_comma, progress or _quiet),
                           dry_run)


def _group_vessels(table: Table, mapping: dict, problems: list, decimal_comma: bool) -> dict:
    """{name: {"row", "vessel", "sparger", "impellers": [(row, values)]}} in file order."""
    from scaleup.campaign import validate  # the service layer's field checks, one source

    kinds = {s.label: ("vessel" if s in F.VESSEL else "sparger" if s in F.SPARGER
                       else "impeller") for s in VESSEL_SPECS}
    groups: dict[str, dict] = {}
    for number, cells in table.numbered():
        if too_many(problems):
            break
        values, _, _ = row_values(table, mapping, number, cells, problems, decimal_comma)
        name = values.get("name", "")
        if not name:
            problems.append(problem(number, "name", None, "is required (the vessel's name)"))
            continue
        group = groups.setdefault(name, {"row": number, "vessel": {}, "sparger": {},
                                         "impellers": [], "first": {}})
        impeller = {}
        for label, text in values.items():
            part = kinds[label]
            if part == "impeller":
                impeller[label] = text
                continue
            target = group[part]
            if label in target and target[label] != text:
                problems.append(problem(number, label, text,
                                        f'differs from row {group["first"][label]} '
                                        f'("{target[label]}") for the same vessel'))
            elif label not in target:
                target[label] = text
                group["first"][label] = number
        if impeller:
            try:
                validate(F.IMPELLER, impeller)
            except InputError as exc:
                report_error(problems, number, exc, [s.label for s in F.IMPELLER], impeller)
                continue
            group["impellers"].append((number, impeller))
    for group in groups.values():
        try:
            validate(F.VESSEL, group["vessel"])
            if group["sparger"]:
                validate(F.SPARGER, group["sparger"])
        except InputError as exc:
            report_error(problems, group["row"], exc, [s.label for s in VESSEL_SPECS],
                         {**group["vessel"], **group["sparger"]})
    return groups


def apply_vessels(campaign, table: Table, on_duplicate: str, decimal_comma: bool,
                  progress: Progress) -> dict:
    """Check and add the vessels of a table; the caller holds the transaction."""
    mapping = match_columns(table, VESSEL_SPECS)
    problems = list(table.problems)
    groups = _group_vessels(table, mapping, problems, decimal_comma)
    rejected_if(problems, table.source)
    counts = {"add": 0, "skip": 0, "replace": 0}
    rows = []
    labels = [s.label for s in VESSEL_SPECS]
    for done, (name, group) in enumerate(groups.items(), start=1):
        number = group["row"]
        stored = campaign.rows("SELECT id, deleted_at FROM vessel WHERE name = ?", (name,))
        impellers = [values for _, values in group["impellers"]]
        try:
            if not stored:
                vessel_id = campaign.add_vessel(group["vessel"], impellers,
                                                group["sparger"] or None)
                action = "add"
            elif stored[0]["deleted_at"]:
                raise InputError(f"vessel {name} is stored but deleted; restore it "
                                 "(vessel restore) or choose another name", "name")
            elif on_duplicate == "refuse":
                raise InputError(f"vessel {name} is already stored (vessel "
                                 f"{stored[0]['id']}); use --on-duplicate skip or replace",
                                 "name")
            else:
                vessel_id, action = stored[0]["id"], on_duplicate
                if action == "replace":
                    _replace_vessel(campaign, vessel_id, group, impellers)
        except InputError as exc:
            report_error(problems, number, exc, labels, group["vessel"])
            continue
        counts[action] += 1
        rows.append({"row": number, "action": action, "vessel_id": vessel_id, "name": name})
        progress("vessels", done, len(groups))
    rejected_if(problems, table.source)
    return {"entity": "vessels", "added": counts["add"], "skipped": counts["skip"],
            "replaced": counts["replace"], "rows": rows, "source": table.source}


def _replace_vessel(campaign, vessel_id: int, group: dict, impellers: list[dict]) -> None:
    from scaleup.campaign import validate

    stored = campaign.vessel(vessel_id)["impellers"]
    wanted = [validate(F.IMPELLER, imp) for imp in impellers]
    same = len(stored) == len(wanted) and all(
        s["impeller_type"] == w["impeller_type"]
        and _close(s["impeller_diameter_m"], w["impeller_diameter_m"])
        and _close(s["clearance_m"], w["clearance_m"]) for s, w in zip(stored, wanted,
                                                                        strict=True))
    if wanted and not same:
        raise InputError("replace changes a vessel's own fields, not its impellers, and the "
                         "file's impellers differ from the stored ones; edit the vessel or "
                         "import it under a new name", "impeller type")
    changes = {k: v for k, v in group["vessel"].items() if k != "name"}
    if changes:
        campaign.edit_vessel(vessel_id, changes)
