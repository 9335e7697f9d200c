"""Screen 5, Correlations: fit kLa to the runs (or a Sherwood number to the flux
measurements), see whether it scales, set it beside the published ones."""

from __future__ import annotations

from dataclasses import dataclass, replace

import numpy as np
from rich.console import Group
from rich.table import Table
from rich.text import Text
from textual import on, work
from textual.app import ComposeResult
from textual.binding import Binding
from textual.containers import Horizontal, Vertical, VerticalScroll
from textual.widgets import Input, Label, Static

from scaleup import fields as F
from scaleup.errors import InputError
from scaleup.tui import format as fmt
from scaleup.tui.messages import ResultComputed
from scaleup.tui.screens.base import WorkScreen
from scaleup.tui.widgets.form import FormField, RecordForm

MARKERS = ("dot", "x", "+", "o", "*", "#")
COLOURS = ("cyan", "orange", "green", "magenta", "yellow", "white")


@dataclass(frozen=True)
class Target:
    """What is fitted to what: kLa to the runs, or Sh to the flux measurements."""

    key: str
    title: str
    subset: str  # what the subset box holds
    placeholder: str
    quantity: str  # axis label of the measured value
    factor: float  # stored SI value to the number plotted
    points: str  # what one observation is called
    default_name: str  # offered when the fit is saved


TARGETS = {
    "kla": Target("kla", "fit kLa to runs", "runs", "all with a kLa (/ to filter)",
                  "kLa [1/h]", 3600.0, "runs", "pilot-kla"),
    "sherwood": Target("sherwood", "fit Sh to flux measurements", "solute",
                       "every solute (/ to name one)", "Sh [-]", 1.0, "fluxes",
                       "flux-sherwood"),
}


@dataclass(frozen=True)
class Choice:
    """What the fit is asked for; each toggle has its own key."""

    target: str = "kla"
    form: str = "power-law"
    power_basis: str = "gassed"
    weights: str = "none"
    medium_factor: bool = False
    viscosity: bool = False
    robust: bool = False
    plus_two: bool = False
    fix_schmidt: bool = True  # one solute at one temperature cannot tell the Sc exponent

    # toggles that mean something for each target
    APPLIES = {"kla": {"form", "power_basis", "weights", "medium_factor", "viscosity", "robust"},
               "sherwood": {"plus_two", "fix_schmidt", "robust"}}

    def options(self) -> dict:
        robust = "soft_l1" if self.robust else None
        if self.target == "sherwood":
            return {"plus_two": self.plus_two, "robust": robust,
                    "fixed": {"c_schmidt": 1 / 3} if self.fix_schmidt else None}
        return {"form": self.form, "power_basis": self.power_basis, "weights": self.weights,
                "medium_factor": self.medium_factor,
                "viscosity": self.viscosity and self.form == "power-law", "robust": robust}

    def describe(self) -> Table:
        table = Table.grid(padding=(0, 1))
        table.add_column(style="bold", no_wrap=True)
        table.add_column(no_wrap=True)
        table.add_column(style="dim", no_wrap=True)
        table.add_row("k", "kLa of runs" if self.target == "kla" else "Sherwood of fluxes",
                      "what is fitted")
        if self.target == "sherwood":
            table.add_row("t", "Sh = 2 + A Re^b Sc^c" if self.plus_two else "Sh = A Re^b Sc^c",
                          "form")
            table.add_row("x", "Sc exponent " + ("held at 1/3" if self.fix_schmidt else "fitted"),
                          "")
            table.add_row("o", f"robust {'on' if self.robust else 'off'}", "soft L1")
            return table
        table.add_row("f", self.form, "form")
        table.add_row("b", f"{self.power_basis} P/V", "power basis")
        table.add_row("w", f"weights {self.weights}", "by stated kLa error")
        table.add_row("m", f"medium factor {'on' if self.medium_factor else 'off'}", "")
        table.add_row("v", f"viscosity term {'on' if self.viscosity else 'off'}", "power-law")
        table.add_row("o", f"robust {'on' if self.robust else 'off'}", "soft L1")
        return table


def parameters_table(summary: dict, points: str = "runs") -> Table:
    table = Table(box=None, padding=(0, 1), header_style="bold", show_edge=False)
    for name in ("parameter", "value", "std. error", "95 % interval"):
        table.add_column(name, justify="left" if name == "parameter" else "right", no_wrap=True)
    for p in summary["parameters"]:
        table.add_row(p["name"], fmt.lab(p["value"], "fraction"),
                      "fixed" if p["fixed"] else fmt.lab(p["stderr"], "fraction", digits=2),
                      f"{fmt.lab(p['ci95'][0], 'fraction')} to {fmt.lab(p['ci95'][1], 'fraction')}")
    s = summary["statistics"]
    table.add_row("", "", "", "")
    table.add_row(points, str(s["n_runs"]), "R² (log)", f"{s['r2_log']:.3f}")
    table.add_row("RMSE (log)", f"{s['rmse_log']:.3f}", "within ±20 %",
                  f"{s['within_20_fraction']:.0%}")
    return table


def lovo_table(summary: dict) -> Table | Text:
    lovo = summary.get("loo_vessel")
    if not lovo or not lovo.get("folds"):
        return Text("leave-one-vessel-out needs runs in at least two vessels", style="dim")
    table = Table(title="leave one vessel out: fit the others, predict this one",
                  title_justify="left", box=None, padding=(0, 1), header_style="bold")
    for name in ("held out", "volume", "runs", "mean bias", "p", "RMSE (log)"):
        table.add_column(name, justify="left" if name == "held out" else "right", no_wrap=True)
    for f in lovo["folds"]:
        bias = f["error"] or f"{f['mean_bias_fraction']:+.0%}"
        table.add_row(f["vessel"], fmt.quantity(f["volume_m3"], "volume", digits=3),
                      str(f["n_runs"]), bias,
                      "-" if f["p_value"] is None else f"{f['p_value']:.2g}",
                      "-" if f["rmse_log"] is None else f"{f['rmse_log']:.3f}")
    return table


def comparison_table(rows: list[dict], target: Target = TARGETS["kla"]) -> Table:
    name = target.quantity.split(" ")[0]
    table = Table(title=f"on the same {target.points} (RMSE of ln {name}; bias and share "
                        "within ±20 %)",
                  title_justify="left", box=None, padding=(0, 1),
                  header_style="bold")
    for name in ("correlation", "in range", "RMSE", "bias", "±20 %", "equation"):
        table.add_column(name, no_wrap=name != "equation", justify="left" if name in (
            "correlation", "equation") else "right", min_width=len(name))
    for r in rows:
        table.add_row(Text(r["name"], style="bold" if r["source"] == "fitted" else ""),
                      f"{r['n_in_domain']}/{r['n_runs']}", f"{r['rmse_log']:.3f}",
                      f"{r['mean_bias_fraction']:+.0%}", f"{r['within_20_fraction']:.0%}",
                      Text(r["equation"], style="dim"))
    return table


def _log_ticks(lo: float, hi: float) -> tuple[list[float], list[str]]:
    """Tick positions (log10 of the value) and labels (the value) for a log axis drawn on
    a linear one: plotext's own log scale transforms its data in place and fails when the
    widget is drawn a second time (a resize, a refresh)."""
    from scaleup.units import sig

    first, last = int(np.floor(np.log10(lo))), int(np.ceil(np.log10(hi)))
    values = [m * 10.0**e for e in range(first, last + 1) for m in (1, 2, 5)
              if lo <= m * 10.0**e <= hi]
    if len(values) < 2:
        values = [lo, hi]
    return [float(np.log10(v)) for v in values], [sig(v, 2) for v in values]


def draw_parity(plot, observed, predicted, vessels, published=None,
                target: Target = TARGETS["kla"]) -> None:
    """Measured against predicted on log axes, one marker per vessel, ±20 % lines."""
    plt = plot.plt
    plt.clear_data()
    plt.clear_figure()
    obs = np.asarray(observed) * target.factor  # kLa in 1/h, the unit people read it in
    pred = np.asarray(predicted) * target.factor
    lo, hi = min(obs.min(), pred.min()) * 0.8, max(obs.max(), pred.max()) * 1.25
    line = np.log10(np.geomspace(lo, hi, 30))
    plt.plot(line.tolist(), line.tolist(), color="gray", marker="braille")
    for factor in (0.8, 1.2):
        plt.plot(line.tolist(), (line + np.log10(factor)).tolist(), color="gray", marker="dot")
    if published is not None:
        plt.scatter(np.log10(obs).tolist(),
                    np.log10(np.asarray(published[1]) * target.factor).tolist(),
                    marker="·", color="gray", label=published[0])
    for i, vessel in enumerate(dict.fromkeys(vessels)):
        pick = np.asarray(vessels) == vessel
        plt.scatter(np.log10(obs[pick]).tolist(), np.log10(pred[pick]).tolist(),
                    marker=MARKERS[i % len(MARKERS)], color=COLOURS[i % len(COLOURS)],
                    label=str(vessel))
    ticks, labels = _log_ticks(lo, hi)
    plt.xticks(ticks, labels)
    plt.yticks(ticks, labels)
    plt.xlabel(f"measured {target.quantity}")
    plt.ylabel(f"predicted {target.quantity.split(' ')[1]}")
    plt.title("parity, ±20 % lines (log axes)")
    plot.refresh()


def draw_residuals_against(plot, observed, predicted, x, x_label: str, title: str) -> None:
    """ln(measured/fitted) against a variable on a log axis: a trend means a missing term."""
    plt = plot.plt
    plt.clear_data()
    plt.clear_figure()
    ratio = np.log(np.asarray(observed) / np.asarray(predicted))
    x = np.asarray(x, dtype=float)
    plt.hline(0.0, color="gray")
    plt.scatter(np.log10(x).tolist(), ratio.tolist(), marker="dot", color="orange")
    lo, hi = float(x.min()), float(x.max())
    ticks, labels = _log_ticks(lo / 1.5, hi * 1.5) if hi > lo else ([float(np.log10(lo))],
                                                                     [f"{lo:.3g}"])
    plt.xticks(ticks, labels)
    plt.xlabel(x_label + " (log axis)")
    plt.ylabel("ln(measured/fit)")
    plt.title(title)
    plot.refresh()


class CorrelationsScreen(WorkScreen):
    MODE = "correlations"
    TITLE = "Correlations"
    AUTO_FOCUS = ".results-pane"  # letters toggle the fit; the filter is reached with /
    BINDINGS = [
        Binding("F", "fit", "fit", id="fit"),
        Binding("S", "save", "save fit", id="save"),
        Binding("c", "next_published", "overlay published", id="published"),
        Binding("k", "toggle('target')", "kLa or Sherwood", id="target"),
        Binding("t", "toggle('plus_two')", "Sherwood 2 +", show=False, id="plus-two"),
        Binding("x", "toggle('fix_schmidt')", "hold Sc exponent", show=False, id="fix-sc"),
        Binding("f", "toggle('form')", "form", show=False, id="form"),
        Binding("b", "toggle('power_basis')", "power basis", show=False, id="basis"),
        Binding("w", "toggle('weights')", "weights", show=False, id="weights"),
        Binding("m", "toggle('medium_factor')", "medium factor", show=False, id="medium"),
        Binding("v", "toggle('viscosity')", "viscosity term", show=False, id="viscosity"),
        Binding("o", "toggle('robust')", "robust loss", show=False, id="robust"),
        Binding("slash", "subset", "runs or solute to use", show=False, id="subset"),
    ]
    CYCLE = {"form": ("power-law", "dimensionless"), "power_basis": ("gassed", "ungassed"),
             "weights": ("none", "stderr"), "target": ("kla", "sherwood")}

    def __init__(self):
        super().__init__()
        self.choice = Choice()
        self.report = None
        self.fit_data: dict | None = None
        self.published_index = 0

    def body(self) -> ComposeResult:
        with Horizontal():
            with Vertical(classes="inputs-pane"):
                target = TARGETS[self.choice.target]
                yield Static(Text(target.title, style="bold"), classes="section-title",
                             id="fit-title")
                with Horizontal(classes="form-row"):
                    yield Label(target.subset, classes="form-label", id="fit-subset")
                    yield Input(placeholder=target.placeholder, id="fit-where", compact=True)
                yield Static(self.choice.describe(), id="fit-choice")
                yield Static(Text("F fit · S save · c published overlay · k kLa/Sherwood · "
                                  "keys above toggle", style="dim"), classes="hint")
                yield Static("", id="fit-notes", markup=False)
            with VerticalScroll(classes="results-pane"):
                yield Static(Text("press F to fit the runs' kLa", style="dim"), id="fit-params")
                yield Horizontal(id="fit-plots", classes="plot-tall")
                yield Static("", id="fit-lovo")
                yield Static("", id="fit-compare")

    def on_mount(self) -> None:
        self.query_one("#fit-plots").display = False

    def action_toggle(self, name: str) -> None:
        if name != "target" and name not in Choice.APPLIES[self.choice.target]:
            self.say(f"{name.replace('_', ' ')} does not apply to a "
                     f"{TARGETS[self.choice.target].title.removeprefix('fit ')} fit")
            return
        value = getattr(self.choice, name)
        if isinstance(value, bool):
            new = not value
        else:
            options = self.CYCLE[name]
            new = options[(options.index(value) + 1) % len(options)]
        self.choice = replace(self.choice, **{name: new})
        self.query_one("#fit-choice", Static).update(self.choice.describe())
        if name == "target":
            self.retarget()

    def retarget(self) -> None:
        """Another target: its own subset box, and nothing of the other target's fit shown."""
        target = TARGETS[self.choice.target]
        self.query_one("#fit-title", Static).update(Text(target.title, style="bold"))
        self.query_one("#fit-subset", Label).update(target.subset)
        box = self.query_one("#fit-where", Input)
        box.value, box.placeholder = "", target.placeholder
        self.report, self.fit_data, self.published_index = None, None, 0
        self.query_one("#fit-params", Static).update(Text(
            f"press F to {target.title}", style="dim"))
        for name in ("#fit-lovo", "#fit-compare", "#fit-notes"):
            self.query_one(name, Static).update("")
        self.query_one("#fit-plots").display = False

    def action_subset(self) -> None:
        self.query_one("#fit-where", Input).focus()

    @on(Input.Submitted, "#fit-where")
    def _where(self, event) -> None:
        self.query_one(".results-pane").focus()
        self.action_fit()

    def key_escape(self) -> None:
        self.query_one(".results-pane").focus()

    def action_fit(self) -> None:
        self.query_one("#fit-params", Static).update(Text("fitting ...", style="dim"))
        where = self.query_one("#fit-where", Input).value.strip() or None
        self._fit(where, self.choice)

    @work(thread=True, exclusive=True, group="fit")
    def _fit(self, where: str | None, choice: Choice) -> None:
        from scaleup.correlate import (
            compare_correlations,
            kla_correlations,
            published_correlation,
            sherwood_correlations,
        )

        catalogue = sherwood_correlations if choice.target == "sherwood" else kla_correlations
        try:
            with self.store_lock:
                if choice.target == "sherwood":
                    report = self.campaign.fit_sherwood(where, **choice.options())
                    rows = compare_correlations(
                        {"this fit": report.result,
                         **{key: published_correlation(key) for key in catalogue}},
                        report.data)
                    warnings = []
                else:
                    report = self.campaign.fit_kla(where, **choice.options())
                    rows, warnings = self.campaign.compare({"this fit": report.result},
                                                           list(catalogue), where)
        except (InputError, ValueError) as exc:
            self.post_message(ResultComputed("fit", None, str(exc)))
            return
        points = report.data.points()
        published = {}
        for key in catalogue:
            try:
                published[key] = np.asarray(published_correlation(key).predict(points))
            except (InputError, ValueError):
                continue  # a correlation that needs what these runs lack is left off the plot
        residual_x = (("reynolds", "Reynolds number [-]", "residual against Re")
                      if choice.target == "sherwood" else
                      ("vessel_volume_m3", "liquid volume [m3]", "residual against scale"))
        data = {"observed": report.data.response,
                "predicted": report.result.predict(points).value,
                "vessels": report.data.vessel, "residual_x": points[residual_x[0]],
                "residual_labels": residual_x[1:], "target": TARGETS[choice.target],
                "published": published, "rows": rows, "warnings": warnings}
        self.post_message(ResultComputed("fit", report, None, data))

    @on(ResultComputed)
    def _fitted(self, message: ResultComputed) -> None:
        if message.problem:
            self.query_one("#fit-params", Static).update(
                Text(f"✗ no fit: {message.problem}", style="bold"))
            return
        if message.extra["target"].key != self.choice.target:
            return  # a fit of the other target, finished after the user switched
        self.report, self.fit_data = message.result, message.extra
        summary = self.report.summary()
        target = self.fit_data["target"]
        self.query_one("#fit-params", Static).update(Group(
            Text(summary["equation"], style="bold"), parameters_table(summary, target.points)))
        self.query_one("#fit-lovo", Static).update(lovo_table(summary))
        self.query_one("#fit-compare", Static).update(comparison_table(self.fit_data["rows"],
                                                                       target))
        notes = [*summary["warnings"], *self.fit_data["warnings"]]
        self.query_one("#fit-notes", Static).update(
            Text("\n".join(f"! {n}" for n in notes[:6]), style="italic"))
        self.draw()

    def draw(self) -> None:
        from scaleup.tui.widgets.plots import new_plot

        if self.fit_data is None or not self.settings.plots:
            return
        box = self.query_one("#fit-plots")
        box.display = True
        if not box.children:
            box.mount(new_plot("parity-plot"), new_plot("scale-plot"))
        d = self.fit_data
        keys = list(d["published"])
        overlay = None
        if keys and self.published_index:
            key = keys[(self.published_index - 1) % len(keys)]
            overlay = (key, d["published"][key])
        draw_parity(self.query_one("#parity-plot"), d["observed"], d["predicted"],
                    d["vessels"], overlay, d["target"])
        draw_residuals_against(self.query_one("#scale-plot"), d["observed"], d["predicted"],
                               d["residual_x"], *d["residual_labels"])

    def action_next_published(self) -> None:
        if self.fit_data is None:
            return
        count = len(self.fit_data["published"])
        self.published_index = (self.published_index + 1) % (count + 1)
        self.draw()

    def action_save(self) -> None:
        if self.report is None:
            self.say("fit first (F), then save", error=True)
            return
        spec = F.Field("name", "fit name", "text", True, help="A name to find the fit by.")

        def save(form: RecordForm) -> str:
            name = form.values()["fit name"]
            if not name:
                raise InputError("is required", "fit name")
            with self.store_lock:
                self.campaign.save_fit(name, self.report)
            return name

        default = TARGETS[self.report.kind].default_name
        self.app.push_screen(RecordForm("save this fit", [FormField(spec, default)], save),
                             lambda name: name and self.say(f"saved fit {name}"))
