"""Screen 7, Properties (being built)."""

from __future__ import annotations

from textual.app import ComposeResult
from textual.widgets import Static

from scaleup.tui.screens.base import WorkScreen


class PropertiesScreen(WorkScreen):
    MODE = "properties"
    TITLE = "Properties"

    def body(self) -> ComposeResult:
        yield Static("Properties: being built")
