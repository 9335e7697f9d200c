"""Screen 3, Media (being built)."""

from __future__ import annotations

from textual.app import ComposeResult
from textual.widgets import Static

from scaleup.tui.screens.base import WorkScreen


class MediaScreen(WorkScreen):
    MODE = "media"
    TITLE = "Media"

    def body(self) -> ComposeResult:
        yield Static("Media: being built")
