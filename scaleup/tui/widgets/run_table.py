"""The runs table: a window of rows over a campaign of any size.

The table holds one page (a few hundred rows); moving past its first or last row asks the
screen for the neighbouring page, so 100,000 runs scroll without ever being read at once.
Values are shown in lab units with the unit in the header, to four significant figures.
"""

from __future__ import annotations

from collections.abc import Callable
from dataclasses import dataclass

from rich.text import Text
from textual.binding import Binding
from textual.message import Message
from textual.widgets import DataTable

from scaleup.tui import format as fmt


@dataclass(frozen=True)
class Column:
    """One column: the run_view column it sorts by, its header, how a row becomes a cell."""

    key: str
    title: str
    cell: Callable[[dict], str]
    numeric: bool = True


def _q(column: str, kind: str, unit: str | None = None, digits: int = 4):
    return lambda row: fmt.lab(row.get(column), kind, unit, digits)


def _date(row: dict) -> str:
    text = (row.get("run_at") or "").replace("T", " ")
    return text[:16]


COLUMNS: tuple[Column, ...] = (
    Column("id", "#\n", lambda r: str(r["id"])),
    Column("vessel", "vessel\n", lambda r: r.get("vessel") or "", numeric=False),
    Column("medium", "medium\n", lambda r: r.get("medium") or "", numeric=False),
    Column("speed_rps", "N\nrpm", _q("speed_rps", "speed")),
    Column("gas_flow_mol_s", "Qg\nNL/min", _q("gas_flow_mol_s", "gas_flow")),
    Column("gas_flow_vvm", "Qg/V\nvvm", _q("gas_flow_vvm", "fraction", digits=3)),
    Column("temperature_k", "T\ndegC", _q("temperature_k", "temperature", digits=3)),
    Column("kla_per_s", "kLa\n1/h", _q("kla_per_s", "kla")),
    Column("kla_stderr_per_s", "±kLa\n1/h", _q("kla_stderr_per_s", "kla", digits=2)),
    Column("n_curves", "DO\ncurves", lambda r: str(r.get("n_curves") or "") or "-"),
    Column("kla_method", "kLa\nfrom", lambda r: r.get("kla_method") or "", numeric=False),
    Column("run_at", "date\n", _date, numeric=False),
    Column("head_pressure_pa", "p head\nbara", _q("head_pressure_pa", "pressure", digits=3)),
    Column("ref", "ref\n", lambda r: r.get("ref") or "", numeric=False),
)
BY_KEY = {c.key: c for c in COLUMNS}


def _label(title: str) -> str:
    name, unit = title.split("\n")
    return f"{name} [{unit}]" if unit else name


SORT_LABELS = {c.key: _label(c.title) for c in COLUMNS}


class RunTable(DataTable):
    """A DataTable that shows one page of runs and asks for the next one at its edges."""

    BINDINGS = [
        Binding("pagedown", "page(1)", "next page", show=False, id="page-down"),
        Binding("pageup", "page(-1)", "previous page", show=False, id="page-up"),
        Binding("home", "ends(-1)", "first run", show=False, id="first"),
        Binding("end", "ends(1)", "last run", show=False, id="last"),
    ]

    @dataclass
    class PageWanted(Message):
        """The cursor ran off the page: ``step`` pages on (or "first" / "last")."""

        step: int
        to_end: bool = False

    def __init__(self, **kwargs):
        super().__init__(cursor_type="row", zebra_stripes=True, header_height=2, **kwargs)
        self.page_offset = 0
        self.total = 0
        self.page_rows: list[dict] = []

    def on_mount(self) -> None:
        for column in COLUMNS:
            self.add_column(Text(column.title, justify="right" if column.numeric else "left"),
                            key=column.key)

    def show_page(self, rows: list[dict], offset: int, total: int, *,
                  cursor: int | None = None) -> None:
        """Replace the rows with one page; ``cursor`` is the row to land on (or keep)."""
        keep = self.cursor_row if cursor is None else cursor
        self.page_offset, self.total, self.page_rows = offset, total, rows
        self.clear()
        for row in rows:
            cells = [Text(c.cell(row), justify="right" if c.numeric else "left",
                          style="" if c.key != "kla_per_s" or row.get("kla_per_s") else "dim")
                     for c in COLUMNS]
            self.add_row(*cells, key=str(row["id"]))
        if rows:
            self.move_cursor(row=max(0, min(keep, len(rows) - 1)), animate=False)

    def current_run(self) -> dict | None:
        if not self.page_rows or self.cursor_row < 0 or self.cursor_row >= len(self.page_rows):
            return None
        return self.page_rows[self.cursor_row]

    # at the edges of the page the cursor asks for more instead of stopping
    def action_cursor_down(self) -> None:
        if self.cursor_row >= len(self.page_rows) - 1 and \
                self.page_offset + len(self.page_rows) < self.total:
            self.post_message(self.PageWanted(1))
            return
        super().action_cursor_down()

    def action_cursor_up(self) -> None:
        if self.cursor_row <= 0 and self.page_offset > 0:
            self.post_message(self.PageWanted(-1))
            return
        super().action_cursor_up()

    def action_page(self, step: int) -> None:
        at_edge = self.cursor_row >= len(self.page_rows) - 1 if step > 0 else self.cursor_row <= 0
        more = (self.page_offset + len(self.page_rows) < self.total) if step > 0 else self.page_offset > 0
        if at_edge and more:
            self.post_message(self.PageWanted(step))
        elif step > 0:
            super().action_page_down()
        else:
            super().action_page_up()

    def action_ends(self, step: int) -> None:
        self.post_message(self.PageWanted(step, to_end=True))
