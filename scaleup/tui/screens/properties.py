"""Screen 7, Properties: water, C* by every method, diffusivity side by side, film basics.

Stateless sums on what is typed on the left; every method that applies is shown, so the
spread between methods is in plain sight rather than hidden behind one default.
"""

from __future__ import annotations

from dataclasses import dataclass

from rich.console import Group
from rich.table import Table
from rich.text import Text
from textual import on, work
from textual.app import ComposeResult
from textual.binding import Binding
from textual.containers import Horizontal, VerticalScroll
from textual.widgets import Input, Label, Static

from scaleup.errors import InputError
from scaleup.tui import format as fmt
from scaleup.tui.messages import ResultComputed
from scaleup.tui.screens.base import WorkScreen


@dataclass(frozen=True)
class Entry:
    key: str
    label: str
    kind: str  # a units kind, or "text"
    default: str
    hint: str


ENTRIES = (
    Entry("temperature", "temperature", "temperature", "30 degC", "degC, K"),
    Entry("pressure", "pressure", "pressure", "1.01325 bara", "absolute; barg converted"),
    Entry("gas", "gas", "text", "O2", "O2 N2 CO2 H2 CH4"),
    Entry("fraction", "gas fraction", "fraction", "0.20946", "mole fraction in dry gas"),
    Entry("salinity", "salinity", "salinity", "0 g/kg", "sea salt, g/kg"),
    Entry("viscosity", "viscosity", "viscosity", "", "medium; water's if empty"),
    Entry("film", "film thickness", "length", "50 um", "film model"),
    Entry("contact", "contact time", "time", "0.05 s", "penetration model"),
    Entry("renewal", "renewal rate", "kla", "20 1/s", "surface renewal"),
)


def read_entries(texts: dict[str, str]) -> tuple[dict, dict[str, str]]:
    """SI values of what is typed, and a problem per field that cannot be read."""
    from scaleup import units

    values, problems = {}, {}
    for e in ENTRIES:
        text = texts.get(e.key, "").strip()
        if not text:
            values[e.key] = None
            continue
        try:
            values[e.key] = text if e.kind == "text" else units.parse(text, e.kind, e.label)
        except InputError as exc:
            problems[e.key] = str(exc).removeprefix(f"{e.label}: ")
    return values, problems


def compute(values: dict) -> dict:
    """Every property the screen shows, each with its source; problems say what failed."""
    from scaleup.props import transport
    from scaleup.props.diffusivity import compare
    from scaleup.props.solubility import saturation, solubility_methods
    from scaleup.props.water import liquid_properties

    T, P = values["temperature"], values["pressure"]
    gas = (values["gas"] or "O2").strip()
    gas = next((g for g in ("O2", "N2", "CO2", "H2", "CH4") if g.lower() == gas.lower()), gas)
    S = values["salinity"] or 0.0
    out: dict = {"problems": []}
    try:
        out["water"] = liquid_properties(T, P, S)
    except (InputError, ValueError) as exc:
        out["problems"].append(f"water: {exc}")
    out["c_star"] = []
    try:
        for method in solubility_methods(gas, T, S):
            out["c_star"].append(saturation(gas, T, P, values["fraction"], salinity=S,
                                            method=method))
    except (InputError, ValueError) as exc:
        out["problems"].append(f"solubility: {exc}")
    viscosity = values["viscosity"]
    try:
        out["diffusivity"] = compare(gas, "water", T, viscosity=viscosity, pressure=P)
    except (InputError, ValueError) as exc:
        out["problems"].append(f"diffusivity: {exc}")
    comparison = out.get("diffusivity")
    if comparison is not None:
        measured = next((e for e in comparison.estimates if e.method == "measured"), None)
        D = (measured or comparison.estimates[0]).diffusivity_m2_s
        out["D_used"] = (D, (measured or comparison.estimates[0]).label)
        models = []
        if values["film"]:
            models.append(("film (Lewis-Whitman)", transport.kl_film_Lewis_Whitman(
                D, values["film"]), f"delta {fmt.quantity(values['film'], 'length', 'um')}"))
        if values["contact"]:
            models.append(("penetration (Higbie)", transport.kl_penetration_Higbie(
                D, values["contact"]), f"t {fmt.quantity(values['contact'], 'time')}"))
        if values["renewal"]:
            models.append(("renewal (Danckwerts)", transport.kl_renewal_Danckwerts(
                D, values["renewal"]), f"s {fmt.lab(values['renewal'], 'fraction')} 1/s"))
        out["kl"] = models
        water = out.get("water")
        if water is not None:
            mu = viscosity or water.viscosity_pa_s
            out["schmidt"] = mu / (water.density_kg_m3 * D)
    return out


def _table(*columns: str) -> Table:
    table = Table(box=None, padding=(0, 1), show_edge=False, header_style="bold")
    for i, name in enumerate(columns):
        # the value column keeps its width; long source notes are the ones cut short
        table.add_column(name, no_wrap=True, overflow="ellipsis",
                         justify="right" if i == 1 else "left", max_width=34 if i == 0 else None,
                         min_width=max(len(name), 9) if i == 1 else None,
                         style="dim" if i == len(columns) - 1 and i > 1 else None)
    return table


def render(out: dict, gas: str) -> Group:
    parts: list = []
    water = out.get("water")
    if water is not None:
        t = _table("water", "value", "source")
        s = water.sources
        t.add_row("density", fmt.quantity(water.density_kg_m3, "density"), s.get("density", ""))
        t.add_row("viscosity", fmt.quantity(water.viscosity_pa_s, "viscosity"),
                  s.get("viscosity", ""))
        t.add_row("surface tension", fmt.quantity(water.surface_tension_n_m, "surface_tension"),
                  s.get("surface_tension", ""))
        t.add_row("vapour pressure", fmt.quantity(water.vapour_pressure_pa, "pressure", "kPa"),
                  s.get("vapour_pressure", ""))
        t.add_row("heat capacity", fmt.quantity(water.heat_capacity_j_kg_k, "specific_heat"),
                  s.get("heat_capacity", ""))
        parts += [t, Text("")]
    if out.get("c_star"):
        t = _table(f"C* of {gas}", "mg/L", "mmol/L", "method, notes")
        for sat in out["c_star"]:
            t.add_row(sat.method, fmt.lab(sat.c_star_mg_l, "fraction"),
                      fmt.lab(sat.c_star_mol_m3, "concentration"),
                      "; ".join(sat.warnings) or f"pO2 {fmt.quantity(sat.partial_pressure_pa, 'pressure', 'kPa')}"
                      if gas == "O2" else "; ".join(sat.warnings))
        parts += [t, Text("")]
    comparison = out.get("diffusivity")
    if comparison is not None:
        t = _table(f"D of {gas} in water", "1e-9 m2/s", "method")
        for e in comparison.estimates:
            measured = e.method == "measured"
            t.add_row(Text(e.label, style="bold" if measured else ""),
                      Text(fmt.lab(e.diffusivity_m2_s * 1e9, "fraction", digits=3),
                           style="bold" if measured else ""),
                      e.source + ("; " + "; ".join(e.warnings) if e.warnings else ""))
        t.add_row(Text("spread", style="italic"),
                  f"{comparison.spread_fraction:.0%}", "(max - min) / mean of the methods")
        parts += [t, Text("")]
    if out.get("kl"):
        D, label = out["D_used"]
        t = _table("kL from D", "1e-4 m/s", "model input")
        for name, kl, note in out["kl"]:
            t.add_row(name, fmt.lab(kl * 1e4, "fraction", digits=3), note)
        if out.get("schmidt"):
            t.add_row("Schmidt number", fmt.lab(out["schmidt"], "fraction", digits=3),
                      "mu / (rho D)")
        parts += [t, Text(f"D used: {label}, {fmt.lab(D * 1e9, 'fraction', digits=3)} "
                          "1e-9 m2/s", style="dim")]
    for problem in out["problems"]:
        parts.append(Text(f"✗ {problem}", style="bold"))
    return Group(*parts)


class PropertiesScreen(WorkScreen):
    MODE = "properties"
    TITLE = "Properties"
    BINDINGS = [
        Binding("ctrl+r", "reset", "defaults", id="reset"),
    ]

    def body(self) -> ComposeResult:
        with Horizontal():
            with VerticalScroll(classes="inputs-pane"):
                yield Static(Text("conditions", style="bold"), classes="section-title")
                for e in ENTRIES:
                    with Horizontal(classes="form-row"):
                        yield Label(Text(e.label), classes="form-label")
                        yield Input(e.default, id=f"prop-{e.key}", compact=True)
                    yield Static(Text(e.hint, style="dim"), classes="hint")
                    yield Static("", id=f"prop-err-{e.key}", classes="form-error", markup=False)
            with VerticalScroll(classes="results-pane"):
                yield Static(Text("working ...", style="dim"), id="prop-results")

    def on_mount(self) -> None:
        for error in self.query(".form-error"):
            error.display = False
        self.query_one("#prop-temperature", Input).focus()
        self.recompute()

    def texts(self) -> dict[str, str]:
        return {e.key: self.query_one(f"#prop-{e.key}", Input).value for e in ENTRIES}

    @on(Input.Changed)
    def _typed(self, event: Input.Changed) -> None:
        self.recompute()

    def recompute(self) -> None:
        values, problems = read_entries(self.texts())
        for e in ENTRIES:
            err = self.query_one(f"#prop-err-{e.key}", Static)
            err.update(Text("✗ " + problems[e.key]) if e.key in problems else "")
            err.display = e.key in problems
        if problems or values["temperature"] is None or values["pressure"] is None:
            return
        self._compute(values)

    @work(thread=True, exclusive=True, group="properties")
    def _compute(self, values: dict) -> None:
        try:
            out = compute(values)
        except (InputError, ValueError) as exc:
            self.post_message(ResultComputed("properties", None, str(exc)))
            return
        self.post_message(ResultComputed("properties", out, None,
                                         {"gas": (values["gas"] or "O2").strip()}))

    @on(ResultComputed)
    def _computed(self, message: ResultComputed) -> None:
        target = self.query_one("#prop-results", Static)
        if message.problem:
            target.update(Text(f"✗ {message.problem}", style="bold"))
            return
        target.update(render(message.result, message.extra["gas"]))

    def action_reset(self) -> None:
        for e in ENTRIES:
            self.query_one(f"#prop-{e.key}", Input).value = e.default
