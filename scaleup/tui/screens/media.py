"""Screen 3, Media: the liquids of the campaign, their measured properties and salts."""

from __future__ import annotations

from rich.console import Group
from rich.table import Table
from rich.text import Text
from textual import on
from textual.app import ComposeResult
from textual.binding import Binding
from textual.containers import Horizontal, Vertical, VerticalScroll
from textual.widgets import OptionList, Static
from textual.widgets.option_list import Option

from scaleup import fields as F
from scaleup.errors import InputError
from scaleup.tui import format as fmt
from scaleup.tui.messages import ChangeUndone
from scaleup.tui.screens.base import WorkScreen
from scaleup.tui.widgets.form import FormField, RecordForm

SALTS = F.Field("salts", "salts", "text",
                help="Dissolved salts with concentrations, e.g. NaCl 0.5 mol/L, Na2SO4 20 mmol/L")
SALT_LINE = F.Field("salt", "salt", "text",
                    help="e.g. KCl 0.1 mol/L")


def read_salts(text: str) -> dict[str, str]:
    """``"NaCl 0.5 mol/L, Na2SO4 0.2 mol/L"`` -> {"NaCl": "0.5 mol/L", ...}."""
    salts = {}
    for part in (p.strip() for p in text.split(",")):
        if not part:
            continue
        name, _, amount = part.partition(" ")
        if not amount.strip():
            raise InputError(f'"{part}" needs a concentration after the salt, e.g. '
                             '"NaCl 0.5 mol/L"', "salts", part)
        salts[name] = amount.strip()
    return salts


def check_salt_line(text: str) -> None:
    """Refuse a salt line whose concentration is not a molar one (shown under the line)."""
    from scaleup import units

    for salt, amount in read_salts(text).items():
        if units.parse(amount, "concentration", f"salt {salt}") < 0:
            raise InputError(f'"{amount}" is negative', f"salt {salt}", amount)


def facts(m: dict) -> Table:
    table = Table.grid(padding=(0, 1))
    table.add_column(style="dim", no_wrap=True)
    table.add_column(no_wrap=True)
    table.add_column(style="dim")
    table.add_row("coalescence", m.get("coalescence") or "-", "")
    table.add_row("density", fmt.quantity(m.get("density_kg_m3"), "density"),
                  "" if m.get("density_kg_m3") else "water at the run temperature")
    table.add_row("viscosity", fmt.quantity(m.get("viscosity_pa_s"), "viscosity", digits=3),
                  "" if m.get("viscosity_pa_s") else "water at the run temperature")
    table.add_row("surface tension", fmt.quantity(m.get("surface_tension_n_m"),
                                                  "surface_tension", digits=3),
                  "" if m.get("surface_tension_n_m") else "water at the run temperature")
    for salt, conc in (m.get("salts") or {}).items():
        table.add_row(f"salt {salt}", fmt.quantity(conc, "concentration", digits=3),
                      fmt.quantity(conc, "concentration", "mol/L", digits=3))
    if m.get("notes"):
        table.add_row("notes", Text(m["notes"]), "")
    return table


class MediaScreen(WorkScreen):
    MODE = "media"
    TITLE = "Media"
    BINDINGS = [
        Binding("a", "add", "add medium", id="add"),
        Binding("e", "edit", "edit", id="edit"),
        Binding("s", "salts", "salts", id="salts"),
        Binding("x,delete", "delete", "delete", id="delete"),
        Binding("u", "app.undo", "undo", id="undo-here"),
        Binding("r", "runs", "its runs", id="runs"),
    ]

    def __init__(self):
        super().__init__()
        self.media_rows: list[dict] = []

    def body(self) -> ComposeResult:
        with Horizontal():
            with Vertical(classes="list-pane"):
                yield OptionList(id="medium-list", classes="record-list")
            with VerticalScroll(classes="record-pane"):
                yield Static("", id="medium-facts")

    def on_mount(self) -> None:
        self.refresh_list()
        self.query_one("#medium-list").focus()

    def on_screen_resume(self) -> None:
        self.refresh_list()

    def refresh_list(self, select: str | None = None) -> None:
        options = self.query_one("#medium-list", OptionList)
        keep = select or self.current_name()
        with self.store_lock:
            self.media_rows = self.campaign.media()
        options.clear_options()
        for m in self.media_rows:
            label = Text(m["name"], style="bold")
            label.append(f"  {m.get('coalescence') or ''}", style="dim")
            options.add_option(Option(label, id=m["name"]))
        names = [m["name"] for m in self.media_rows]
        if names:
            options.highlighted = names.index(keep) if keep in names else 0
        self.show_current()

    def current_name(self) -> str | None:
        options = self.query_one("#medium-list", OptionList)
        if options.highlighted is None or not self.media_rows:
            return None
        return options.get_option_at_index(options.highlighted).id

    def current(self) -> dict | None:
        name = self.current_name()
        return next((m for m in self.media_rows if m["name"] == name), None)

    @on(OptionList.OptionHighlighted, "#medium-list")
    def _moved(self, event) -> None:
        self.show_current()

    def show_current(self) -> None:
        m = self.current()
        target = self.query_one("#medium-facts", Static)
        if m is None:
            target.update(Text("no media yet: press a to add one", style="dim"))
            return
        target.update(Group(Text(m["name"], style="bold"), facts(m)))

    def action_add(self) -> None:
        lines = [FormField(spec) for spec in F.MEDIUM] + [FormField(SALTS)]

        def save(form: RecordForm) -> str:
            values = {k: v for k, v in form.values().items() if v}
            salts = read_salts(values.pop("salts", ""))
            with self.store_lock:
                self.campaign.add_medium(values, salts)
            return values["name"]

        intro = ("Leave density, viscosity or surface tension empty to use water's at the run "
                 "temperature.")
        self.app.push_screen(RecordForm("add a medium", lines, save, intro=intro), self._saved)

    def action_edit(self) -> None:
        m = self.current()
        if m is None:
            return
        lines = [FormField(spec, fmt.typed(m.get(spec.column), spec.kind)) for spec in F.MEDIUM]

        def save(form: RecordForm) -> str:
            changes = form.changes()
            if changes:
                with self.store_lock:
                    self.campaign.edit_medium(m["name"], changes,
                                              expected_version=m["row_version"])
            return changes.get("name", m["name"])

        self.app.push_screen(RecordForm(f"edit medium {m['name']}", lines, save,
                                        intro="s edits the salts."), self._saved)

    def action_salts(self) -> None:
        m = self.current()
        if m is None:
            return
        stored = [f"{salt} {fmt.typed(conc, 'concentration', 'mol/L')}"
                  for salt, conc in (m.get("salts") or {}).items()]
        texts = [*stored, *[""] * max(2, 4 - len(stored))]
        lines = [FormField(SALT_LINE, text, name=f"salt {i}", check=check_salt_line)
                 for i, text in enumerate(texts, start=1)]

        def save(form: RecordForm) -> str:
            salts, line_of = {}, {}
            for key, text in form.values().items():  # each line was read when it was left
                for salt, amount in read_salts(text).items():
                    if salt in salts:
                        raise InputError(f"{salt} is on {line_of[salt]} already", key)
                    salts[salt], line_of[salt] = amount, key
            with self.store_lock:
                self.campaign.set_salts(m["name"], salts, expected_version=m["row_version"])
            return m["name"]

        intro = ("One salt a line with its molar concentration: NaCl 0.5 mol/L, "
                 "Na2SO4 20 mmol/L. Empty a line to remove that salt.")
        self.app.push_screen(RecordForm(f"salts of {m['name']}", lines, save, intro=intro),
                             self._saved)

    def _saved(self, name: str | None) -> None:
        if name:
            self.say(f"saved medium {name}")
            self.refresh_list(name)

    def action_delete(self) -> None:
        m = self.current()
        if m is None:
            return
        try:
            with self.store_lock:
                self.campaign.delete_medium(m["name"])
        except InputError as exc:
            self.say(str(exc), error=True)
            return
        self.say(f"deleted medium {m['name']} (u undoes)")
        self.refresh_list()

    @on(ChangeUndone)
    def _changed(self, message) -> None:
        self.refresh_list()

    def action_runs(self) -> None:
        m = self.current()
        if m is not None:
            self.app.runs_filter = f"medium = '{m['name']}'"
            self.app.action_go("runs")
