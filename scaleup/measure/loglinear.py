"""The log-linear method on a batch of curves, and the goodness-of-fit figures both methods share.

The classic spreadsheet method: with C_inf taken as known, ln(C_inf - C) falls linearly with
time at slope -kLa; an ordinary least-squares line through the samples inside the window of
the rise gives kLa, its standard error and a t-interval (n - 2 degrees of freedom). It takes no
account of probe lag and depends on the C_inf chosen; it is reported so that results can be
compared with earlier practice.
"""

from __future__ import annotations

import numpy as np


def t975(dof: np.ndarray) -> np.ndarray:
    """Two-sided 95 % Student t quantile.

    Parameters
    ----------
    dof : array
        Degrees of freedom [-].

    Returns
    -------
    array
        t(0.975, dof) [-]; nan where dof < 1.
    """
    from scipy.stats import t as student_t

    with np.errstate(invalid="ignore"):
        return np.where(dof > 0, student_t.ppf(0.975, np.maximum(dof, 1)), np.nan)


def goodness(t_row: np.ndarray, c_row: np.ndarray, model_row: np.ndarray) -> dict:
    """Residuals, residual standard error, R^2 and Durbin-Watson of one fit.

    Parameters
    ----------
    t_row : array
        Sample times [s].
    c_row : array
        Readings [any unit].
    model_row : array
        Fitted values [unit of ``c_row``].

    Returns
    -------
    dict
        t, r (residuals), rmse (residual standard error with 3 parameters), r2, dw.
    """
    r = c_row - model_row
    ssr = float(r @ r)
    sst = float(((c_row - c_row.mean()) ** 2).sum())
    dof = max(r.size - 3, 1)
    dw = float((np.diff(r) ** 2).sum() / ssr) if ssr > 0 else float("nan")
    return {"t": t_row, "r": r, "rmse": float(np.sqrt(ssr / dof)),
            "r2": 1.0 - ssr / sst if sst > 0 else float("nan"), "dw": dw}


def log_linear_batch(t: np.ndarray, c: np.ndarray, usable: np.ndarray, lo: float, hi: float,
                     stars: list, start: np.ndarray, length: np.ndarray
                     ) -> list[tuple[dict | None, tuple | None]]:
    """The log-linear method on a padded batch (ordinary least squares on ln of the deficit).

    Parameters
    ----------
    t : array (m, n)
        Time since the start [s].
    c : array (m, n)
        DO readings [any unit].
    usable : bool array (m, n)
        Samples from each row's start to its end.
    lo, hi : float
        Fractions of the rise [-] (measured on the data from the first samples to C_inf).
    stars : list
        C* per row [unit of ``c``] or None: C_inf is then the mean of the last 5 % of samples.
    start, length : int arrays (m,)
        Where each row's usable samples begin and end [sample index].

    Returns
    -------
    list of (dict or None, (reason, code) or None)
        The fit figures of each row, or why it failed.
    """
    m = t.shape[0]
    n_use = length - start
    cw = np.where(usable, c, 0.0)
    # means of the first and last q usable samples from one running sum per row
    q = np.maximum(5, n_use // 20)
    cum = np.concatenate([np.zeros((m, 1)), np.cumsum(cw, 1)], axis=1)
    rows = np.arange(m)
    head_end = np.minimum(start + q, length)
    tail_start = np.maximum(length - q, start)
    first = (cum[rows, head_end] - cum[rows, start]) / (head_end - start)
    plateau = (cum[rows, length] - cum[rows, tail_start]) / (length - tail_start)
    star = np.array([np.nan if s is None else float(s) for s in stars])
    c_inf = np.where(np.isfinite(star), star, plateau)
    rise = c_inf - first
    with np.errstate(divide="ignore", invalid="ignore"):
        frac = (cw - first[:, None]) / rise[:, None]
        deficit = (c_inf[:, None] - cw) / np.sign(rise)[:, None]
    sel = usable & (frac >= lo) & (frac <= hi) & (deficit > 0)
    y = np.log(np.where(sel, deficit, 1.0))
    w = sel.astype(float)
    n = w.sum(1)
    tw = t * w
    st, sy, stt, sty = tw.sum(1), (y * w).sum(1), (tw * t).sum(1), (tw * y).sum(1)
    with np.errstate(divide="ignore", invalid="ignore"):
        sxx = stt - st * st / n
        slope = (sty - st * sy / n) / sxx
        icpt = (sy - slope * st) / n
        resid = np.where(sel, y - icpt[:, None] - slope[:, None] * t, 0.0)
        s2 = (resid * resid).sum(1) / (n - 2)
        se = np.sqrt(s2 / sxx)
    half = t975(n - 2.0) * se
    out = []
    for i in range(m):
        if n[i] < 3 or not (np.isfinite(slope[i]) and slope[i] < 0):
            why = (f"only {int(n[i])} samples lie below C_inf = {c_inf[i]:.4g} inside the window"
                   if n[i] < 3 else "ln(C_inf - C) does not fall with time")
            out.append((None, (why, "log_linear_failed")))
            continue
        k = float(-slope[i])
        c0 = float(c_inf[i] - np.sign(rise[i]) * np.exp(icpt[i]))
        s = sel[i]
        model = c_inf[i] - (c_inf[i] - c0) * np.exp(-k * t[i, s])
        d = goodness(t[i, s], c[i, s], model)
        d.update(method="log-linear", k=k, se=float(se[i]),
                 ci=(k - float(half[i]), k + float(half[i])),
                 c_inf=float(c_inf[i]), c_inf_se=float("nan"), c0=c0, c0_se=float("nan"),
                 tau=0.0)
        out.append((d, None))
    return out
