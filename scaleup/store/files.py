"""Write CSV, XLSX and JSON files whole or not at all.

Every export and template is written to ``NAME.part`` beside the target and renamed over it
only when complete, so an error or Ctrl-C never leaves half a file under the real name (the
partial file is removed).
"""

from __future__ import annotations

import csv
import json
import math
import os
from collections.abc import Callable, Sequence
from pathlib import Path

from scaleup.errors import InputError

FORMATS = {".csv": "csv", ".xlsx": "xlsx", ".json": "json"}


def file_format(path: str | Path, allowed: Sequence[str] = ("csv", "xlsx", "json")) -> str:
    """The format named by a file's extension; refuse others with the choices."""
    found = FORMATS.get(Path(path).suffix.lower())
    if found not in allowed:
        raise InputError(f'"{Path(path).suffix or Path(path).name}" is not a format this '
                         f"can write; use {', '.join('.' + a for a in allowed)}", "file",
                         str(path))
    return found


def write_atomically(path: str | Path, write: Callable[[Path], None]) -> Path:
    """Call ``write(temporary_path)``, then move the result to ``path``."""
    path = Path(path)
    if path.is_dir():
        raise InputError(f"{path} is a folder; give a file name", "file", str(path))
    if not path.parent.exists():
        raise InputError(f"the folder {path.parent} does not exist", "file", str(path))
    tmp = path.with_name(path.name + ".part")
    try:
        write(tmp)
        os.replace(tmp, path)
    except BaseException:
        tmp.unlink(missing_ok=True)
        raise
    return path


def _cell(value: object) -> object:
    if isinstance(value, float):
        return repr(value)  # every digit, so a re-import gives the same number
    return "" if value is None else value


def write_csv(path: str | Path, rows: Sequence[Sequence[object]]) -> Path:
    def write(tmp: Path) -> None:
        with open(tmp, "w", newline="", encoding="utf-8") as fh:
            writer = csv.writer(fh)
            for row in rows:
                writer.writerow([_cell(c) for c in row])
    return write_atomically(path, write)


def write_xlsx(path: str | Path, sheets: Sequence[tuple[str, Sequence[Sequence[object]]]],
               header_rows: int = 1) -> Path:
    """A workbook with one sheet per (title, rows); the header rows bold and frozen."""
    def write(tmp: Path) -> None:
        import openpyxl
        from openpyxl.styles import Font

        book = openpyxl.Workbook()
        book.remove(book.active)
        for title, rows in sheets:
            sheet = book.create_sheet(title[:31])
            widths: dict[int, int] = {}
            for row in rows:
                sheet.append([None if c is None or c == "" else c for c in row])
                for i, c in enumerate(row):
                    widths[i] = max(widths.get(i, 8), min(60, len(str(c)) + 2))
            for r in range(1, min(header_rows, sheet.max_row) + 1):
                for cell in sheet[r]:
                    cell.font = Font(bold=True)
            sheet.freeze_panes = sheet.cell(row=header_rows + 1, column=1)
            for i, w in widths.items():
                sheet.column_dimensions[openpyxl.utils.get_column_letter(i + 1)].width = w
        book.save(tmp)
    return write_atomically(path, write)


def json_safe(value: object) -> object:
    """Plain JSON types: numpy arrays and scalars as lists and numbers, NaN and inf as null
    (JSON has no NaN; a reader must not see the word)."""
    if hasattr(value, "tolist") and not isinstance(value, (str, bytes)):
        value = value.tolist()
    if isinstance(value, float) and not math.isfinite(value):
        return None
    if isinstance(value, dict):
        return {str(k): json_safe(v) for k, v in value.items()}
    if isinstance(value, (list, tuple)):
        return [json_safe(v) for v in value]
    return value


def write_json(path: str | Path, payload: dict) -> Path:
    def write(tmp: Path) -> None:
        with open(tmp, "w", encoding="utf-8") as fh:
            json.dump(json_safe(payload), fh, indent=2, allow_nan=False)
            fh.write("\n")
    return write_atomically(path, write)
