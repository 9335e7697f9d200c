"""Read a sheet of a CSV, XLSX or JSON table file as text cells, refusing what would misread.

Every importer starts here. A table is a header row of ``name [unit]`` cells (or a header of
names followed by a units row of ``[unit]`` cells, as ``export --units-row`` writes) and rows
of text cells. Row numbers are the file's own (row 1 is the header), so a report points at
the row a person sees in the spreadsheet. Nothing here knows what the columns mean; column
matching against :mod:`scaleup.fields` and the cell checks are below too, so that every
importer words its problems the same way.
"""

from __future__ import annotations

import csv
import datetime as _dt
import io
import json
import math
import re
from collections.abc import Sequence
from dataclasses import dataclass, field
from pathlib import Path

from scaleup import fields as F
from scaleup import units
from scaleup.errors import ImportRejected, InputError

_HEADER = re.compile(r"^\s*(?P<name>[^\[\]]+?)\s*(?:\[(?P<unit>[^\[\]]*)\])?\s*$")
_UNITS_CELL = re.compile(r"^\s*\[(?P<unit>[^\[\]]*)\]\s*$")
_PLAIN_NUMBER = re.compile(r"^[-+]?(?:\d+\.?\d*|\.\d+)(?:[eE][-+]?\d+)?$")
_COMMA_DECIMAL = re.compile(r"[-+]?\d+(,\d+)?([eE][-+]?\d+)?")
_THOUSANDS_COMMA = re.compile(r"[-+]?\d{1,3}(,\d{3})+(\.\d+)?")
_THOUSANDS_POINT = re.compile(r"[-+]?\d{1,3}(\.\d{3})+,\d+")
_DECIMAL_COMMA = re.compile(r"[-+]?\d*,\d+([eE][-+]?\d+)?")
_THOUSANDS_SPACE = re.compile(r"[-+]?\d{1,3}( \d{3})+(\.\d+)?")
MAX_BYTES = 200 * 1024 * 1024
# A file this wrong is the wrong file or the wrong layout: checking stops, the report says so
MAX_PROBLEMS = 1000
XLSX_SUFFIXES = (".xlsx", ".xlsm")


def problem(row: int | None, column: str | None, value: object, reason: str) -> dict:
    """One entry of an import report: where (row, column), what (value) and why."""
    return {"row": row, "column": column, "value": value, "reason": reason}


def too_many(problems: list[dict]) -> bool:
    """True once ``problems`` holds MAX_PROBLEMS; adds the note that checking stopped."""
    if len(problems) < MAX_PROBLEMS:
        return False
    if problems[-1]["reason"] != _STOPPED:
        problems.append(problem(None, None, None, _STOPPED))
    return True


_STOPPED = (f"checking stopped after {MAX_PROBLEMS} problems: is this the right file and "
            "layout? Fix these and import again")


def reject(source: str, reason: str, row: int | None = None, column: str | None = None):
    """Raise an :class:`ImportRejected` with one file-level problem."""
    raise ImportRejected([problem(row, column, None, reason)], source)


@dataclass(frozen=True)
class Table:
    """A sheet as read: header names and units, rows of text cells with their row numbers.

    ``problems`` holds rows that could not be split into the header's columns; importers
    report them with their own.
    """

    names: list[str]
    units: list[str]
    rows: list[list[str]]
    row_numbers: list[int]
    source: str
    problems: list[dict] = field(default_factory=list)

    def numbered(self):
        """(row number, cells) pairs."""
        return zip(self.row_numbers, self.rows, strict=True)


def normalise(name: str) -> str:
    """Column names compare case- and space-insensitively: ``Gas_Flow`` = ``gas flow``."""
    return re.sub(r"[\s_\-]+", " ", name.strip().lower())


def read_table(path: str | Path, sheet: str | None = None, entity: str | None = None, *,
               allow_empty: bool = False) -> Table:
    """Read a CSV (UTF-8; comma, semicolon or tab separated), an XLSX sheet or a JSON table.

    The sheet of a workbook is ``sheet`` if given, else the one named like ``entity``
    (``runs``), else the first. A header without data rows is refused unless
    ``allow_empty``.
    """
    path = Path(path)
    if not path.exists():
        raise InputError(f"{path} does not exist", "file", str(path))
    if path.is_dir():
        raise InputError(f"{path} is a folder, not a file", "file", str(path))
    size = path.stat().st_size
    if size == 0:
        reject(str(path), "the file is empty")
    if size > MAX_BYTES:
        raise InputError(f"{path} is larger than {MAX_BYTES // 2**20} MB", "file", str(path))
    suffix = path.suffix.lower()
    if suffix in XLSX_SUFFIXES:
        return _read_xlsx(path, sheet, entity, allow_empty)
    raw = path.read_bytes()
    if raw.startswith(b"PK\x03\x04"):
        reject(str(path), "this is a zip archive (an XLSX workbook?) with a "
               f'"{path.suffix}" name; give it the .xlsx extension')
    if b"\x00" in raw[:65536]:
        reject(str(path), "this is not a text (CSV) file: it holds binary data")
    try:
        text = raw.decode("utf-8-sig")
    except UnicodeDecodeError as exc:
        reject(str(path), f"not UTF-8 text (byte {exc.start}); save the file as UTF-8 CSV")
    if sheet is not None:
        raise InputError(f"--sheet applies to XLSX workbooks; {path.name} is a text file",
                         "sheet", sheet)
    if suffix == ".json":
        return _read_json(text, str(path), allow_empty)
    return _read_csv(text, str(path), allow_empty)


def sheet_names(path: str | Path) -> list[str]:
    """Sheet names of an XLSX workbook ([] for other files or unreadable ones)."""
    path = Path(path)
    if path.suffix.lower() not in XLSX_SUFFIXES or not path.exists():
        return []
    import openpyxl

    try:
        book = openpyxl.load_workbook(path, read_only=True)
    except Exception:  # the read proper reports why
        return []
    names = list(book.sheetnames)
    book.close()
    return names


def _read_csv(text: str, source: str, allow_empty: bool) -> Table:
    first_line = text.lstrip("\ufeff").split("\n", 1)[0]
    delimiter = max([",", ";", "\t"], key=first_line.count)
    try:
        records = list(csv.reader(io.StringIO(text), delimiter=delimiter, strict=True))
    except csv.Error as exc:
        reject(source, f"cannot be read as CSV: {exc}")
    return _table(list(enumerate(records, start=1)), source, allow_empty)


def _read_json(text: str, source: str, allow_empty: bool) -> Table:
    try:
        data = json.loads(text)
    except json.JSONDecodeError as exc:
        reject(source, f"not valid JSON: {exc.msg} at line {exc.lineno}")
    except RecursionError:  # "[[[[...": nested deeper than the parser goes
        reject(source, "not a JSON table: it is nested too deeply")
    if not isinstance(data, dict) or not isinstance(data.get("columns"), list) or \
            not isinstance(data.get("rows"), list):
        reject(source, 'a JSON table is an object with "columns" (header cells) and "rows" '
               "(lists of cells), as `scaleup export ... FILE.json` writes")
    header = [str(c) for c in data["columns"]]
    records = [(1, header)]
    for number, row in enumerate(data["rows"], start=2):
        if isinstance(row, dict):
            row = [row.get(c) for c in header]
        if not isinstance(row, list):
            reject(source, "every row of a JSON table is a list of cells", row=number)
        records.append((number, [_text_of(v) for v in row]))
    return _table(records, source, allow_empty)


def _read_xlsx(path: Path, sheet: str | None, entity: str | None, allow_empty: bool) -> Table:
    import openpyxl

    try:
        book = openpyxl.load_workbook(path, read_only=True, data_only=True)
    except Exception as exc:
        reject(str(path), f"cannot read as an XLSX workbook ({type(exc).__name__}: {exc})")
    try:
        if sheet is not None:
            if sheet not in book.sheetnames:
                raise InputError(f'no sheet "{sheet}"; sheets: {", ".join(book.sheetnames)}',
                                 "sheet", sheet)
            ws = book[sheet]
        else:
            named = [s for s in book.sheetnames if entity and normalise(s) == normalise(entity)]
            ws = book[named[0]] if named else book.worksheets[0]
        records = [(number, [_text_of(v) for v in row])
                   for number, row in enumerate(ws.iter_rows(values_only=True), start=1)]
        title = ws.title
    finally:
        book.close()
    return _table(records, f"{path}:{title}", allow_empty)


def _text_of(value: object) -> str:
    """A cell as text: floats in full precision, date-times in ISO 8601."""
    if value is None:
        return ""
    if isinstance(value, bool):
        return "true" if value else "false"
    if isinstance(value, float):
        return repr(value)
    if isinstance(value, (_dt.datetime, _dt.date, _dt.time)):
        return value.isoformat()
    return str(value)


def _table(records: list[tuple[int, list[str]]], source: str, allow_empty: bool = False) -> Table:
    records = [(n, r) for n, r in records if any(str(c).strip() for c in r)]
    if not records:
        reject(source, "the file has no header row (it holds only empty cells)")
    header_number, header = records[0]
    while header and not str(header[-1]).strip():
        header = header[:-1]
    names, units_, problems = [], [], []
    for cell in header:
        m = _HEADER.match(cell or "")
        if not m:
            problems.append(problem(header_number, cell, None,
                                    'a header cell reads "name [unit]", e.g. "speed [rpm]"'))
            continue
        names.append(m.group("name"))
        units_.append(_unit(m.group("unit")))
    if problems:
        raise ImportRejected(problems, source)
    body = records[1:]
    if body and _is_units_row(body[0][1], len(names)):
        for i, cell in enumerate(body[0][1][:len(names)]):
            m = _UNITS_CELL.match(cell or "")
            unit = _unit(m.group("unit")) if m else ""
            if unit and units_[i] and unit != units_[i]:
                problems.append(problem(body[0][0], names[i], cell,
                                        f'the header says "{units_[i]}" and the units row "{unit}"'))
            units_[i] = units_[i] or unit
        body = body[1:]
    if problems:
        raise ImportRejected(problems, source)
    width = len(names)
    seen: dict[str, str] = {}
    for name in names:
        key = normalise(name)
        if key in seen:
            problems.append(problem(header_number, name, None,
                                    f'the column appears twice (also as "{seen[key]}")'))
        seen[key] = name
    if problems:
        raise ImportRejected(problems, source)
    rows, numbers, row_problems = [], [], []
    for number, cells in body:
        cells = [str(c) for c in cells]
        extra = [c for c in cells[width:] if c.strip()]
        if extra:
            row_problems.append(problem(
                number, None, ",".join(cells),
                f"the row has {width + len(cells[width:])} cells but the header {width}; a "
                "decimal comma in a comma-separated file splits a number in two"))
            continue
        rows.append((cells + [""] * width)[:width])
        numbers.append(number)
    if not rows and not row_problems and not allow_empty:
        reject(source, "the file has a header row but no data rows")
    return Table(names, units_, rows, numbers, source, row_problems)


def _unit(text: str | None) -> str:
    """A header's unit; "-" (dimensionless, as templates write it) is no unit."""
    unit = (text or "").strip()
    return "" if unit == "-" else unit


def _is_units_row(cells: list[str], width: int) -> bool:
    filled = [c for c in cells[:width] if str(c).strip()]
    return bool(filled) and all(_UNITS_CELL.match(c) for c in filled)


def match_columns(table: Table, specs: Sequence[F.Field],
                  extra: dict[str, Sequence[str]] | None = None) -> dict[int, F.Field | str]:
    """Map column index -> field (or the key of an extra column); refuse unknown, missing
    and ill-united columns, listing the expected columns.

    ``extra`` maps a key to the accepted spellings of a column that is not a stored field
    (a run reference, a curve marker).
    """
    by_name: dict[str, F.Field | str] = {}
    for s in specs:
        by_name[normalise(s.label)] = s
        by_name[normalise(s.column)] = s
    for key, spellings in (extra or {}).items():
        for spelling in spellings:
            by_name[normalise(spelling)] = key
    expected = ", ".join([header_label(s) for s in specs]
                         + [spellings[0] for spellings in (extra or {}).values()])
    mapping: dict[int, F.Field | str] = {}
    problems = []
    for i, name in enumerate(table.names):
        target = by_name.get(normalise(name))
        if target is None:
            problems.append(problem(1, name, None, f"unknown column; expected columns: {expected}"))
            continue
        if target in mapping.values():
            problems.append(problem(1, name, None, "a second column for the same field"))
            continue
        mapping[i] = target
        if isinstance(target, F.Field):
            reason = unit_problem(target, table.units[i])
            if reason:
                problems.append(problem(1, f"{name} [{table.units[i]}]", None, reason))
    present = {m.column for m in mapping.values() if isinstance(m, F.Field)}
    for s in specs:
        if s.required and s.column not in present:
            problems.append(problem(1, s.label, None,
                                    f"required column is missing; expected columns: {expected}"))
    if problems:
        raise ImportRejected(problems, table.source)
    return mapping


def header_label(spec: F.Field) -> str:
    """The header cell a template writes for a field: ``speed [rpm]``."""
    return f"{spec.label} [{spec.unit}]" if spec.unit else spec.label


def unit_problem(spec: F.Field, unit: str) -> str | None:
    """Why the unit of a header does not fit its field (None when it does)."""
    if not unit:
        return None
    if spec.kind in ("text", "choice", "date", "int"):
        return f'"{spec.label}" takes no unit (it holds {_what(spec)}); write the header ' \
               f'"{spec.label}"'
    try:
        if spec.kind == "gas_flow":
            units.parse_gas_flow(f"1 {unit}", spec.label, liquid_volume_m3=1.0,
                                 temperature_k=300.0, pressure_pa=1e5)
        else:
            units.parse(f"1 {unit}", spec.kind, spec.label)
    except InputError as exc:
        text = str(exc).split(": ", 1)[-1]
        return f"wrong unit for this column: {text}"
    return None


def _what(spec: F.Field) -> str:
    return {"text": "text", "choice": "a choice", "date": "a date", "int": "a whole number"
            }[spec.kind]


def _separators(value: str, decimal_comma: bool) -> str:
    """The number text of a cell with separators checked (and decimal commas turned to
    points when the file uses them); refuses what could be misread."""
    number = value.split()[0]
    if decimal_comma:
        if "." in number:
            raise InputError(f'"{value}": with decimal commas a point is ambiguous (thousands '
                             "separator or decimal point?); write the number without it")
        if _COMMA_DECIMAL.fullmatch(number):
            return value.replace(",", ".", 1)
        return value
    if _PLAIN_NUMBER.match(value):  # the common case: nothing to refuse
        return value
    if _THOUSANDS_COMMA.fullmatch(number):
        raise InputError(f'"{value}" has thousands separators; write the plain number '
                         f'"{number.replace(",", "")}"')
    if _THOUSANDS_POINT.fullmatch(number):
        plain = number.replace(".", "").replace(",", ".")
        raise InputError(f'"{value}" uses a decimal comma and thousands points; write "{plain}"')
    if _DECIMAL_COMMA.fullmatch(number):
        raise InputError(f'"{value}" uses a decimal comma; write '
                         f'"{number.replace(",", ".")}" (or import with --decimal-comma)')
    if _THOUSANDS_SPACE.fullmatch(value):
        raise InputError(f'"{value}" has spaces as thousands separators; write '
                         f'"{value.replace(" ", "")}"')
    return value


def cell_text(value: str, unit: str, *, decimal_comma: bool = False) -> str:
    """The text of one cell with its column's unit, ready for :func:`scaleup.fields.read`.

    A cell under a ``[unit]`` header must be a plain number; one under a header without a
    unit may carry its own (``"600 rpm"``). Decimal commas and thousands separators are
    refused with the plain number to write, unless ``decimal_comma`` says the file uses the
    comma as decimal separator (then a point anywhere is refused as ambiguous).
    """
    value = value.strip()
    if not value:
        return ""
    if not decimal_comma and _PLAIN_NUMBER.match(value):  # the common case: nothing to refuse
        if unit and not math.isfinite(float(value)):
            raise InputError(f'"{value}" is not a finite number')
        return f"{value} {unit}" if unit else value
    text = _separators(value, decimal_comma)
    if not unit:
        return text
    number_cell(text, unit=unit)
    return f"{text} {unit}"


def number_cell(value: str, *, decimal_comma: bool = False, unit: str = "") -> float:
    """A plain number from a cell (no unit), with the separator rules of :func:`cell_text`."""
    value = _separators(value.strip(), decimal_comma)
    where = f" in {unit}" if unit else ""
    if not _PLAIN_NUMBER.match(value):
        if re.match(r"^[-+]?(?:\d+\.?\d*|\.\d+)", value):
            raise InputError(f'"{value}" is not a plain number; the column is{where or " a number"}'
                             ", so write the number alone")
        raise InputError(f'"{value}" is not a number (text in a number column{where})')
    number = float(value)
    if not math.isfinite(number):
        raise InputError(f'"{value}" is not a finite number')
    return number
