"""The terminal workbench: one open campaign, seven screens, keyboard first.

``make_app(campaign, settings)`` builds the app from its services (used by ``scaleup`` and by
the tests); ``run_app(path)`` opens a campaign file and runs it. Screens are imported only when
first shown, so the first frame costs textual and the Runs screen, nothing more.
"""

from __future__ import annotations

import importlib
import threading
from collections.abc import Iterable
from dataclasses import dataclass
from pathlib import Path

from textual.app import App, SystemCommand
from textual.binding import Binding
from textual.screen import Screen
from textual.theme import Theme

from scaleup.campaign import Campaign


@dataclass(frozen=True)
class Settings:
    """How the workbench behaves; the defaults suit a person, tests shrink them."""

    page_size: int = 200  # runs held in the table at once; the rest stay in the file
    detail_delay_s: float = 0.12  # wait for the cursor to settle before deriving a run
    plots: bool = True  # off in snapshot tests where a plot adds nothing


@dataclass(frozen=True)
class Place:
    """One screen of the workbench: its mode name, key, title and where its class lives."""

    mode: str
    key: str
    title: str
    target: str
    purpose: str


PLACES: tuple[Place, ...] = (
    Place("runs", "1", "Runs", "scaleup.tui.screens.runs:RunsScreen",
          "browse, filter, log and edit runs"),
    Place("vessels", "2", "Vessels", "scaleup.tui.screens.vessels:VesselsScreen",
          "geometry, impellers, sparger, jacket; sketch to scale"),
    Place("media", "3", "Media", "scaleup.tui.screens.media:MediaScreen",
          "liquids, their properties and salts"),
    Place("curves", "4", "Curves", "scaleup.tui.screens.curves:CurvesScreen",
          "fit DO curves, move the window, accept kLa"),
    Place("correlations", "5", "Correlations",
          "scaleup.tui.screens.correlations:CorrelationsScreen",
          "fit kLa correlations, parity, leave-one-vessel-out"),
    Place("scaleup", "6", "Scale-up", "scaleup.tui.screens.projection:ProjectionScreen",
          "project a pilot point to the production vessel"),
    Place("properties", "7", "Properties", "scaleup.tui.screens.properties:PropertiesScreen",
          "solubility, diffusivity, water, transport"),
)

# Our own palette: deep slate background, copper for what is active, teal for what is
# good, brick for what is broken. Chosen to stay apart on a 256-colour terminal.
WORKBENCH_THEME = Theme(
    name="scaleup-slate",
    primary="#3f8f9f",
    secondary="#7a8fa6",
    accent="#d08c45",
    warning="#d9b44a",
    error="#d0553f",
    success="#6fae6a",
    foreground="#dfe4ea",
    background="#1b2128",
    surface="#232b34",
    panel="#2c3642",
    dark=True,
)


def _factory(place: Place):
    def build() -> Screen:
        module, _, attr = place.target.partition(":")
        return getattr(importlib.import_module(module), attr)()

    return build


class WorkbenchApp(App):
    """The scaleup workbench on one campaign."""

    TITLE = "scaleup"
    CSS_PATH = Path(__file__).with_name("scaleup.tcss")
    ENABLE_COMMAND_PALETTE = True
    HORIZONTAL_BREAKPOINTS = [(0, "-narrow"), (130, "-wide"), (170, "-huge")]
    MODES = {place.mode: _factory(place) for place in PLACES}
    DEFAULT_MODE = "runs"
    BINDINGS = [
        *(Binding(p.key, f"app.go('{p.mode}')", p.title, show=False, id=f"go-{p.mode}")
          for p in PLACES),
        Binding("question_mark,f1", "app.keys", "keys", id="keys"),
        Binding("ctrl+z", "app.undo", "undo", show=False, id="undo"),
        Binding("ctrl+q", "app.quit", "quit", id="quit"),
        # digits typed in a field go into the field; esc leaves it so 1-7 switch screens again
        Binding("escape", "app.leave_field", "leave field", show=False, id="leave-field"),
    ]

    def __init__(self, campaign: Campaign, settings: Settings | None = None):
        super().__init__()
        self.campaign = campaign
        self.settings = settings or Settings()
        # One connection, used from the event loop and from workers: one at a time.
        self.store_lock = threading.RLock()
        self.register_theme(WORKBENCH_THEME)
        self.theme = WORKBENCH_THEME.name
        self.sub_title = Path(campaign.path).name
        self.selected_run_id: int | None = None  # the run the Curves screen opens on
        self.runs_filter: str | None = None  # a filter another screen asks Runs to apply

    # ---- navigation ----------------------------------------------------------------------
    def action_go(self, mode: str) -> None:
        if self.current_mode != mode:
            self.switch_mode(mode)

    def action_leave_field(self) -> None:
        from textual.widgets import Input

        if isinstance(self.focused, Input):
            self.screen.set_focus(None)
            self.notify("left the field: number keys switch screens again", timeout=2)

    def action_keys(self) -> None:
        from scaleup.tui.widgets.keys import KeysScreen

        if not isinstance(self.screen, KeysScreen):
            self.push_screen(KeysScreen(self.screen))

    def action_undo(self) -> None:
        """Undo this user's last change, whatever screen it was made on."""
        from scaleup.errors import InputError
        from scaleup.tui.messages import ChangeUndone

        try:
            with self.store_lock:
                done = self.campaign.undo()
        except InputError as exc:
            self.notify(str(exc), title="undo", severity="warning", markup=False)
            return
        self.notify(f"undid the {done['undid']} of {done['table']} {done['record_id']}",
                    title="undo", markup=False)
        self.screen.post_message(ChangeUndone(done["table"], done["record_id"], done["undid"]))

    def get_system_commands(self, screen: Screen) -> Iterable[SystemCommand]:
        yield from super().get_system_commands(screen)
        for place in PLACES:
            yield SystemCommand(f"{place.key}  {place.title}", place.purpose,
                                lambda mode=place.mode: self.action_go(mode))
        yield SystemCommand("Undo last change", "undo your newest edit, delete or add",
                            self.action_undo)
        yield SystemCommand("Keys of this screen", "every key and what it does",
                            self.action_keys)
        commands = getattr(screen, "palette_commands", None)
        if commands is not None:
            yield from commands()


def make_app(campaign: Campaign, settings: Settings | None = None) -> WorkbenchApp:
    """The workbench on an open campaign (the caller keeps and closes the campaign)."""
    return WorkbenchApp(campaign, settings)


def run_app(path: str | Path) -> None:
    """Open the campaign file at ``path`` and run the workbench until the user quits."""
    with Campaign(path) as campaign:
        make_app(campaign).run()
