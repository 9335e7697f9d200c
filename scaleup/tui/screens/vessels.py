"""Screen 2, Vessels: the geometry of each vessel, drawn to scale beside its numbers."""

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
from scaleup.tui.widgets.form import FormField, RecordForm, TableForm
from scaleup.tui.widgets.sketch import legend, sketch

SECOND = "2nd "  # prefix of the optional second impeller's fields in the add form


# column headers of the impeller table
HEADERS = {"impeller_type": "type", "impeller_diameter_m": "D", "clearance_m": "C",
           "blade_count": "blades", "blade_width_m": "blade w", "power_number_measured": "Np"}


def impeller_key(position: int, spec: F.Field) -> str:
    """The form key of one impeller field, named as the service layer names its problems
    ("impeller 2 clearance"), so each problem shows under its own field."""
    return f"impeller {position} {spec.label.removeprefix('impeller ')}"


def typed_part(vessel: dict, spec: F.Field, value: object) -> str:
    """A stored value of an impeller or sparger as typed: lengths in mm in a pilot vessel."""
    small = spec.kind == "length" and vessel["tank_diameter_m"] < 2
    return fmt.typed(value, spec.kind, "mm" if small else None)


def _ratio(a: float | None, b: float | None) -> str:
    return fmt.lab(a / b, "fraction", digits=3) if a and b else "-"


def facts(v: dict) -> Table:
    """The vessel's numbers, with the ratios an engineer checks first."""
    T, H = v["tank_diameter_m"], v["liquid_height_m"]
    table = Table.grid(padding=(0, 1))
    table.add_column(style="dim", no_wrap=True)
    table.add_column(no_wrap=True)
    table.add_column(style="dim", no_wrap=True)
    table.add_row("T tank", fmt.quantity(T, "length", "mm" if T < 2 else None), "")
    table.add_row("H liquid", fmt.quantity(H, "length"), f"H/T {_ratio(H, T)}")
    table.add_row("V working", fmt.quantity(v["working_volume_m3"], "volume"),
                  fmt.quantity(v["working_volume_m3"], "volume", "m**3").replace("m**3", "m3"))
    table.add_row("bottom", v.get("bottom_shape") or "flat", "")
    table.add_row("baffles", str(v.get("baffle_count") or 0),
                  f"w/T {_ratio(v.get('baffle_width_m'), T)}")
    table.add_row("p head", fmt.quantity(v.get("head_pressure_pa"), "pressure", digits=3),
                  "absolute")
    for i, imp in enumerate(v.get("impellers") or [], start=1):
        D = imp["impeller_diameter_m"]
        table.add_row(f"impeller {i}", imp["impeller_type"],
                      f"{imp.get('blade_count') or '?'} blades")
        table.add_row("  D", fmt.quantity(D, "length", digits=3), f"D/T {_ratio(D, T)}")
        table.add_row("  C", fmt.quantity(imp["clearance_m"], "length", digits=3),
                      f"C/T {_ratio(imp['clearance_m'], T)}")
    s = v.get("sparger")
    if s:
        table.add_row("sparger", s["sparger_type"], f"{s.get('orifice_count') or '?'} holes")
        table.add_row("  diameter", fmt.quantity(s.get("sparger_diameter_m"), "length",
                                                 digits=3),
                      f"/D {_ratio(s.get('sparger_diameter_m'), (v.get('impellers') or [{}])[0].get('impeller_diameter_m'))}")
        table.add_row("  height", fmt.quantity(s.get("sparger_height_m"), "length", digits=3),
                      "")
    if v.get("jacket_area_m2"):
        table.add_row("jacket", fmt.quantity(v["jacket_area_m2"], "area", digits=3),
                      fmt.quantity(v.get("jacket_u_w_m2_k"), "heat_transfer_coefficient",
                                   digits=3))
    if v.get("coil_area_m2"):
        table.add_row("coil", fmt.quantity(v["coil_area_m2"], "area", digits=3),
                      fmt.quantity(v.get("coil_u_w_m2_k"), "heat_transfer_coefficient",
                                   digits=3))
    if v.get("motor_power_limit_w"):
        table.add_row("motor", fmt.quantity(v["motor_power_limit_w"], "power", digits=3),
                      "rated")
    if v.get("notes"):
        table.add_row("notes", Text(v["notes"]), "")
    return table


class VesselsScreen(WorkScreen):
    MODE = "vessels"
    TITLE = "Vessels"
    BINDINGS = [
        Binding("a", "add", "add vessel", id="add"),
        Binding("e", "edit", "edit", id="edit"),
        Binding("i", "impellers", "impellers", id="impellers"),
        Binding("s", "sparger", "sparger", id="sparger"),
        Binding("x,delete", "delete", "delete", id="delete"),
        Binding("u", "app.undo", "undo", id="undo-here"),
        Binding("r", "runs", "its runs", id="runs"),
    ]

    def __init__(self):
        super().__init__()
        self.vessel_rows: list[dict] = []

    def body(self) -> ComposeResult:
        with Horizontal():
            with Vertical(classes="list-pane"):
                yield OptionList(id="vessel-list", classes="record-list")
                with VerticalScroll(id="vessel-facts"):
                    yield Static("", id="vessel-facts-text")
            yield Static("", id="vessel-sketch")

    def on_mount(self) -> None:
        self.refresh_list()
        self.query_one("#vessel-list").focus()

    def on_screen_resume(self) -> None:
        self.refresh_list()

    def refresh_list(self, select: str | None = None) -> None:
        options = self.query_one("#vessel-list", OptionList)
        keep = select or self.current_name()
        with self.store_lock:
            self.vessel_rows = self.campaign.vessels()
        options.clear_options()
        for v in self.vessel_rows:
            label = Text(v["name"], style="bold")
            label.append(f"  {fmt.quantity(v['working_volume_m3'], 'volume', digits=3)}",
                         style="dim")
            options.add_option(Option(label, id=v["name"]))
        names = [v["name"] for v in self.vessel_rows]
        if names:
            options.highlighted = names.index(keep) if keep in names else 0
        self.show_current()

    def current_name(self) -> str | None:
        options = self.query_one("#vessel-list", OptionList)
        if options.highlighted is None or not self.vessel_rows:
            return None
        return options.get_option_at_index(options.highlighted).id

    def current(self) -> dict | None:
        name = self.current_name()
        return next((v for v in self.vessel_rows if v["name"] == name), None)

    @on(OptionList.OptionHighlighted, "#vessel-list")
    def _moved(self, event) -> None:
        self.show_current()

    def on_resize(self, event) -> None:
        self.show_current()

    def show_current(self) -> None:
        v = self.current()
        drawing = self.query_one("#vessel-sketch", Static)
        if v is None:
            drawing.update(Text("no vessels yet: press a to add one", style="dim"))
            self.query_one("#vessel-facts-text", Static).update("")
            return
        height = max(self.size.height - 6, 10)
        width = max(min(int(height * 1.6), 60), 24)
        lines = sketch(v, width, height)
        caption = Text(f"{v['name']} to scale", style="bold")
        drawing.update(Group(caption, *lines, legend()))
        self.query_one("#vessel-facts-text", Static).update(Group(
            Text(v["name"], style="bold"), facts(v)))

    # ---- changes -------------------------------------------------------------------------
    def action_add(self) -> None:
        like = self.current()
        lines = [FormField(spec) for spec in F.VESSEL]
        first = (like or {}).get("impellers") or [{}]
        for spec in F.IMPELLER:
            text = fmt.typed(first[0].get(spec.column), spec.kind) if like else ""
            lines.append(FormField(spec, text if spec.column == "impeller_type" else ""))
        for spec in F.IMPELLER[:3]:
            lines.append(FormField(spec, "", "optional", name=SECOND + spec.label))
        for spec in F.SPARGER:
            lines.append(FormField(spec))

        def save(form: RecordForm) -> str:
            values = {k: v for k, v in form.values().items() if v}
            vessel = {k: v for k, v in values.items() if k in {s.label for s in F.VESSEL}}
            impellers = [{k: v for k, v in values.items() if k in {s.label for s in F.IMPELLER}}]
            second = {k[len(SECOND):]: v for k, v in values.items() if k.startswith(SECOND)}
            if second:
                impellers.append(second)
            sparger = {k: v for k, v in values.items() if k in {s.label for s in F.SPARGER}}
            with self.store_lock:
                self.campaign.add_vessel(vessel, [i for i in impellers if i], sparger or None)
            return vessel["name"]

        from scaleup.hydro.impellers import impeller_types

        intro = ("Give the liquid height or the working volume. Impeller types: "
                 + ", ".join(impeller_types()) + ". Lengths take mm, m, in.")
        self.app.push_screen(RecordForm("add a vessel", lines, save, intro=intro),
                             self._saved)

    def action_edit(self) -> None:
        v = self.current()
        if v is None:
            return
        lines = [FormField(spec, fmt.typed(v.get(spec.column), spec.kind)) for spec in F.VESSEL]

        def save(form: RecordForm) -> str:
            changes = form.changes()
            if changes:
                with self.store_lock:
                    self.campaign.edit_vessel(v["name"], changes,
                                              expected_version=v["row_version"])
            return changes.get("name", v["name"])

        intro = ("Geometry of the shell (i edits the impellers, s the sparger). "
                 "Change the height and the volume follows (or the other way round).")
        self.app.push_screen(RecordForm(f"edit vessel {v['name']}", lines, save, intro=intro),
                             self._saved)

    def action_impellers(self) -> None:
        v = self.current()
        if v is None:
            return
        stored = v.get("impellers") or []
        unit = "mm" if v["tank_diameter_m"] < 2 else "m"
        headers = [f"{HEADERS[spec.column]} {unit}" if spec.kind == "length"
                   else HEADERS[spec.column] for spec in F.IMPELLER]
        rows = []
        for i, imp in enumerate([*stored, {}], start=1):  # and a spare row to add one
            spare = "add one" if not imp else ""
            rows.append((str(i), [FormField(spec, typed_part(v, spec, imp.get(spec.column)),
                                            spare if spec.column == "impeller_type" else "",
                                            name=impeller_key(i, spec))
                                  for spec in F.IMPELLER]))

        def save(form: RecordForm) -> str:
            values = form.values()
            impellers = []
            for i in range(1, len(rows) + 1):
                typed = {spec.label: values[impeller_key(i, spec)] for spec in F.IMPELLER}
                if any(typed.values()):  # an impeller left wholly empty is not there
                    impellers.append({k: t for k, t in typed.items() if t})
            with self.store_lock:
                self.campaign.set_impellers(v["name"], impellers,
                                            expected_version=v["row_version"])
            return v["name"]

        from scaleup.hydro.impellers import impeller_types

        intro = ("Lowest impeller first; C is its height above the bottom; Np a measured "
                 "power number (else the catalogue's). Empty a row to remove that impeller, "
                 "fill the spare row to add one. Types: " + ", ".join(impeller_types()) + ".")
        self.app.push_screen(TableForm(f"impellers of {v['name']}", headers, rows, save,
                                       intro=intro), self._saved)

    def action_sparger(self) -> None:
        v = self.current()
        if v is None:
            return
        sparger = v.get("sparger") or {}
        lines = [FormField(spec, typed_part(v, spec, sparger.get(spec.column)))
                 for spec in F.SPARGER]

        def save(form: RecordForm) -> str:
            values = {k: t for k, t in form.values().items() if t}
            with self.store_lock:
                self.campaign.set_sparger(v["name"], values or None,
                                          expected_version=v["row_version"])
            return v["name"]

        intro = ("Height is above the vessel bottom. Empty every field to remove the "
                 "sparger.")
        self.app.push_screen(RecordForm(f"sparger of {v['name']}", lines, save, intro=intro),
                             self._saved)

    def _saved(self, name: str | None) -> None:
        if name:
            self.say(f"saved vessel {name}")
            self.refresh_list(name)

    def action_delete(self) -> None:
        v = self.current()
        if v is None:
            return
        try:
            with self.store_lock:
                self.campaign.delete_vessel(v["name"])
        except InputError as exc:
            self.say(str(exc), error=True)
            return
        self.say(f"deleted vessel {v['name']} (u undoes)")
        self.refresh_list()

    @on(ChangeUndone)
    def _changed(self, message) -> None:
        self.refresh_list()

    def action_runs(self) -> None:
        v = self.current()
        if v is None:
            return
        self.app.runs_filter = f"vessel = '{v['name']}'"
        self.app.action_go("runs")
