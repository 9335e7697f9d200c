"""The log-linear method on a batch of curves.

The classic spreadsheet method: with C_inf taken as known, ln(C_inf - C) falls linearly with
time at slope -kLa; an ordinary least-squares line through the samples inside the window of
the rise gives kLa, its standard error and a t-interval (n - 2 degrees of freedom). It takes no
account of probe lag and depends on the C_inf chosen; it is reported so that results can be
compared with earlier practice.
"""

from __future__ import annotations

from dataclasses import dataclass

import numpy as np

from scaleup.measure.curve_checks import row_means
from scaleup.measure.segments import segment_sums as _segment_sums

_PART_SAMPLES = 400_000  # samples of the batch gathered at a time


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


@dataclass(eq=False)
class LogLinearFits:
    """The log-linear method on every row of a batch (arrays of shape ``(m,)``).

    ``failed`` holds the reason (None where it worked); concentrations are in the unit of the
    data; ``times`` [s] and ``residuals`` hold one array per row (the samples used).
    """

    failed: list
    kla: np.ndarray
    se: np.ndarray
    ci_half: np.ndarray
    c_inf: np.ndarray
    c0: np.ndarray
    rmse: np.ndarray
    r_squared: np.ndarray
    durbin_watson: np.ndarray
    times: list
    residuals: list


def _levels(c: np.ndarray, start: np.ndarray, length: np.ndarray
            ) -> tuple[np.ndarray, np.ndarray, np.ndarray]:
    """Means of the first and of the last q = max(5, n/20) samples after each row's start,
    and which rows have all those samples alike.

    On a noise-free curve whose first or last samples are all alike, which samples lie
    inside the window can turn on the last bit of these means; such rows get them from one
    running sum, the order in which earlier versions added, so they select the same samples.
    """
    n_use = length - start
    q = np.maximum(5, n_use // 20)
    head = np.minimum(q, n_use)
    tail = np.maximum(length - q, start)
    if (start == start[0]).all() and (length == c.shape[1]).all():  # column slices will do
        a, h, z = int(start[0]), int(head[0]), int(tail[0])
        first, last = c[:, a:a + h].mean(1), c[:, z:].mean(1)
        first_spread = np.ptp(c[:, a:a + h], axis=1)
        last_spread = np.ptp(c[:, z:], axis=1)
    else:
        first, first_spread = row_means(c, start, head)
        last, last_spread = row_means(c, tail, length - tail)
    scale = np.maximum(np.abs(first), np.abs(last))
    alike = np.minimum(first_spread, last_spread) <= 1e-9 * scale
    for i in np.flatnonzero(alike):
        running = np.concatenate([[0.0], np.cumsum(c[i, start[i]:length[i]])])
        first[i] = running[head[i]] / head[i]
        last[i] = (running[-1] - running[tail[i] - start[i]]) / (length[i] - tail[i])
    return first, last, alike


def log_linear_batch(batch, lo: float, hi: float, stars: list) -> LogLinearFits:
    """The log-linear method on a padded batch (ordinary least squares on ln of the deficit).

    Parameters
    ----------
    batch : Batch
        Checked curves (:class:`scaleup.measure.curve_checks.Batch`): times [s] and readings
        [any unit], with each row's start and length.
    lo, hi : float
        Fractions of the rise [-] (measured on the data from the first samples to C_inf).
    stars : list
        C* per row [unit of the data] or None: C_inf is then the mean of the last 5 % of
        samples.

    Returns
    -------
    LogLinearFits
        The fit figures of each row, or why it failed.

    Notes
    -----
    The samples used are those after the start whose fraction of the rise lies in [lo, hi]
    and whose deficit d = sign(rise) (C_inf - C) is positive; the fraction is 1 - d/|rise|,
    so the test is one of bounds on C. The samples of a run of rows are gathered into one
    array, every sum is a sum over each row's run of it, and the residual of the fitted curve
    follows from that of the line: C - model = sign d expm1(-(ln d - line)).
    """
    t, c, length = batch.t, batch.c, batch.length
    m, width = t.shape
    first, plateau, alike = _levels(c, batch.first, length)
    star = np.array([np.nan if s is None else float(s) for s in stars])
    c_inf = np.where(np.isfinite(star), star, plateau)
    rise = c_inf - first
    sign = np.sign(rise)
    # d in [|rise| (1 - hi), |rise| (1 - lo)] and d > 0, as bounds on C = C_inf - sign d
    ends = np.stack([c_inf - rise * (1.0 - hi), c_inf - rise * (1.0 - lo)])
    low, high = ends.min(0), ends.max(0)
    with np.errstate(invalid="ignore"):
        high = np.where(rise > 0, np.minimum(high, np.nextafter(c_inf, -np.inf)), high)
        low = np.where(rise < 0, np.maximum(low, np.nextafter(c_inf, np.inf)), low)
    out = {name: np.full(m, np.nan) for name in ("n", "slope", "icpt", "se", "rmse", "r2",
                                                 "dw")}
    times: list = []
    residuals: list = []
    rows_per_part = max(1, _PART_SAMPLES // max(width, 1))
    for i0 in range(0, m, rows_per_part):
        part = slice(i0, min(i0 + rows_per_part, m))
        _log_linear_part(t[part], c[part], batch, part, c_inf[part], sign[part], low[part],
                         high[part], first[part], rise[part], lo, hi, alike[part], out,
                         times, residuals)
    n, slope, icpt = out["n"], out["slope"], out["icpt"]
    works = (n >= 3) & np.isfinite(slope) & (slope < 0)
    failed = [None if ok else (
        f"only {int(count)} samples lie below C_inf = {level:.4g} inside the window"
        if count < 3 else "ln(C_inf - C) does not fall with time")
        for ok, count, level in zip(works.tolist(), n.tolist(), c_inf.tolist(),
                                    strict=True)]
    return LogLinearFits(failed=failed, kla=-slope, se=out["se"],
                         ci_half=t975(n - 2.0) * out["se"], c_inf=c_inf,
                         c0=c_inf - sign * np.exp(icpt), rmse=out["rmse"],
                         r_squared=out["r2"], durbin_watson=out["dw"], times=times,
                         residuals=residuals)


def _log_linear_part(t, c, batch, part, c_inf, sign, low, high, first, rise, lo, hi,
                     alike, out, times, residuals) -> None:
    """The log-linear fits of the batch rows ``part`` (views ``t``, ``c``), into ``out``."""
    r, width = t.shape
    sel = (c >= low[:, None]) & (c <= high[:, None])
    start, length = batch.first[part], batch.length[part]
    if (start > 0).any() or (length < width).any():
        cols = np.arange(width)
        sel &= (cols >= start[:, None]) & (cols < length[:, None])
    for i in np.flatnonzero(alike):
        # the fraction of the rise exactly as earlier versions computed it
        frac = (c[i] - first[i]) / rise[i]
        cols = np.arange(width)
        sel[i] = ((cols >= start[i]) & (cols < length[i]) & (frac >= lo) & (frac <= hi)
                  & ((c_inf[i] - c[i]) / sign[i] > 0))
    counts = np.count_nonzero(sel, axis=1)
    at = np.flatnonzero(sel)
    offsets = np.cumsum(counts) - counts
    origin = batch.start[part]
    tt = t.reshape(-1)[at]
    if origin.any():
        tt -= np.repeat(origin, counts)
    # the deficit as (C_inf - C) / sign(rise)
    gap = np.repeat(c_inf, counts)
    gap -= c.reshape(-1)[at]
    d = gap * np.repeat(sign, counts)
    y = np.log(d)
    n = counts.astype(float)
    st, sy = _segment_sums(tt, offsets, counts), _segment_sums(y, offsets, counts)
    stt, sty = _segment_sums(tt * tt, offsets, counts), _segment_sums(tt * y, offsets, counts)
    with np.errstate(divide="ignore", invalid="ignore"):
        sxx = stt - st * st / n
        slope = (sty - st * sy / n) / sxx
        icpt = (sy - slope * st) / n
        resid = np.repeat(slope, counts)
        resid *= tt
        np.subtract(y, resid, out=resid)
        resid -= np.repeat(icpt, counts)
        s2 = _segment_sums(resid * resid, offsets, counts) / (n - 2)
        se = np.sqrt(s2 / sxx)
    # C - (C_inf - sign exp(icpt + slope t)) = sign d expm1(-resid) = (C_inf - C) expm1(-resid)
    with np.errstate(over="ignore", invalid="ignore"):
        model_resid = np.expm1(np.negative(resid, out=resid), out=resid)
        model_resid *= gap
    ssr = _segment_sums(model_resid * model_resid, offsets, counts)
    with np.errstate(invalid="ignore", divide="ignore"):
        spread = d - np.repeat(_segment_sums(d, offsets, counts) / n, counts)
    sst = _segment_sums(spread * spread, offsets, counts)
    # squared steps, the one from a row's last sample to the next row's first set to zero
    jumps = np.empty(model_resid.size)
    np.subtract(model_resid[1:], model_resid[:-1], out=jumps[:-1])
    jumps *= jumps
    jumps[offsets[(counts > 0) & (offsets > 0)] - 1] = 0.0
    jumps[-1:] = 0.0
    dw_sum = _segment_sums(jumps, offsets, counts)
    rows = np.arange(part.start, part.start + r)
    with np.errstate(divide="ignore", invalid="ignore"):
        out["rmse"][rows] = np.sqrt(ssr / np.maximum(n - 3, 1))
        out["r2"][rows] = np.where(sst > 0, 1.0 - ssr / sst, np.nan)
        out["dw"][rows] = np.where(ssr > 0, dw_sum / ssr, np.nan)
    out["n"][rows], out["slope"][rows], out["icpt"][rows], out["se"][rows] = n, slope, icpt, se
    if origin.any():
        tt += np.repeat(origin, counts)
    ends = (offsets + counts).tolist()
    times.extend(tt[i:j] for i, j in zip(offsets.tolist(), ends, strict=True))
    residuals.extend(model_resid[i:j] for i, j in zip(offsets.tolist(), ends, strict=True))
