"""Screen 1, Runs: find, read, log and correct the runs of the campaign."""

from __future__ import annotations

from datetime import date

from rich.text import Text
from textual import on, work
from textual.app import ComposeResult
from textual.binding import Binding
from textual.containers import Horizontal, Vertical
from textual.widgets import DataTable, Input, Static

from scaleup import fields as F
from scaleup.errors import InputError
from scaleup.tui import format as fmt
from scaleup.tui.messages import (
    ChangeUndone,
    RecordSaved,
    RunDetailLoaded,
    RunsPageLoaded,
    RunsQueryFailed,
)
from scaleup.tui.screens.base import WorkScreen
from scaleup.tui.widgets.form import FormField, RecordForm
from scaleup.tui.widgets.run_detail import RunDetail
from scaleup.tui.widgets.run_table import SORT_LABELS, RunTable

FILTER_HINT = "filter, e.g.  vessel = 'P-300' and speed > 300 rpm   (enter to apply, esc back)"


class RunsScreen(WorkScreen):
    MODE = "runs"
    TITLE = "Runs"
    BINDINGS = [
        Binding("slash", "filter", "filter", id="filter"),
        Binding("a", "add", "add run", id="add"),
        Binding("e", "edit", "edit (or enter)", id="edit"),
        Binding("x,delete", "delete", "delete", id="delete"),
        Binding("u", "app.undo", "undo", id="undo-here"),
        Binding("s", "sort", "sort", id="sort"),
        Binding("r", "reverse", "reverse sort", show=False, id="reverse"),
        Binding("f", "same_vessel", "this vessel only", show=False, id="same-vessel"),
        Binding("R", "restore", "restore a deleted run", show=False, id="restore"),
        Binding("c", "curve", "open its curve", show=False, id="curve"),
        Binding("d", "toggle_detail", "detail pane", show=False, id="detail"),
        Binding("pagedown", "noop", "next page (pgdn)", show=False, id="pgdn-help"),
    ]

    def __init__(self):
        super().__init__()
        self.where = ""
        self.order_by = "id"
        self.descending = False
        self.request = 0
        self.detail_timer = None
        self.detail_run_id: int | None = None
        self.cursor_wanted: int | None = None
        self.heading_to: int | None = None

    def body(self) -> ComposeResult:
        with Vertical(id="runs-top"):
            with Horizontal(id="filter-row"):
                yield Static(Text("filter ▸", style="bold"), id="filter-label")
                yield Input(placeholder=FILTER_HINT, id="filter", compact=True)
            yield Static("", id="runs-status", markup=False)
        with Horizontal(id="runs-main"):
            yield RunTable(id="runs-table")
            yield RunDetail(id="runs-detail")

    def on_mount(self) -> None:
        self.query_one(RunTable).focus()
        self.load(0, cursor=0)

    # ---- reading pages -------------------------------------------------------------------
    def load(self, offset: int, *, cursor: int | None = None) -> None:
        self.request += 1
        self.cursor_wanted = cursor
        # keys pressed while a page is on its way count from where they were heading
        self.heading_to = None if cursor is None else offset + cursor
        self._read_page(self.where, self.order_by, self.descending, offset,
                        self.settings.page_size, self.request)

    def reload(self) -> None:
        table = self.query_one(RunTable)
        self.load(table.page_offset, cursor=table.cursor_row)

    @work(thread=True, exclusive=True, group="runs-page")
    def _read_page(self, where, order_by, descending, offset, size, request) -> None:
        try:
            with self.store_lock:
                total = self.campaign.count_runs(where or None)
                offset = max(0, min(offset, max(0, total - size)))
                rows = self.campaign.runs(where or None, order_by=order_by,
                                          descending=descending, limit=size, offset=offset)
        except InputError as exc:
            self.post_message(RunsQueryFailed(str(exc)))
            return
        fmt.warm()
        self.post_message(RunsPageLoaded(rows, total, offset, request))

    @on(RunsPageLoaded)
    def _page_loaded(self, message: RunsPageLoaded) -> None:
        if message.request != self.request:
            return
        if self.cursor_wanted is not None and self.heading_to is not None:
            self.cursor_wanted = self.heading_to - message.offset  # the offset may be clamped
        self.heading_to = None
        table = self.query_one(RunTable)
        table.show_page(message.rows, message.offset, message.total, cursor=self.cursor_wanted)
        self.query_one("#filter", Input).remove_class("-invalid")
        self._status()
        if not message.rows:
            self.query_one(RunDetail).show_nothing(
                "no runs match the filter" if self.where else "no runs yet: press a to add one")

    @on(RunsQueryFailed)
    def _query_failed(self, message: RunsQueryFailed) -> None:
        self.query_one("#filter", Input).add_class("-invalid")
        status = self.query_one("#runs-status", Static)
        status.update(Text("✗ " + message.error, style="bold"))
        status.add_class("-problem")

    def _status(self) -> None:
        table = self.query_one(RunTable)
        status = self.query_one("#runs-status", Static)
        status.remove_class("-problem")
        shown = len(table.page_rows)
        arrow = "↓" if self.descending else "↑"
        text = Text()
        text.append(f"{table.total:,} runs", style="bold")
        if self.where:
            text.append(" match", style="bold")
        if shown and shown < table.total:
            text.append(f" · holding {table.page_offset + 1:,}-{table.page_offset + shown:,}")
        text.append(f" · sorted by {SORT_LABELS[self.order_by]} {arrow}")
        text.append("   / filter · s sort · a add · e edit · c curve · ? keys", style="dim")
        status.update(text)

    @on(RunTable.PageWanted)
    def _page_wanted(self, message: RunTable.PageWanted) -> None:
        table = self.query_one(RunTable)
        here = self.heading_to if self.heading_to is not None else \
            table.page_offset + max(table.cursor_row, 0)
        if message.to_end:
            target = 0 if message.step < 0 else table.total - 1
        elif abs(message.step) == 1:
            target = here + message.step
        else:
            target = here + message.step * max(table.size.height - 2, 1)
        target = max(0, min(target, table.total - 1))
        size = self.settings.page_size
        offset = max(0, min(target - size // 2, max(0, table.total - size)))
        self.load(offset, cursor=target - offset)

    # ---- the detail pane -----------------------------------------------------------------
    @on(DataTable.RowHighlighted, "#runs-table")
    def _row_moved(self, event: DataTable.RowHighlighted) -> None:
        run = self.query_one(RunTable).current_run()
        if run is None or run["id"] == self.detail_run_id:
            return
        if self.detail_timer is not None:
            self.detail_timer.stop()
        if self.settings.detail_delay_s <= 0:
            self._read_detail(run["id"])
            return
        self.detail_timer = self.set_timer(self.settings.detail_delay_s,
                                           lambda: self._read_detail(run["id"]))

    @work(thread=True, exclusive=True, group="run-detail")
    def _read_detail(self, run_id: int) -> None:
        conditions, problem, curve = None, None, None
        with self.store_lock:
            try:
                run = self.campaign.run(run_id)
                run["working_volume_m3"] = self.campaign.vessel(run["vessel_id"])[
                    "working_volume_m3"]
                stored = self.campaign.curves(run_id)
                if stored and self.settings.plots:
                    curve = self.campaign.curve(stored[0]["id"])
            except InputError as exc:
                self.post_message(RunsQueryFailed(str(exc)))
                return
            try:
                conditions = self.campaign.run_conditions(run_id)
            except Exception as exc:  # a layer that cannot evaluate this point says why
                problem = str(exc)
        run["n_curves"] = len(stored)
        self.post_message(RunDetailLoaded(run_id, run, conditions, problem, curve))

    @on(RunDetailLoaded)
    def _detail_loaded(self, message: RunDetailLoaded) -> None:
        current = self.query_one(RunTable).current_run()
        if current is None or current["id"] != message.run_id:
            return
        self.detail_run_id = message.run_id
        detail = self.query_one(RunDetail)
        detail.show(message.run, message.conditions, message.problem)
        self._show_curve(message.curve, message.run)

    def _show_curve(self, curve: dict | None, run: dict) -> None:
        detail = self.query_one(RunDetail)
        plots = detail.query("#run-plot")
        if curve is None:
            plots.remove()
            return
        from scaleup.tui.widgets.plots import draw_do_curve, new_plot

        if plots:
            plot = plots.first()
        else:
            plot = new_plot("run-plot")
            detail.mount(plot)
        draw_do_curve(plot, curve["time_s"], curve["do_values"], curve["do_unit"],
                      title=f"DO curve {curve['id']} ({curve['kind']})")

    # ---- filter and sort -----------------------------------------------------------------
    def action_filter(self) -> None:
        self.query_one("#filter", Input).focus()

    @on(Input.Submitted, "#filter")
    def _filter_submitted(self, event: Input.Submitted) -> None:
        self.where = event.value.strip()
        self.detail_run_id = None
        self.load(0, cursor=0)
        self.query_one(RunTable).focus()

    def key_escape(self) -> None:
        if self.focused is self.query_one("#filter", Input):
            self.query_one(RunTable).focus()

    def action_same_vessel(self) -> None:
        run = self.query_one(RunTable).current_run()
        if run is None:
            return
        wanted = f"vessel = '{run['vessel']}'"
        self.where = "" if self.where == wanted else wanted
        self.query_one("#filter", Input).value = self.where
        self.load(0, cursor=0)

    def action_sort(self) -> None:
        from scaleup.tui.widgets.pick import PickScreen
        from scaleup.tui.widgets.run_table import SORT_LABELS

        def chosen(key: str | None) -> None:
            if key is None:
                return
            self.descending = (not self.descending) if key == self.order_by else False
            self.order_by = key
            self.load(0, cursor=0)

        self.app.push_screen(PickScreen("sort runs by (again to reverse)",
                                        list(SORT_LABELS.items()), self.order_by), chosen)

    def action_reverse(self) -> None:
        self.descending = not self.descending
        self.load(0, cursor=0)

    @on(DataTable.HeaderSelected, "#runs-table")
    def _header_clicked(self, event: DataTable.HeaderSelected) -> None:
        key = str(event.column_key.value)
        self.descending = (not self.descending) if key == self.order_by else False
        self.order_by = key
        self.load(0, cursor=0)

    def action_toggle_detail(self) -> None:
        # narrow terminals hide the pane until asked; wide ones show it until told not to
        self.toggle_class("-detail-shown" if self.has_class("-narrow") else "-detail-hidden")

    def action_noop(self) -> None:
        """Listed only so the keys sheet names paging."""

    # ---- changes -------------------------------------------------------------------------
    def _gas_context(self, values: dict[str, str]) -> dict:
        """What a gas flow needs to be read: the chosen vessel's volume, the temperature."""
        name = values.get("vessel")
        context: dict = {}
        if not name:
            return context
        try:
            with self.store_lock:
                vessel = self.campaign.vessel(name)
        except InputError:
            return context
        context["liquid_volume_m3"] = vessel["working_volume_m3"]
        context["pressure_pa"] = vessel["head_pressure_pa"]
        try:
            from scaleup import units

            context["temperature_k"] = units.parse(values.get("temperature", ""),
                                                   "temperature")
        except (InputError, ValueError):
            pass
        return context

    @staticmethod
    def _lines(run: dict | None, *, like: bool) -> list[FormField]:
        lines = []
        for spec in F.RUN:
            text = ""
            if run is not None:
                key = {"run_at": "run_at"}.get(spec.column, spec.column)
                if like and spec.column in ("ref", "kla_per_s", "kla_stderr_per_s",
                                            "kla_method", "notes", "power_measured_w",
                                            "torque_measured_n_m", "gas_holdup"):
                    text = ""
                elif like and spec.column == "run_at":
                    text = date.today().isoformat()
                else:
                    text = fmt.typed(run.get(key), spec.kind)
            note = "the vessel's when empty" if spec.column == "head_pressure_pa" else ""
            lines.append(FormField(spec, text, note))
        return lines

    def action_add(self) -> None:
        like = self.query_one(RunTable).current_run()
        if like is not None:
            with self.store_lock:
                like = self.campaign.run(like["id"])

        def save(form: RecordForm) -> int:
            values = {k: v for k, v in form.values().items() if v}
            with self.store_lock:
                return self.campaign.add_run(values)

        intro = "Type values with their units. Fields are filled from the run under the cursor."
        self.app.push_screen(RecordForm("add a run", self._lines(like, like=True), save,
                                        intro=intro if like else "", context=self._gas_context),
                             lambda run_id: self._saved(run_id, added=True))

    @on(DataTable.RowSelected, "#runs-table")
    def _row_chosen(self, event: DataTable.RowSelected) -> None:
        self.action_edit()

    def action_edit(self) -> None:
        current = self.query_one(RunTable).current_run()
        if current is None:
            return
        with self.store_lock:
            run = self.campaign.run(current["id"])

        def save(form: RecordForm) -> int:
            changes = form.changes()
            if changes:
                with self.store_lock:
                    self.campaign.edit_run(run["id"], changes,
                                           expected_version=run["row_version"])
            return run["id"]

        self.app.push_screen(RecordForm(f"edit run {run['id']}", self._lines(run, like=False),
                                        save, context=self._gas_context),
                             lambda run_id: self._saved(run_id, added=False))

    def _saved(self, run_id: int | None, *, added: bool) -> None:
        if run_id is None:
            return
        self.post_message(RecordSaved("run", run_id, added))

    @on(RecordSaved)
    def _record_saved(self, message: RecordSaved) -> None:
        self.say(f"{'added' if message.added else 'saved'} run {message.record_id}")
        self.detail_run_id = None
        if message.added:
            self._jump_to(message.record_id)
        else:
            self.reload()

    def _jump_to(self, run_id: int) -> None:
        """Show the page holding a run (newest runs sort last by id)."""
        if self.order_by == "id" and not self.descending and not self.where:
            with self.store_lock:
                before = self.campaign.count_runs(f"id < {int(run_id)}")
            size = self.settings.page_size
            offset = max(0, before - size // 2)
            self.load(offset, cursor=before - offset)
        else:
            self.reload()

    def action_delete(self) -> None:
        run = self.query_one(RunTable).current_run()
        if run is None:
            return
        with self.store_lock:
            self.campaign.delete_run(run["id"])
        self.say(f"deleted run {run['id']} (u undoes, R restores)")
        self.detail_run_id = None
        self.reload()

    def action_restore(self) -> None:
        from scaleup.tui.widgets.form import FormField

        with self.store_lock:
            deleted = [h["record_id"] for h in self.campaign.history("run", limit=200)
                       if h["action"] == "delete"]
        spec = F.Field("run_id", "run number", "int", True, 1, 2**53,
                       help="The number (#) of a deleted run.")

        def save(form: RecordForm) -> int:
            run_id = int(F.read(spec, form.values()["run number"]))
            with self.store_lock:
                self.campaign.restore_run(run_id)
            return run_id

        self.app.push_screen(
            RecordForm("restore a deleted run", [FormField(spec, str(deleted[0]) if deleted
                                                            else "")], save,
                       intro="recently deleted: " + (", ".join(map(str, deleted[:12])) or
                                                     "none")),
            lambda run_id: self._saved(run_id, added=False))

    @on(ChangeUndone)
    def _undone(self, message: ChangeUndone) -> None:
        self.detail_run_id = None
        self.reload()

    def on_screen_resume(self) -> None:
        if self.app.runs_filter is not None:
            self.where, self.app.runs_filter = self.app.runs_filter, None
            self.query_one("#filter", Input).value = self.where
            self.detail_run_id = None
            self.load(0, cursor=0)
        elif self.query_one(RunTable).page_rows:
            self.reload()

    def action_curve(self) -> None:
        run = self.query_one(RunTable).current_run()
        if run is None:
            return
        if not run.get("n_curves"):
            self.say(f"run {run['id']} has no DO curve")
            return
        self.app.selected_run_id = run["id"]
        self.app.action_go("curves")
