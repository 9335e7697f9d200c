"""How far off an ideal-probe fit would read on a lagged curve: the lag bias of a window.

The lag bias of a fit is k_plain / k - 1, where k_plain is kLa fitted by the ideal-probe
model (no lag correction) to the noise-free lagged curve of kLa k on the same samples.
On evenly spaced samples every sum that fit needs is a sum of exponentials over an
arithmetic sequence of times, a geometric series with a closed form, so the fit costs a few
operations per curve and iteration. Other curves (uneven sampling, or k tau_p near 1, where
the textbook lagged form cancels) are fitted on their samples from moments
(:mod:`scaleup.measure.taylorfit`), started from a fit on every eighth sample.
"""

from __future__ import annotations

import numpy as np

from scaleup.measure import expfit, taylorfit, varpro

_STRIDE = 8  # every so many samples for the start of a fit on the samples


def geometric_moments(a: np.ndarray, t0: np.ndarray, dt: np.ndarray, n: np.ndarray
                      ) -> tuple[np.ndarray, np.ndarray, np.ndarray]:
    """Sums of exp(-a t), t exp(-a t) and t^2 exp(-a t) over t = t0 + j dt, j = 0 .. n-1.

    Parameters
    ----------
    a : array
        Decay rate [1/s], 0 or more.
    t0 : array
        First time [s].
    dt : array
        Time step [s], more than 0.
    n : array
        Number of terms [-], 1 or more.

    Returns
    -------
    (array, array, array)
        The three sums [-], [s], [s^2].

    Notes
    -----
    With q = exp(-a dt), S0 = sum q^j = (1 - q^n)/(1 - q) and, from (1 - q) S1 = S0 - 1 -
    (n - 1) q^n and (1 - q) S2 = 2 S1 - (S0 - 1) - (n - 1)^2 q^n, the sums of j q^j and
    j^2 q^j; 1 - q and 1 - q^n come from expm1, and the numerators lose at most a factor
    1/(a dt n) of their digits, which is small for the windows of a rise.

    Examples
    --------
    >>> s0, s1, s2 = geometric_moments(np.array([0.1]), np.array([2.0]), np.array([0.5]),
    ...                                np.array([40]))
    >>> t = 2.0 + 0.5 * np.arange(40)
    >>> bool(np.allclose([s0[0], s1[0], s2[0]], [np.exp(-0.1 * t).sum(),
    ...      (t * np.exp(-0.1 * t)).sum(), (t * t * np.exp(-0.1 * t)).sum()], rtol=1e-13))
    True
    """
    x = a * dt
    one_less = -np.expm1(-x)  # 1 - q
    with np.errstate(divide="ignore", invalid="ignore"):
        s0 = np.where(x > 0, -np.expm1(-n * x) / one_less, n)
        last = (n - 1) * np.exp(-n * x)  # (n - 1) q^n
        s1 = np.where(x > 0, (s0 - 1.0 - last) / one_less, n * (n - 1) / 2.0)
        s2 = np.where(x > 0, (2.0 * s1 - (s0 - 1.0) - (n - 1) * last) / one_less,
                      (n - 1) * n * (2 * n - 1) / 6.0)
    scale = np.exp(-a * t0)
    return (scale * s0, scale * (t0 * s0 + dt * s1),
            scale * (t0 * t0 * s0 + 2.0 * t0 * dt * s1 + dt * dt * s2))


def _even_bias(k: np.ndarray, tau: np.ndarray, t0: np.ndarray, dt: np.ndarray,
               n: np.ndarray) -> np.ndarray:
    """The lag bias on evenly spaced samples, every sum in closed form."""
    b = 1.0 / tau
    p, q = b / (b - k), k / (b - k)  # g = p exp(-k t) - q exp(-b t)

    def moments(rate):
        return geometric_moments(rate, t0, dt, n)

    sum_g = p * moments(k)[0] - q * moments(b)[0]
    sum_gg = p * p * moments(2 * k)[0] - 2 * p * q * moments(k + b)[0] + q * q * moments(2 * b)[0]
    mean = 1.0 - sum_g / n  # of the data y = 1 - g
    s_cc = n - 2.0 * sum_g + sum_gg - n * mean * mean
    steps = varpro._Steps(k.copy(), 60, 1e-9)
    zero = np.zeros(k.size)
    while True:
        rows = np.flatnonzero(steps.active)
        if rows.size == 0:
            break
        kf = steps.k[rows]

        def at(rate, rows=rows):
            return geometric_moments(rate, t0[rows], dt[rows], n[rows])

        e0, e1, _ = at(kf)
        ee0, ee1, ee2 = at(2 * kf)
        ke0, ke1, _ = at(k[rows] + kf)
        be0, be1, _ = at(b[rows] + kf)
        pr, qr, mr = p[rows], q[rows], mean[rows]
        # y - mean = (1 - mean) - p exp(-k t) + q exp(-b t) against g = e, v = -t e
        s_cg = (1.0 - mr) * e0 - pr * ke0 + qr * be0
        s_cv = -((1.0 - mr) * e1 - pr * ke1 + qr * be1)
        sums = np.array([e0, ee0, s_cg, -e1, ee2, -ee1, s_cv])
        steps.update(rows, sums, n[rows].astype(float), zero[rows], s_cc[rows])
    return np.where(steps.converged & np.isfinite(steps.ssr_best), steps.k_best / k - 1.0,
                    np.nan)


def _sampled_bias(t, start, rows, k, tau, first, stop) -> np.ndarray:
    """The lag bias of ``rows`` fitted on their samples (times ``t`` less ``start``)."""
    m = start.size
    k_true = np.zeros(m)
    k_true[rows] = k

    def clean(r, times):
        return 1.0 - expfit.row_response(times, k_true[r], tau[r])

    span = -(-(stop[rows] - first[rows]) // _STRIDE)
    cols = first[rows, None] + _STRIDE * np.arange(int(span.max()))
    usable = cols < stop[rows, None]
    cols = np.minimum(cols, stop[rows, None] - 1)
    coarse_t = np.maximum(t[rows[:, None], cols] - start[rows, None], 0.0)
    coarse = expfit.fit_batch(coarse_t, clean(rows, coarse_t), usable, 0.0, k)
    k0 = np.zeros(m)
    k0[rows] = np.where(coarse.converged, coarse.kla_per_s, k)
    ex = taylorfit.Expansion(taylorfit.Source(t, None, start, data=clean), np.zeros(m),
                             first, stop)
    steps, _ = taylorfit.fit(ex, k0, rows)
    return np.where(steps.converged[rows] & np.isfinite(steps.ssr_best[rows]),
                    steps.k_best[rows] / k - 1.0, np.nan)


def lag_bias_batch(t: np.ndarray, start: np.ndarray, spacing: np.ndarray, rows: np.ndarray,
                   kla: np.ndarray, tau: np.ndarray, first: np.ndarray, stop: np.ndarray
                   ) -> np.ndarray:
    """Lag bias of ``rows`` of a padded batch on their windows.

    Parameters
    ----------
    t : array (m, n)
        Sample times [s].
    start : array (m,)
        Start of each rise [s].
    spacing : array (m,)
        Time step of rows sampled evenly [s], nan for the others.
    rows : int array
        Rows to do [row index].
    kla : array
        kLa of those rows [1/s].
    tau : array (m,)
        Probe time constant [s].
    first, stop : int arrays (m,)
        Windows [first, stop) [sample index].

    Returns
    -------
    array
        k_plain / k - 1 [-] per row asked for; nan where the fit does not converge.
    """
    out = np.empty(rows.size)
    tau_r = tau[rows]
    # the closed form wants kLa away from 1/tau_p and a window over which exp(-k t) falls
    # well below 1 (every window of a rise does), so that its numerators keep their digits
    duration = spacing[rows] * (stop[rows] - first[rows])
    even = (np.isfinite(spacing[rows]) & (np.abs(1.0 - kla * tau_r) >= expfit._NEAR_SINGULAR)
            & (kla * duration >= 0.05))
    if even.any():
        r = rows[even]
        t0 = t[r, first[r]] - start[r]
        out[even] = _even_bias(kla[even], tau_r[even], t0, spacing[r], stop[r] - first[r])
    if (~even).any():
        out[~even] = _sampled_bias(t, start, rows[~even], kla[~even], tau, first, stop)
    return out


def lag_bias_rows(t: np.ndarray, kla: np.ndarray, tau: np.ndarray) -> np.ndarray:
    """Relative error of ideal-probe fits to noise-free lagged curves, one per row.

    Parameters
    ----------
    t : array (m, n)
        Sample times since gas-on [s], increasing along each row, every sample fitted.
    kla : array (m,)
        True kLa [1/s].
    tau : array (m,)
        Probe time constant [s], more than 0.

    Returns
    -------
    array (m,)
        k_fitted / k_true - 1 [-]; nan where the fit does not converge.
    """
    m, n = t.shape
    return _sampled_bias(t, np.zeros(m), np.arange(m), kla, tau, np.zeros(m, int),
                         np.full(m, n))


def lag_bias(kla_per_s: float, tau_p_s: float, t_s: np.ndarray) -> float:
    """Relative error of kLa fitted without the lag correction to a lagged curve [-].

    Parameters
    ----------
    kla_per_s : float
        True kLa [1/s].
    tau_p_s : float
        Probe time constant [s].
    t_s : array
        Sample times since gas-on used by the fit [s].

    Returns
    -------
    float
        k_fitted / k_true - 1 [-] for the noise-free lagged curve on these samples; negative
        means the uncorrected fit reads low.

    Notes
    -----
    Late in the rise the lag term exp(-t/tau_p) has died away and the probe signal decays at
    the true kLa, only scaled; the bias comes from the early samples, so it depends strongly
    on the window: a fit from the start reads far lower than one that skips the first 20 %.

    Examples
    --------
    kLa = 0.02 1/s, tau_p = 8 s, samples every 0.25 s over the whole rise:

    >>> round(lag_bias(0.02, 8.0, np.linspace(0.0, 500.0, 2001)), 4)
    -0.0713
    """
    t = np.asarray(t_s, dtype=float).ravel()
    if not (tau_p_s > 0 and t.size >= 4):
        return float("nan")
    return float(lag_bias_rows(t[None, :], np.array([float(kla_per_s)]),
                               np.array([float(tau_p_s)]))[0])
