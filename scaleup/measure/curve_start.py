"""Where the rise of a DO curve begins, and how noisy the curve is, for one curve or a batch.

:func:`detect_start` looks for the last sample still at the initial level before the signal
leaves it; :func:`detect_starts` gives the same answer for every row of a padded batch at
once.
"""

from __future__ import annotations

from concurrent.futures import Executor
from functools import partial

import numpy as np

from scaleup.measure import lanes

_BLOCK = 100_000  # samples per block of rows: the second differences stay in cache


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


def end_levels(c: np.ndarray) -> tuple[float, float, int]:
    """Mean of the first and of the last 5 % of the samples (at least 3 each).

    Parameters
    ----------
    c : array
        Readings [any unit], in time order.

    Returns
    -------
    (float, float, int)
        The two means [unit of ``c``] and the number of samples in each [-].
    """
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
    first, last, _ = end_levels(y)
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


def detect_starts(t_s: np.ndarray, c: np.ndarray, length: np.ndarray,
                  pool: Executor | None = None) -> np.ndarray:
    """:func:`detect_start` for each row of a padded batch.

    Parameters
    ----------
    t_s : array (m, n)
        Sample times [s], increasing along each row for ``length`` samples.
    c : array (m, n)
        DO readings [any unit].
    length : int array (m,)
        Samples in each row [-].
    pool : Executor, optional
        A thread pool whose free thread takes some of the blocks of rows.

    Returns
    -------
    array (m,)
        Start time of each row [s].
    """
    out = np.empty(length.size)
    for size in np.unique(length):
        rows = np.flatnonzero(length == size)
        if rows.size < 4 or size < 8:
            out[rows] = [detect_start(t_s[i, :size], c[i, :size]) for i in rows]
        elif rows.size == length.size:
            out[:] = _detect_rows(t_s[:, :size], c[:, :size], pool)
        else:
            out[rows] = _detect_rows(t_s[rows, :size], c[rows, :size], pool)
    return out


def _detect_rows(t: np.ndarray, y: np.ndarray, pool: Executor | None = None) -> np.ndarray:
    """:func:`detect_start` on rows of equal length, with the same result.

    The noise enters only through thresholds that rise with it, and the start index does
    not fall as they rise; so the detection is run at both ends of a bracket on the median
    absolute second difference (a guess from every eighth value, checked by counting), and
    only rows whose two answers differ get the exact median.
    """
    m, n = y.shape
    q = max(3, n // 20)
    first, last = y[:, :q].mean(1), y[:, -q:].mean(1)
    change = last - first
    falling = change < 0
    if falling.any():
        y = np.where(falling[:, None], -y, y)
        change = np.abs(change)
    width = max(1, min(25, n // 50)) | 1
    half = (n - 2) // 2
    guess, bracketed = np.empty(m), np.empty(m, bool)

    def bracket(a: int, b: int) -> None:  # a block of rows at a time, while it is in cache
        d2 = _second_differences(y[a:b])
        sub = d2[:, ::8].copy()
        sub.partition(sub.shape[1] // 2, axis=1)
        g = guess[a:b] = sub[:, sub.shape[1] // 2]
        bracketed[a:b] = ((np.count_nonzero(d2 < 0.9 * g[:, None], axis=1) <= half)
                          & (np.count_nonzero(d2 <= 1.1 * g[:, None], axis=1) > half))

    block = max(1, _BLOCK // n)
    lanes.share(pool, [partial(bracket, a, min(a + block, m)) for a in range(0, m, block)])
    low, high = 0.9 * guess, 1.1 * guess
    scale = 1.4826 / np.sqrt(6.0) / np.sqrt(width)  # noise of the smoothed signal per median
    levels = _Levels(y, base=y[:, :width].mean(1), change=change, width=width)
    at_low = levels.start_index(low * scale)
    at_high = levels.start_index(high * scale)
    # index -1: no start found, the data begin on the rise
    sure = bracketed & (at_low == at_high)
    out = np.where(at_low >= 0, t[np.arange(m), np.maximum(at_low, 0)], t[:, 0])
    if not sure.all():
        rows = np.flatnonzero(~sure)
        exact = _second_differences(y[rows])
        exact.partition(half, axis=1)
        index = levels.start_index(exact[:, half] * scale, rows)
        out[rows] = np.where(index >= 0, t[rows, np.maximum(index, 0)], t[rows, 0])
    return out


def _second_differences(y: np.ndarray) -> np.ndarray:
    """|y[i+2] - 2 y[i+1] + y[i]| along each row."""
    d2 = np.multiply(y[:, 1:-1], 2.0)
    np.subtract(y[:, 2:], d2, out=d2)
    d2 += y[:, :-2]
    return np.abs(d2, out=d2)


class _Levels:
    """The threshold steps of :func:`detect_start` for rows of a batch, at a given noise."""

    def __init__(self, y, base, change, width):
        self.y, self.base, self.change, self.width = y, base, change, width
        self.smooth: dict[int, np.ndarray] = {}  # leading columns -> smoothed signal

    def _smoothed(self, block: int) -> np.ndarray:
        """The moving average over the first ``block`` columns of every row (the running sum
        gives the same values on a prefix as on the whole row)."""
        from scipy.ndimage import uniform_filter1d

        if block not in self.smooth:
            span = min(self.y.shape[1], block + self.width)
            self.smooth[block] = uniform_filter1d(self.y[:, :span], self.width, axis=1,
                                                  mode="nearest")[:, :block]
        return self.smooth[block]

    def start_index(self, noise: np.ndarray, rows: np.ndarray | None = None) -> np.ndarray:
        """Index of the start of each row (all, or ``rows``) at smoothed-signal ``noise``,
        -1 where the data begin on the rise."""
        rows = np.arange(self.y.shape[0]) if rows is None else rows
        n = self.y.shape[1]
        out = np.full(rows.size, -1)
        todo = np.arange(rows.size)
        block = min(n, 128)  # grown fourfold for the rows whose rise lies beyond it
        every = rows.size == self.y.shape[0] and (rows == np.arange(rows.size)).all()
        while todo.size:
            r = rows[todo]
            whole = every and todo.size == rows.size  # all rows in order: no gathered copy
            smooth = self._smoothed(block) if whole else self._smoothed(block)[r]
            base, change, nz = self.base[r], self.change[r], noise[todo]
            above = smooth > (base + np.maximum(0.1 * change, 5 * nz))[:, None]
            seen = above.any(1)
            if seen.any():
                cols = np.arange(block)
                s_rows = r[seen]
                every_seen = bool(seen.all())  # then no boolean-indexed copies
                rise = np.argmax(above if every_seen else above[seen], axis=1)
                flat = (((smooth if every_seen else smooth[seen])
                         <= (base[seen] + np.maximum(0.005 * change[seen], 3 * nz[seen]))[:, None])
                        & (cols < rise[:, None]))
                last_flat = block - 1 - np.argmax(flat[:, ::-1], axis=1)
                found = flat.any(1) & (last_flat >= self.width)
                level = base[seen] + np.maximum(0.005 * change[seen],
                                                3 * nz[seen] * np.sqrt(self.width))
                # the average leaves the level up to width/2 samples early: step on along
                # the data
                data = self.y[:, :block] if whole and every_seen else self.y[s_rows, :block]
                ahead = (((data > level[:, None]) | (cols >= rise[:, None]))
                         & (cols > last_flat[:, None]))
                out[todo[seen]] = np.where(found, np.argmax(ahead, axis=1) - 1, -1)
            if block == n:
                break
            todo = todo[~seen]
            block = min(n, 4 * block)
        return out
