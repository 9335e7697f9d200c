"""First-order step responses fitted by separable least squares, many curves at once.

A gassing-out curve seen through a first-order probe is

.. math::
    C_p(t) = C_\\infty - (C_\\infty - C_0)\\, g(t; k, \\tau_p), \\qquad
    g = \\frac{e^{-k t} - k \\tau_p e^{-t/\\tau_p}}{1 - k \\tau_p}

with :math:`g = e^{-k t}` when :math:`\\tau_p = 0`. For a fixed :math:`k` the model is linear
in :math:`C_\\infty` and :math:`C_0`, so they are solved in closed form and only :math:`k`
is searched, by the variable-projection Gauss-Newton steps of
:mod:`scaleup.measure.varpro`. All curves of a batch are padded into one ``(m, n)`` array
with a mask and iterated together, so the work per iteration is a handful of whole-array
numpy operations.
"""

from __future__ import annotations

import numpy as np

from scaleup.measure.varpro import BatchFit, _lag_sums, _Steps

# Below this |1 - k tau_p| the textbook form of g loses digits to cancellation; the
# symmetric form with expm1 is used instead (slower, exact everywhere).
_NEAR_SINGULAR = 0.05
_SERIES_X = 1e-2  # below this x the series of phi and omega is exact to ~1e-13


def response(t: np.ndarray | float, kla: np.ndarray | float,
             tau_p: np.ndarray | float = 0.0) -> np.ndarray:
    """Fraction of a concentration step not yet shown by the probe, g(t) [-].

    Parameters
    ----------
    t : array or float
        Time since the step [s].
    kla : array or float
        Volumetric mass-transfer coefficient [1/s]; broadcasts against ``t``.
    tau_p : array or float
        First-order probe time constant [s]; 0 for an ideal probe.

    Returns
    -------
    array
        g [-], 1 at t = 0 falling to 0.

    Examples
    --------
    >>> float(response(10.0, 0.1))  # exp(-1)
    0.36787944117144233
    >>> round(float(response(10.0, 0.1, 10.0)), 12)  # k tau_p = 1: (1 + t/tau) exp(-t/tau)
    0.735758882343
    """
    t, k, tau = np.broadcast_arrays(*(np.asarray(v, dtype=float) for v in (t, kla, tau_p)))
    g, _ = _basis(t.reshape(-1, 1), k.ravel(), tau.ravel(), derivative=False)
    return g.reshape(t.shape)


def row_response(t: np.ndarray, kla: np.ndarray, tau_p: np.ndarray) -> np.ndarray:
    """g for a batch of curves, one kLa and one probe time constant per row.

    Parameters
    ----------
    t : array (m, n)
        Time since the step [s].
    kla : array (m,)
        kLa [1/s] of each row.
    tau_p : array (m,)
        Probe time constant [s] of each row; 0 for an ideal probe.

    Returns
    -------
    array (m, n)
        g [-], the fraction of the step not yet shown.
    """
    return _basis(np.asarray(t, float), np.asarray(kla, float), np.asarray(tau_p, float),
                  derivative=False)[0]


def time_at_fraction(kla: np.ndarray, tau_p: np.ndarray, fraction: float) -> np.ndarray:
    """Time [s] at which the probe shows ``fraction`` of the step, one per curve.

    Parameters
    ----------
    kla : array (m,)
        kLa [1/s].
    tau_p : array (m,)
        Probe time constant [s]; 0 for an ideal probe.
    fraction : float
        Fraction of the step [-], between 0 and 1.

    Returns
    -------
    array (m,)
        t [s] with 1 - g(t) = fraction.

    Notes
    -----
    Ideal probe: t = -ln(1 - f)/kLa. Lagged probe: Newton's method on ln g, started from the
    union bound t = (1/kLa + tau_p) ln(2/(1 - f)), which lies beyond the root; ln g is concave
    (g is the survival function of a sum of two exponential delays), so the iterates fall
    monotonically onto the root without overshooting.

    Examples
    --------
    >>> round(float(time_at_fraction(np.array([0.02]), np.array([0.0]), 0.5)[0]), 6)  # ln 2/k
    34.657359
    >>> round(float(time_at_fraction(np.array([0.1]), np.array([10.0]), 0.5)[0]), 6)
    16.783470
    """
    return _time_at_fraction(np.asarray(kla, dtype=float), np.asarray(tau_p, dtype=float),
                             fraction)


def _time_at_fraction(a: np.ndarray, tau: np.ndarray, fraction: float | np.ndarray,
                      guess: np.ndarray | None = None) -> np.ndarray:
    """:func:`time_at_fraction`, Newton's method started from ``guess`` where given (a root
    nearby, e.g. for a kLa a little different): from below the root the first step lands
    beyond it, and from there the iterates fall onto it as from the union bound.
    ``fraction`` may also be an array, one fraction per row."""
    frac = np.asarray(fraction, dtype=float)
    edge = None
    if frac.ndim == 0:
        if not 0.0 < frac < 1.0:
            return np.full(a.shape, 0.0 if frac <= 0 else np.inf)
    else:
        edge = ~((frac > 0.0) & (frac < 1.0))
        if edge.any():
            frac = np.where(edge, 0.5, frac)
    log_target = np.log1p(-frac)
    out = -log_target / a
    lag = tau > 0
    if lag.any():
        if frac.ndim:
            frac, log_target = frac[lag], log_target[lag]
        a, b = a[lag], 1.0 / tau[lag]
        s, f = np.minimum(a, b), np.maximum(a, b)
        t = (1.0 / a + 1.0 / b) * np.log(2.0 / (1.0 - frac))
        if guess is not None:
            t = np.where(np.isfinite(guess[lag]) & (guess[lag] > 0), guess[lag], t)
        for _ in range(60):
            x = (f - s) * t
            with np.errstate(divide="ignore", invalid="ignore"):
                phi = np.where(x > 1e-12, -np.expm1(-x) / x, 1.0 - x / 2)
            inner = f * t * phi + np.exp(-x)  # g = exp(-s t) * inner
            # Newton on ln g - ln(1 - f), with d(ln g)/dt = -a b t phi / inner
            step = -(-s * t + np.log(inner) - log_target) * inner / (a * b * t * phi)
            t = t - step
            if (np.abs(step) <= 1e-12 * t).all():
                break
        out[lag] = t
    if edge is not None and edge.any():
        out[edge] = np.where(np.asarray(fraction)[edge] <= 0, 0.0, np.inf)
    return out


def _basis(t: np.ndarray, k: np.ndarray, tau: np.ndarray, probe: np.ndarray | None = None,
           derivative: bool = True) -> tuple[np.ndarray, np.ndarray | None]:
    """g (and dg/dk if ``derivative``) for rows of ``t`` (m, n), one kLa and tau_p per row.

    ``probe`` holds exp(-t/tau_p) when the caller has it already. Rows are split into three
    groups (ideal probe, lagged, lagged near k tau_p = 1), each computed on its own rows only.
    """
    ideal = tau <= 0.0
    near = ~ideal & (np.abs(1.0 - k * tau) < _NEAR_SINGULAR)
    direct = ~ideal & ~near
    with np.errstate(divide="ignore"):
        b = np.where(ideal, np.inf, 1.0 / np.where(ideal, 1.0, tau))
    groups = [(ideal, lambda r: _ideal(t[r], k[r, None], derivative)),
              (direct, lambda r: _lag_direct(t[r], k[r, None], b[r, None],
                                             None if probe is None else probe[r], derivative)),
              (near, lambda r: _lag_stable(t[r], k[r, None], b[r, None], derivative))]
    g = v = None
    for rows, compute in groups:
        if not rows.any():
            continue
        if rows.all():
            return compute(slice(None))
        if g is None:
            g = np.empty(t.shape)
            v = np.empty(t.shape) if derivative else None
        g_r, v_r = compute(rows)
        g[rows] = g_r
        if derivative:
            v[rows] = v_r
    return g, v


def _ideal(t, a, derivative=True):
    e = np.exp(-a * t)
    return e, (-t * e if derivative else None)


def _lag_direct(t, a, b, probe=None, derivative=True):
    """Textbook form: g = (b e^{-at} - a e^{-bt})/(b - a),
    dg/da = b [e^{-at} (1 - (b - a) t) - e^{-bt}] / (b - a)^2."""
    e = np.exp(-a * t)
    f = np.exp(-b * t) if probe is None else probe
    d = b - a
    g = (b / d) * e - (a / d) * f
    if not derivative:
        return g, None
    v = (b / (d * d)) * (e * (1.0 - d * t) - f)
    return g, v


def _lag_stable(t, a, b, derivative=True):
    """Symmetric form, exact through k tau_p = 1.

    With s = min(a, b), f = max(a, b), x = |a - b| t and phi(x) = (1 - e^{-x})/x:
    g = e^{-st} (f t phi + e^{-x}) and dg/da = -b t^2 e^{-st} omega(x), where
    omega = (e^{-x} - 1 + x)/x^2 if a < b and (1 - (1 + x) e^{-x})/x^2 if a > b.
    """
    s = np.minimum(a, b)
    f = np.maximum(a, b)
    x = (f - s) * t
    em = np.expm1(-x)
    slow_liquid = np.broadcast_to(a <= b, x.shape)
    with np.errstate(divide="ignore", invalid="ignore"):
        phi = -em / x
        omega = np.where(slow_liquid, em + x, -em - x * (1.0 + em)) / (x * x)
    small = x < _SERIES_X
    if small.any():
        xs = x[small]
        phi[small] = 1.0 - xs / 2 + xs**2 / 6 - xs**3 / 24 + xs**4 / 120
        series_a = 0.5 - xs / 6 + xs**2 / 24 - xs**3 / 120 + xs**4 / 720
        series_b = 0.5 - xs / 3 + xs**2 / 8 - xs**3 / 30 + xs**4 / 144
        omega[small] = np.where(slow_liquid[small], series_a, series_b)
    decay = np.exp(-s * t)
    g = decay * (f * t * phi + 1.0 + em)
    if not derivative:
        return g, None
    v = -b * t * t * decay * omega
    return g, v


_CHUNK_ELEMENTS = 200_000  # rows per chunk chosen so each work array stays in cache


class _Chunk:
    """One cache-sized chunk of curves: constants, and a work buffer for the moment sums.

    ``work[:, j, :]`` holds e = exp(-k t), t e, the mask, the centred data and
    f = exp(-t/tau_p); one batched matrix product of its first two rows with all five gives
    every sum an iteration needs. The sums that do not depend on kLa (``n``, ``s_c``, ``s_cc``,
    ``f1``, ``f2``, ``fc``: count, data, data squared, f, f squared, f times data over the mask)
    are indexed by the chunk's rows; the work buffer holds only the rows in ``held``.
    """


    def __init__(self, t, c, mask, tau):
        # masked samples get t = 0 (a fast, finite exponential) and are zeroed by the mask
        self.full = bool(mask.all())
        self.t = t if self.full else np.where(mask, t, 0.0)
        self.n = mask.sum(1).astype(float)
        c = c if self.full else np.where(mask, c, 0.0)
        self.shift = c.sum(1) / np.maximum(self.n, 1.0)
        r, n = t.shape
        self.held = np.arange(r)
        self.work = np.empty((r, 5, n))
        self.work[:, 2] = mask
        np.subtract(c, self.shift[:, None], out=self.work[:, 3])
        if not self.full:
            self.work[:, 3] *= mask
        self.s_c = np.zeros(r)  # the data are centred on their mean over the mask
        self.s_cc = np.einsum("ij,ij->i", self.work[:, 3], self.work[:, 3])
        self._probe_basis(tau)
        if not self.full:
            self.work[:, 4] *= mask
        self.f1 = self.work[:, 4].sum(1)
        self.f2 = np.einsum("ij,ij->i", self.work[:, 4], self.work[:, 4])
        self.fc = np.einsum("ij,ij->i", self.work[:, 4], self.work[:, 3])

    def _probe_basis(self, tau: np.ndarray) -> None:
        """Probe constants, and f = exp(-t/tau_p) into ``work[:, 4]`` (0 for an ideal probe)."""
        self.tau = tau
        self.lagged = tau > 0
        self.b = np.where(self.lagged, 1.0 / np.where(self.lagged, tau, 1.0), np.inf)
        self.work[:, 4] = 0.0
        if self.lagged.all():
            np.exp(self.t * -self.b[:, None], out=self.work[:, 4])
        elif self.lagged.any():
            rows = np.flatnonzero(self.lagged)
            self.work[rows, 4] = np.exp(-self.t[rows] * self.b[rows, None])

    def keep(self, rows: np.ndarray) -> None:
        """Keep only the listed rows of the work buffer (converged curves leave it)."""
        self.held = self.held[rows]
        for name in ("t", "work", "tau", "lagged", "b"):
            setattr(self, name, getattr(self, name)[rows])

    def sums(self, k: np.ndarray) -> np.ndarray:
        """(Sg, Sgg, Scg, Sv, Svv, Sgv, Scv) for every held row at kLa ``k``; v = dg/dk."""
        work, t, b = self.work, self.t, self.b
        np.multiply(t, -k[:, None], out=work[:, 0])
        np.exp(work[:, 0], out=work[:, 0])
        if not self.full:
            work[:, 0] *= work[:, 2]
        np.multiply(t, work[:, 0], out=work[:, 1])
        z = np.matmul(work[:, :2], work.transpose(0, 2, 1))
        e2, et, e1, ec, ef = (z[:, 0, j] for j in range(5))
        t2, t1, tc, tf = (z[:, 1, j] for j in range(1, 5))
        out = np.array([e1, e2, ec, -t1, t2, -et, -tc])  # ideal probe: g = e, v = -t e
        near = self.lagged & (np.abs(1.0 - k / b) < _NEAR_SINGULAR)
        lag = self.lagged & ~near
        if lag.all():
            held = self.held
            return _lag_sums(k, b, e1, e2, ec, t1, t2, tc, et, ef, tf, self.f1[held],
                             self.f2[held], self.fc[held])
        if lag.any():
            held = self.held[lag]
            out[:, lag] = _lag_sums(k[lag], b[lag], e1[lag], e2[lag], ec[lag], t1[lag],
                                    t2[lag], tc[lag], et[lag], ef[lag], tf[lag],
                                    self.f1[held], self.f2[held], self.fc[held])
        if near.any():
            g, v = _lag_stable(t[near], k[near, None], b[near, None])
            g *= work[near, 2]
            v *= work[near, 2]
            cn = work[near, 3]
            out[:, near] = [g.sum(1), np.einsum("ij,ij->i", g, g), np.einsum("ij,ij->i", g, cn),
                            v.sum(1), np.einsum("ij,ij->i", v, v),
                            np.einsum("ij,ij->i", g, v), np.einsum("ij,ij->i", v, cn)]
        return out


def guess_kla(t: np.ndarray, c: np.ndarray, mask: np.ndarray) -> np.ndarray:
    """A rough kLa [1/s] per row, to start the fit from.

    Parameters
    ----------
    t : array (m, n)
        Time since the step [s].
    c : array (m, n)
        Readings in any concentration unit [mol/m3, mg/L or %].
    mask : bool array (m, n)
        Samples to use.

    Returns
    -------
    array (m,)
        kLa [1/s] from a straight line through ln(1 - fraction of the rise) between 10 % and
        80 % of the rise seen from the first to the last few samples; it reads low for a lagged
        probe and high when the curve stops short of its plateau, which the fit then corrects.
    """
    if mask.all():  # the usual case, without the masking
        ends = min(5, t.shape[1])
        c_first, c_last = c[:, :ends].mean(1), c[:, -ends:].mean(1)
        span = t.max(1) - t.min(1)
    else:
        t = np.where(mask, t, 0.0)
        cum_w = np.cumsum(mask, 1)
        first = (cum_w <= 5) & mask
        last = ((cum_w[:, -1:] - cum_w) < 5) & mask
        with np.errstate(divide="ignore", invalid="ignore"):
            c_first = np.where(first, c, 0.0).sum(1) / first.sum(1)
            c_last = np.where(last, c, 0.0).sum(1) / last.sum(1)
        c = np.where(mask, c, 0.0)
        span = t.max(1) - np.where(mask, t, np.inf).min(1)
    with np.errstate(divide="ignore", invalid="ignore"):
        frac = (c - c_first[:, None]) / (c_last - c_first)[:, None]
    sel = (frac >= 0.1) & (frac <= 0.8)
    if not mask.all():
        sel &= mask
    y = np.log(np.clip(1.0 - np.where(sel, frac, 0.0), 1e-9, None))
    ws = sel.astype(float)
    n = ws.sum(1)
    tw = t * ws
    st, sy = tw.sum(1), np.einsum("ij,ij->i", y, ws)
    stt, sty = np.einsum("ij,ij->i", tw, t), np.einsum("ij,ij->i", tw, y)
    with np.errstate(divide="ignore", invalid="ignore"):
        slope = (n * sty - st * sy) / (n * stt - st * st)
        fallback = 3.0 / span
    k = np.where((n >= 2) & (slope < 0) & np.isfinite(slope), -slope, fallback)
    return np.where(np.isfinite(k) & (k > 0), k, 1e-3)


def fit_batch(t: np.ndarray, c: np.ndarray, mask: np.ndarray, tau_p: np.ndarray | float,
              kla_guess: np.ndarray | None = None, *, max_iter: int = 60,
              rtol: float = 1e-9) -> BatchFit:
    """Fit C_inf, C0 and kLa to each row of a batch of step responses.

    Parameters
    ----------
    t : array (m, n)
        Time since the step [s] (the gas switched on); masked entries may hold anything.
    c : array (m, n)
        Probe readings in any concentration unit [mol/m3, mg/L or %]; masked entries ignored.
    mask : bool array (m, n)
        Which samples each fit uses.
    tau_p : array (m,) or float
        Probe time constant [s] per curve; 0 fits the ideal-probe model.
    kla_guess : array (m,), optional
        Starting values of kLa [1/s]; default :func:`guess_kla`.
    max_iter : int
        Iteration limit; rows not converged by then are flagged in ``converged``.
    rtol : float
        Convergence when the Gauss-Newton step in kLa is below ``rtol * kLa`` [-].

    Returns
    -------
    BatchFit
        Estimates with standard errors; concentrations in the unit of ``c``, kLa [1/s].

    Notes
    -----
    Each step is Kaufman's Gauss-Newton step on the variable-projection functional; a step
    that raises the residual sum of squares (beyond its rounding floor) is halved, and kLa is
    kept positive. The data are centred per curve so the residual sum of squares, computed from
    sums, keeps its digits. Rows are processed in chunks small enough to stay in cache.

    Examples
    --------
    >>> tt = np.linspace(0.0, 300.0, 301)[None, :]
    >>> cc = 8.0 - 7.5 * np.exp(-0.02 * tt)
    >>> fit = fit_batch(tt, cc, np.ones_like(tt, bool), 0.0)
    >>> round(float(fit.kla_per_s[0]), 9), round(float(fit.c_inf[0]), 9)
    (0.02, 8.0)
    """
    t = np.asarray(t, dtype=float)
    c = np.asarray(c, dtype=float)
    mask = np.asarray(mask, dtype=bool) & np.isfinite(t) & np.isfinite(c)
    return _fit_rows(t, c, mask, tau_p, kla_guess, max_iter, rtol)


def _fit_rows(t: np.ndarray, c: np.ndarray, mask: np.ndarray, tau_p, kla_guess=None,
              max_iter: int = 60, rtol: float = 1e-9) -> BatchFit:
    """:func:`fit_batch` on float arrays whose masked samples are known to be finite."""
    m, n = t.shape
    tau = np.broadcast_to(np.asarray(tau_p, dtype=float), (m,))
    stride = max(1, n // 256)  # a starting value needs no more than a few hundred samples
    # chunks of equal size: a small last one would iterate on its own for as long
    rows = -(-m // max(1, -(-m * n // _CHUNK_ELEMENTS)))
    parts = []
    for i in range(0, m, rows):
        part = slice(i, i + rows)
        if kla_guess is None:
            k0 = guess_kla(t[part, ::stride], c[part, ::stride], mask[part, ::stride])
        else:
            k0 = np.broadcast_to(np.asarray(kla_guess, dtype=float), (m,))[part].copy()
        parts.append(_fit_chunk(_Chunk(t[part], c[part], mask[part], tau[part]), k0,
                                max_iter, rtol))
    return BatchFit(*(np.concatenate([getattr(p, f) for p in parts])
                      for f in BatchFit.__dataclass_fields__))


def _fit_chunk(ch: _Chunk, k: np.ndarray, max_iter: int, rtol: float) -> BatchFit:
    """Gauss-Newton iterations on one chunk; rows leave the work buffer as they converge, or
    when ``max_iter`` iterations have not been enough."""
    steps = _Steps(k, max_iter, rtol)
    while True:
        moving = steps.active[ch.held]
        if not moving.any():
            break
        if moving.sum() < 0.6 * ch.held.size:
            ch.keep(np.flatnonzero(moving))
            moving = np.ones(ch.held.size, bool)
        rows = ch.held[moving]
        steps.update(rows, ch.sums(steps.k[ch.held])[:, moving], ch.n[rows], ch.s_c[rows],
                     ch.s_cc[rows])
    return steps.result(ch.n, ch.shift)
