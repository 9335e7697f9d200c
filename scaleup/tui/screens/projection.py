"""Screen 6, Scale-up: from a pilot run to the production vessel, by rules and by duty."""

from __future__ import annotations

from dataclasses import dataclass, replace

from rich.console import Group
from rich.table import Table
from rich.text import Text
from textual import on, work
from textual.app import ComposeResult
from textual.binding import Binding
from textual.containers import Horizontal, VerticalScroll
from textual.widgets import Input, Label, Static

from scaleup import fields as F
from scaleup.errors import InputError
from scaleup.tui import format as fmt
from scaleup.tui.messages import ResultComputed
from scaleup.tui.screens.base import WorkScreen
from scaleup.tui.widgets.form import FormField, RecordForm

BROKEN = "bold #ffffff on #8a2f22"


@dataclass(frozen=True)
class Entry:
    key: str
    label: str
    default: str
    hint: str


ENTRIES = (
    Entry("run", "pilot run #", "", "a run with a kLa; 1 Runs to find one"),
    Entry("volume", "target volume", "30 m3", "geometrically similar vessel"),
    Entry("vessel", "or vessel", "", "a stored vessel instead"),
    Entry("correlation", "correlation", "", "ctrl+o cycles: default, fits, published"),
    Entry("do", "DO set-point", "20 %", "% of air saturation, or mg/L"),
    Entry("our", "OUR duty", "50 mmol/(L h)", "oxygen demand of the broth"),
    Entry("o2", "O2 in gas", "0.20946", "mole fraction; above 0.21 is enriched"),
    Entry("tip", "max tip speed", "6 m/s", "limit; empty for none"),
    Entry("pv", "max P/V", "", "ungassed, e.g. 3 kW/m3"),
)
# which column of the rules table a broken limit belongs to
MARGIN_COLUMN = {"tip speed": "tip", "duty": "OTR", "critical DO": "OTR", "P/V": "P/V",
                 "motor": "P/V", "superficial velocity": "Qg", "speed": "N", "vvm": "Qg",
                 "flooding margin": "regime", "heat removal": "P/V"}


def read_inputs(texts: dict[str, str]) -> tuple[dict, dict[str, str]]:
    """What the study needs, in SI, and a problem per field that cannot be read."""
    from scaleup import units

    kinds = {"volume": "volume", "our": "rate", "tip": "velocity", "pv": "power_per_volume",
             "o2": "fraction"}
    values, problems = {}, {}
    for key, text in texts.items():
        text = text.strip()
        try:
            if not text:
                values[key] = None
            elif key == "run":
                values[key] = int(text.lstrip("#"))
            elif key == "do":
                values[key] = (float(text.rstrip("% ")), True) if text.endswith("%") else \
                    (units.parse_dissolved_oxygen(text, "DO set-point"), False)
            elif key in kinds:
                values[key] = units.parse(text, kinds[key], key)
            else:
                values[key] = text
        except ValueError as exc:
            problems[key] = str(exc).split(": ", 1)[-1] if isinstance(exc, InputError) else \
                f'"{text}" is not a whole number'
    if values.get("run") is None:
        problems.setdefault("run", "give the pilot run")
    if values.get("volume") is None and values.get("vessel") is None:
        problems.setdefault("volume", "give a target volume or a vessel")
    return values, problems


# "4.68e-04" needs 8 columns; the regime column (None) is the one that gives way
_MIN_WIDTH = {"rule": 11, "P/V": 8, "regime": None}


def rules_table(results: dict) -> Table:
    table = Table(box=None, padding=(0, 1), header_style="bold", show_edge=False)
    heads = [("rule", "", "left"), ("N", "rpm", "right"), ("Qg", "Nm3/h", "right"),
             ("P/V", "kW/m3", "right"), ("tip", "m/s", "right"), ("kLa", "1/h", "right"),
             ("OTR", "mmol/L/h", "right"), ("regime", "", "left")]
    for name, unit, justify in heads:
        # numbers keep their width (a cut number reads as another number); the regime
        # words are the ones shortened on a narrow terminal
        table.add_column(f"{name}\n{unit}", justify=justify, no_wrap=True,
                         min_width=_MIN_WIDTH.get(name, max(len(unit), 5)),
                         overflow="ellipsis")
    for r in results["rules"]:
        if r.get("speed_rps") is None:
            table.add_row(r["rule"], *["-"] * 6, Text(r.get("note") or "no solution",
                                                      style="italic"))
            continue
        broken = {MARGIN_COLUMN.get(k, "") for k, m in (r.get("margins") or {}).items()
                  if m is not None and m < 0}
        cells = {
            "N": fmt.lab(r["speed_rps"], "speed", digits=3),
            "Qg": units_nm3h(r["gas_flow_mol_s"]),
            "P/V": fmt.lab(r["power_per_volume_w_m3"], "power_per_volume", digits=3),
            "tip": fmt.lab(r["tip_speed_m_s"], "velocity", digits=3),
            "kLa": fmt.lab(r["kla_per_s"], "kla", digits=3),
            "OTR": fmt.lab(r["otr_capacity_mol_m3_s"], "rate", digits=3),
            "regime": str(r["regime"]).replace("completely dispersed", "dispersed"),
        }
        row = [Text(("✗ " if r["violations"] else "✓ ") + r["rule"],
                    style="bold" if r["violations"] else "")]
        for key in ("N", "Qg", "P/V", "tip", "kLa", "OTR", "regime"):
            row.append(Text(cells[key] + (" !" if key in broken else ""),
                            style=BROKEN if key in broken else ""))
        table.add_row(*row)
    return table


def broken_text(results: dict) -> Text:
    """The limits each rule breaks, in words (the table marks them with ! and colour)."""
    text = Text()
    for r in results["rules"]:
        if r.get("violations"):
            text.append(f"✗ {r['rule']}: ", style="bold")
            text.append("; ".join(r["violations"]) + "\n")
    return text or Text("✓ every rule stays inside the limits", style="bold")


def units_nm3h(mol_s: float | None) -> str:
    from scaleup import units

    return "-" if mol_s is None else units.sig(units.gas_flow_to(mol_s, "Nm3/h"), 3)


def design_text(d: dict) -> Text:
    text = Text()
    text.append("design for the duty: ", style="bold")
    if not d.get("feasible") or d.get("speed_rps") is None:
        text.append("no speed and gas rate in the window meets it. ", style="bold")
        text.append("; ".join(d.get("infeasibility") or []))
        return text
    text.append(f"N {fmt.quantity(d['speed_rps'], 'speed', digits=3)}, "
                f"Qg {units_nm3h(d['gas_flow_mol_s'])} Nm3/h "
                f"({fmt.lab(d['vvm'], 'fraction', digits=2)} vvm), total power "
                f"{fmt.quantity(d['total_power_w'], 'power', digits=3)} "
                f"(agitator {fmt.quantity(d['agitator_power_w'], 'power', digits=3)}, "
                f"compressor {fmt.quantity(d['compressor_power_w'], 'power', digits=3)})\n")
    p = d.get("probability_meets_duty")
    if p is not None:
        text.append(f"probability of meeting the duty {p:.0%}", style="bold")
        text.append(f" (kLa uncertainty of the correlation, {d.get('n_draws', '?')} draws); "
                    f"binding: {', '.join(d.get('binding_constraints') or []) or 'none'}")
    return text


DESIGN_CONFIDENCE = 0.9  # probability with which the designed vessel meets the duty


class ProjectionScreen(WorkScreen):
    MODE = "scaleup"
    TITLE = "Scale-up"
    # the results have the focus, so the number keys still switch screens; tab reaches the fields
    AUTO_FOCUS = "#proj-results"
    BINDINGS = [
        Binding("f5", "project", "project (or enter)", id="project"),
        Binding("ctrl+o", "correlation", "next correlation", id="correlation"),
        Binding("ctrl+s", "save", "save study", id="save"),
        Binding("ctrl+r", "export", "write report", id="export"),
    ]

    def __init__(self):
        super().__init__()
        self.results: dict | None = None
        self.design: dict | None = None
        self.inputs_used: dict | None = None

    def body(self) -> ComposeResult:
        with Horizontal():
            with VerticalScroll(classes="inputs-pane"):
                yield Static(Text("pilot → production", style="bold"), classes="section-title")
                for e in ENTRIES:
                    with Horizontal(classes="form-row"):
                        yield Label(Text(e.label), classes="form-label")
                        yield Input(e.default, id=f"proj-{e.key}", compact=True)
                    yield Static(Text(e.hint, style="dim"), classes="hint")
                    yield Static("", id=f"proj-err-{e.key}", classes="form-error", markup=False)
                yield Static(Text("tab to the fields · enter or F5 project · ctrl+o correlation"
                                  " · ctrl+s save · ctrl+r report · esc leaves a field",
                                  style="dim"), classes="hint")
            with VerticalScroll(classes="results-pane", id="proj-results"):
                yield Static(Text("type the pilot run and the target, then enter",
                                  style="dim"), id="proj-rules")
                yield Static("", id="proj-design")
                yield Static("", id="proj-map")
                yield Static("", id="proj-notes")

    def on_mount(self) -> None:
        for error in self.query(".form-error"):
            error.display = False
        self._suggest_run()

    def on_screen_resume(self) -> None:
        self._suggest_run()

    def _suggest_run(self) -> None:
        box = self.query_one("#proj-run", Input)
        if box.value:
            return
        with self.store_lock:
            # the largest pilot vessel is the closest to production
            measured = self.campaign.runs("kla is not null", order_by="volume", descending=True,
                                          limit=1)
        if measured:
            box.value = str(measured[0]["id"])

    def texts(self) -> dict[str, str]:
        return {e.key: self.query_one(f"#proj-{e.key}", Input).value for e in ENTRIES}

    @on(Input.Submitted)
    def _submitted(self, event) -> None:
        self.action_project()

    def action_correlation(self) -> None:
        from scaleup.correlate import kla_correlations

        with self.store_lock:
            fits = [f["name"] for f in self.campaign.fits() if f["kind"] == "kla"]
        choices = ["", *fits, *kla_correlations]
        box = self.query_one("#proj-correlation", Input)
        now = box.value.strip()
        box.value = choices[(choices.index(now) + 1) % len(choices)] if now in choices else ""
        self.say(f"correlation: {box.value or 'default (van t Riet for the medium)'}")

    def action_project(self) -> None:
        values, problems = read_inputs(self.texts())
        for e in ENTRIES:
            err = self.query_one(f"#proj-err-{e.key}", Static)
            err.update(Text("✗ " + problems[e.key]) if e.key in problems else "")
            err.display = e.key in problems
        if problems:
            return
        self.query_one("#proj-rules", Static).update(Text("projecting ...", style="dim"))
        self._project(values)

    @work(thread=True, exclusive=True, group="projection")
    def _project(self, values: dict) -> None:
        from scaleup.hydro.geometry import scale_to_volume
        from scaleup.scaling.evaluate import Limits, Process

        do, percent = values["do"] or (20.0, True)
        process = Process(do_setpoint=do, do_percent=percent, our=values["our"],
                          o2_fraction=values["o2"] or 0.20946)
        limits = Limits(max_tip_speed=values["tip"], max_power_per_volume=values["pv"])
        target = {"to_vessel": values["vessel"]} if values["vessel"] else \
            {"to_volume": values["volume"]}
        try:
            with self.store_lock:
                results = self.campaign.scale_study({"run_id": values["run"]}, **target,
                                                    correlation=values["correlation"],
                                                    process=process, limits=limits)
                design = None
                if values["our"]:
                    point, liquid = self.campaign.scale_pilot(run_id=values["run"])
                    vessel = values["vessel"] or scale_to_volume(point.vessel, values["volume"])
                    # the design must meet the duty with 90 % probability, as `scaleup
                    # design` does by default; the rule table shows medians
                    design = self.campaign.design_study(
                        vessel=vessel, liquid=liquid, correlation=values["correlation"],
                        process=replace(process, confidence=DESIGN_CONFIDENCE), limits=limits,
                        grid=(28, 16), map_draws=300, risk_draws=4000)
        except (InputError, ValueError) as exc:
            self.post_message(ResultComputed("projection", None, str(exc)))
            return
        self.post_message(ResultComputed("projection", results, None,
                                         {"design": design, "inputs": values,
                                          "target": target}))

    @on(ResultComputed)
    def _projected(self, message: ResultComputed) -> None:
        rules = self.query_one("#proj-rules", Static)
        if message.problem:
            rules.update(Text(f"✗ {message.problem}", style="bold"))
            return
        r = self.results = message.result
        self.design = message.extra["design"]
        self.inputs_used = message.extra
        head = Text()
        head.append(f"pilot {fmt.quantity(r['pilot_volume_m3'], 'volume', digits=3)} → "
                    f"{fmt.quantity(r['target_volume_m3'], 'volume', 'm**3', digits=3).replace('m**3', 'm3')}"
                    f" (scale factor {r['scale_factor']:.3g} in length), gas by "
                    f"{r['gas_rule_description']}\n", style="bold")
        head.append(f"kLa to keep {fmt.quantity(r['kla_target_per_s'], 'kla', digits=3)} "
                    f"({r['kla_target_source']}); correlation {r['correlation']['name']}: "
                    f"{r['correlation']['equation']}")
        rules.update(Group(head, rules_table(r), broken_text(r)))
        d = self.design
        self.query_one("#proj-design", Static).update(design_text(d) if d else Text(
            "give an OUR duty to design for it", style="dim"))
        if d is not None:
            from scaleup.tui.widgets.heatmap import heat_map

            self.query_one("#proj-map", Static).update(Group(
                Text("operating window", style="bold"),
                heat_map(d["window"], (d.get("speed_rps"), d.get("gas_flow_mol_s")))))
        notes = [*r.get("warnings", []), *((d or {}).get("warnings") or [])]
        cautions = list(dict.fromkeys([*r.get("cautions", []), *((d or {}).get("cautions")
                                                                 or [])]))
        text = Text()
        for n in notes:
            text.append(f"! {n}\n")
        text.append("cautions\n", style="bold")
        for c in cautions:
            text.append(f"• {c}\n")
        self.query_one("#proj-notes", Static).update(text)

    def action_save(self) -> None:
        if self.results is None:
            self.say("project first (enter), then save", error=True)
            return
        spec = F.Field("name", "study name", "text", True, help="A name to find it by.")

        def save(form: RecordForm) -> str:
            name = form.values()["study name"]
            if not name:
                raise InputError("is required", "study name")
            values, target = self.inputs_used["inputs"], self.inputs_used["target"]
            from scaleup.scaling.evaluate import Limits, Process

            do, percent = values["do"] or (20.0, True)
            with self.store_lock:
                self.campaign.scale_study(
                    {"run_id": values["run"]}, **target, correlation=values["correlation"],
                    process=Process(do_setpoint=do, do_percent=percent, our=values["our"],
                                    o2_fraction=values["o2"] or 0.20946),
                    limits=Limits(max_tip_speed=values["tip"],
                                  max_power_per_volume=values["pv"]), save=name)
            return name

        self.app.push_screen(RecordForm("save this study", [FormField(spec, "production-30m3")],
                                        save), self._saved)

    def _saved(self, name: str | None) -> None:
        if name:
            self.saved_name = name
            self.say(f"saved study {name}; ctrl+r writes its report")

    def action_export(self) -> None:
        name = getattr(self, "saved_name", None)
        if not name:
            self.say("save the study first (ctrl+s)", error=True)
            return
        from pathlib import Path

        from scaleup.report import write_report

        path = Path(self.campaign.path).with_name(f"{name}.html")
        with self.store_lock:
            done = write_report(self.campaign, name, path)
        self.say(f"report written to {done['path']}")
