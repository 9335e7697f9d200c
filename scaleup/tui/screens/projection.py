"""Screen 6, Scale-up (being built)."""

from __future__ import annotations

from textual.app import ComposeResult
from textual.widgets import Static

from scaleup.tui.screens.base import WorkScreen


class ProjectionScreen(WorkScreen):
    MODE = "scaleup"
    TITLE = "Scale-up"

    def body(self) -> ComposeResult:
        yield Static("Scale-up: being built")
