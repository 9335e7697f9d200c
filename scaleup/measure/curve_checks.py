"""What a DO curve must satisfy before it is fitted, and where its rise begins.

Each check turns a curve that cannot give a kLa into a :class:`Rejected` with a code and a
sentence that says what is wrong and what to do, instead of a number. :func:`prepare_batch`
runs the checks on many curves at once and hands the few that need a closer look (gaps,
time going back, too short, flat or nearly so) to :func:`prepare`, one by one.
"""

from __future__ import annotations

from collections.abc import Sequence
from concurrent.futures import Executor
from dataclasses import dataclass
from functools import partial

import numpy as np

from scaleup.errors import InputError
from scaleup.measure import lanes
from scaleup.measure.curve_start import detect_start, detect_starts, end_levels, noise_level

MIN_POINTS = 5  # three parameters (kLa, C_inf, C0) plus two degrees of freedom for an error
_BLOCK = 100_000  # samples per block of rows in the batch checks: their work arrays stay in cache


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
    first, last, _ = end_levels(y)
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


@dataclass(frozen=True, eq=False)
class Batch:
    """Curves that passed the checks, padded into ``(m, n)`` arrays.

    Row i holds ``length[i]`` finite samples in time order (zeros after them); its rise
    starts at ``start[i]`` [s], and ``first[i]`` is the index of its first sample at or after
    that time. ``spacing[i]`` is its time step [s] when its samples are evenly spaced (steps
    equal to 1e-9), nan otherwise. ``index`` is the position of each row in the caller's list
    of curves.
    """

    index: np.ndarray
    t: np.ndarray
    c: np.ndarray
    length: np.ndarray
    first: np.ndarray
    start: np.ndarray
    detected: np.ndarray
    spacing: np.ndarray
    warnings: list


def row_means(c: np.ndarray, begin: np.ndarray, count: np.ndarray
              ) -> tuple[np.ndarray, np.ndarray]:
    """Mean and range of ``count[i]`` samples of each row i from column ``begin[i]``.

    Parameters
    ----------
    c : array (m, n)
        Readings [any unit].
    begin : int array (m,)
        First column of each run [sample index].
    count : int array (m,)
        Samples in each run, at least one [-].

    Returns
    -------
    (array, array)
        Mean and max - min of each run [unit of ``c``].
    """
    cols = begin[:, None] + np.arange(int(count.max()))
    inside = cols < (begin + count)[:, None]
    values = c[np.arange(c.shape[0])[:, None], np.where(inside, cols, begin[:, None])]
    mean = np.where(inside, values, 0.0).sum(1) / count
    return mean, values.max(1) - values.min(1)


def _clearly_rising(c: np.ndarray, length: np.ndarray, pool: Executor | None = None
                    ) -> np.ndarray:
    """Rows whose change from the first to the last samples is certainly more than five
    times their noise (:func:`noise_level`), so that :func:`prepare` would pass them.

    The noise is 1.4826/sqrt(6) times the median absolute second difference, which is below
    x when more than half of the second differences are. By Chebyshev's inequality at most
    S/x^2 of them reach x, S being their sum of squares; that bound, over the first 60 % of
    the columns, settles every curve whose noise is below about 5 % of its change, and the
    others go to :func:`prepare`, which decides exactly.
    """
    if (length == c.shape[1]).all():
        q = max(3, c.shape[1] // 20)
        first, last = c[:, :q].mean(1), c[:, -q:].mean(1)
    else:
        q = np.maximum(3, length // 20)
        first, _ = row_means(c, np.zeros_like(length), q)
        last, _ = row_means(c, length - q, q)
    change = np.abs(last - first)
    scale = np.maximum(np.maximum(np.abs(first), np.abs(last)), 1e-300)
    # 5 * 1.4826 * median / sqrt(6) < change, with a margin for rounding
    below = 0.999 * change * np.sqrt(6.0) / (5 * 1.4826)
    half = (length - 2) // 2
    span = min(c.shape[1] - 2, int(np.ceil(0.6 * (int(length.max()) - 2))) + 2)
    counted = np.minimum(span, length - 2)
    square = np.empty(length.size)
    block = max(1, _BLOCK // span)

    def sum_squares(a: int, b: int) -> None:
        second = np.multiply(c[a:b, 1:span + 1], 2.0)
        np.subtract(c[a:b, 2:span + 2], second, out=second)
        second += c[a:b, :span]
        if (counted[a:b] < span).any():
            second *= np.arange(span) < counted[a:b, None]
        square[a:b] = np.einsum("ij,ij->i", second, second)

    lanes.share(pool, [partial(sum_squares, a, min(a + block, length.size))
                       for a in range(0, length.size, block)])
    with np.errstate(divide="ignore", invalid="ignore"):
        reach = square / (below * below)
    return (change > 1e-9 * scale) & (counted - reach > half)


def _search_rows(t: np.ndarray, length: np.ndarray, value: np.ndarray) -> np.ndarray:
    """Per row: the number of its ``length`` (increasing) times below ``value``."""
    lo, hi = np.zeros_like(length), length.copy()
    rows = np.arange(length.size)
    while (lo < hi).any():
        mid = (lo + hi) // 2
        up = (lo < hi) & (t[rows, np.minimum(mid, t.shape[1] - 1)] < value)
        lo = np.where(up, mid + 1, lo)
        hi = np.where((lo < hi) & ~up, mid, hi)
    return lo


def prepare_batch(curves: Sequence, starts: Sequence, stars: Sequence,
                  pool: Executor | None = None) -> tuple[Batch | None, list[Rejected | None]]:
    """Check many curves and find their starts, as :func:`prepare` does for one.

    Parameters
    ----------
    curves : sequence of (t_s, c)
        Sample times [s] and DO readings [any unit] of each curve.
    starts : sequence
        Gas-on time [s] of each curve, or None to detect it.
    stars : sequence
        Saturation concentration [unit of the curve] of each, or None.
    pool : Executor, optional
        A thread pool whose free thread takes some of the blocks of rows.

    Returns
    -------
    (Batch or None, list)
        The curves that passed, and per curve its :class:`Rejected` or None.
    """
    ts = [np.asarray(t, dtype=float).ravel() for t, _ in curves]
    cs = [np.asarray(c, dtype=float).ravel() for _, c in curves]
    for t, y in zip(ts, cs, strict=True):
        if t.size != y.size:
            raise InputError(f"{t.size} times but {y.size} DO values; every sample needs "
                             "both", "curve")
    total = len(ts)
    length = np.array([t.size for t in ts], int)
    width = int(length.max()) if total else 0
    t_all, c_all, simple, low, high = _gather(ts, cs, length, width, pool)
    simple &= length >= MIN_POINTS
    if simple.all():
        simple = _clearly_rising(c_all, length, pool)
    elif simple.any():
        rows = np.flatnonzero(simple)
        simple[rows] = _clearly_rising(c_all[rows], length[rows])
    start = np.zeros(total)
    detected = np.zeros(total, bool)
    warnings: list = [()] * total
    rejected: list[Rejected | None] = [None] * total
    for i in np.flatnonzero(~simple):
        p = prepare(ts[i], cs[i], start_s=starts[i], c_star=stars[i])
        if isinstance(p, Rejected):
            rejected[i] = p
            continue
        length[i] = p.t.size
        t_all[i], c_all[i] = 0.0, 0.0
        t_all[i, :length[i]], c_all[i, :length[i]] = p.t, p.c
        start[i], detected[i], warnings[i] = p.start, p.start_detected, p.warnings
    rows = np.flatnonzero(simple)
    given = np.array([starts[i] is not None for i in rows], bool)
    if given.any():
        at = rows[given]
        start[at] = [float(starts[i]) for i in at]
        begin, end = t_all[at, 0], t_all[at, length[at] - 1]
        with np.errstate(invalid="ignore"):
            outside = ~(np.isfinite(start[at]) & (begin - 1e-9 <= start[at]) & (start[at] < end))
        if outside.any():
            j = int(np.argmax(outside))
            raise InputError(f"{start[at[j]]:g} s is outside the record, which runs from "
                             f"{begin[j]:g} s to {end[j]:g} s", "start_s", starts[at[j]])
    if (~given).any():
        found = rows[~given]
        if found.size == total:
            start[:] = detect_starts(t_all, c_all, length, pool)
        else:
            start[found] = detect_starts(t_all[found], c_all[found], length[found], pool)
        detected[found] = True
    first = _search_rows(t_all, length, start)
    for i in rows[length[rows] - first[rows] < MIN_POINTS]:
        rejected[i] = _too_short(int(length[i] - first[i]), "samples after the start")
    keep = np.array([r is None for r in rejected], bool)
    if not keep.any():
        return None, rejected
    index = np.flatnonzero(keep)
    if not keep.all():
        t_all, c_all, low, high = t_all[index], c_all[index], low[index], high[index]
    spacing = _spacing(t_all, low, high, length[index], simple[index])
    return Batch(index=index, t=t_all, c=c_all, length=length[index], first=first[index],
                 start=start[index], detected=detected[index], spacing=spacing,
                 warnings=[warnings[i] for i in index]), rejected


def _gather(ts: list, cs: list, length: np.ndarray, width: int,
            pool: Executor | None = None) -> tuple:
    """The curves as two padded arrays (times [s], readings), and per row whether its
    samples are finite with times increasing, and its smallest and largest padded time
    step [s].

    Taken a few rows at a time, so that the checks read each block while it is in cache
    and the time steps never fill an array as large as the batch.
    """
    total = len(ts)
    even = bool((length == width).all())
    alloc = np.empty if even else np.zeros  # padding must read as zeros
    t_all, c_all = alloc((total, width)), alloc((total, width))
    if not even:
        for i in range(total):
            t_all[i, :length[i]], c_all[i, :length[i]] = ts[i], cs[i]
    good = np.zeros(total, bool)
    low, high = np.full(total, np.inf), np.full(total, -np.inf)
    block = max(1, _BLOCK // max(width, 1))

    def check(a: int, b: int) -> None:
        t, c = t_all[a:b], c_all[a:b]
        if even:
            np.stack(ts[a:b], out=t)
            np.stack(cs[a:b], out=c)
        with np.errstate(over="ignore", invalid="ignore"):
            good[a:b] = np.isfinite(np.einsum("ij,ij->i", t, c))
        if width > 1:
            steps = np.diff(t, axis=1)
            steps.min(1, out=low[a:b])
            steps.max(1, out=high[a:b])
            if even:  # every step lies inside its row: times increase when the least does
                good[a:b] &= low[a:b] > 0
            else:
                down = steps <= 0
                at = np.argmax(down, axis=1)
                good[a:b] &= ~(down[np.arange(b - a), at] & (at < length[a:b] - 1))

    lanes.share(pool, [partial(check, a, min(a + block, total))
                       for a in range(0, total, block)])
    return t_all, c_all, good, low, high


def _spacing(t: np.ndarray, low: np.ndarray, high: np.ndarray, length: np.ndarray,
             padded_ok: np.ndarray) -> np.ndarray:
    """Time step of each evenly sampled row [s], nan for the others; ``low`` and ``high``
    are the smallest and largest differences of ``t`` as padded, valid for rows in
    ``padded_ok`` (the others were compacted since)."""
    step = (t[np.arange(length.size), length - 1] - t[:, 0]) / (length - 1)
    full = padded_ok & (length == t.shape[1])
    low, high = np.where(full, low, np.inf), np.where(full, high, -np.inf)
    for i in np.flatnonzero(~full):
        d = np.diff(t[i, :length[i]])
        low[i], high[i] = d.min(), d.max()
    return np.where(high - low <= 1e-9 * step, step, np.nan)
