"""Plots drawn in the terminal (textual-plotext), imported only when the first one is shown."""

from __future__ import annotations

import numpy as np
from textual.widget import Widget


def new_plot(widget_id: str, classes: str = "") -> Widget:
    """A fresh plot widget (importing plotext costs a quarter second, so not at start)."""
    from textual_plotext import PlotextPlot

    return PlotextPlot(id=widget_id, classes=classes)


def thin(*arrays: np.ndarray, most: int = 400) -> tuple[np.ndarray, ...]:
    """Every k-th sample so a plot of a long record stays quick; the last one is kept."""
    n = len(arrays[0])
    if n <= most:
        return arrays
    index = np.unique(np.r_[np.linspace(0, n - 1, most).astype(int), n - 1])
    return tuple(np.asarray(a)[index] for a in arrays)


def draw_do_curve(plot: Widget, time_s: np.ndarray, do_values: np.ndarray, unit: str, *,
                  title: str = "", fit_time_s: np.ndarray | None = None,
                  fit_values: np.ndarray | None = None,
                  window_s: tuple[float, float] | None = None) -> None:
    """A DO curve against time in minutes; the fit is drawn first so the points stay on top."""
    plt = plot.plt
    plt.clear_data()
    plt.clear_figure()
    t, c = thin(np.asarray(time_s, float), np.asarray(do_values, float))
    minutes = t / 60.0
    if fit_time_s is not None and fit_values is not None:
        ft, fc = thin(np.asarray(fit_time_s, float), np.asarray(fit_values, float), most=200)
        plt.plot((ft / 60.0).tolist(), fc.tolist(), marker="braille", color="orange",
                 label="fit")
    plt.scatter(minutes.tolist(), c.tolist(), marker="dot", color="cyan", label="measured")
    if window_s is not None:
        for edge in window_s:
            plt.vline(edge / 60.0, color="gray")
    plt.xlabel("time [min]")
    plt.ylabel(f"DO [{unit}]")
    if title:
        plt.title(title)
    plot.refresh()


def draw_residuals(plot: Widget, time_s: np.ndarray, residuals: np.ndarray, unit: str) -> None:
    """Residuals of a fit against time: a pattern here means the model does not fit."""
    plt = plot.plt
    plt.clear_data()
    plt.clear_figure()
    t, r = thin(np.asarray(time_s, float), np.asarray(residuals, float))
    plt.hline(0.0, color="gray")
    plt.scatter((t / 60.0).tolist(), r.tolist(), marker="dot", color="orange")
    plt.xlabel("time [min]")
    plt.ylabel(f"residual [{unit}]")
    plot.refresh()
