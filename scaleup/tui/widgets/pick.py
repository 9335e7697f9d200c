"""A short pick-list in a modal: arrows and enter, or esc to leave it as it was."""

from __future__ import annotations

from rich.text import Text
from textual.app import ComposeResult
from textual.binding import Binding
from textual.containers import Vertical
from textual.screen import ModalScreen
from textual.widgets import Label, OptionList
from textual.widgets.option_list import Option


class PickScreen(ModalScreen[str | None]):
    """Choose one of ``choices`` (key, label); dismissed with the key or None."""

    BINDINGS = [Binding("escape", "dismiss(None)", "cancel", id="cancel")]

    def __init__(self, title: str, choices: list[tuple[str, str]], current: str | None = None):
        super().__init__()
        self.pick_title = title
        self.choices = choices
        self.current = current

    def compose(self) -> ComposeResult:
        with Vertical(id="pick-box"):
            yield Label(Text(self.pick_title, style="bold"))
            yield OptionList(*(Option(Text(("● " if key == self.current else "  ") + label),
                                      id=key) for key, label in self.choices), id="pick-list")

    def on_mount(self) -> None:
        options = self.query_one(OptionList)
        keys = [key for key, _ in self.choices]
        if self.current in keys:
            options.highlighted = keys.index(self.current)
        options.focus()

    def on_option_list_option_selected(self, event: OptionList.OptionSelected) -> None:
        self.dismiss(event.option.id)
