"""Screen 5, Correlations: fit kLa to the runs, see whether it scales, set it beside the
published ones."""

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
class Choice:
    """What the fit is asked for; each toggle has its own key."""

    form: str = "power-law"
    power_basis: str = "gassed"
    weights: str = "none"
    medium_factor: bool = False
    viscosity: bool = False
    robust: bool = False

    def options(self) -> dict:
        return {"form": self.form, "power_basis": self.power_basis, "weights": self.weights,
                "medium_factor": self.medium_factor,
                "viscosity": self.viscosity and self.form == "power-law",
                "robust": "soft_l1" if self.robust else None}

    def describe(self) -> Table:
        table = Table.grid(padding=(0, 1))
        table.add_column(style="bold", no_wrap=True)
        table.add_column(no_wrap=True)
        table.add_column(style="dim", no_wrap=True)
        table.add_row("f", self.form, "form")
        table.add_row("b", f"{self.power_basis} P/V", "power basis")
        table.add_row("w", f"weights {self.weights}", "by stated kLa error")
        table.add_row("m", f"medium factor {'on' if self.medium_factor else 'off'}", "")
        table.add_row("v", f"viscosity term {'on' if self.viscosity else 'off'}", "power-law")
        table.add_row("o", f"robust {'on' if self.robust else 'off'}", "soft L1")
        return table


def parameters_table(summary: dict) -> Table:
    table = Table(box=None, padding=(0, 1), header_style="bold", show_edge=False)
    for name in ("parameter", "value", "std. error", "95 % interval"):
        table.add_column(name, justify="left" if name == "parameter" else "right", no_wrap=True)
    for p in summary["parameters"]:
        table.add_row(p["name"], fmt.lab(p["value"], "fraction"),
                      "fixed" if p["fixed"] else fmt.lab(p["stderr"], "fraction", digits=2),
                      f"{fmt.lab(p['ci95'][0], 'fraction')} to {fmt.lab(p['ci95'][1], 'fraction')}")
    s = summary["statistics"]
    table.add_row("", "", "", "")
    table.add_row("runs", str(s["n_runs"]), "R² (log)", f"{s['r2_log']:.3f}")
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


def comparison_table(rows: list[dict]) -> Table:
    table = Table(title="on the same runs (RMSE of ln kLa; bias and share within ±20 %)",
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


def draw_parity(plot, observed, predicted, vessels, published=None) -> None:
    """Measured against predicted kLa on log axes, one marker per vessel, ±20 % lines."""
    plt = plot.plt
    plt.clear_data()
    plt.clear_figure()
    obs = np.asarray(observed) * 3600.0  # 1/s to 1/h, the unit people read kLa in
    pred = np.asarray(predicted) * 3600.0
    lo, hi = min(obs.min(), pred.min()) * 0.8, max(obs.max(), pred.max()) * 1.25
    line = np.geomspace(lo, hi, 30)
    plt.plot(line.tolist(), line.tolist(), color="gray", marker="braille")
    for factor in (0.8, 1.2):
        plt.plot(line.tolist(), (line * factor).tolist(), color="gray", marker="dot")
    if published is not None:
        plt.scatter(obs.tolist(), (np.asarray(published[1]) * 3600.0).tolist(),
                    marker="·", color="gray", label=published[0])
    for i, vessel in enumerate(dict.fromkeys(vessels)):
        pick = np.asarray(vessels) == vessel
        plt.scatter(obs[pick].tolist(), pred[pick].tolist(), marker=MARKERS[i % len(MARKERS)],
                    color=COLOURS[i % len(COLOURS)], label=str(vessel))
    plt.xscale("log")
    plt.yscale("log")
    plt.xlabel("measured kLa [1/h]")
    plt.ylabel("predicted [1/h]")
    plt.title("parity, ±20 % lines")
    plot.refresh()


def draw_volume_residuals(plot, observed, predicted, volumes) -> None:
    plt = plot.plt
    plt.clear_data()
    plt.clear_figure()
    ratio = np.log(np.asarray(observed) / np.asarray(predicted))
    plt.hline(0.0, color="gray")
    plt.scatter(np.asarray(volumes).tolist(), ratio.tolist(), marker="dot", color="orange")
    plt.xscale("log")
    plt.xlabel("liquid volume [m3]")
    plt.ylabel("ln(measured/fit)")
    plt.title("residual against scale")
    plot.refresh()


class CorrelationsScreen(WorkScreen):
    MODE = "correlations"
    TITLE = "Correlations"
    AUTO_FOCUS = ".results-pane"  # letters toggle the fit; the filter is reached with /
    BINDINGS = [
        Binding("F", "fit", "fit", id="fit"),
        Binding("S", "save", "save fit", id="save"),
        Binding("c", "next_published", "overlay published", id="published"),
        Binding("f", "toggle('form')", "form", show=False, id="form"),
        Binding("b", "toggle('power_basis')", "power basis", show=False, id="basis"),
        Binding("w", "toggle('weights')", "weights", show=False, id="weights"),
        Binding("m", "toggle('medium_factor')", "medium factor", show=False, id="medium"),
        Binding("v", "toggle('viscosity')", "viscosity term", show=False, id="viscosity"),
        Binding("o", "toggle('robust')", "robust loss", show=False, id="robust"),
        Binding("slash", "subset", "runs to use", show=False, id="subset"),
    ]
    CYCLE = {"form": ("power-law", "dimensionless"), "power_basis": ("gassed", "ungassed"),
             "weights": ("none", "stderr")}

    def __init__(self):
        super().__init__()
        self.choice = Choice()
        self.report = None
        self.fit_data: dict | None = None
        self.published_index = 0

    def body(self) -> ComposeResult:
        with Horizontal():
            with Vertical(classes="inputs-pane"):
                yield Static(Text("fit kLa to runs", style="bold"), classes="section-title")
                with Horizontal(classes="form-row"):
                    yield Label("runs", classes="form-label")
                    yield Input(placeholder="all with a kLa (/ to filter)", id="fit-where",
                                compact=True)
                yield Static(self.choice.describe(), id="fit-choice")
                yield Static(Text("F fit · S save · c published overlay · keys above toggle",
                                  style="dim"), classes="hint")
                yield Static("", id="fit-notes", markup=False)
            with VerticalScroll(classes="results-pane"):
                yield Static(Text("press F to fit the runs' kLa", style="dim"), id="fit-params")
                yield Horizontal(id="fit-plots", classes="plot-tall")
                yield Static("", id="fit-lovo")
                yield Static("", id="fit-compare")

    def on_mount(self) -> None:
        self.query_one("#fit-plots").display = False

    def action_toggle(self, name: str) -> None:
        value = getattr(self.choice, name)
        if isinstance(value, bool):
            new = not value
        else:
            options = self.CYCLE[name]
            new = options[(options.index(value) + 1) % len(options)]
        self.choice = replace(self.choice, **{name: new})
        self.query_one("#fit-choice", Static).update(self.choice.describe())

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
        from scaleup.correlate import kla_correlations, published_correlation

        try:
            with self.store_lock:
                report = self.campaign.fit_kla(where, **choice.options())
                rows, warnings = self.campaign.compare({"this fit": report.result},
                                                       list(kla_correlations), where)
        except (InputError, ValueError) as exc:
            self.post_message(ResultComputed("fit", None, str(exc)))
            return
        points = report.data.points()
        published = {}
        for key in kla_correlations:
            try:
                published[key] = np.asarray(published_correlation(key).predict(points))
            except (InputError, ValueError):
                continue  # a correlation that needs what these runs lack is left off the plot
        data = {"observed": report.data.response,
                "predicted": report.result.predict(points).value,
                "vessels": report.data.vessel, "volumes": points["vessel_volume_m3"],
                "published": published, "rows": rows, "warnings": warnings}
        self.post_message(ResultComputed("fit", report, None, data))

    @on(ResultComputed)
    def _fitted(self, message: ResultComputed) -> None:
        if message.problem:
            self.query_one("#fit-params", Static).update(
                Text(f"✗ no fit: {message.problem}", style="bold"))
            return
        self.report, self.fit_data = message.result, message.extra
        summary = self.report.summary()
        self.query_one("#fit-params", Static).update(Group(
            Text(summary["equation"], style="bold"), parameters_table(summary)))
        self.query_one("#fit-lovo", Static).update(lovo_table(summary))
        self.query_one("#fit-compare", Static).update(comparison_table(self.fit_data["rows"]))
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
                    d["vessels"], overlay)
        draw_volume_residuals(self.query_one("#scale-plot"), d["observed"], d["predicted"],
                              d["volumes"])

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

        self.app.push_screen(RecordForm("save this fit", [FormField(spec, "pilot-kla")], save),
                             lambda name: name and self.say(f"saved fit {name}"))
