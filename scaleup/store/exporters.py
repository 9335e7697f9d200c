"""Write runs to CSV or XLSX with ``name [unit]`` headers that the importer reads back."""

from __future__ import annotations

import csv
from pathlib import Path

from scaleup import fields as F
from scaleup import units

SI_LABELS = {"speed": "rev/s", "gas_flow": "mol/s", "temperature": "K", "pressure": "Pa"}


def _header_unit(spec: F.Field, si: bool) -> str:
    if spec.kind in ("text", "choice", "date", "int", "fraction"):
        return ""
    if si:
        return SI_LABELS.get(spec.kind) or units.KINDS[spec.kind].label
    return spec.unit


def _cell(spec: F.Field, value, si: bool, volume_m3: float) -> str | float:
    if value is None:
        return ""
    if spec.kind in ("text", "choice", "date"):
        return str(value)
    if spec.kind in ("int", "fraction") or si:
        return value
    if spec.kind == "gas_flow":
        return units.gas_flow_to(value, "NL/min", volume_m3)
    return units.convert(value, spec.kind)


def run_table(campaign, where: str | None = None, *, si: bool = False) -> tuple[list[str], list]:
    """Header cells and rows of the runs, in lab units (or SI), ready to write."""
    specs = F.RUN
    headers = [f"{s.label} [{u}]" if (u := _header_unit(s, si)) else s.label for s in specs]
    volumes = {v["id"]: v["working_volume_m3"] for v in campaign.vessels(include_deleted=True)}
    rows = []
    for r in campaign.runs(where):
        full = campaign.run(r["id"])
        rows.append([_cell(s, full.get(s.column), si, volumes[full["vessel_id"]])
                     for s in specs])
    return headers, rows


def export_runs(campaign, path: str | Path, where: str | None = None, *, si: bool = False) -> int:
    """Write the runs to ``path`` (.csv or .xlsx); returns the number of runs written."""
    path = Path(path)
    headers, rows = run_table(campaign, where, si=si)
    tmp = path.with_name(path.name + ".part")
    if path.suffix.lower() == ".xlsx":
        import openpyxl

        book = openpyxl.Workbook()
        sheet = book.active
        sheet.title = "runs"
        sheet.append(headers)
        for r in rows:
            sheet.append(r)
        book.save(tmp)
    elif path.suffix.lower() == ".csv":
        with open(tmp, "w", newline="", encoding="utf-8") as fh:
            writer = csv.writer(fh)
            writer.writerow(headers)
            for r in rows:
                writer.writerow([repr(c) if isinstance(c, float) else c for c in r])
    else:
        from scaleup.errors import InputError

        raise InputError(f'"{path.suffix}" is not a known export format; use .csv or .xlsx',
                         "file", str(path))
    tmp.replace(path)  # never leave half a file under the real name
    return len(rows)
