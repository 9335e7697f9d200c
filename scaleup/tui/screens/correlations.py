"""Screen 5, Correlations (being built)."""

from __future__ import annotations

from textual.app import ComposeResult
from textual.widgets import Static

from scaleup.tui.screens.base import WorkScreen


class CorrelationsScreen(WorkScreen):
    MODE = "correlations"
    TITLE = "Correlations"

    def body(self) -> ComposeResult:
        yield Static("Correlations: being built")
