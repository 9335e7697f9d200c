"""The operating window as a terminal heat map: speed across, gas rate up, total power as
shade; points that break a limit are hatched (a glyph, not only a colour), the optimum is ◆."""

from __future__ import annotations

import numpy as np
from rich.text import Text

from scaleup import units

# light to dark: more power is darker, so the eye goes to the cheap corner
SHADES = ("#e8d8a8", "#d9b36a", "#c98a45", "#a8612e", "#7d3f22", "#4f2318")
HATCH = "░░"


def heat_map(window: dict, optimum: tuple[float, float] | None = None,
             volume_m3: float | None = None) -> Text:
    """Rows are gas rates (highest on top), columns speeds; two cells per grid point."""
    speeds = np.asarray(window["speeds_rps"])
    flows = np.asarray(window["gas_flows_mol_s"])
    # the window is indexed [speed, gas rate]; the map draws gas rates as rows
    power = np.asarray(window["total_power_w"], float).T
    feasible = np.asarray(window["feasible"], bool).T
    finite = power[np.isfinite(power) & (power > 0)]
    lo, hi = (finite.min(), finite.max()) if finite.size else (1.0, 10.0)
    span = np.log(hi / lo) if hi > lo else 1.0
    best = None
    if optimum is not None and optimum[0] is not None:
        best = (int(np.abs(flows - optimum[1]).argmin()), int(np.abs(speeds - optimum[0]).argmin()))
    text = Text(no_wrap=True)
    label_w = 9
    for row in range(flows.size - 1, -1, -1):
        flow_label = units.sig(units.gas_flow_to(flows[row], "Nm3/h"), 3)
        text.append(f"{flow_label:>{label_w}} ", style="dim")
        for col in range(speeds.size):
            p = power[row, col]
            if best == (row, col):
                text.append("◆◆", style="bold #ffffff on #1f6f5f")
            elif not feasible[row, col] or not np.isfinite(p):
                text.append(HATCH, style="#6b7480")
            else:
                shade = SHADES[min(int(np.log(p / lo) / span * len(SHADES)), len(SHADES) - 1)]
                text.append("  ", style=f"on {shade}")
        text.append("\n")
    text.append(" " * (label_w + 1))
    step = max(1, speeds.size // 5)
    axis = ""
    for col in range(0, speeds.size, step):
        axis += f"{units.sig(speeds[col] * 60, 3):<{2 * step}}"
    text.append(axis[: 2 * speeds.size] + "\n", style="dim")
    text.append(f"{'':>{label_w}} speed [rpm] →   gas rate [Nm3/h] ↑\n", style="dim")
    text.append(f"{'':>{label_w}} ")
    for shade in SHADES:
        text.append("  ", style=f"on {shade}")
    text.append(f" total power {units.sig(lo / 1000, 3)} to {units.sig(hi / 1000, 3)} kW  ")
    text.append(HATCH, style="#6b7480")
    text.append(" breaks a limit or the duty  ")
    text.append("◆◆", style="bold #ffffff on #1f6f5f")
    text.append(" least total power that meets the duty")
    return text
