"""Empty import templates, with a sheet that says what each column holds.

The columns, their lab units and valid ranges come from :mod:`scaleup.fields` (and, for DO
curves, from :mod:`scaleup.store.curve_import`), the same specifications the importers
check against, so a template can never promise what an import then refuses. An XLSX
template has the entity's sheet and a ``columns`` sheet; a CSV template is the header row,
with the documentation beside it in ``NAME-columns.csv``.
"""

from __future__ import annotations

from pathlib import Path

from scaleup import fields as F
from scaleup import units
from scaleup.store.files import file_format, write_csv, write_xlsx
from scaleup.store.tables import header_label

DOC_HEADER = ["column", "unit", "required", "valid range", "other units accepted", "meaning"]
ABOUT = {
    "runs": "One row per run (one operating point of one vessel with one medium). The vessel "
            "and medium must be stored, or the vessel be on a vessels sheet of the same "
            "workbook. A duplicate is a run with the same vessel, medium, speed, gas flow, "
            "date and time.",
    "vessels": "One row per impeller, lowest first. A vessel with two impellers takes two "
               "rows with the same name; the vessel's own fields and its sparger go on its "
               "first row. Give the liquid height or the working volume.",
    "fluxes": "One row per mass-flux test. The optional run column names the run (its ref "
              "or id) the test belongs to.",
    "curves": "One row per DO sample. Several curves may share a file: a new run or curve "
              "marker starts a new curve, and without a marker so does a gap in time.",
}


def _accepted(spec: F.Field) -> str:
    if spec.kind == "gas_flow":
        return "NL/min, Nm3/h, vvm, mol/s; L/min only at normal conditions"
    if spec.kind in units.KINDS and units.KINDS[spec.kind].si != "dimensionless":
        k = units.KINDS[spec.kind]
        return f"any {k.description.split(' ', 1)[1]}, e.g. {k.example}"
    if spec.kind == "fraction":
        return "a fraction (0.21) or % (21 %)"
    return ""


def _required(spec: F.Field) -> str:
    if spec.required:
        return "yes"
    return f"no (default {spec.default})" if spec.default not in (None, "") else "no"


def _field_rows(specs: tuple[F.Field, ...]) -> list[list[str]]:
    return [[header_label(s), s.unit, _required(s), s.range_text(), _accepted(s), s.help]
            for s in specs]


def template_columns(entity: str) -> tuple[list[str], list[list[str]]]:
    """(header cells, documentation rows) of an entity's template."""
    from scaleup.store.curve_import import TEMPLATE

    run_row = ["run", "", "no", "a stored run's ref or id",
               "", "The run this test belongs to, by its ref (or id)."]
    if entity == "runs":
        docs = _field_rows(F.RUN)
    elif entity == "vessels":
        docs = _field_rows(F.VESSEL + F.IMPELLER + F.SPARGER)
    elif entity == "fluxes":
        docs = [run_row, *_field_rows(F.FLUX)]
    elif entity == "curves":
        docs = [[header, unit, required, valid, "", meaning]
                for header, unit, required, valid, meaning in TEMPLATE]
    else:
        from scaleup.errors import InputError

        raise InputError(f'no template for "{entity}"; choose runs, vessels, fluxes or curves',
                         "entity", entity)
    return [d[0] for d in docs], docs


def write_template(entity: str, path: str | Path, *, with_vessels: bool = False) -> list[Path]:
    """Write an empty template (CSV or XLSX by extension); returns the files written.

    ``with_vessels`` adds an empty vessels sheet to an XLSX runs template, for campaigns
    whose vessels arrive in the same workbook as their runs.
    """
    path = Path(path)
    fmt = file_format(path, ("csv", "xlsx"))
    header, docs = template_columns(entity)
    about = [[f"{entity}: {ABOUT[entity]}"], [], DOC_HEADER, *docs]
    if fmt == "csv":
        sidecar = path.with_name(f"{path.stem}-columns.csv")
        write_csv(sidecar, about)
        write_csv(path, [header])
        return [path, sidecar]
    sheets = [(entity, [header])]
    if with_vessels and entity == "runs":
        sheets.append(("vessels", [template_columns("vessels")[0]]))
    sheets.append(("columns", about))
    write_xlsx(path, sheets)
    return [path]
