"""The strip along the top: where you are, where else you can go, which campaign is open."""

from __future__ import annotations

from rich.text import Text
from textual.widgets import Static


class NavBar(Static):
    """One line: the seven places with their keys, the current one lit, then the file."""

    DEFAULT_CSS = "NavBar { height: 1; }"

    def __init__(self, current: str, campaign_name: str = "", **kwargs):
        super().__init__(**kwargs)
        self.current = current
        self.campaign_name = campaign_name

    def render(self) -> Text:
        from scaleup.tui.app import PLACES

        line = Text(no_wrap=True, overflow="ellipsis")
        line.append(" scaleup ", style="bold reverse")
        narrow = self.size.width and self.size.width < 100
        for place in PLACES:
            lit = place.mode == self.current
            label = place.title[:4] if narrow and not lit else place.title
            line.append(" ")
            line.append(place.key, style="bold underline" if not lit else "bold reverse")
            line.append(f" {label} " if not lit else f" {label} ",
                        style="bold reverse" if lit else "dim")
        if self.campaign_name:
            line.append(f"  {self.campaign_name}", style="italic dim")
        return line
