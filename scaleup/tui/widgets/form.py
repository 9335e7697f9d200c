"""A modal form built from the field specs of :mod:`scaleup.fields`.

Each field accepts what a person types, units included ("450 rpm", "1 vvm", "30 degC"). A
field is checked when you leave it, and again when you save; the service layer has the last
word, and every problem it names is shown under its own field before anything is stored.
"""

from __future__ import annotations

import re
from collections.abc import Callable, Sequence
from dataclasses import dataclass
from typing import Any

from rich.text import Text
from textual import on
from textual.app import ComposeResult
from textual.binding import Binding
from textual.containers import Horizontal, Vertical, VerticalScroll
from textual.screen import ModalScreen
from textual.suggester import SuggestFromList
from textual.widgets import Input, Label, Static

from scaleup import fields as F
from scaleup.errors import InputError


@dataclass(frozen=True)
class FormField:
    """One line of a form: the spec, what it holds now, and a note for when it is empty."""

    spec: F.Field
    text: str = ""
    empty_note: str = ""
    name: str = ""  # key in the values handed to ``save``; the spec's label by default
    # reads the typed text (raising InputError) where the spec alone cannot, e.g. "NaCl 0.5 mol/L"
    check: Callable[[str], object] | None = None

    @property
    def key(self) -> str:
        return self.name or self.spec.label


def _dom_id(key: str) -> str:
    return re.sub(r"[^a-z0-9_-]", "-", key.lower())


def unit_hint(spec: F.Field, note: str = "") -> str:
    """What the unit column of a form says: the lab unit and the accepted range."""
    parts = []
    if spec.kind == "gas_flow":
        parts.append("NL/min, Nm3/h, vvm or mol/s")
    elif spec.unit and spec.unit != "-":
        parts.append(spec.unit)
    rng = spec.range_text()
    if rng and not spec.choices:
        parts.append(rng)
    if spec.choices:
        parts.append(" | ".join(spec.choices))
    if note:
        parts.append(note)
    return " · ".join(parts)


def split_problems(message: str, keys: Sequence[str]) -> tuple[dict[str, str], list[str]]:
    """Share the problems of one InputError message among the fields they name.

    The service layer joins problems with "; " and starts each with the field's label.
    """
    by_field: dict[str, str] = {}
    general: list[str] = []
    ordered = sorted(keys, key=len, reverse=True)  # "kla stderr" before "kla"
    for part in (p.strip() for p in message.split("; ")):
        if not part:
            continue
        owner = next((k for k in ordered if part.lower().startswith(k.lower() + ":")), None)
        if owner is None:
            general.append(part)
        else:
            by_field[owner] = (by_field[owner] + "; " if owner in by_field else "") + \
                part[len(owner) + 1:].strip()
    return by_field, general


class RecordForm(ModalScreen[Any]):
    """Add or edit one record. ``save(form)`` stores it (reading ``form.values()`` or
    ``form.changes()``) and returns what the form is dismissed with, or raises ``InputError``."""

    BINDINGS = [
        Binding("ctrl+s", "save", "save", id="save"),
        Binding("escape", "cancel", "cancel", id="cancel"),
        Binding("down", "app.focus_next", "next field", show=False, id="next"),
        Binding("up", "app.focus_previous", "previous field", show=False, id="previous"),
    ]
    TITLE = "form"

    def __init__(self, title: str, lines: Sequence[FormField],
                 save: Callable[[RecordForm], Any], *, intro: str = "",
                 context: Callable[[dict[str, str]], dict] | None = None):
        super().__init__()
        self.form_title = title
        self.lines = list(lines)
        self.save = save
        self.intro = intro
        self.read_context = context or (lambda values: {})
        self.by_key = {line.key: line for line in self.lines}
        self.by_dom = {_dom_id(line.key): line for line in self.lines}

    def compose(self) -> ComposeResult:
        with Vertical(id="form-box"):
            yield Label(Text(self.form_title, style="bold"), id="form-title")
            if self.intro:
                yield Static(Text(self.intro), id="form-intro")
            with VerticalScroll(id="form-fields"):
                for line in self.lines:
                    spec, dom = line.spec, _dom_id(line.key)
                    with Horizontal(classes="form-row"):
                        yield Label(Text(line.key + (" *" if spec.required else "")),
                                    classes="form-label")
                        suggester = SuggestFromList(spec.choices, case_sensitive=False) \
                            if spec.choices else None
                        yield Input(line.text, placeholder=spec.help[:60] or spec.label,
                                    id=f"in-{dom}", suggester=suggester, compact=True,
                                    select_on_focus=False)
                        yield Label(Text(unit_hint(spec, line.empty_note), style="dim"),
                                    classes="form-unit")
                    yield Static("", id=f"err-{dom}", classes="form-error", markup=False)
            yield Static("", id="form-general", classes="form-error", markup=False)
            yield Static("", id="form-hint", markup=False)
            yield Static(Text("ctrl+s save · esc cancel · tab/↓ next field · * required",
                              style="dim"), id="form-keys")

    def on_mount(self) -> None:
        for error in self.query(".form-error"):
            error.display = False
        self.query(Input).first().focus()

    # ---- reading -------------------------------------------------------------------------
    def values(self) -> dict[str, str]:
        """What is typed now in every field (empty ones as ""), keyed by field."""
        return {line.key: self.query_one(f"#in-{dom}", Input).value.strip()
                for dom, line in self.by_dom.items()}

    def changes(self) -> dict[str, str]:
        """The fields whose text differs from what the form opened with."""
        return {k: v for k, v in self.values().items() if v != self.by_key[k].text.strip()}

    def _show(self, dom: str, problem: str | None) -> None:
        err = self.query_one(f"#err-{dom}", Static)
        err.update(Text("✗ " + problem) if problem else "")
        err.display = bool(problem)
        self.query_one(f"#in-{dom}", Input).set_class(bool(problem), "-invalid")

    def check_one(self, dom: str) -> str | None:
        """The problem with one field as typed, or None; shown under the field."""
        line = self.by_dom[dom]
        text = self.query_one(f"#in-{dom}", Input).value.strip()
        problem = None
        if text:
            try:
                if line.check is not None:
                    line.check(text)
                else:
                    F.read(line.spec, text, **self.read_context(self.values()))
            except InputError as exc:
                problem = str(exc).removeprefix(f"{line.spec.label}: ")
            except ValueError as exc:  # a gas flow in vvm before the vessel is known
                problem = str(exc)
        self._show(dom, problem)
        return problem

    @on(Input.Blurred)
    def _left_field(self, event: Input.Blurred) -> None:
        if event.input.id and event.input.id.startswith("in-"):
            self.check_one(event.input.id[3:])

    @on(Input.Changed)
    def _typed(self, event: Input.Changed) -> None:
        # once a field shows a problem, say as soon as it is fixed
        dom = (event.input.id or "")[3:]
        if dom in self.by_dom and event.input.has_class("-invalid"):
            self.check_one(dom)

    @on(Input.Submitted)
    def _next(self, event: Input.Submitted) -> None:
        self.focus_next()

    def on_descendant_focus(self, event) -> None:
        widget = event.widget
        if isinstance(widget, Input) and (widget.id or "").startswith("in-"):
            line = self.by_dom.get(widget.id[3:])
            if line is not None:
                hint = line.spec.help or line.spec.label
                self.query_one("#form-hint", Static).update(Text(f"{line.key}: {hint}",
                                                                 style="italic"))

    # ---- saving --------------------------------------------------------------------------
    def action_save(self) -> None:
        problems = [dom for dom in self.by_dom if self.check_one(dom)]
        general = self.query_one("#form-general", Static)
        if problems:
            general.update(Text(f"{len(problems)} field(s) need a fix; nothing was saved"))
            general.display = True
            self.query_one(f"#in-{problems[0]}", Input).focus()
            return
        try:
            result = self.save(self)
        except InputError as exc:
            by_field, rest = split_problems(str(exc), list(self.by_key))
            for key, problem in by_field.items():
                self._show(_dom_id(key), problem)
            general.update(Text("; ".join(rest) if rest else
                                f"{len(by_field)} field(s) need a fix; nothing was saved"))
            general.display = True
            if by_field:
                self.query_one(f"#in-{_dom_id(next(iter(by_field)))}", Input).focus()
            return
        self.dismiss(result)

    def action_cancel(self) -> None:
        self.dismiss(None)


class TableForm(RecordForm):
    """A form of records that repeat (the impellers of a vessel): one row per record, one
    column per field, what each column holds and its unit in the header. Reading, checking
    and saving are the :class:`RecordForm`'s; a problem is shown under its row, named."""

    def __init__(self, title: str, headers: Sequence[str],
                 rows: Sequence[tuple[str, Sequence[FormField]]],
                 save: Callable[[RecordForm], Any], *, intro: str = ""):
        self.headers = list(headers)
        self.rows = [(label, list(lines)) for label, lines in rows]
        super().__init__(title, [line for _, lines in self.rows for line in lines], save,
                         intro=intro)

    def compose(self) -> ComposeResult:
        with Vertical(id="form-box"):
            yield Label(Text(self.form_title, style="bold"), id="form-title")
            if self.intro:
                yield Static(Text(self.intro), id="form-intro")
            with VerticalScroll(id="form-fields"):
                with Horizontal(classes="table-head"):
                    yield Label("", classes="table-row-label")
                    for n, header in enumerate(self.headers):
                        yield Label(Text(header, style="bold"), classes=f"table-cell col-{n}")
                for label, lines in self.rows:
                    with Horizontal(classes="table-row"):
                        yield Label(Text(label), classes="table-row-label")
                        for n, line in enumerate(lines):
                            yield Input(line.text, placeholder=line.empty_note,
                                        id=f"in-{_dom_id(line.key)}", compact=True,
                                        select_on_focus=False, classes=f"table-cell col-{n}")
                    for line in lines:
                        yield Static("", id=f"err-{_dom_id(line.key)}",
                                     classes="form-error table-error", markup=False)
            yield Static("", id="form-general", classes="form-error", markup=False)
            yield Static("", id="form-hint", markup=False)
            yield Static(Text("ctrl+s save · esc cancel · tab/↓ next field", style="dim"),
                         id="form-keys")

    def _show(self, dom: str, problem: str | None) -> None:
        super()._show(dom, f"{self.by_dom[dom].key}: {problem}" if problem else None)
