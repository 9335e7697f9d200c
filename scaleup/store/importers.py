"""Read spreadsheets of runs into a campaign: validated whole, written all or nothing.

Header cells read ``name [unit]`` (``speed [rpm]``, ``gas flow [NL/min]``); any unit of the
right kind is accepted. Column names match the field labels of :mod:`scaleup.fields`, case-
and space-insensitively (``Gas_Flow`` = ``gas flow``). Every row is checked before anything
is written; one bad row rejects the file, and the report lists every bad row.
"""

from __future__ import annotations

import csv
import io
import re
from dataclasses import dataclass
from pathlib import Path

from scaleup import fields as F
from scaleup.errors import ImportRejected, InputError

_HEADER = re.compile(r"^\s*(?P<name>[^\[\]]+?)\s*(?:\[(?P<unit>[^\[\]]*)\])?\s*$")
MAX_BYTES = 200 * 1024 * 1024


@dataclass(frozen=True)
class Table:
    """A sheet as read: header names and units, and rows of text cells (row 2 is the first)."""

    names: list[str]
    units: list[str]
    rows: list[list[str]]
    source: str


def normalise(name: str) -> str:
    return re.sub(r"[\s_\-]+", " ", name.strip().lower())


def read_table(path: str | Path, sheet: str | None = None) -> Table:
    """Read a CSV (UTF-8, comma, semicolon or tab separated) or the sheet of an XLSX file."""
    path = Path(path)
    if not path.exists():
        raise InputError(f"{path} does not exist", "file", str(path))
    if path.stat().st_size == 0:
        raise ImportRejected([{"row": None, "column": None, "value": None,
                               "reason": "the file is empty"}], str(path))
    if path.stat().st_size > MAX_BYTES:
        raise InputError(f"{path} is larger than {MAX_BYTES // 2**20} MB", "file", str(path))
    if path.suffix.lower() in (".xlsx", ".xlsm"):
        return _read_xlsx(path, sheet)
    raw = path.read_bytes()
    if b"\x00" in raw[:4096]:
        raise ImportRejected([{"row": None, "column": None, "value": None,
                               "reason": "this is not a text (CSV) file: it holds binary data"}],
                             str(path))
    try:
        text = raw.decode("utf-8-sig")
    except UnicodeDecodeError as exc:
        raise ImportRejected([{"row": None, "column": None, "value": None,
                               "reason": f"not UTF-8 text (byte {exc.start}); save the file as "
                                         "UTF-8 CSV"}], str(path)) from None
    sample = text[:4096]
    delimiter = max([",", ";", "\t"], key=sample.split("\n", 1)[0].count)
    reader = csv.reader(io.StringIO(text), delimiter=delimiter)
    all_rows = [r for r in reader]
    return _table(all_rows, str(path))


def _read_xlsx(path: Path, sheet: str | None) -> Table:
    import openpyxl

    try:
        book = openpyxl.load_workbook(path, read_only=True, data_only=True)
    except Exception as exc:
        raise ImportRejected([{"row": None, "column": None, "value": None,
                               "reason": f"cannot read as an XLSX workbook: {exc}"}],
                             str(path)) from None
    if sheet is not None and sheet not in book.sheetnames:
        raise InputError(f'no sheet "{sheet}"; sheets: {", ".join(book.sheetnames)}', "sheet")
    ws = book[sheet] if sheet else book.worksheets[0]
    all_rows = [["" if v is None else (repr(v) if isinstance(v, float) else str(v))
                 for v in row] for row in ws.iter_rows(values_only=True)]
    book.close()
    return _table(all_rows, f"{path}:{ws.title}")


def _table(all_rows: list[list[str]], source: str) -> Table:
    all_rows = [r for r in all_rows if any(c.strip() for c in r)]
    if not all_rows:
        raise ImportRejected([{"row": None, "column": None, "value": None,
                               "reason": "the file has no header row"}], source)
    names, units_ = [], []
    for cell in all_rows[0]:
        m = _HEADER.match(cell or "")
        if not m:
            raise ImportRejected([{"row": 1, "column": cell, "value": None,
                                   "reason": 'a header reads "name [unit]"'}], source)
        names.append(m.group("name"))
        units_.append((m.group("unit") or "").strip())
    width = len(names)
    rows = [(r + [""] * width)[:width] for r in all_rows[1:]]
    return Table(names, units_, rows, source)


def match_columns(table: Table, specs: tuple[F.Field, ...],
                  extra: tuple[str, ...] = ()) -> dict[int, F.Field | str]:
    """Map column index -> field (or an extra column name); refuse unknown and missing ones."""
    by_name = {}
    for s in specs:
        by_name[normalise(s.label)] = s
        by_name[normalise(s.column)] = s
    for e in extra:
        by_name[normalise(e)] = e
    mapping, problems = {}, []
    for i, name in enumerate(table.names):
        key = normalise(name)
        if key not in by_name:
            problems.append({"row": 1, "column": name, "value": None,
                             "reason": "unknown column; expected columns: "
                                       + ", ".join(s.label for s in specs)})
            continue
        mapping[i] = by_name[key]
    present = {m.column for m in mapping.values() if isinstance(m, F.Field)}
    for s in specs:
        if s.required and s.column not in present:
            problems.append({"row": 1, "column": s.label, "value": None,
                             "reason": "required column is missing; expected columns: "
                                       + ", ".join(s.label for s in specs)})
    if problems:
        raise ImportRejected(problems, table.source)
    return mapping


def cell_text(value: str, unit: str) -> str:
    """The text of one cell with its column's unit, ready for :func:`scaleup.fields.read`."""
    value = value.strip()
    if not value:
        return ""
    if re.fullmatch(r"[-+]?\d{1,3}(,\d{3})+(\.\d+)?", value):
        raise InputError(f'"{value}" has thousands separators; write the plain number '
                         f'"{value.replace(",", "")}"')
    if re.fullmatch(r"[-+]?\d+,\d+", value):
        raise InputError(f'"{value}" uses a decimal comma; write "{value.replace(",", ".")}"')
    return f"{value} {unit}" if unit else value


def import_runs(campaign, path: str | Path, *, sheet: str | None = None, dry_run: bool = False,
                on_duplicate: str = "refuse") -> dict:
    """Validate every row of a runs file, then write them in one transaction.

    Returns ``{"added": n, "skipped": n, "replaced": n, "rows": [...], "dry_run": bool}``.
    Raises :class:`ImportRejected` listing every bad row; nothing is written then.
    """
    from scaleup.store import records

    if on_duplicate not in ("refuse", "skip", "replace"):
        raise InputError(f'"{on_duplicate}" is not one of refuse, skip, replace', "on-duplicate")
    table = read_table(path, sheet)
    mapping = match_columns(table, F.RUN)
    problems, clean_rows = [], []
    for row_number, cells in enumerate(table.rows, start=2):
        values = {}
        row_bad = False
        for i, spec in mapping.items():
            try:
                text = cell_text(cells[i], table.units[i])
            except InputError as exc:
                problems.append({"row": row_number, "column": table.names[i],
                                 "value": cells[i], "reason": str(exc)})
                row_bad = True
                continue
            if text:
                values[spec.label] = text
        if row_bad:
            continue
        try:
            clean_rows.append((row_number, campaign._clean_run(values)))
        except InputError as exc:
            for part in str(exc).split("; "):
                column = part.split(":", 1)[0] if ":" in part else None
                problems.append({"row": row_number, "column": column,
                                 "value": values.get(column), "reason": part})
    seen = {}
    added = skipped = replaced = 0
    plan = []
    for row_number, clean in clean_rows:
        key = (clean["vessel_id"], clean["medium_id"], round(clean["speed_rps"], 9),
               round(clean["gas_flow_mol_s"], 12), clean["run_at"])
        if key in seen:
            problems.append({"row": row_number, "column": None, "value": None,
                             "reason": f"duplicate of row {seen[key]} (same vessel, medium, "
                                       "speed, gas flow, date and time)"})
            continue
        seen[key] = row_number
        existing = campaign.rows(
            "SELECT id FROM run WHERE deleted_at IS NULL AND vessel_id = ? AND medium_id = ? AND "
            "abs(speed_rps - ?) < 1e-9 AND abs(gas_flow_mol_s - ?) < 1e-12 AND run_at = ?", key)
        if existing and on_duplicate == "refuse":
            problems.append({"row": row_number, "column": None, "value": None,
                             "reason": f"duplicate of stored run {existing[0]['id']}; use "
                                       "--on-duplicate skip or replace"})
            continue
        plan.append((row_number, clean, existing[0]["id"] if existing else None))
    if problems:
        raise ImportRejected(sorted(problems, key=lambda p: (p["row"] or 0)), table.source)
    summary_rows = []
    try:
        with campaign.transaction():
            for row_number, clean, existing_id in plan:
                if existing_id is not None and on_duplicate == "skip":
                    skipped += 1
                    summary_rows.append({"row": row_number, "action": "skip",
                                         "run_id": existing_id})
                elif existing_id is not None:
                    records.update(campaign.conn, "run", existing_id, clean,
                                   actor=campaign.actor)
                    replaced += 1
                    summary_rows.append({"row": row_number, "action": "replace",
                                         "run_id": existing_id})
                else:
                    run_id = records.insert(campaign.conn, "run", clean, actor=campaign.actor,
                                            action="import")
                    added += 1
                    summary_rows.append({"row": row_number, "action": "add", "run_id": run_id})
            if dry_run:
                raise _RollBack
    except _RollBack:
        pass
    return {"added": added, "skipped": skipped, "replaced": replaced, "rows": summary_rows,
            "dry_run": dry_run, "source": table.source}


class _RollBack(Exception):
    """Raised inside the transaction of a dry run so that nothing is kept."""
