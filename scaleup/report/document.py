"""A report as plain blocks (paragraphs, tables, figures, lists) that HTML and Markdown render.

Sections are built once from the study; each renderer only lays them out, so the HTML page
and the Markdown file say the same thing. A table cell keeps the SI value it shows (and the
result key it came from), so the HTML can carry it for checking and copying.
"""

from __future__ import annotations

from dataclasses import dataclass, field

from scaleup import units
from scaleup.store.keyunits import kind_of, lab_value, unit_label


@dataclass(frozen=True)
class Cell:
    """A table cell: the text shown, and the result key and SI value it shows (if any)."""

    text: str
    key: str | None = None
    si: float | None = None


@dataclass(frozen=True)
class Table:
    headers: list[str]
    rows: list[list[Cell]]
    caption: str = ""


@dataclass(frozen=True)
class Paragraph:
    text: str


@dataclass(frozen=True)
class Figure:
    svg: str
    caption: str
    name: str


@dataclass(frozen=True)
class Items:
    """A list; ``kind`` is "plain", "warning" or "caution" (styled in HTML)."""

    entries: list[str]
    kind: str = "plain"


@dataclass(frozen=True)
class Code:
    """Preformatted text (the inputs as JSON)."""

    text: str
    summary: str = ""


@dataclass
class Section:
    id: str
    title: str
    blocks: list = field(default_factory=list)

    def add(self, block) -> Section:
        self.blocks.append(block)
        return self


def number(value) -> str:
    """Four significant figures, plainly; "-" for a missing value."""
    if value is None:
        return "-"
    if isinstance(value, bool):
        return "yes" if value else "no"
    if isinstance(value, (int, float)):
        return units.sig(float(value))
    return str(value)


def shown(key: str, value, *, with_unit: bool = False) -> Cell:
    """A result value as a cell in its lab unit (key endings say the unit)."""
    kind = kind_of(key)
    if isinstance(value, list) and value and all(isinstance(v, (int, float)) or v is None
                                                 for v in value):
        text = " to ".join(number(lab_value(v, kind) if kind else v) for v in value)
        unit = unit_label(kind) if kind else ""
        return Cell(f"{text} {unit}".strip() if with_unit else text, key, None)
    if isinstance(value, list):
        return Cell("; ".join(str(v) for v in value) or "none", key, None)
    if isinstance(value, dict):
        return Cell(", ".join(f"{k} {number(v)}" for k, v in value.items()), key, None)
    if kind is None or not isinstance(value, (int, float)) or isinstance(value, bool):
        si = float(value) if isinstance(value, (int, float)) and not isinstance(value, bool) \
            else None
        return Cell(number(value), key, si)
    text = number(lab_value(value, kind))
    return Cell(f"{text} {unit_label(kind)}" if with_unit else text, key, float(value))


def label(key: str) -> str:
    """A result key as words for people: ``gassed_power_per_volume_w_m3`` -> "gassed power
    per volume"."""
    from scaleup.store.keyunits import base_name

    words = [_WORDS.get(w, w) for w in base_name(key).split("_")]
    return " ".join(words).strip()


_WORDS = {"pi95": "95 % prediction interval", "kla": "kLa", "otr": "OTR", "our": "OUR",
          "do": "DO", "o2": "O2", "lm": "log-mean", "dt": "dT", "u": "U"}


def unit_of(key: str) -> str:
    return unit_label(kind_of(key))
