"""Screen 4, Curves: fit a DO curve, move its window, accept the kLa it gives."""

from __future__ import annotations

import numpy as np
from rich.text import Text
from textual import on, work
from textual.app import ComposeResult
from textual.binding import Binding
from textual.containers import Horizontal, Vertical
from textual.widgets import DataTable, ProgressBar, Static

from scaleup.errors import InputError
from scaleup.tui import format as fmt
from scaleup.tui.messages import ProgressMade, ResultComputed
from scaleup.tui.screens.base import WorkScreen

LOW_STEP = 0.02  # fraction of the rise moved by one press of [ or ]
HIGH_STEP = 0.01  # the top of the window matters more, so it moves in finer steps


def fitted_values(analysis, do_values: np.ndarray, time_s: np.ndarray) -> np.ndarray:
    """The model at the fitted samples: the data there minus the residuals."""
    fit = analysis.primary
    index = np.searchsorted(time_s, fit.times_s)
    index = np.clip(index, 0, len(time_s) - 1)
    return np.asarray(do_values)[index] - fit.residuals


def describe(analysis, unit: str) -> Text:
    """One paragraph: kLa with its interval, the window, the probe model, fit quality."""
    fit = analysis.primary
    text = Text()
    text.append("kLa ", style="bold")
    text.append(f"{fmt.lab(fit.kla_per_s, 'kla')} ± {fmt.lab(fit.kla_stderr_per_s, 'kla', digits=2)}"
                " 1/h", style="bold")
    lo, hi = fit.kla_ci95_per_s
    text.append(f"   95 % CI {fmt.lab(lo, 'kla')} to {fmt.lab(hi, 'kla')} 1/h\n")
    text.append(f"window {analysis.window[0]:.0%} to {analysis.window[1]:.0%} of the rise "
                f"({fmt.lab(fit.window_s[0], 'time', digits=3)} to "
                f"{fmt.lab(fit.window_s[1], 'time', digits=3)} s, {fit.n_points} points)\n")
    probe = f"probe lag on, tau {fmt.lab(fit.tau_p_s, 'time', digits=3)} s" if fit.tau_p_s \
        else "probe lag off (ideal probe)"
    text.append(f"{analysis.method} fit · {probe}")
    if analysis.lag_bias is not None and fit.tau_p_s:
        bias = analysis.lag_bias
        text.append(" · without it kLa would be " + (
            f"{abs(bias):.1%} {'low' if bias < 0 else 'high'}" if abs(bias) >= 0.0005
            else "the same to 0.1 %"))
    text.append(f"\nR² {fit.r_squared:.4f} · rmse {fmt.lab(fit.rmse, 'fraction', digits=3)} "
                f"{unit} · Durbin-Watson {fit.durbin_watson:.2f}")
    other = analysis.log_linear if analysis.method == "nonlinear" else analysis.nonlinear
    if other is not None:
        text.append(f" · {other.method} gives {fmt.lab(other.kla_per_s, 'kla')} 1/h",
                    style="dim")
    for warning in analysis.warnings:
        text.append(f"\n! {warning}", style="bold")
    return text


class CurvesScreen(WorkScreen):
    MODE = "curves"
    TITLE = "Curves"
    BINDINGS = [
        Binding("left_square_bracket", "low(-1)", "low cut-off down", show=False,
                id="low-down"),
        Binding("right_square_bracket", "low(1)", "low cut-off up", show=False, id="low-up"),
        Binding("less_than_sign", "high(-1)", "high cut-off down", show=False, id="high-down"),
        Binding("greater_than_sign", "high(1)", "high cut-off up", show=False, id="high-up"),
        Binding("p", "probe", "probe lag", id="probe"),
        Binding("m", "method", "method", show=False, id="method"),
        Binding("w", "reset", "default window", show=False, id="reset"),
        Binding("A", "accept", "accept kLa", id="accept"),
        Binding("B", "batch", "analyse all", id="batch"),
        Binding("g", "run", "go to its run", show=False, id="run"),
    ]

    def __init__(self):
        super().__init__()
        self.curve_rows: list[dict] = []
        self.samples: dict | None = None
        self.window = (0.2, 0.98)
        self.probe_on = True
        self.method = "nonlinear"
        self.analysis = None

    def body(self) -> ComposeResult:
        with Horizontal():
            with Vertical(classes="list-pane", id="curve-pane"):
                yield DataTable(id="curve-list", cursor_type="row", zebra_stripes=True)
                yield ProgressBar(id="batch-progress", show_eta=False)
            with Vertical(classes="results-pane"):
                yield Vertical(id="curve-plot-box", classes="plot-tall")
                yield Vertical(id="residual-box", classes="plot-short")
                yield Static("", id="curve-result", markup=False)
                yield Static(Text("[ ] low cut-off  < > high cut-off  w default window  "
                                  "p probe lag  m method  A accept  B analyse all",
                                  style="dim"), classes="hint")

    def on_mount(self) -> None:

        self.query_one("#batch-progress", ProgressBar).display = False
        table = self.query_one("#curve-list", DataTable)
        for key, title in (("id", "curve"), ("run", "run"), ("n", "points"),
                           ("kla", "kLa 1/h"), ("state", "state"), ("kind", "kind")):
            table.add_column(title, key=key)
        self.refresh_list()
        table.focus()

    def on_screen_resume(self) -> None:
        self.refresh_list()

    def refresh_list(self) -> None:
        table = self.query_one("#curve-list", DataTable)
        keep = self.current_id()
        with self.store_lock:
            self.curve_rows = self.campaign.curves()
        wanted = self.app.selected_run_id
        self.app.selected_run_id = None
        table.clear()
        for c in self.curve_rows:
            state = "accepted" if c["kla_per_s"] else ("rejected" if c["analysed_at"] else "new")
            table.add_row(str(c["id"]), str(c["run_id"]), str(c["n_samples"]),
                          Text(fmt.lab(c["kla_per_s"], "kla"), justify="right"),
                          Text(state, style="bold" if state == "rejected" else ""),
                          c["kind"], key=str(c["id"]))
        ids = [c["id"] for c in self.curve_rows]
        if wanted is not None:
            keep = next((c["id"] for c in self.curve_rows if c["run_id"] == wanted), keep)
        if keep in ids:
            table.move_cursor(row=ids.index(keep), animate=False)
        if not ids:
            self.query_one("#curve-result", Static).update(
                Text("no DO curves in this campaign yet", style="dim"))

    def current_id(self) -> int | None:
        table = self.query_one("#curve-list", DataTable)
        if not self.curve_rows or table.cursor_row < 0 or table.cursor_row >= len(
                self.curve_rows):
            return None
        return self.curve_rows[table.cursor_row]["id"]

    def current_row(self) -> dict | None:
        cid = self.current_id()
        return next((c for c in self.curve_rows if c["id"] == cid), None)

    @on(DataTable.RowHighlighted, "#curve-list")
    def _moved(self, event) -> None:
        row = self.current_row()
        if row is None:
            return
        if row["window_low"] is not None and row["window_high"] is not None:
            self.window = (row["window_low"], row["window_high"])
        else:
            self.window = (0.2, 0.98)
        self.samples = None
        self.analyse()

    # ---- analysis in a worker ------------------------------------------------------------
    def analyse(self) -> None:
        row = self.current_row()
        if row is None:
            return
        tau = None if self.probe_on else 0.0
        self._preview(row["id"], self.window, tau, self.method, self.samples is None)

    @work(thread=True, exclusive=True, group="curve-preview")
    def _preview(self, curve_id: int, window, tau, method, load: bool) -> None:
        extra = {"curve_id": curve_id}
        with self.store_lock:
            if load:
                extra["samples"] = self.campaign.curve(curve_id)
            try:
                analysis = self.campaign.preview_curve(curve_id, window=window, tau_p_s=tau,
                                                       method=method)
            except InputError as exc:
                self.post_message(ResultComputed("preview", None, str(exc), extra))
                return
        self.post_message(ResultComputed("preview", analysis, None, extra))

    @on(ResultComputed)
    def _computed(self, message: ResultComputed) -> None:
        if message.tag == "batch":
            self._batch_done(message)
            return
        if message.extra.get("curve_id") != self.current_id():
            return
        if "samples" in message.extra:
            self.samples = message.extra["samples"]
        self.analysis = message.result
        self.draw(message.problem)

    def draw(self, problem: str | None) -> None:
        from scaleup.tui.widgets.plots import draw_do_curve, draw_residuals, new_plot

        s = self.samples
        if s is None:
            return
        box = self.query_one("#curve-plot-box")
        if not box.children:
            box.mount(new_plot("curve-plot"))
            self.query_one("#residual-box").mount(new_plot("residual-plot"))
        plot = self.query_one("#curve-plot")
        result = self.query_one("#curve-result", Static)
        title = f"curve {s['id']} of run {s['run_id']}"
        if self.analysis is None:
            draw_do_curve(plot, s["time_s"], s["do_values"], s["do_unit"], title=title)
            result.update(Text(f"✗ no kLa from this curve: {problem}", style="bold"))
            return
        fit = self.analysis.primary
        draw_do_curve(plot, s["time_s"], s["do_values"], s["do_unit"], title=title,
                      fit_time_s=fit.times_s,
                      fit_values=fitted_values(self.analysis, s["do_values"], s["time_s"]),
                      window_s=fit.window_s)
        draw_residuals(self.query_one("#residual-plot"), fit.times_s, fit.residuals,
                       s["do_unit"])
        result.update(describe(self.analysis, s["do_unit"]))

    # ---- keys ------------------------------------------------------------------------------
    def action_low(self, step: int) -> None:
        low = round(min(max(self.window[0] + step * LOW_STEP, 0.0), self.window[1] - 0.05), 3)
        self.window = (low, self.window[1])
        self.analyse()

    def action_high(self, step: int) -> None:
        high = round(min(max(self.window[1] + step * HIGH_STEP, self.window[0] + 0.05), 1.0), 3)
        self.window = (self.window[0], high)
        self.analyse()

    def action_reset(self) -> None:
        self.window = (0.2, 0.98)
        self.analyse()

    def action_probe(self) -> None:
        self.probe_on = not self.probe_on
        self.say("probe-lag model " + ("on" if self.probe_on else "off"))
        self.analyse()

    def action_method(self) -> None:
        self.method = "log-linear" if self.method == "nonlinear" else "nonlinear"
        self.say(f"{self.method} fit")
        self.analyse()

    def action_accept(self) -> None:
        row = self.current_row()
        if row is None or self.analysis is None:
            self.say("nothing to accept: this curve gives no kLa", error=True)
            return
        tau = None if self.probe_on else 0.0
        with self.store_lock:
            result = self.campaign.analyse_curves([row["id"]], window=self.window,
                                                  tau_p_s=tau, method=self.method)[0]
        self.say(f"run {row['run_id']}: kLa {fmt.quantity(result['kla_per_s'], 'kla')} "
                 "accepted and stored")
        self.refresh_list()

    def action_batch(self) -> None:
        bar = self.query_one("#batch-progress", ProgressBar)
        bar.display = True
        bar.update(total=max(len(self.curve_rows), 1), progress=0)
        self._batch(None if self.probe_on else 0.0, self.method)

    @work(thread=True, exclusive=True, group="curve-batch")
    def _batch(self, tau, method) -> None:
        def progress(done: int, total: int) -> None:
            self.post_message(ProgressMade("batch", done, total))

        try:
            with self.store_lock:
                results = self.campaign.analyse_curves(tau_p_s=tau, method=method,
                                                       progress=progress)
        except InputError as exc:
            self.post_message(ResultComputed("batch", None, str(exc)))
            return
        self.post_message(ResultComputed("batch", results))

    @on(ProgressMade)
    def _progress(self, message: ProgressMade) -> None:
        self.query_one("#batch-progress", ProgressBar).update(total=message.total,
                                                              progress=message.done)

    def _batch_done(self, message: ResultComputed) -> None:
        self.query_one("#batch-progress", ProgressBar).display = False
        if message.problem:
            self.say(message.problem, error=True)
            return
        results = message.result
        good = sum(1 for r in results if r.get("kla_per_s"))
        self.say(f"analysed {len(results)} curves: {good} gave a kLa, "
                 f"{len(results) - good} were rejected (each run's kLa updated)")
        self.refresh_list()
        self.samples = None
        self.analyse()

    def action_run(self) -> None:
        row = self.current_row()
        if row is not None:
            self.app.runs_filter = f"id = {int(row['run_id'])}"
            self.app.action_go("runs")
