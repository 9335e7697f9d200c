"""The `?` sheet: every key of the screen you came from, then the keys that work anywhere."""

from __future__ import annotations

from rich.table import Table
from rich.text import Text
from textual.app import ComposeResult
from textual.binding import Binding
from textual.containers import VerticalScroll
from textual.screen import ModalScreen, Screen
from textual.widgets import Static

_NAMES = {"question_mark": "?", "slash": "/", "escape": "esc", "delete": "del",
          "pagedown": "pgdn", "pageup": "pgup", "less_than_sign": "<",
          "greater_than_sign": ">", "left_square_bracket": "[", "right_square_bracket": "]",
          "comma": ",", "full_stop": ".", "plus": "+", "minus": "-", "space": "space"}


def key_text(key: str) -> str:
    """How a key is written for people: ``ctrl+s``, ``?``, ``pgdn``."""
    return " / ".join(_NAMES.get(k.strip(), k.strip()) for k in key.split(","))


def bindings_of(screen: Screen) -> list[Binding]:
    return [b for b in screen.BINDINGS if isinstance(b, Binding) and b.description]


class KeysScreen(ModalScreen[None]):
    """A sheet of keys; any key closes it."""

    BINDINGS = [Binding("escape,question_mark,q,f1", "dismiss", "close", id="close")]

    def __init__(self, origin: Screen):
        super().__init__()
        self.origin = origin

    def compose(self) -> ComposeResult:
        with VerticalScroll(id="keys-sheet"):
            yield Static(self._sheet(), id="keys-body")

    def _sheet(self) -> Table:
        from scaleup.tui.app import PLACES, WorkbenchApp

        title = getattr(self.origin, "TITLE", None) or type(self.origin).__name__
        table = Table(title=f"keys of {title}", title_justify="left", box=None,
                      show_header=False, pad_edge=False, expand=True)
        table.add_column("key", style="bold", no_wrap=True, min_width=10)
        table.add_column("does")
        for binding in bindings_of(self.origin):
            table.add_row(key_text(binding.key), Text(binding.description))
        table.add_row("", "")
        table.add_row(Text("anywhere", style="italic"), "")
        for place in PLACES:
            table.add_row(place.key, Text(f"{place.title}: {place.purpose}"))
        for binding in WorkbenchApp.BINDINGS:
            if binding.description and not binding.id.startswith("go-"):
                table.add_row(key_text(binding.key), Text(binding.description))
        table.add_row("ctrl+p", Text("find any command by name"))
        table.add_row("", Text("press esc or ? to close", style="dim"))
        return table
