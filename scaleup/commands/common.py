"""Helpers every command module shares: JSON output, readable tables, quantity options."""

from __future__ import annotations

import json
import math
from collections.abc import Iterable, Sequence
from typing import Any

import click


def _plain(value: Any) -> Any:
    """Make numpy scalars/arrays and non-finite floats JSON-safe (NaN and inf become null)."""
    if hasattr(value, "tolist") and not isinstance(value, (str, bytes)):
        value = value.tolist()
    if isinstance(value, float):
        return value if math.isfinite(value) else None
    if isinstance(value, dict):
        return {str(k): _plain(v) for k, v in value.items()}
    if isinstance(value, (list, tuple)):
        return [_plain(v) for v in value]
    if hasattr(value, "item"):
        return _plain(value.item())
    return value


def emit_json(payload: dict) -> None:
    """Print exactly one JSON object on stdout."""
    click.echo(json.dumps(_plain(payload), indent=2, allow_nan=False))


def print_table(rows: Iterable[Sequence[Any]], headers: Sequence[str], title: str | None = None,
                footer: str | None = None) -> None:
    """Print a readable table (rich) with the given headers; cells are strings already."""
    from rich.console import Console
    from rich.table import Table
    from rich.text import Text

    # cells are plain text: "speed [rpm]" must not be read as rich markup
    table = Table(title=Text(title) if title else None, show_lines=False, header_style="bold")
    for h in headers:
        table.add_column(Text(h), overflow="fold")
    for r in rows:
        table.add_row(*[Text("" if c is None else str(c)) for c in r])
    import sys

    # piped output is not wrapped to 80 columns: a file or a pager gets the whole table
    console = Console(highlight=False, soft_wrap=False,
                      width=None if sys.stdout.isatty() else 200)
    console.print(table)
    if footer:
        console.print(footer, markup=False)


def print_pairs(pairs: Iterable[tuple[str, Any]], title: str | None = None) -> None:
    """Print label/value pairs as a two-column table."""
    print_table([(k, v) for k, v in pairs], ["quantity", "value"], title=title)


def print_notes(warnings: Iterable[str] = (), cautions: Iterable[str] = ()) -> None:
    """Print warnings and cautions below a table (on stdout, plainly)."""
    for w in warnings:
        click.echo(f"warning: {w}")
    for c in cautions:
        click.echo(f"caution: {c}")


json_option = click.option("--json", "as_json", is_flag=True,
                           help="Print one JSON object with SI values instead of a table.")
