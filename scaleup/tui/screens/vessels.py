"""Screen 2, Vessels (being built)."""

from __future__ import annotations

from textual.app import ComposeResult
from textual.widgets import Static

from scaleup.tui.screens.base import WorkScreen


class VesselsScreen(WorkScreen):
    MODE = "vessels"
    TITLE = "Vessels"

    def body(self) -> ComposeResult:
        yield Static("Vessels: being built")
