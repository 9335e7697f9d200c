"""What a DO curve must satisfy before it is fitted, and where its rise begins.

Each check turns a curve that cannot give a kLa into a :class:`Rejected` with a code and a
sentence that says what is wrong and what to do, instead of a number.
"""

from __future__ import annotations

from dataclasses import dataclass

import numpy as np

from scaleup.errors import InputError

MIN_POINTS = 5  # three parameters (kLa, C_inf, C0) plus two degrees of freedom for an error


@dataclass(frozen=True)
class Rejected:
    """A curve that gave no kLa. ``code``: all_nan, time_not_increasing, too_short, flat,
    saturated, no_convergence, log_linear_failed; ``reason``: the sentence for people."""

    reason: str
    code: str


@dataclass(frozen=True, eq=False)
class Prepared:
    """A curve that passed the checks: finite samples only, with its start."""

    t: np.ndarray
    c: np.ndarray
    start: float
    start_detected: bool
    noise: float
    direction: float
    warnings: tuple[str, ...]


def noise_level(c: np.ndarray) -> float:
    """Standard deviation of the sample noise, robust to the trend.

    Parameters
    ----------
    c : array
        Readings [any unit], finite, in time order.

    Returns
    -------
    float
        Noise standard deviation [unit of ``c``]; 0 for fewer than four samples.

    Notes
    -----
    From the median absolute second difference: a smooth trend hardly contributes to it,
    1.4826 turns a median absolute value into a standard deviation for normal noise, and the
    square root of 6 undoes the differencing (1 - 2 + 1 has a sum of squares of 6).
    """
    if c.size < 4:
        return 0.0
    d2 = np.abs(c[2:] - 2.0 * c[1:-1] + c[:-2])
    half = d2.size // 2
    return float(1.4826 * np.partition(d2, half)[half] / np.sqrt(6.0))


def _levels(c: np.ndarray) -> tuple[float, float, int]:
    """Mean of the first and of the last 5 % of the samples (at least 3 each)."""
    q = max(3, c.size // 20)
    return float(c[:q].mean()), float(c[-q:].mean()), q


def detect_start(t_s: np.ndarray, c: np.ndarray) -> float:
    """Time the rise begins [s]: the last sample still at the initial level.

    Parameters
    ----------
    t_s : array
        Sample times [s], increasing, finite.
    c : array
        DO readings [any unit], finite.

    Returns
    -------
    float
        The start time [s]; ``t_s[0]`` when the data begin on the rise.

    Notes
    -----
    The signal is smoothed with a centred moving average; the rise is where the smoothed
    signal first passes 10 % of the total change (and five times its noise), and the start
    is the last sample before that within 0.5 % of the change (and three times the noise) of
    the initial level. A first-order probe starts its rise with zero slope, so the detected
    start can be a little late; give the logged gas-on time for the lag model.

    Examples
    --------
    >>> t = np.arange(0.0, 300.0)
    >>> c = np.where(t < 40, 0.5, 8.0 - 7.5 * np.exp(-0.03 * (t - 40)))
    >>> float(detect_start(t, c))
    40.0
    """
    t = np.asarray(t_s, dtype=float)
    y = np.asarray(c, dtype=float)
    first, last, _ = _levels(y)
    change = last - first
    if change < 0:
        y, first, change = -y, -first, -change
    width = max(1, min(25, y.size // 50)) | 1
    padded = np.pad(y, width // 2, mode="edge")
    smooth = np.convolve(padded, np.ones(width) / width, mode="valid")
    noise = noise_level(y) / np.sqrt(width)
    base = float(y[:width].mean())  # the level before anything happened
    above = smooth > base + max(0.1 * change, 5 * noise)
    if not above.any():
        return float(t[0])
    rise = int(np.argmax(above))
    flat = np.flatnonzero(smooth[:rise] <= base + max(0.005 * change, 3 * noise))
    if flat.size == 0 or flat[-1] < width:
        return float(t[0])
    # the average leaves the level up to width/2 samples early: step on along the raw data
    i = int(flat[-1])
    level = base + max(0.005 * change, 3 * noise * np.sqrt(width))
    while i + 1 < rise and y[i + 1] <= level:
        i += 1
    return float(t[i])


def prepare(t_s, c, *, start_s: float | None = None,
            c_star: float | None = None) -> Prepared | Rejected:
    """Check one curve and find its start; a :class:`Rejected` says why it cannot be fitted.

    Parameters
    ----------
    t_s : array
        Sample times [s].
    c : array
        DO readings [any unit]; NaN is a gap.
    start_s : float, optional
        Gas-on time [s]; detected when None.
    c_star : float, optional
        Saturation concentration [unit of ``c``], to tell a saturated curve from a flat one.

    Returns
    -------
    Prepared or Rejected
    """
    t = np.asarray(t_s, dtype=float).ravel()
    y = np.asarray(c, dtype=float).ravel()
    if t.size != y.size:
        raise InputError(f"{t.size} times but {y.size} DO values; every sample needs both",
                         "curve")
    finite = np.isfinite(t) & np.isfinite(y)
    if not finite.any():
        return Rejected("no usable samples: every DO value (or its time) is missing", "all_nan")
    rows = np.flatnonzero(finite)
    warnings = []
    if rows.size < t.size:
        warnings.append(f"{t.size - rows.size} samples with a missing time or value were "
                        "skipped")
    t, y = t[rows], y[rows]
    steps = np.diff(t)
    if (steps <= 0).any():
        i = int(np.argmax(steps <= 0))
        return Rejected(f"time does not increase: sample {rows[i + 1] + 1} at {t[i + 1]:g} s "
                        f"follows sample {rows[i] + 1} at {t[i]:g} s; sort the samples or fix "
                        "the clock", "time_not_increasing")
    if t.size < MIN_POINTS:
        return _too_short(t.size, "usable samples")
    noise = noise_level(y)
    first, last, _ = _levels(y)
    change = last - first
    scale = max(abs(first), abs(last), 1e-300)
    if np.ptp(y) == 0 or abs(change) <= max(5 * noise, 1e-9 * scale):
        level = float(np.median(y))
        if c_star is not None and c_star > 0 and level >= 0.9 * c_star:
            return Rejected(f"saturated from the start: the signal stays at {level:.4g} "
                            f"({100 * level / c_star:.0f} % of C* = {c_star:g}); strip the "
                            "oxygen first (nitrogen or sulfite) so there is a rise to fit",
                            "saturated")
        return Rejected(f"flat: the signal changes by {change:.3g} from start to end, not "
                        f"more than five times its noise ({noise:.2g}); there is no rise to "
                        "fit", "flat")
    if start_s is None:
        start, detected = detect_start(t, y), True
    else:
        start, detected = float(start_s), False
        if not (np.isfinite(start) and t[0] - 1e-9 <= start < t[-1]):
            raise InputError(f"{start_s:g} s is outside the record, which runs from "
                             f"{t[0]:g} s to {t[-1]:g} s", "start_s", start_s)
    n_after = int((t >= start).sum())
    if n_after < MIN_POINTS:
        return _too_short(n_after, "samples after the start")
    return Prepared(t=t, c=y, start=start, start_detected=detected, noise=noise,
                    direction=float(np.sign(change)), warnings=tuple(warnings))


def _too_short(n: int, what: str) -> Rejected:
    return Rejected(f"too short: {n} {what}; fitting kLa, C_inf and C0 (3 parameters) needs at "
                    f"least {MIN_POINTS}", "too_short")
