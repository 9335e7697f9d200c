"""Statistics of a fit: influence diagnostics, likelihood, information criteria, errors."""

from __future__ import annotations

import numpy as np


def influence(Xw: np.ndarray, unscaled: np.ndarray, ew: np.ndarray, s2: float) -> dict:
    """Leverage, studentised residuals and Cook's distance of each run.

    Parameters
    ----------
    Xw : numpy.ndarray, shape (n, p)
        Design (or Jacobian) rows times the square root of each run's weight.
    unscaled : numpy.ndarray, shape (p, p)
        ``(Xw' Xw)^-1``.
    ew : numpy.ndarray, shape (n,)
        Residuals times the square root of each run's weight.
    s2 : float
        Residual variance.

    Returns
    -------
    dict of numpy.ndarray
        ``leverage`` (hat diagonal), ``studentized_internal``, ``studentized_external``
        (leave-one-out scale) and ``cooks_distance``; NaN where a run has leverage 1
        (it alone determines a parameter).

    Notes
    -----
    The definitions of Belsley, Kuh and Welsch (1980) and Cook (1977), as in statsmodels'
    ``OLSInfluence``.
    """
    n, p = Xw.shape
    h = np.einsum("ij,jk,ik->i", Xw, unscaled, Xw)
    with np.errstate(divide="ignore", invalid="ignore"):
        internal = ew / np.sqrt(s2 * (1.0 - h))
        external = internal * np.sqrt((n - p - 1) / (n - p - internal**2))
        cooks = internal**2 * h / (p * (1.0 - h))
    return {"leverage": h, "studentized_internal": internal,
            "studentized_external": external, "cooks_distance": cooks}


def error_measures(predicted: np.ndarray, measured: np.ndarray) -> dict:
    """How far predictions are from measurements, in the terms engineers quote.

    Returns ``rmse_log`` (root mean square of ``ln(pred/meas)``), ``mean_bias_fraction``
    (``exp(mean ln(pred/meas)) - 1``, positive = over-prediction), ``max_abs_error_fraction``
    (largest ``|pred/meas - 1|``) and ``within_20_fraction`` (share within +-20 %).

    Examples
    --------
    >>> error_measures([1.1, 0.9], [1.0, 1.0])["within_20_fraction"]
    1.0
    """
    ratio = np.asarray(predicted, float) / np.asarray(measured, float)
    log_ratio = np.log(ratio)
    return {"rmse_log": float(np.sqrt(np.mean(log_ratio**2))),
            "mean_bias_fraction": float(np.expm1(np.mean(log_ratio))),
            "max_abs_error_fraction": float(np.max(np.abs(ratio - 1.0))),
            "within_20_fraction": float(np.mean(np.abs(ratio - 1.0) <= 0.2))}


def gaussian_llf(resid: np.ndarray, w: np.ndarray) -> float:
    """Weighted-normal log likelihood at the maximum-likelihood scale (as statsmodels WLS)."""
    n = resid.size
    ssr = float(np.sum(w * resid**2))
    return -0.5 * n * (np.log(2 * np.pi * ssr / n) + 1.0) + 0.5 * float(np.sum(np.log(w)))


def fit_statistics(z: np.ndarray, zhat: np.ndarray, w_r2: np.ndarray, y: np.ndarray,
                   yhat: np.ndarray, resid: np.ndarray, w_eff: np.ndarray, p: int,
                   likelihood: bool) -> dict:
    """R2 and RMSE in log space, log likelihood, AIC, BIC and error measures of a fit.

    ``z``/``zhat`` are measured and fitted values in the form's log space, ``w_r2`` the
    weights for R2 (statsmodels' weighted, centred definition), ``resid``/``w_eff`` the
    residuals and weights in the space the errors were fitted in. Without ``likelihood``
    (robust fits) ``llf``, ``aic`` and ``bic`` are None.
    """
    n = z.size
    zbar = np.average(z, weights=w_r2)
    r2 = 1.0 - np.sum(w_r2 * (z - zhat) ** 2) / np.sum(w_r2 * (z - zbar) ** 2)
    out = {"n_runs": n, "n_parameters": p, "df_resid": n - p, "r2_log": float(r2),
           "rmse_log": float(np.sqrt(np.mean((z - zhat) ** 2)))}
    if likelihood:
        llf = gaussian_llf(resid, w_eff)
        out.update(llf=llf, aic=-2 * llf + 2 * p, bic=-2 * llf + p * np.log(n))
    else:
        out.update(llf=None, aic=None, bic=None)
    errors = error_measures(yhat, y)
    errors.pop("rmse_log")
    out.update(errors)
    return out
