"""The report's plots, drawn by matplotlib as SVG text to put inline in a page.

No pyplot: each plot builds its own :class:`matplotlib.figure.Figure`, so nothing global is
touched and the report can be built from a worker thread. Text stays text in the SVG (it
prints sharply and can be searched), and element ids are salted with a fixed string so the
same study gives the same file byte for byte.
"""

from __future__ import annotations

import io
import re
from collections.abc import Sequence

import numpy as np

from scaleup.units import MOL_PER_NORMAL_M3

WIDTH_IN, HEIGHT_IN = 6.4, 4.0
_STYLE = {"svg.fonttype": "none", "svg.hashsalt": "scaleup-report", "font.size": 9,
          "axes.grid": True, "grid.alpha": 0.3, "axes.spines.top": False,
          "axes.spines.right": False}
MARKERS = "osD^v<>ph*"


def _svg(fig) -> str:
    buffer = io.StringIO()
    fig.savefig(buffer, format="svg", bbox_inches="tight", metadata={"Date": None})
    text = buffer.getvalue()
    # inline SVG needs neither the XML declaration nor the DOCTYPE
    text = re.sub(r"^<\?xml[^>]*>\s*", "", text)
    text = re.sub(r"<!DOCTYPE[^>]*>\s*", "", text)
    return text.strip()


def _figure(width: float = WIDTH_IN, height: float = HEIGHT_IN):
    from matplotlib.figure import Figure

    return Figure(figsize=(width, height))


def _style():
    import matplotlib

    return matplotlib.rc_context(_STYLE)


def _plain_ticks(ax) -> None:
    """Log axes labelled 20, 50, 100 rather than 2x10^1."""
    from matplotlib.ticker import FuncFormatter, LogLocator

    for axis in (ax.xaxis, ax.yaxis):
        if axis.get_scale() != "log":
            continue
        axis.set_major_locator(LogLocator(subs=(1.0, 2.0, 5.0)))
        axis.set_major_formatter(FuncFormatter(lambda v, _: f"{v:g}"))
        axis.set_minor_formatter(FuncFormatter(lambda v, _: ""))


def parity_svg(measured: Sequence[float], predicted: Sequence[float], groups: Sequence[str],
               unit: str = "1/h", scale: float = 3600.0) -> str:
    """Measured against predicted on log axes, one marker per group (vessel), with the 1:1
    line and a +-20 % band. Values in SI, shown times ``scale`` in ``unit``."""
    y = np.asarray(measured, float) * scale
    x = np.asarray(predicted, float) * scale
    with _style():
        fig = _figure()
        ax = fig.add_subplot()
        ok = (x > 0) & (y > 0)
        low, high = (np.min(np.r_[x[ok], y[ok]]) / 1.3, np.max(np.r_[x[ok], y[ok]]) * 1.3) \
            if ok.any() else (1.0, 10.0)
        line = np.array([low, high])
        ax.fill_between(line, line / 1.2, line * 1.2, color="0.85", label="+-20 %")
        ax.plot(line, line, color="0.3", lw=1, label="1:1")
        for i, g in enumerate(dict.fromkeys(groups)):
            mask = np.array([gg == g for gg in groups]) & ok
            ax.plot(x[mask], y[mask], MARKERS[i % len(MARKERS)], ms=5, alpha=0.8,
                    label=str(g), linestyle="none", gid=f"points-{i}")
        ax.set_xscale("log")
        ax.set_yscale("log")
        ax.set_xlim(low, high)
        ax.set_ylim(low, high)
        ax.set_xlabel(f"predicted [{unit}]")
        ax.set_ylabel(f"measured [{unit}]")
        ax.set_aspect("equal")
        ax.legend(loc="upper left", fontsize=8)
        _plain_ticks(ax)
        return _svg(fig)


def residual_svg(predicted: Sequence[float], residual_log: Sequence[float],
                 groups: Sequence[str], residual_sd: float | None = None, unit: str = "1/h",
                 scale: float = 3600.0) -> str:
    """Log residuals ln(measured/predicted) against the prediction, by group, with +-2 s."""
    x = np.asarray(predicted, float) * scale
    r = np.asarray(residual_log, float)
    with _style():
        fig = _figure(height=3.2)
        ax = fig.add_subplot()
        ax.axhline(0.0, color="0.3", lw=1)
        if residual_sd:
            for s in (-2, 2):
                ax.axhline(s * residual_sd, color="0.5", lw=0.8, ls="--")
        for i, g in enumerate(dict.fromkeys(groups)):
            mask = np.array([gg == g for gg in groups])
            ax.plot(x[mask], r[mask], MARKERS[i % len(MARKERS)], ms=5, alpha=0.8,
                    label=str(g), linestyle="none", gid=f"points-{i}")
        ax.set_xscale("log")
        ax.set_xlabel(f"predicted [{unit}]")
        ax.set_ylabel("ln(measured / predicted)")
        ax.legend(loc="best", fontsize=8)
        _plain_ticks(ax)
        return _svg(fig)


def window_svg(window: dict, chosen: tuple[float, float] | None = None,
               others: Sequence[tuple[str, float, float]] = ()) -> str:
    """The operating window: total power over speed (rpm) x gas rate (NL/min), infeasible
    points hatched, the probability of meeting the duty as contours, the chosen point
    marked. ``window`` holds the grid as the design study saves it (SI)."""
    speeds = np.asarray(window["speeds_rps"], float).reshape(-1) * 60.0
    gas = np.asarray(window["gas_flows_mol_s"], float).reshape(-1) / MOL_PER_NORMAL_M3 * 6e4
    power = np.asarray(window["total_power_w"], dtype=float).reshape(speeds.size, gas.size)
    feasible = np.asarray(window["feasible"], dtype=bool).reshape(speeds.size, gas.size)
    with _style():
        fig = _figure(height=4.4)
        ax = fig.add_subplot()
        G, N = np.meshgrid(gas, speeds)
        shown = np.ma.masked_where(~feasible | ~np.isfinite(power), power / 1e3)
        if shown.count():
            mesh = ax.pcolormesh(N, G, shown, shading="nearest", cmap="viridis")
            fig.colorbar(mesh, ax=ax, label="total power [kW] (feasible points)")
        ax.contourf(N, G, (~feasible).astype(float), levels=[0.5, 1.5], colors="none",
                    hatches=["///"])
        ax.contour(N, G, feasible.astype(float), levels=[0.5], colors="k", linewidths=1)
        probability = window.get("probability_meets_duty")
        if probability is not None:
            p = np.asarray(probability, dtype=float).reshape(speeds.size, gas.size)
            if np.isfinite(p).any() and np.nanmax(p) > np.nanmin(p):
                lines = ax.contour(N, G, p, levels=[0.5, 0.9, 0.95], colors="tab:red",
                                   linewidths=0.8, linestyles="--")
                ax.clabel(lines, fmt=lambda v: f"P={v:.2f}", fontsize=7)
        for i, (label, n, q) in enumerate(others):
            if n is not None and q is not None:
                ax.plot(n * 60.0, q / MOL_PER_NORMAL_M3 * 6e4, MARKERS[(i + 1) % len(MARKERS)],
                        color="tab:orange", ms=5, linestyle="none")
                ax.annotate(label, (n * 60.0, q / MOL_PER_NORMAL_M3 * 6e4), fontsize=7,
                            xytext=(3, 3), textcoords="offset points")
        if chosen is not None and chosen[0] is not None and chosen[1] is not None:
            ax.plot(chosen[0] * 60.0, chosen[1] / MOL_PER_NORMAL_M3 * 6e4, "*", ms=14,
                    color="tab:red", markeredgecolor="k", label="chosen point",
                    linestyle="none")
            ax.legend(loc="upper right", fontsize=8)
        ax.set_xscale("log")
        ax.set_yscale("log")
        ax.set_xlabel("agitator speed [rpm]")
        ax.set_ylabel("gas rate [NL/min]")
        ax.set_title("hatched: breaks a limit or misses the duty", fontsize=8)
        _plain_ticks(ax)
        return _svg(fig)
