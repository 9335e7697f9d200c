"""kLa from gassing-out curves: the nonlinear fit, probe lag, windowing and the log-linear method.

A dissolved-oxygen (DO) curve recorded after the gas is switched on follows

.. math::
    C(t) = C_\\infty - (C_\\infty - C_0)\\, e^{-k_La (t - t_0)}

and a first-order probe with time constant :math:`\\tau_p` shows it as

.. math::
    C_p(t) = C_\\infty - (C_\\infty - C_0)
             \\frac{e^{-k_La t} - k_La \\tau_p e^{-t/\\tau_p}}{1 - k_La \\tau_p}

(time from :math:`t_0`). kLa, :math:`C_\\infty` and :math:`C_0` are fitted together by
nonlinear least squares, the approach of the ASCE/EWRI 2-06 clean-water standard [1]_; the
lagged model is the classic two-first-order-lags result (van't Riet [2]_). The log-linear
method (a straight line through ln(C* - C)) is reported beside it because it is what most
spreadsheets did before.

Concentrations may be in any unit (% saturation, mg/L, mol/m3): the model is linear in them,
so kLa does not depend on the unit, and C_inf and C0 come back in the unit of the data.

Defaults, stated once
---------------------
* Window: samples whose fitted probe reading lies between 20 % and 98 % of the rise
  (C - C0)/(C_inf - C0) are fitted; ASCE/EWRI 2-06 truncates DO data below about 20 % and above
  98 % of saturation (from memory). The window is found from the fit itself and iterated.
* Start: the last sample still at the initial level before the signal leaves it (to within
  the noise). A logged gas-on time (``start_s``) is better, above all for the lag model, which
  assumes the probe was at equilibrium at that instant.
* Probe lag warning when an uncorrected fit on the same samples would read more than 2 % off
  (common practice, no source).

References
----------
.. [1] ASCE/EWRI 2-06, Measurement of Oxygen Transfer in Clean Water. American Society of
   Civil Engineers, Reston VA, 2007.
.. [2] van't Riet, K. "Review of measuring methods and results in nonviscous gas-liquid mass
   transfer in stirred vessels." Ind. Eng. Chem. Process Des. Dev. 18 (1979) 357-364.
"""

from __future__ import annotations

import os
from collections.abc import Callable, Sequence
from concurrent.futures import ThreadPoolExecutor
from dataclasses import dataclass, field

import numpy as np

from scaleup.errors import InputError
from scaleup.measure.curve_checks import MIN_POINTS, Rejected, prepare_batch
from scaleup.measure.curve_start import detect_start
from scaleup.measure.lagbias import lag_bias
from scaleup.measure.loglinear import log_linear_batch
from scaleup.measure.windowfit import fit_windows

__all__ = ["DEFAULT_WINDOW", "CURVE_METHODS", "CurveRejected", "Rejected", "CurveFit",
           "CurveAnalysis", "ProbeStep", "analyse_curve", "analyse_curves", "curve_methods",
           "detect_start", "fit_probe_step", "lag_bias"]

DEFAULT_WINDOW = (0.2, 0.98)
LAG_BIAS_WARNING = 0.02
CURVE_METHODS = {
    "nonlinear": "kLa, C_inf and C0 fitted together by nonlinear least squares (ASCE/EWRI 2-06), "
                 "with the probe-lag model when a probe time constant is given",
    "log-linear": "straight line through ln(C_inf - C) against time, C_inf taken as C* if "
                  "given, else the mean of the last samples; no lag correction",
}
_BLOCK_SAMPLES = 4_000_000  # samples per progress step in a batch (at least one curve)
_THREAD_SAMPLES = 200_000  # from this size of batch a second thread pays for itself


class CurveRejected(InputError):
    """A curve that cannot give a kLa; ``code`` names the condition, the message says why."""

    def __init__(self, reason: str, code: str):
        self.code = code
        self.reason = reason
        super().__init__(reason, "curve")


# CurveFit and CurveAnalysis are read-only by convention, not frozen: a frozen dataclass
# sets each field through object.__setattr__, which made building the results of a large
# batch cost more than several of its passes over the samples
@dataclass(eq=False)
class CurveFit:
    """One method's estimate from one curve.

    Concentrations (``c_inf``, ``c0``, ``rmse``, ``residuals``) are in the unit of the data;
    ``start_s`` and ``window_s`` are on the clock of the data [s]; ``r_squared`` and
    ``durbin_watson`` are computed from the concentration residuals for either method.
    ``covariance`` (nonlinear only) is the 3 x 3 covariance of (c_inf, c0, kla).
    """

    method: str
    kla_per_s: float
    kla_stderr_per_s: float
    kla_ci95_per_s: tuple[float, float]
    c_inf: float
    c_inf_stderr: float
    c0: float
    c0_stderr: float
    start_s: float
    window_s: tuple[float, float]
    tau_p_s: float
    n_points: int
    rmse: float
    r_squared: float
    durbin_watson: float
    times_s: np.ndarray = field(repr=False)
    residuals: np.ndarray = field(repr=False)
    covariance: np.ndarray | None = field(default=None, repr=False)


@dataclass(eq=False)
class CurveAnalysis:
    """Both methods on one curve; ``primary`` is the one asked for.

    ``lag_bias`` is the relative error an uncorrected (ideal-probe) fit would make on the same
    samples (-0.08 reads 8 % low), or None without a probe time constant.
    """

    method: str
    nonlinear: CurveFit | None
    log_linear: CurveFit | None
    lag_bias: float | None
    start_detected: bool
    window: tuple[float, float]
    warnings: tuple[str, ...]

    @property
    def primary(self) -> CurveFit:
        fit = self.nonlinear if self.method == "nonlinear" else self.log_linear
        assert fit is not None  # a curve whose primary method fails is rejected instead
        return fit

    def summary(self) -> dict:
        """The result as plain numbers for JSON and the store (no sample arrays).

        Keys: method, kla_per_s, kla_stderr_per_s, kla_ci95_per_s, c_inf, c_inf_stderr, c0,
        c0_stderr (unit of the data), n_points, start_s, start_detected, window (fractions),
        window_s, tau_p_s, rmse, r_squared, durbin_watson, lag_bias, nonlinear_kla_per_s,
        log_linear_kla_per_s, warnings.
        """
        p = self.primary
        return {
            "method": self.method, "kla_per_s": p.kla_per_s,
            "kla_stderr_per_s": p.kla_stderr_per_s, "kla_ci95_per_s": list(p.kla_ci95_per_s),
            "c_inf": p.c_inf, "c_inf_stderr": p.c_inf_stderr, "c0": p.c0,
            "c0_stderr": p.c0_stderr, "n_points": p.n_points, "start_s": p.start_s,
            "start_detected": self.start_detected, "window": list(self.window),
            "window_s": list(p.window_s), "tau_p_s": p.tau_p_s, "rmse": p.rmse,
            "r_squared": p.r_squared, "durbin_watson": p.durbin_watson,
            "lag_bias": self.lag_bias,
            "nonlinear_kla_per_s": self.nonlinear.kla_per_s if self.nonlinear else None,
            "log_linear_kla_per_s": self.log_linear.kla_per_s if self.log_linear else None,
            "warnings": list(self.warnings)}


@dataclass(frozen=True)
class ProbeStep:
    """Probe time constant fitted from a step test (probe moved into saturated liquid)."""

    tau_p_s: float
    tau_p_stderr_s: float
    n_points: int
    warnings: tuple[str, ...]


def curve_methods() -> list[str]:
    """Names of the curve-fitting methods, for pick-lists and ``--method``."""
    return list(CURVE_METHODS)


def analyse_curve(t_s: Sequence[float] | np.ndarray, c: Sequence[float] | np.ndarray, *,
                  tau_p_s: float = 0.0, window: tuple[float, float] = DEFAULT_WINDOW,
                  start_s: float | None = None, method: str = "nonlinear",
                  c_star: float | None = None) -> CurveAnalysis:
    """kLa from one gassing-out curve by the nonlinear fit, with the log-linear method beside it.

    Parameters
    ----------
    t_s : array
        Sample times [s], increasing; NaN rows are skipped.
    c : array
        DO readings [any unit: %, mg/L or mol/m3]; NaN is a gap.
    tau_p_s : float
        First-order probe time constant [s]; 0 fits an ideal probe.
    window : (float, float)
        Fractions of the rise [-] whose samples are fitted (default 0.2 to 0.98).
    start_s : float, optional
        Gas-on time [s] on the clock of ``t_s``; detected when not given.
    method : str
        ``"nonlinear"`` or ``"log-linear"``: which estimate is primary.
    c_star : float, optional
        Saturation concentration [unit of ``c``]: C_inf of the log-linear method and the
        level above which a flat curve counts as saturated.

    Returns
    -------
    CurveAnalysis
        Both estimates, the lag bias and warnings.

    Raises
    ------
    CurveRejected
        When the curve cannot give a kLa (flat, too short, all NaN, saturated, time not
        increasing, no convergence); the message says which and why.

    Examples
    --------
    A noise-free curve with kLa = 0.02 1/s seen through an 8 s probe, recovered exactly:

    >>> t = np.arange(0.0, 400.0, 1.0)
    >>> g = (np.exp(-0.02 * t) - 0.16 * np.exp(-t / 8.0)) / (1 - 0.16)
    >>> res = analyse_curve(t, 100.0 - 95.0 * g, tau_p_s=8.0, start_s=0.0)
    >>> round(res.primary.kla_per_s, 8), round(res.lag_bias, 4)
    (0.02, -0.0178)
    """
    result = analyse_curves([(t_s, c)], tau_p_s=tau_p_s, window=window, start_s=start_s,
                            method=method, c_star=c_star)[0]
    if isinstance(result, Rejected):
        raise CurveRejected(result.reason, result.code)
    return result


def analyse_curves(curves: Sequence[tuple[np.ndarray, np.ndarray]], *,
                   tau_p_s: float | Sequence[float] = 0.0,
                   window: tuple[float, float] = DEFAULT_WINDOW,
                   start_s: float | None | Sequence[float | None] = None,
                   method: str = "nonlinear",
                   c_star: float | None | Sequence[float | None] = None,
                   progress: Callable[[int, int], None] | None = None
                   ) -> list[CurveAnalysis | Rejected]:
    """Analyse many curves at once; a curve that gives no kLa gets a :class:`Rejected` slot.

    Parameters
    ----------
    curves : sequence of (t_s, c)
        Times [s] and DO readings [any unit] of each curve.
    tau_p_s : float or sequence
        Probe time constant [s], one for all or one per curve.
    window : (float, float)
        Fractions of the rise [-] to fit.
    start_s : float or sequence, optional
        Gas-on times [s]; None (or a None entry) detects it.
    method : str
        ``"nonlinear"`` or ``"log-linear"``.
    c_star : float or sequence, optional
        Saturation concentrations [unit of each curve].
    progress : callable, optional
        Called as ``progress(done, total)`` after each chunk of curves, for a progress bar.

    Returns
    -------
    list
        One :class:`CurveAnalysis` or :class:`Rejected` per curve, in order.
    """
    if method not in CURVE_METHODS:
        raise InputError(f"unknown method {method!r}; choose one of {', '.join(CURVE_METHODS)}",
                         "method", method)
    lo, hi = _check_window(window)
    total = len(curves)
    taus = _per_curve(tau_p_s, total, "tau_p_s")
    starts = _per_curve(start_s, total, "start_s")
    stars = _per_curve(c_star, total, "c_star")
    for tau in taus:
        if not (np.isfinite(tau) and tau >= 0):
            raise InputError(f"{tau!r} is not a probe time constant; expected 0 s or more",
                             "tau_p_s", tau)
    out: list[CurveAnalysis | Rejected] = []
    # the log-linear fits of a large batch run on a second core, when there is one, beside
    # the nonlinear ones
    many = sum(len(t) for t, _ in curves) > _THREAD_SAMPLES
    pool = ThreadPoolExecutor(max_workers=2) if many and (os.cpu_count() or 1) > 1 else None
    try:
        first = 0
        while first < total:
            stop, samples = first, 0
            while stop < total and (stop == first or samples < _BLOCK_SAMPLES):
                samples += len(curves[stop][0])
                stop += 1
            block = range(first, stop)
            out.extend(_analyse_block([curves[i] for i in block],
                                      [float(taus[i]) for i in block], lo, hi, method,
                                      [starts[i] for i in block], [stars[i] for i in block],
                                      pool))
            first = stop
            if progress is not None:
                progress(stop, total)
    finally:
        if pool is not None:
            pool.shutdown()
    return out


def _check_window(window: tuple[float, float]) -> tuple[float, float]:
    try:
        lo, hi = (float(v) for v in window)
    except (TypeError, ValueError) as exc:
        raise InputError(f"{window!r} is not a window; expected two fractions such as "
                         "0.2:0.98", "window", window) from exc
    if not (0.0 <= lo < hi <= 1.0):
        raise InputError(f"{lo:g}:{hi:g} is not a window of the rise; expected "
                         "0 <= low < high <= 1, e.g. 0.2:0.98", "window", window)
    return lo, hi


def _per_curve(value, total: int, name: str) -> list:
    if value is None or np.isscalar(value):
        return [value] * total
    values = list(value)
    if len(values) != total:
        raise InputError(f"{len(values)} values for {total} curves", name, value)
    return values


def _analyse_block(curves: list, taus: list[float], lo: float, hi: float, method: str,
                   starts: list, stars: list, pool: ThreadPoolExecutor | None
                   ) -> list[CurveAnalysis | Rejected]:
    # wild data overflow on the way to a rejection; every estimate is checked before use
    with np.errstate(all="ignore"):
        batch, rejected = prepare_batch(curves, starts, stars, pool)
        results: list[CurveAnalysis | Rejected] = list(rejected)
        if batch is None:
            return results
        tau = np.array([taus[i] for i in batch.index])
        block_stars = [stars[i] for i in batch.index]
        if pool is None:
            loglin, loglins = _log_linear_results(batch, lo, hi, block_stars)
        else:
            job = pool.submit(_log_linear_results, batch, lo, hi, block_stars)
        fits = _nonlinear_fits(batch, tau, fit_windows(batch, tau, (lo, hi), pool), lo, hi)
        if pool is not None:
            loglin, loglins = job.result()
    for j, i in enumerate(batch.index.tolist()):
        nl, nl_reason, nl_warnings, bias = fits[j]
        ll = loglins[j]
        ll_reason = loglin.failed[j]
        if method == "nonlinear" and nl is None:
            results[i] = Rejected(*nl_reason)
            continue
        if method == "log-linear" and ll is None:
            results[i] = Rejected(ll_reason, "log_linear_failed")
            continue
        warnings = [*batch.warnings[j], *nl_warnings]
        if nl is None:
            warnings.append(f"nonlinear fit not available: {nl_reason[0]}")
        if ll is None:
            warnings.append(f"log-linear method not available: {ll_reason}")
        results[i] = CurveAnalysis(method, nl, ll, bias, bool(batch.detected[j]), (lo, hi),
                                   tuple(warnings))
    return results


def _nonlinear_fits(batch, tau, nl, lo: float, hi: float) -> list[tuple]:
    """(CurveFit or None, (reason, code) or None, warnings, lag bias) per row."""
    f = nl.fit
    flagged = _may_warn(f, tau, nl, hi).tolist()
    columns = [a.tolist() for a in (nl.status, f.kla_per_s, f.kla_stderr_per_s, nl.ci_half,
                                     f.c_inf, f.c_inf_stderr, f.c0, f.c0_stderr, batch.start,
                                     tau, f.n_points, nl.rmse, nl.r_squared,
                                     nl.durbin_watson, nl.last_fraction, nl.bias,
                                     nl.stop - nl.first)]
    covariances = list(f.cov)
    out = []
    for j, (status, k, se, half, c_inf, c_inf_se, c0, c0_se, start, tau_j, n, rmse, r2, dw,
            last, bias, size) in enumerate(zip(*columns, strict=True)):
        if status == 1:
            out.append((None, (f"too few samples in the window {lo:g} to {hi:g} of the rise "
                               f"({max(size, 0)}; at least {MIN_POINTS} needed): widen the "
                               "window or record more often", "too_short"), [], None))
            continue
        if status == 2:
            out.append((None, ("the nonlinear fit did not converge; the curve may not be a "
                               "first-order rise (check the start time and the window)",
                               "no_convergence"), [], None))
            continue
        times = nl.times[j]
        bias = None if bias != bias else bias  # nan: not computed
        fit = CurveFit("nonlinear", k, se, (k - half, k + half), c_inf, c_inf_se, c0, c0_se,
                       start, (float(times[0]), float(times[-1])), tau_j, n, rmse, r2, dw,
                       times, nl.residuals[j], covariances[j])
        out.append((fit, None, _fit_warnings(fit, bias, last, hi) if flagged[j] else [], bias))
    return out


def _may_warn(f, tau: np.ndarray, nl, hi: float) -> np.ndarray:
    """Rows for which :func:`_fit_warnings` may find something to say (a superset: the
    tests here are its own, with a margin), so that the others skip it."""
    k, se = f.kla_per_s, f.kla_stderr_per_s
    with np.errstate(invalid="ignore"):
        return ~((se <= 0.25 * k) & (nl.last_fraction >= min(hi, 0.9))
                 & ~(nl.durbin_watson < 1.0)
                 & ~(np.abs(nl.bias) > LAG_BIAS_WARNING)
                 & ~((tau > 0) & (k * tau > 0.5)))


def _log_linear_results(batch, lo: float, hi: float, stars: list):
    with np.errstate(all="ignore"):  # per thread: see _analyse_block
        loglin = log_linear_batch(batch, lo, hi, stars)
    return loglin, _log_linear_fits(batch, loglin)


def _log_linear_fits(batch, ll) -> list[CurveFit | None]:
    columns = [a.tolist() for a in (ll.kla, ll.se, ll.ci_half, ll.c_inf, ll.c0, batch.start,
                                     ll.rmse, ll.r_squared, ll.durbin_watson)]
    out: list[CurveFit | None] = []
    nan = float("nan")
    for j, (k, se, half, c_inf, c0, start, rmse, r2, dw) in enumerate(zip(*columns,
                                                                          strict=True)):
        if ll.failed[j] is not None:
            out.append(None)
            continue
        times = ll.times[j]
        out.append(CurveFit("log-linear", k, se, (k - half, k + half), c_inf, nan, c0, nan,
                            start, (float(times[0]), float(times[-1])), 0.0, int(times.size),
                            rmse, r2, dw, times, ll.residuals[j]))
    return out


def _fit_warnings(fit: CurveFit, bias: float | None, last_fraction: float,
                  hi: float) -> list[str]:
    out = []
    k, tau, se = fit.kla_per_s, fit.tau_p_s, fit.kla_stderr_per_s
    if se > 0.25 * k:
        out.append(f"kLa is poorly determined: standard error {100 * se / k:.0f} % of "
                   "the estimate")
    if last_fraction < min(hi, 0.9) - 1e-9:
        out.append(f"the data end at {100 * last_fraction:.0f} % of the rise: C_inf is "
                   "extrapolated and kLa is less certain; record until the signal levels off")
    dw = fit.durbin_watson
    if np.isfinite(dw) and dw < 1.0 and fit.rmse > 1e-9 * abs(fit.c_inf - fit.c0):
        out.append(f"the residuals are strongly correlated (Durbin-Watson {dw:.2f}): the "
                   "model does not follow the curve closely (probe lag, drift, a wrong start) "
                   "and the stated interval is too narrow")
    if bias is not None and abs(bias) > LAG_BIAS_WARNING:
        out.append(f"probe lag: kLa*tau_p = {k * tau:.2f}; a fit without the lag correction "
                   f"would read {100 * abs(bias):.0f} % {'low' if bias < 0 else 'high'} on "
                   "these samples")
    if tau > 0 and k * tau > 0.5:
        out.append(f"the probe is slow for this kLa (kLa*tau_p = {k * tau:.2f} > 0.5): the "
                   "estimate rests on the lag model; a faster probe would give a firmer one")
    return out


def fit_probe_step(t_s: Sequence[float] | np.ndarray, c: Sequence[float] | np.ndarray, *,
                   start_s: float | None = None,
                   window: tuple[float, float] = (0.05, 0.98)) -> ProbeStep:
    """Probe time constant from a step test: the probe moved from zero to a saturated liquid.

    Parameters
    ----------
    t_s : array
        Sample times [s].
    c : array
        Probe readings [any unit].
    start_s : float, optional
        Time of the step [s]; detected when not given.
    window : (float, float)
        Fractions of the step [-] to fit (default 0.05 to 0.98).

    Returns
    -------
    ProbeStep
        tau_p [s] = 1/k of the first-order response, with its standard error [s].

    Examples
    --------
    >>> t = np.arange(0.0, 60.0, 0.25)
    >>> round(fit_probe_step(t, 100 * (1 - np.exp(-t / 6.0)), start_s=0.0).tau_p_s, 9)
    6.0
    """
    res = analyse_curve(t_s, c, tau_p_s=0.0, window=window, start_s=start_s)
    fit = res.nonlinear
    assert fit is not None
    tau = 1.0 / fit.kla_per_s
    return ProbeStep(tau_p_s=tau, tau_p_stderr_s=fit.kla_stderr_per_s * tau * tau,
                     n_points=fit.n_points, warnings=res.warnings)
