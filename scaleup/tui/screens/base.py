"""What every workbench screen shares: the top strip, the footer, the store lock."""

from __future__ import annotations

from textual.app import ComposeResult
from textual.screen import Screen
from textual.widgets import Footer

from scaleup.tui.widgets.navbar import NavBar


class WorkScreen(Screen):
    """A place of the workbench. Subclasses set ``MODE`` and ``TITLE`` and write ``body``."""

    MODE = ""
    TITLE = ""

    @property
    def campaign(self):
        return self.app.campaign

    @property
    def store_lock(self):
        return self.app.store_lock

    @property
    def settings(self):
        return self.app.settings

    def compose(self) -> ComposeResult:
        yield NavBar(self.MODE, self.app.sub_title, id="navbar")
        yield from self.body()
        yield Footer(compact=True)

    def body(self) -> ComposeResult:
        raise NotImplementedError

    def say(self, text: str, *, error: bool = False, title: str | None = None) -> None:
        """A short notice in the corner; never markup, so units in brackets survive."""
        self.notify(text, title=title or self.TITLE, severity="error" if error else
                    "information", markup=False, timeout=6 if error else 3)
