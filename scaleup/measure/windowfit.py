"""The nonlinear fit of a batch of curves, each on the window of the rise that its own fit puts
it in, found for the whole batch at once; with the goodness of fit and the lag bias.

The window of a curve is the run of samples whose fitted probe reading lies between two
fractions of the rise. It depends on the fitted kLa, so each curve is fitted on the window of
a rough fit, then on the window of that fit, and so on until the window stays put (at most
six fits, the last one kept). The fits run on moments (:mod:`scaleup.measure.taylorfit`):
one pass over a window's samples serves all its iterations, and a window that moves changes
the moments only at its ends, so the whole iteration costs about one pass per curve. Curves
are sorted by window before they are cut into chunks, so that each chunk's columns cover
little more than its rows' windows.
"""

from __future__ import annotations

from concurrent.futures import Executor
from dataclasses import dataclass
from functools import partial

import numpy as np

from scaleup.measure import expfit, lanes, taylorfit, varpro
from scaleup.measure.curve_checks import MIN_POINTS, Batch
from scaleup.measure.lagbias import lag_bias_batch
from scaleup.measure.loglinear import t975

_MAX_FITS = 6  # fits per curve (each on the window of the one before); the last is kept
_REACH = 8  # samples either side of a window edge looked at first when it moves
_ROUGH_SAMPLES = 150  # samples per curve for the first, rough fit
# the rough fit only places the first window: kLa to 1e-6 relative is well inside the radius
# of the moment series (taylorfit.RADIUS) about it
_ROUGH_RTOL = 1e-6


@dataclass(eq=False)
class WindowFits:
    """The nonlinear fit of every row of a :class:`Batch` (arrays of shape ``(m,)``).

    ``status``: 0 fitted, 1 too few samples in the window, 2 no convergence. ``first`` and
    ``stop`` are the window's sample indices [first, stop) in the batch arrays; ``times`` and
    ``residuals`` hold one array per fitted row (None otherwise); ``bias`` is the lag bias
    (nan when not computed); ``last_fraction`` the fraction of the rise at the last sample.
    """

    status: np.ndarray
    fit: varpro.BatchFit
    ci_half: np.ndarray
    first: np.ndarray
    stop: np.ndarray
    rmse: np.ndarray
    r_squared: np.ndarray
    durbin_watson: np.ndarray
    last_fraction: np.ndarray
    bias: np.ndarray
    times: list
    residuals: list


def _search(t, origin, pos, lo, hi, target, right) -> np.ndarray:
    """Per row ``pos`` of ``t`` (less ``origin``): the first column in [lo, hi) with
    t >= target (t > target where ``right``, a bool or one per row), else hi; each row
    increases from lo to hi."""
    lo, hi = lo.copy(), hi.copy()
    last = t.shape[1] - 1
    while True:
        open_ = lo < hi
        if not open_.any():
            return lo
        mid = (lo + hi) // 2
        value = t[pos, np.minimum(mid, last)] - origin
        up = open_ & ((value < target) | (right & (value == target)))
        lo = np.where(up, mid + 1, lo)
        hi = np.where(open_ & ~up, mid, hi)


def _search_near(t, origin, pos, lo, hi, target, right, near) -> np.ndarray:
    """:func:`_search`, looking first at the columns around ``near`` (a window edge moves by
    a sample or two when kLa is refined), and over the whole range where the answer is not
    among them."""
    cols = near[:, None] + np.arange(-_REACH, _REACH)
    inside = (cols >= lo[:, None]) & (cols < hi[:, None])
    value = t[pos[:, None], np.clip(cols, 0, t.shape[1] - 1)] - origin[:, None]
    goal = target[:, None]
    below = inside & ((value < goal) | (np.asarray(right)[..., None] & (value == goal)))
    count = below.sum(1)
    # the answer is among these columns when the first is below the target (or before lo)
    # and the last is not (or at or past hi)
    sure = (((cols[:, 0] < lo) | below[:, 0])
            & ((cols[:, -1] >= hi) | (inside[:, -1] & ~below[:, -1])))
    found = np.where(cols[:, 0] < lo, lo + count, near - _REACH + count)
    if not sure.all():
        other = ~sure
        found[other] = _search(t, origin[other], pos[other], lo[other], hi[other],
                               target[other], right if np.ndim(right) == 0 else right[other])
    return found


def _rough(batch: Batch, tau: np.ndarray) -> varpro.BatchFit:
    """A first fit of every row on about 150 of its samples after the start."""
    every = np.maximum(1, batch.length // _ROUGH_SAMPLES)
    width = int(np.max(-(-batch.length // every)))
    if (every == every[0]).all():  # one stride for all: a strided view, not a gather
        t = batch.t[:, ::every[0]][:, :width] - batch.start[:, None]
        c = np.ascontiguousarray(batch.c[:, ::every[0]][:, :width])  # read often after
        cols = every[0] * np.arange(width)
    else:
        cols = every[:, None] * np.arange(width)
        rows = np.arange(cols.shape[0])[:, None]
        at = np.minimum(cols, batch.length[:, None] - 1)
        t, c = batch.t[rows, at] - batch.start[:, None], batch.c[rows, at]
    usable = (cols >= batch.first[:, None]) & (cols < batch.length[:, None])
    whole = usable.all(1)
    if whole.all() or not whole.any():
        return expfit._fit_rows(t, c, usable, tau, rtol=_ROUGH_RTOL)  # finite samples only
    # rows that use every sample take the engine's unmasked path, the others the masked one
    out = varpro.BatchFit(*(np.empty((t.shape[0],) + (3, 3) * (name == "cov"),
                                     int if name in ("n_points", "iterations") else
                                     bool if name == "converged" else float)
                            for name in varpro.BatchFit.__dataclass_fields__))
    for rows in (np.flatnonzero(whole), np.flatnonzero(~whole)):
        _assign(out, rows, expfit._fit_rows(t[rows], c[rows], usable[rows], tau[rows],
                                             rtol=_ROUGH_RTOL))
    return out


class _Windows:
    """Where each row's window lies for a kLa, and how many windows each has been fitted on.

    For each row it keeps the kLa its window was last found for, the times at which the
    probe shows the two fractions then, and the gaps around them to the neighbouring
    samples. The probe reading is the sum of two exponential delays, so scaling kLa by s
    moves any such time by at most |1/s - 1| of itself (stochastic ordering); a row whose
    times cannot have left their gaps keeps its window without a search.
    """

    def __init__(self, batch: Batch, tau: np.ndarray, fractions: tuple[float, float]):
        self.batch, self.tau, self.fractions = batch, tau, fractions
        m = tau.size
        self.fits = np.ones(m, int)
        self.k_at = np.full(m, np.nan)
        self.t_lo, self.t_hi = np.full(m, np.nan), np.full(m, np.nan)
        self.gaps = np.zeros((4, m))  # t_lo in (gaps[0], gaps[1]], t_hi in [gaps[2], gaps[3])
        self.short = {}  # row: the window, too short, that dropped it

    def locate(self, rows, k, near=None) -> tuple[np.ndarray, np.ndarray]:
        """Windows [first, stop) of kLa ``k`` (batch sample indices), searched first around
        the windows ``near`` = (first, stop) where given."""
        b = self.batch
        r = rows.size
        # both edges at once: the low fraction's first, then the high fraction's
        pos = np.concatenate([rows, rows])
        lo, hi, origin = (np.concatenate([x, x]) for x in
                          (b.first[rows], b.length[rows], b.start[rows]))
        times = expfit._time_at_fraction(
            np.concatenate([k, k]), np.concatenate([self.tau[rows]] * 2),
            np.repeat(np.asarray(self.fractions, float), r),
            np.concatenate([self.t_lo[rows], self.t_hi[rows]]))
        self.t_lo[rows], self.t_hi[rows], self.k_at[rows] = times[:r], times[r:], k
        right = np.repeat([False, True], r)  # first: t >= t_lo; stop: t > t_hi
        if near is None:
            found = _search(b.t, origin, pos, lo, hi, times, right)
        else:
            found = _search_near(b.t, origin, pos, lo, hi, times, right,
                                 np.concatenate(near))
        first, stop = found[:r], found[r:]
        # the times of the samples either side of each edge (infinite past the ends)
        cols = np.concatenate([first - 1, first, stop - 1, stop])
        valid = np.concatenate([first > lo[:r], first < hi[:r], stop > lo[:r], stop < hi[:r]])
        value = b.t[np.tile(rows, 4), np.clip(cols, 0, b.t.shape[1] - 1)] - np.tile(origin[:r], 4)
        outside = np.repeat([-np.inf, np.inf, -np.inf, np.inf], r)
        self.gaps[:, rows] = np.where(valid, value, outside).reshape(4, r)
        return first, stop

    def follow(self, rows, k, first, stop, status) -> tuple:
        """Windows for rows that converged on [first, stop): (moved, dropped, first, stop);
        a row in too short a window is dropped with status 1, one fitted six times stays."""
        moved, dropped = np.zeros(rows.size, bool), np.zeros(rows.size, bool)
        new_first, new_stop = first.copy(), stop.copy()
        more = self.fits[rows] < _MAX_FITS
        at = rows[more]
        # how far the two times can have moved since the window was found (Newton's
        # tolerance included)
        reach = np.abs(self.k_at[at] / k[more] - 1.0) + 1e-11
        t_lo, t_hi = self.t_lo[at], self.t_hi[at]
        g = self.gaps[:, at]
        stays = ((t_lo * (1 - reach) > g[0]) & (t_lo * (1 + reach) <= g[1])
                 & (t_hi * (1 - reach) >= g[2]) & (t_hi * (1 + reach) < g[3]))
        more[np.flatnonzero(more)[stays]] = False
        if more.any():
            f, s = self.locate(rows[more], k[more], (first[more], stop[more]))
            short = s - f < MIN_POINTS
            status[rows[more][short]] = 1
            self.short.update(zip(rows[more][short].tolist(),
                                  zip(f[short].tolist(), s[short].tolist(), strict=True),
                                  strict=True))
            dropped[more] = short
            moved[more] = ~short & ((f != first[more]) | (s != stop[more]))
            new_first[more], new_stop[more] = f, s
            self.fits[rows[moved]] += 1
        return moved, dropped, new_first, new_stop


def _assign(target: varpro.BatchFit, rows: np.ndarray, part: varpro.BatchFit) -> None:
    for name in varpro.BatchFit.__dataclass_fields__:
        getattr(target, name)[rows] = getattr(part, name)


def _plain_rows(batch, rows, k, first, stop, windows: _Windows, status,
                fit: varpro.BatchFit) -> None:
    """The window iteration of ``rows`` by one plain fit per window, from their current
    window and kLa (kLa near 1/tau_p, where the moments would lose digits); results go
    into ``fit``, ``k``, ``first``, ``stop`` and ``status``."""
    current = rows
    while current.size:
        a, b = int(first[current].min()), int(stop[current].max())
        cols = np.arange(a, b)
        mask = (cols >= first[current, None]) & (cols < stop[current, None])
        t = batch.t[current, a:b] - batch.start[current, None]
        part = expfit.fit_batch(t, batch.c[current, a:b], mask, windows.tau[current],
                                k[current])
        _assign(fit, current, part)
        k[current] = part.kla_per_s
        status[current[~part.converged]] = 2
        current = current[part.converged]
        moved, _, first[current], stop[current] = windows.follow(
            current, k[current], first[current], stop[current], status)
        current = current[moved]


class _Finish:
    """Goodness of fit of the fitted rows on their windows, chunk by chunk."""

    def __init__(self, m: int):
        self.rmse, self.r2, self.dw, self.last = (np.full(m, np.nan) for _ in range(4))
        self.times: list = [None] * m
        self.residuals: list = [None] * m

    def chunk(self, source, rows, a, b, fit, ex, tau) -> None:
        t, c = source.crop(rows, a, b)
        first, stop = ex.first[rows] - a, ex.stop[rows] - a
        at = np.arange(rows.size)
        k, tau_r = fit.kla_per_s[rows], tau[rows]
        self.last[rows] = 1.0 - expfit.row_response(t[at, stop - 1][:, None], k, tau_r)[:, 0]
        resid = _residuals(t, c, k, tau_r, fit.c_inf[rows], fit.c0[rows])
        w = b - a
        cols = np.arange(w)
        np.copyto(resid, 0.0, where=(cols < first[:, None]) | (cols >= stop[:, None]))
        ssr = np.einsum("ij,ij->i", resid, resid)
        steps = np.diff(resid, axis=1)
        # the residuals, zero outside, jump from and to zero at the ends of each window
        jumps = (np.where(first > 0, resid[at, first] ** 2, 0.0)
                 + np.where(stop < w, resid[at, stop - 1] ** 2, 0.0))
        n = ex.n[rows]
        sst = ex.s_cc[rows] - ex.s_c[rows] ** 2 / n
        with np.errstate(divide="ignore", invalid="ignore"):
            self.rmse[rows] = np.sqrt(ssr / np.maximum(n - 3, 1))
            self.r2[rows] = np.where(sst > 0, 1.0 - ssr / sst, np.nan)
            self.dw[rows] = np.where(
                ssr > 0, (np.einsum("ij,ij->i", steps, steps) - jumps) / ssr, np.nan)
        grid = source.t
        for i, (row, f, s) in enumerate(zip(rows.tolist(), first.tolist(), stop.tolist(),
                                            strict=True)):
            self.times[row] = grid[row, a + f:a + s]  # on the data's clock
            self.residuals[row] = resid[i, f:s]


def _residuals(t, c, k, tau, c_inf, c0) -> np.ndarray:
    """C - (C_inf - (C_inf - C0) g) on rows of times ``t`` (overwritten) and readings ``c``.

    Away from k tau_p = 1 the lagged g is p e^{-kt} - q e^{-t/tau_p} (textbook form, as in
    :func:`scaleup.measure.expfit.row_response`), summed here term by term into one array.
    """
    rise = c_inf - c0
    with np.errstate(divide="ignore"):
        b = np.where(tau > 0, 1.0 / np.where(tau > 0, tau, 1.0), np.inf)
    direct = (tau > 0) & (np.abs(1.0 - k * tau) >= expfit._NEAR_SINGULAR)
    if not (direct.all() or (tau <= 0).all()):
        g = expfit.row_response(t, k, tau)
        np.multiply(g, rise[:, None], out=g)
        np.subtract(c_inf[:, None], g, out=g)
        return np.subtract(c, g, out=g)
    out = np.multiply(t, -k[:, None])
    np.exp(out, out=out)
    if direct.all():  # (C - C_inf) + rise (p e - q f), p = b/(b - k), q = k/(b - k)
        d = b - k
        out *= (rise * b / d)[:, None]
        np.multiply(t, -b[:, None], out=t)
        np.exp(t, out=t)
        t *= (rise * k / d)[:, None]
        out -= t
    else:  # ideal probe: g = e
        out *= rise[:, None]
    out += c
    out -= c_inf[:, None]
    return out


def fit_windows(batch: Batch, tau: np.ndarray, fractions: tuple[float, float],
                pool: Executor | None = None) -> WindowFits:
    """Fit every row of ``batch`` on the window ``fractions`` of its own fitted rise.

    Parameters
    ----------
    batch : Batch
        Curves that passed the checks (times [s], readings [any unit]).
    tau : array (m,)
        Probe time constant of each row [s].
    fractions : (float, float)
        Low and high fraction of the rise [-] bounding the window.
    pool : Executor, optional
        A thread pool whose free thread takes some of the passes over the samples.

    Returns
    -------
    WindowFits
        Estimates, windows, goodness of fit and lag bias per row.

    Notes
    -----
    The rough fit uses every n // 150-th sample of a row of n; a row whose rough fit does
    not converge, or whose window holds fewer than five samples, gives no estimate.
    """
    m = batch.length.size
    status = np.zeros(m, int)
    rough = _rough(batch, tau)
    k = rough.kla_per_s.copy()
    status[~rough.converged] = 2
    windows = _Windows(batch, tau, fractions)
    first, stop = windows.locate(np.arange(m), k)
    status[(status == 0) & (stop - first < MIN_POINTS)] = 1
    source = taylorfit.Source(batch.t, batch.c, batch.start, span=(batch.first, batch.length))
    ex = taylorfit.Expansion(source, tau, first, stop)
    ex.pool = pool

    def follow(rows, k_best):
        return windows.follow(rows, k_best, ex.first[rows], ex.stop[rows], status)

    steps, plain = taylorfit.fit(ex, k, np.flatnonzero(status == 0), relocate=follow)
    fit = steps.result(ex.n, ex.shift)
    first, stop = ex.first.copy(), ex.stop.copy()
    if plain.size:
        k = steps.k_best.copy()
        _plain_rows(batch, plain, k, first, stop, windows, status, fit)
        ex.move(plain, first[plain], stop[plain])
    for row, (f, s) in windows.short.items():
        first[row], stop[row] = f, s
    k = fit.kla_per_s
    status[(status == 0) & ~(fit.converged & np.isfinite(k) & (k > 0))] = 2
    good = np.flatnonzero(status == 0)
    done = _Finish(m)
    lanes.share(pool, [partial(done.chunk, source, rows, a, b, fit, ex, tau)
                       for rows, a, b in taylorfit.chunks(first, stop, good)])
    bias = np.full(m, np.nan)
    lagged = good[(tau[good] > 0) & (stop[good] - first[good] >= 4)]
    if lagged.size:
        bias[lagged] = lag_bias_batch(batch.t, batch.start, batch.spacing, lagged, k[lagged],
                                      tau, first, stop)
    return WindowFits(status=status, fit=fit,
                      ci_half=t975(fit.n_points - 3.0) * fit.kla_stderr_per_s,
                      first=first, stop=stop, rmse=done.rmse, r_squared=done.r2,
                      durbin_watson=done.dw, last_fraction=done.last, bias=bias,
                      times=done.times, residuals=done.residuals)
