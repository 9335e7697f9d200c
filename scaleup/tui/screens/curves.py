"""Screen 4, Curves (being built)."""

from __future__ import annotations

from textual.app import ComposeResult
from textual.widgets import Static

from scaleup.tui.screens.base import WorkScreen


class CurvesScreen(WorkScreen):
    MODE = "curves"
    TITLE = "Curves"

    def body(self) -> ComposeResult:
        yield Static("Curves: being built")
