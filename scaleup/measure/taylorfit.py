"""Separable least-squares fits of many step responses from moments taken once per window.

The Gauss-Newton step of :mod:`scaleup.measure.expfit` needs, at each kLa k, sums over the
window such as :math:`\\sum c\\,e^{-kt}`, :math:`\\sum t\\,e^{-2kt}` or
:math:`\\sum e^{-kt} e^{-t/\\tau_p}`. Around an expansion point :math:`k_0`, with the time
centred and scaled on the window, :math:`t = t_c + h s`, each is a short Taylor series,

.. math::
    \\sum x\\,e^{-kt} = e^{-(k - k_0) t_c} \\sum_{n} \\frac{u^n}{n!}
    \\sum x\\,s^n e^{-k_0 t}, \\qquad u = -(k - k_0) h,

so one pass over the samples (the moments :math:`\\sum x s^n e^{-k_0 t}` of e, e squared, e
times the probe term and e times the data) serves every iteration while :math:`|u|` stays
small, and a window that moves changes the moments only by its end samples. A row whose kLa
leaves the radius of its series is expanded again where it is.

The lagged model is summed in its textbook form, which loses digits near k tau_p = 1;
rows there are left to the plain engine (:func:`scaleup.measure.expfit.fit_batch`).
"""

from __future__ import annotations

from collections.abc import Callable
from functools import partial

import numpy as np

from scaleup.measure import expfit, lanes, varpro
from scaleup.measure.segments import segment_sums

ORDER = 7  # highest power of u kept
_POWERS = ORDER + 3  # s^0 ... s^(ORDER + 2): t and t^2 weights need two more
# (2|u|)^(ORDER+1)/(ORDER+1)! <= 1e-16 relative to the moments: the exp(-2kt) series, the
# slowest, is exact to rounding within this |u|
RADIUS = 0.018
_FAR = 1e150  # a time outside every window: exp(-k t) is 0 there, and t * t still finite
_CHUNK = 50_000  # samples per expansion chunk: its dozen work arrays stay in cache
_FACTORIAL = np.cumprod(np.r_[1.0, np.arange(1.0, ORDER + 1)])
# the nine series: (moment row, first power, factor 2 in u): e, t e, e^2, t e^2, t^2 e^2,
# e f, t e f, c e, c t e
_SERIES = [(0, 0, 1), (0, 1, 1), (1, 0, 2), (1, 1, 2), (1, 2, 2), (2, 0, 1), (2, 1, 1),
           (3, 0, 1), (3, 1, 1)]
_GATHER = np.array([[q * _POWERS + p + n for n in range(ORDER + 1)] for q, p, _ in _SERIES])
_SCALE = np.array([[float(two) ** n for n in range(ORDER + 1)] for _, _, two in _SERIES])


class Source:
    """Times since the start (clamped at 0) and data of a padded batch, by column ranges or
    by single samples; ``data`` maps (rows, times) to readings when they are computed (a
    noise-free curve) instead of read."""

    def __init__(self, t: np.ndarray, c: np.ndarray | None, start: np.ndarray,
                 data: Callable[[np.ndarray, np.ndarray], np.ndarray] | None = None,
                 span: tuple[np.ndarray, np.ndarray] | None = None):
        self.t, self.c, self.start, self.data = t, c, start, data
        # ``span``: each row's first sample at or after its start and its length, where
        # known; a crop within them for all its rows has no time to clamp (before the start
        # or in the padding)
        self.span = span

    def crop(self, rows: np.ndarray, a: int, b: int) -> tuple[np.ndarray, np.ndarray]:
        """Times since each row's start [s] (clamped at 0) and readings of ``rows`` over the
        columns [a, b); the times are a copy, free to be worked on in place."""
        return self.crop_grid(rows, a, b, False)[:2]

    def crop_grid(self, rows: np.ndarray, a: int, b: int, check: bool
                  ) -> tuple[np.ndarray, np.ndarray, bool]:
        """:meth:`crop`, and (when ``check``) whether the rows' own times over the columns
        are all the same (one logger's grid, whatever each row's start)."""
        t = self.t[rows, a:b]  # a gathered copy, worked on in place
        same = check and bool((t == t[0]).all())
        origin = self.start[rows]
        if origin.any():
            t -= origin[:, None]
        if (self.span is None or (self.span[0][rows] > a).any()
                or (self.span[1][rows] < b).any()):
            np.maximum(t, 0.0, out=t)
        c = self.c[rows, a:b] if self.data is None else self.data(rows, t)
        return t, c, same

    def samples(self, rows: np.ndarray, cols: np.ndarray) -> tuple[np.ndarray, np.ndarray]:
        t = np.maximum(self.t[rows, cols] - self.start[rows], 0.0)
        c = self.c[rows, cols] if self.data is None else self.data(rows, t[:, None])[:, 0]
        return t, c


def chunks(first: np.ndarray, stop: np.ndarray, rows: np.ndarray):
    """Runs of rows sorted by window, of about a cache's worth of samples each.

    Parameters
    ----------
    first, stop : int arrays
        Windows [first, stop) of every row [sample index].
    rows : int array
        The rows to cut into runs [row index].

    Returns
    -------
    iterator of (int array, int, int)
        The rows of each run and the column range [a, b) their windows cover [sample index].
    """
    order = rows[np.lexsort((first[rows], stop[rows]))]
    lo, hi = first[order], stop[order]
    i = 0
    while i < order.size:
        a, b, j = lo[i], hi[i], i + 1
        while j < order.size:
            na, nb = min(a, lo[j]), max(b, hi[j])
            if (j - i + 1) * (nb - na) > _CHUNK:
                break
            a, b, j = na, nb, j + 1
        yield order[i:j], int(a), int(b)
        i = j


class Expansion:
    """Moments and fixed sums of ``m`` rows, each about its own expansion point ``k0``.

    Per row: ``tc``, ``h`` (time centring and scale [s]), ``shift`` (the data are centred on
    it), the window count ``n`` and the sums of the centred data (``s_c``), its square
    (``s_cc``), the probe term f = exp(-t/tau_p) (``f1``), its square (``f2``) and f times
    the data (``fc``) over the window; ``moments`` (m, 4, ORDER + 3).
    """

    def __init__(self, source: Source, tau: np.ndarray, first: np.ndarray, stop: np.ndarray):
        m = tau.size
        self.source, self.tau = source, tau
        self.lagged = tau > 0
        self.b = np.where(self.lagged, 1.0 / np.where(self.lagged, tau, 1.0), np.inf)
        self.first, self.stop = first.copy(), stop.copy()
        self.k0, self.tc, self.h, self.shift = (np.zeros(m) for _ in range(4))
        self.n = (stop - first).astype(float)
        self.s_c, self.s_cc, self.f1, self.f2, self.fc = (np.zeros(m) for _ in range(5))
        self.moments = np.zeros((m, 4, _POWERS))
        self.pool = None  # a thread pool to share expansions with (lanes.share)

    def expand(self, rows: np.ndarray, k0: np.ndarray, fresh: bool) -> None:
        """Take the moments of ``rows`` about ``k0`` on their windows; ``fresh`` rows also get
        their centring, shift and fixed sums (their data summing to zero about the shift, up
        to rounding, as in the plain engine)."""
        self.k0[rows] = k0
        lanes.share(self.pool, [partial(self._expand, part, a, b, fresh)
                                for part, a, b in chunks(self.first, self.stop, rows)])

    def _expand(self, rows, a, b, fresh):
        # rows sampled on one grid (a logger's usual export) share one set of powers of the
        # time on that grid, centred on the chunk's span (each row's centre is the same
        # instant on its own clock); the others are centred each on its own window
        t, c, shared = self.source.crop_grid(rows, a, b, fresh)
        r, w = t.shape
        first, stop = self.first[rows] - a, self.stop[rows] - a
        at = np.arange(r)
        if shared:
            grid = self.source.t[rows[0], a:b]
            lo, hi = grid[first.min()], grid[stop.max() - 1]
            centre, half = 0.5 * (lo + hi), max(0.5 * (hi - lo), 1e-300)
            self.tc[rows], self.h[rows] = centre - self.source.start[rows], half
        elif fresh:
            self.tc[rows] = 0.5 * (t[at, first] + t[at, stop - 1])
            self.h[rows] = np.maximum(0.5 * (t[at, stop - 1] - t[at, first]), 1e-300)
        cols = np.arange(w)
        inside = (cols >= first[:, None]) & (cols < stop[:, None])
        base = np.empty((r, 4, w))
        weight = base[:, 0]
        weight[:] = inside
        if fresh:
            self.shift[rows] = np.einsum("ij,ij->i", c, weight) / self.n[rows]
        centred = np.subtract(c, self.shift[rows, None], out=c if self.source.data else None)
        lag = self.lagged[rows]
        probe = np.zeros((r, w))
        if lag.all():
            np.multiply(t, -self.b[rows, None], out=probe)
            np.exp(probe, out=probe)
        elif lag.any():
            probe[lag] = np.exp(-t[lag] * self.b[rows[lag], None])
        if fresh:
            in_window = centred * weight
            self.s_c[rows] = 0.0
            self.s_cc[rows] = np.einsum("ij,ij->i", in_window, centred)
            np.multiply(probe, weight, out=in_window)
            self.f1[rows] = in_window.sum(1)
            self.f2[rows] = np.einsum("ij,ij->i", in_window, probe)
            self.fc[rows] = np.einsum("ij,ij->i", in_window, centred)
        e = base[:, 0]
        if shared:
            powers = np.empty((_POWERS, w))
            powers[0] = 1.0
            powers[1] = (grid - centre) / half
            for j in range(2, _POWERS):
                np.multiply(powers[j - 1], powers[1], out=powers[j])
            np.multiply(t, -self.k0[rows, None], out=t)
            e *= np.exp(t, out=t)  # e held the window mask
        else:
            powers = np.empty((r, _POWERS, w))
            powers[:, 0] = 1.0
            np.subtract(t, self.tc[rows, None], out=powers[:, 1])
            powers[:, 1] /= self.h[rows, None]
            for j in range(2, _POWERS):
                np.multiply(powers[:, j - 1], powers[:, 1], out=powers[:, j])
            np.copyto(t, _FAR, where=~inside)
            np.multiply(t, -self.k0[rows, None], out=e)
            np.exp(e, out=e)
        np.multiply(e, e, out=base[:, 1])
        np.multiply(e, probe, out=base[:, 2])
        np.multiply(e, centred, out=base[:, 3])
        # one small product per row: a single large one would be split over threads, which
        # stall whenever another process holds a core
        self.moments[rows] = np.matmul(base, powers.T[None] if shared
                                       else powers.transpose(0, 2, 1))

    def sums(self, rows: np.ndarray, k: np.ndarray) -> np.ndarray:
        """The seven sums (Sg, Sgg, Scg, Sv, Svv, Sgv, Scv) of ``rows`` at kLa ``k``, which
        must lie within :data:`RADIUS` of their expansion points (and lagged rows away from
        k tau_p = 1)."""
        d = k - self.k0[rows]
        tc, h = self.tc[rows], self.h[rows]
        u = -d * h
        coef = np.vander(u, ORDER + 1, increasing=True) / _FACTORIAL  # u^n / n!
        moments = self.moments.reshape(-1, 4 * _POWERS)[rows[:, None, None], _GATHER]
        moments *= _SCALE  # 2^n in the series of exp(-2kt)
        a0, a1, b0, b1, b2, c0, c1, x0, x1 = np.einsum("rjn,rn->jr", moments, coef)
        scale = np.exp(-d * tc)
        scale2 = scale * scale
        e1, t1 = scale * a0, scale * (tc * a0 + h * a1)
        e2, et = scale2 * b0, scale2 * (tc * b0 + h * b1)
        t2 = scale2 * (tc * tc * b0 + 2 * tc * h * b1 + h * h * b2)
        ef, tf = scale * c0, scale * (tc * c0 + h * c1)
        ec, tcx = scale * x0, scale * (tc * x0 + h * x1)
        lag = self.lagged[rows]
        if lag.all():
            return varpro._lag_sums(k, self.b[rows], e1, e2, ec, t1, t2, tcx, et, ef, tf,
                                    self.f1[rows], self.f2[rows], self.fc[rows])
        out = np.array([e1, e2, ec, -t1, t2, -et, -tcx])  # ideal probe: g = e, v = -t e
        if lag.any():
            out[:, lag] = varpro._lag_sums(
                k[lag], self.b[rows[lag]], e1[lag], e2[lag], ec[lag], t1[lag], t2[lag],
                tcx[lag], et[lag], ef[lag], tf[lag], self.f1[rows[lag]], self.f2[rows[lag]],
                self.fc[rows[lag]])
        return out

    def move(self, rows: np.ndarray, first: np.ndarray, stop: np.ndarray) -> None:
        """Shift the windows of ``rows`` to [first, stop), updating moments and fixed sums
        from the samples that enter or leave."""
        old_first, old_stop = self.first[rows], self.stop[rows]
        # the new sums are the old plus the signed sums over [old_stop, stop) and minus
        # those over [old_first, first), which holds whether or not the windows overlap
        lo = np.concatenate([np.minimum(old_first, first), np.minimum(old_stop, stop)])
        hi = np.concatenate([np.maximum(old_first, first), np.maximum(old_stop, stop)])
        sign = np.concatenate([np.where(first < old_first, 1.0, -1.0),
                               np.where(stop > old_stop, 1.0, -1.0)])
        size = hi - lo
        segment = np.repeat(np.arange(size.size), size)
        col = np.arange(segment.size) - np.repeat(np.cumsum(size) - size - lo, size)
        who = np.tile(np.arange(rows.size), 2)[segment]
        row = rows[who]
        t, c = self.source.samples(row, col)
        s = sign[segment]
        c = c - self.shift[row]
        with np.errstate(over="ignore"):
            f = np.where(self.lagged[row], np.exp(-t * np.where(self.lagged[row],
                                                                 self.b[row], 0.0)), 0.0)
        e = np.exp(-self.k0[row] * t)
        sc, sf = s * c, s * f
        for name, values in (("s_c", sc), ("s_cc", sc * c), ("f1", sf), ("f2", sf * f),
                             ("fc", sf * c)):
            getattr(self, name)[rows] += np.bincount(who, weights=values, minlength=rows.size)
        x = (t - self.tc[row]) / self.h[row]
        powers = np.vander(x, _POWERS, increasing=True)
        se = s * e
        base = np.column_stack([se, se * e, se * f, se * c])
        terms = (base[:, :, None] * powers[:, None, :]).reshape(x.size, 4 * _POWERS)
        # the samples come segment by segment (each row's low edge, then each row's high
        # edge): one sum per segment, and a row's two segments added to its moments
        per_segment = segment_sums(terms, np.cumsum(size) - size, size)
        change = per_segment[:rows.size] + per_segment[rows.size:]
        self.moments[rows] += change.reshape(rows.size, 4, _POWERS)
        self.n[rows] = stop - first
        self.first[rows], self.stop[rows] = first, stop


def fit(ex: Expansion, k: np.ndarray, rows: np.ndarray, *, max_iter: int = 60,
        rtol: float = 1e-9, relocate: Callable | None = None
        ) -> tuple[varpro._Steps, np.ndarray]:
    """Gauss-Newton fits of ``rows`` of an :class:`Expansion`.

    Parameters
    ----------
    ex : Expansion
        Moments of the rows on their windows (taken here, about ``k``).
    k : array
        Starting kLa of every row of the expansion [1/s]; changed in place.
    rows : int array
        The rows to fit [row index].
    max_iter : int
        Iterations per window before a row counts as not converging.
    rtol : float
        Convergence when the step in kLa is below ``rtol * kLa`` [-].
    relocate : callable, optional
        ``relocate(rows, k_best)``, asked for rows that converged, gives their new windows
        as (moved, dropped, first, stop); moved rows are fitted again on the new window from
        their estimate, as a fresh fit would be. Converged rows wait until a quarter of the
        active ones have gathered, so that it is asked seldom.

    Returns
    -------
    (varpro._Steps, int array)
        The step state (estimates, sums at the estimates, convergence) and the rows left to
        the plain engine (kLa near 1/tau_p), with their windows as they stand.
    """
    steps = varpro._Steps(k, max_iter, rtol)
    steps.active[:] = False
    steps.active[rows] = True
    plain = np.zeros(k.size, bool)
    waiting = np.zeros(k.size, bool)
    ex.expand(rows, k[rows], fresh=True)
    while True:
        rows = np.flatnonzero(steps.active)
        if rows.size:
            kr = steps.k[rows]
            near = ex.lagged[rows] & (np.abs(1.0 - kr / ex.b[rows]) < expfit._NEAR_SINGULAR)
            if near.any():
                plain[rows[near]] = True
                steps.active[rows[near]] = False
                rows, kr = rows[~near], kr[~near]
            far = np.abs((kr - ex.k0[rows]) * ex.h[rows]) > RADIUS
            if far.any():
                ex.expand(rows[far], kr[far], fresh=False)
            if rows.size:
                ended = steps.update(rows, ex.sums(rows, kr), ex.n[rows], ex.s_c[rows],
                                     ex.s_cc[rows])
                if relocate is not None:
                    waiting[ended] = True
        elif not waiting.any():
            break
        # converged rows wait for their new windows until enough of them have gathered
        if waiting.any() and waiting.sum() >= 0.25 * steps.active.sum():
            ended = np.flatnonzero(waiting)
            waiting[:] = False
            moved, dropped, first, stop = relocate(ended, steps.k_best[ended])
            steps.converged[ended[dropped]] = False
            if moved.any():
                ex.move(ended[moved], first[moved], stop[moved])
                steps.restart(ended[moved])
    return steps, np.flatnonzero(plain)
