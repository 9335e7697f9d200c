"""Fit a correlation form to runs, with the statistics an engineer can defend.

Three estimators, one result type:

* ``method="ols"``: least squares in the form's log space, ordinary or weighted
  (``weights="stderr"``: each run weighted by ``(y / se)^2``, the inverse variance of
  ``ln y`` by the delta method). This is the default: kLa scatter is multiplicative.
* ``method="nls"``: nonlinear least squares on the response itself (additive errors),
  started from the log-space estimate; weights ``1 / se^2``.
* ``robust="soft_l1"`` or ``"huber"`` (with ``method="ols"``): a robust loss in log space;
  runs it down-weights to less than half are flagged.

The result carries parameters, covariance, residual variance, statistics, influence
diagnostics and the fitted domain, evaluates confidence and prediction intervals at new
points, and round-trips through a plain dict (JSON) so a saved fit can predict later.
Intervals use the t distribution with the residual degrees of freedom.
"""

from __future__ import annotations

import datetime as _dt
from collections.abc import Mapping
from dataclasses import dataclass, field, replace

import numpy as np
from scipy import optimize, stats

from scaleup.correlate.diagnostics import fit_statistics, influence
from scaleup.correlate.domain import Domain, Extrapolation, domain_from_runs
from scaleup.correlate.models import (
    COALESCENCE,
    KLA_DIMENSIONLESS,
    KLA_POWER_LAW,
    SHERWOOD,
    VESSEL_VOLUME,
    ModelForm,
    Observations,
)
from scaleup.errors import InputError, ScaleupError

SCHEMA = "scaleup.fit/1"
METHODS = ("ols", "nls")
WEIGHTS = ("none", "stderr")
ROBUST_LOSSES = ("soft_l1", "huber")
# A run whose robust weight falls below this counts less than half a run: it is flagged
# (for soft-L1 that is a residual beyond 2.3 robust standard deviations, for Huber 2.7).
DOWN_WEIGHT_FLAG = 0.5
# Huber tuning constant: 95 % efficiency at normal errors (Huber 1981).
ROBUST_TUNING = 1.345


class FitDidNotConverge(ScaleupError):
    """The nonlinear or robust optimiser stopped without converging."""


def _version() -> str:
    from importlib.metadata import PackageNotFoundError, version

    try:
        return version("scaleup")
    except PackageNotFoundError:
        from scaleup import __version__

        return __version__


def t_quantile(level: float, df: int) -> float:
    """Two-sided t quantile for a ``level`` interval with ``df`` degrees of freedom [-]."""
    return float(stats.t.ppf(0.5 + level / 2.0, df))


@dataclass(frozen=True)
class Prediction:
    """Predicted response at ``m`` points with 95 % (or ``level``) intervals.

    ``value`` is the fitted curve: for log-space fits the median response,
    ``exp(z)``; the intervals are exact back-transforms of the log-space intervals.
    """

    value: np.ndarray
    ci_low: np.ndarray
    ci_high: np.ndarray
    pi_low: np.ndarray
    pi_high: np.ndarray
    z: np.ndarray
    se_mean: np.ndarray
    se_observation: np.ndarray
    level: float
    extrapolation: Extrapolation


@dataclass(frozen=True)
class FitResult:
    """A fitted correlation: parameters, covariance, statistics, diagnostics and domain.

    The model is ``z = X @ params + offset`` in the form's transformed space, and the
    response is ``form.untransform(z, points)``. ``error_space`` says where the residual
    variance lives: ``"log"`` (in ``z``) or ``"linear"`` (in the response).
    """

    form: ModelForm
    method: str
    weights: str
    robust: str | None
    error_space: str
    params: np.ndarray
    cov: np.ndarray
    residual_variance: float
    prediction_weight: float
    n_runs: int
    statistics: dict
    domain: Domain
    run_ids: tuple = ()
    diagnostics: dict = field(default_factory=dict)
    warnings: tuple[str, ...] = ()
    bootstrap: dict | None = None
    package_version: str = ""
    created_at: str = ""

    @property
    def parameter_names(self) -> tuple[str, ...]:
        return self.form.parameter_names

    @property
    def df_resid(self) -> int:
        return self.n_runs - len(self.params)

    @property
    def stderr(self) -> np.ndarray:
        return np.sqrt(np.diag(self.cov))

    def conf_int(self, level: float = 0.95) -> np.ndarray:
        """t-based intervals of the parameters, shape (p, 2)."""
        half = t_quantile(level, self.df_resid) * self.stderr
        return np.column_stack([self.params - half, self.params + half])

    def parameters(self, level: float = 0.95) -> list[dict]:
        """Parameters as engineers read them: ``C = exp(ln_C)`` with its interval mapped.

        Each entry has ``name``, ``value``, ``stderr``, ``ci95`` (low, high), ``t_value``,
        ``p_value`` and ``fixed``; ``stderr`` of an exponentiated parameter is by the delta
        method. Fixed parameters are listed with ``stderr`` None.
        """
        ci = self.conf_int(level)
        out = []
        free = dict(zip(self.parameter_names, range(len(self.params)), strict=True))
        fixed = dict(self.form.fixed)
        for name in self.form.all_parameter_names:
            log = name.startswith("ln_")
            label = name[3:] if log else name
            if name in fixed:
                v = float(np.exp(fixed[name]) if log else fixed[name])
                out.append({"name": label, "value": v, "stderr": None, "ci95": [v, v],
                            "t_value": None, "p_value": None, "fixed": True})
                continue
            i = free[name]
            theta, se = float(self.params[i]), float(self.stderr[i])
            # an exact fit (no residual scatter) has no t statistic
            t_value = theta / se if se > 0 else None
            p_value = (None if t_value is None
                       else float(2 * stats.t.sf(abs(t_value), self.df_resid)))
            lo, hi = float(ci[i, 0]), float(ci[i, 1])
            if log:
                value = float(np.exp(theta))
                out.append({"name": label, "value": value, "stderr": value * se,
                            "ci95": [float(np.exp(lo)), float(np.exp(hi))],
                            "t_value": t_value, "p_value": p_value, "fixed": False})
            else:
                out.append({"name": label, "value": theta, "stderr": se, "ci95": [lo, hi],
                            "t_value": t_value, "p_value": p_value, "fixed": False})
        return out

    def design_rows(self, points: Mapping[str, np.ndarray]) -> tuple[np.ndarray, np.ndarray]:
        """Design rows ``X`` and offsets of new points, so ``z = X @ params + offset``."""
        return self.form.design(points)

    def untransform(self, z: np.ndarray, points: Mapping[str, np.ndarray]) -> np.ndarray:
        """Linear predictor(s) ``z`` back to the response at ``points``."""
        return self.form.untransform(z, points)

    def predict(self, points: Mapping[str, np.ndarray], level: float = 0.95,
                weight: float | None = None) -> Prediction:
        """Fitted value with confidence (mean) and prediction (new run) intervals.

        Parameters
        ----------
        points : mapping of str to array_like
            Variables of the new points by SI name (e.g. ``gassed_power_per_volume_w_m3``,
            ``superficial_velocity_m_s``), plus ``vessel_volume_m3`` to check scale.
        level : float
            Interval level [-].
        weight : float, optional
            Weight of a new run (default: the fit's ``prediction_weight``, the harmonic
            mean of the fitting weights, i.e. a run of the campaign's typical precision).

        Returns
        -------
        Prediction
        """
        X, offset = self.design_rows(points)
        z = X @ self.params + offset
        var_mean = np.einsum("ij,jk,ik->i", X, self.cov, X)
        w = self.prediction_weight if weight is None else weight
        var_obs_extra = self.residual_variance / w
        t = t_quantile(level, self.df_resid)
        if self.error_space == "log":
            se_mean = np.sqrt(var_mean)
            se_obs = np.sqrt(var_mean + var_obs_extra)
            value = self.untransform(z, points)
            bounds = [self.untransform(z + s * t * se, points)
                      for s, se in ((-1, se_mean), (1, se_mean), (-1, se_obs), (1, se_obs))]
        else:
            value = self.untransform(z, points)
            gradient = (value - self.form.shift)[:, None] * X
            se_mean = np.sqrt(np.einsum("ij,jk,ik->i", gradient, self.cov, gradient))
            se_obs = np.sqrt(se_mean**2 + var_obs_extra)
            bounds = [value - t * se_mean, value + t * se_mean,
                      value - t * se_obs, value + t * se_obs]
        extrapolation = self.domain.check(points)
        return Prediction(value, *bounds, z, se_mean, se_obs, level, extrapolation)

    def simulate(self, points: Mapping[str, np.ndarray], n_samples: int,
                 rng: np.random.Generator, observation: bool = True) -> np.ndarray:
        """Monte Carlo draws of the response, shape (n_samples, m).

        Parameters are drawn from the normal approximation N(params, cov); with
        ``observation`` a new run's residual (variance ``residual_variance /
        prediction_weight`` in ``error_space``) is added, as for a prediction interval.
        """
        X, offset = self.design_rows(points)
        theta = rng.multivariate_normal(self.params, self.cov, size=n_samples)
        z = theta @ X.T + offset
        sd = np.sqrt(self.residual_variance / self.prediction_weight)
        if observation and self.error_space == "log":
            z = z + rng.normal(0.0, sd, size=z.shape)
        y = self.untransform(z, points)
        if observation and self.error_space == "linear":
            y = y + rng.normal(0.0, sd, size=y.shape)
        return y

    def with_bootstrap(self, summary: dict) -> FitResult:
        return replace(self, bootstrap=summary)

    def to_dict(self) -> dict:
        """Everything needed to predict again, as JSON-safe plain types."""
        return {
            "schema": SCHEMA, "form": self.form.to_dict(), "equation": self.form.equation(),
            "method": self.method, "weights": self.weights, "robust": self.robust,
            "error_space": self.error_space,
            "parameter_names": list(self.parameter_names),
            "params": self.params.tolist(), "cov": self.cov.tolist(),
            "residual_variance": self.residual_variance,
            "prediction_weight": self.prediction_weight, "n_runs": self.n_runs,
            "df_resid": self.df_resid, "parameters": self.parameters(),
            "statistics": dict(self.statistics), "domain": self.domain.to_dict(),
            "run_ids": [_plain_id(r) for r in self.run_ids],
            "diagnostics": {k: _json_list(v) for k, v in self.diagnostics.items()},
            "warnings": list(self.warnings), "bootstrap": self.bootstrap,
            "package_version": self.package_version, "created_at": self.created_at,
        }

    @classmethod
    def from_dict(cls, data: Mapping) -> FitResult:
        """Rebuild a fit written by :meth:`to_dict` (refuses other schemas)."""
        if data.get("schema") != SCHEMA:
            raise InputError(f"not a saved fit of this program (schema {data.get('schema')!r}, "
                             f"expected {SCHEMA!r})", "fit")
        form = ModelForm.from_dict(data["form"])
        params = np.asarray(data["params"], dtype=float)
        if len(params) != len(form.parameter_names):
            raise InputError("saved fit is inconsistent: parameter count does not match its "
                             "form", "fit")
        return cls(form, data["method"], data["weights"], data.get("robust"),
                   data["error_space"], params,
                   np.asarray(data["cov"], dtype=float).reshape(len(params), len(params)),
                   float(data["residual_variance"]), float(data["prediction_weight"]),
                   int(data["n_runs"]), dict(data["statistics"]),
                   Domain.from_dict(data["domain"]), tuple(data.get("run_ids", ())),
                   {k: _array_from_json(v) for k, v in data.get("diagnostics", {}).items()},
                   tuple(data.get("warnings", ())), data.get("bootstrap"),
                   data.get("package_version", ""), data.get("created_at", ""))


def _plain_id(value):
    return value.item() if hasattr(value, "item") else value


def _json_list(values) -> list:
    """Array to a list with NaN and inf as None (strict JSON has no NaN)."""
    a = np.asarray(values)
    if a.dtype.kind == "f":
        return [x if np.isfinite(x) else None for x in a.tolist()]
    return a.tolist()


def _array_from_json(values: list) -> np.ndarray:
    if any(v is None for v in values):
        return np.array([np.nan if v is None else v for v in values], dtype=float)
    return np.asarray(values)


def fit_weights(form: ModelForm, data: Observations, weights: str, space: str) -> np.ndarray:
    """Per-run weights: ones, or inverse variances from the stated standard errors."""
    if weights not in WEIGHTS:
        raise InputError(f"unknown weights {weights!r}; choose none or stderr", "weights",
                         weights)
    if weights == "none":
        return np.ones(data.n)
    se = data.response_stderr
    if se is None or np.any(~(se > 0)):
        missing = data.n if se is None else int(np.sum(~(se > 0)))
        raise InputError(f"weights from standard errors need a positive stated standard "
                         f"error for every run; {missing} run(s) have none (use weights none)",
                         "weights")
    if space == "linear":
        return 1.0 / se**2
    # var(ln y) ~ (se / y)^2, and for ln(Sh - 2) ~ (se / (Sh - 2))^2
    return ((data.response - form.shift) / se) ** 2


def _solve(X: np.ndarray, z: np.ndarray, w: np.ndarray) -> tuple[np.ndarray, np.ndarray, int]:
    """Weighted least squares by SVD: estimates, (X'WX)^-1 and the rank."""
    sw = np.sqrt(w)
    U, s, Vt = np.linalg.svd(X * sw[:, None], full_matrices=False)
    rank = int(np.sum(s > s[0] * max(X.shape) * np.finfo(float).eps))
    kept = np.arange(len(s)) < rank
    s_inv = np.divide(1.0, s, out=np.zeros_like(s), where=kept)
    beta = Vt.T @ (s_inv * (U.T @ (z * sw)))
    unscaled = (Vt.T * s_inv**2) @ Vt
    return beta, unscaled, rank


def _check_estimable(form: ModelForm, X: np.ndarray, rank: int, n: int) -> None:
    p = X.shape[1]
    if n <= p:
        raise InputError(f"{n} run(s) cannot fit {p} parameters ({', '.join(form.parameter_names)}):"
                         f" at least {p + 1} are needed", "runs", n)
    if rank < p:
        flat = [name for name, col in zip(form.parameter_names, X.T, strict=True)
                if np.ptp(col) == 0 and not name.startswith("ln_")]
        why = (f"; {', '.join(flat)} has no spread in the data (all runs at one value)"
               if flat else "; two variables move together in these runs")
        raise InputError(f"the runs cannot separate the parameters{why}", "runs")


def fit(form: ModelForm, data: Observations, *, method: str = "ols", weights: str = "none",
        robust: str | None = None) -> FitResult:
    """Fit ``form`` to ``data``.

    Parameters
    ----------
    form : ModelForm
        The correlation form (medium classes resolved; see :func:`fit_kla`).
    data : Observations
        Per-run data.
    method : str
        ``"ols"`` (least squares in log space) or ``"nls"`` (on the response).
    weights : str
        ``"none"`` or ``"stderr"`` (inverse variance from each run's standard error).
    robust : str, optional
        ``"soft_l1"`` or ``"huber"``: robust loss in log space (``method="ols"`` only).

    Returns
    -------
    FitResult

    Examples
    --------
    Runs exactly on van't Riet's coalescing line give back its constants:

    >>> from scaleup.correlate.models import kla_observations
    >>> pv = [300.0, 600.0, 1200.0, 2400.0, 600.0, 2400.0]
    >>> us = [0.004, 0.004, 0.008, 0.008, 0.016, 0.016]
    >>> kla = [0.026 * p**0.4 * u**0.5 for p, u in zip(pv, us)]
    >>> obs = kla_observations(kla, gassed_power_per_volume_w_m3=pv, superficial_velocity_m_s=us)
    >>> [round(p["value"], 4) for p in fit(ModelForm("kla-power-law"), obs).parameters()]
    [0.026, 0.4, 0.5]
    """
    if method not in METHODS:
        raise InputError(f"unknown method {method!r}; choose ols or nls", "method", method)
    if robust is not None and robust not in ROBUST_LOSSES:
        raise InputError(f"unknown robust loss {robust!r}; choose soft_l1 or huber", "robust",
                         robust)
    if robust is not None and method != "ols":
        raise InputError("a robust fit works in log space: use method ols", "robust", robust)
    if data.response_name != form.response_name:
        raise InputError(f"the data hold {data.response_name} but the form predicts "
                         f"{form.response_name}", "form", form.kind)
    points = data.points()
    X, offset = form.design(points)
    z = form.transform(data.response, points)
    y = data.response
    n, p = X.shape
    space = "linear" if method == "nls" else "log"
    w = fit_weights(form, data, weights, space)
    w_log = w if space == "log" else np.ones(n)
    beta, unscaled, rank = _solve(X, z - offset, w_log)
    _check_estimable(form, X, rank, n)
    notes: list[str] = []
    robust_weight = np.ones(n)
    if robust is not None:
        beta, robust_weight = _robust(X, z - offset, w, beta, robust)
        beta, unscaled, _ = _solve(X, z - offset, w * robust_weight)
    if method == "nls":
        beta = _nonlinear(form, X, offset, y, w, beta, points)
    zhat = X @ beta + offset
    yhat = form.untransform(zhat, points)
    resid_log = z - zhat
    if method == "nls":
        gradient = (yhat - form.shift)[:, None] * X
        _, unscaled, _ = _solve(gradient, np.zeros(n), w)
        resid, design, w_eff = y - yhat, gradient, w
    else:
        resid, design, w_eff = resid_log, X, w * robust_weight
    s2 = float(np.sum(w_eff * resid**2) / (n - p))
    cov = s2 * unscaled
    diagnostics = influence(design * np.sqrt(w_eff)[:, None], unscaled,
                             resid * np.sqrt(w_eff), s2)
    diagnostics["residual_log"] = resid_log
    diagnostics["fitted"] = yhat
    diagnostics["robust_weight"] = robust_weight
    flagged = robust_weight < DOWN_WEIGHT_FLAG
    diagnostics["flagged"] = flagged
    ids = tuple(data.run_id.tolist()) if data.run_id is not None else tuple(range(n))
    if flagged.any():
        notes.append(f"robust fit down-weighted {int(flagged.sum())} run(s) to less than half: "
                     + ", ".join(str(ids[i]) for i in np.flatnonzero(flagged)))
    if n - p < 5:
        notes.append(f"only {n - p} residual degree(s) of freedom: intervals are wide and "
                     "rest on the normal-error assumption")
    statistics = fit_statistics(z, zhat, w_log if robust is None else w_eff, y, yhat, resid,
                                w_eff, p, likelihood=robust is None)
    statistics["residual_std"] = float(np.sqrt(s2))
    statistics["n_flagged"] = int(flagged.sum())
    continuous = {k: data.variables[k] for k in form.continuous_variables}
    if VESSEL_VOLUME in data.variables:
        continuous[VESSEL_VOLUME] = data.variables[VESSEL_VOLUME]
    cats = {k: v for k, v in data.categories.items() if k == COALESCENCE}
    domain = domain_from_runs(continuous, cats, joint=tuple(
        v for v in form.continuous_variables if np.ptp(np.log(data.variables[v])) > 0))
    w_pred = float(1.0 / np.mean(1.0 / w))
    return FitResult(form, method, weights, robust, space, beta, cov, s2, w_pred, n,
                     statistics, domain, ids, diagnostics, tuple(notes), None, _version(),
                     _dt.datetime.now(_dt.UTC).isoformat(timespec="seconds"))


def _robust(X, z, w, start, loss) -> tuple[np.ndarray, np.ndarray]:
    sw = np.sqrt(w)
    e = (z - X @ start) * sw
    sigma = 1.4826 * np.median(np.abs(e - np.median(e)))
    if not sigma > 0:
        sigma = float(np.std(e)) or 1.0
    f_scale = ROBUST_TUNING * sigma
    solution = optimize.least_squares(lambda b: (X @ b - z) * sw, start,
                                      jac=lambda b: X * sw[:, None], loss=loss,
                                      f_scale=f_scale, method="trf", x_scale="jac")
    if not solution.success:
        raise FitDidNotConverge(f"robust ({loss}) fit did not converge: {solution.message}")
    u = ((X @ solution.x - z) * sw / f_scale) ** 2
    # the IRLS weight of each run is the loss derivative rho'(u) at convergence
    weight = 1.0 / np.sqrt(1.0 + u) if loss == "soft_l1" else np.where(u <= 1, 1.0,
                                                                        1.0 / np.sqrt(u))
    return solution.x, weight


def _nonlinear(form, X, offset, y, w, start, points) -> np.ndarray:
    sw = np.sqrt(w)

    def residuals(b):
        return (form.untransform(X @ b + offset, points) - y) * sw

    def jacobian(b):
        f = form.untransform(X @ b + offset, points)
        return (f - form.shift)[:, None] * X * sw[:, None]

    solution = optimize.least_squares(residuals, start, jac=jacobian, method="lm",
                                      xtol=1e-12, ftol=1e-12, gtol=1e-12)
    if not solution.success:
        raise FitDidNotConverge(f"nonlinear fit did not converge: {solution.message}")
    return solution.x


def kla_form(*, form: str = "power-law", power_basis: str, viscosity: bool = False,
             fixed: Mapping[str, float] | None = None) -> ModelForm:
    """A kLa form by its CLI name (``power-law`` or ``dimensionless``)."""
    kinds = {"power-law": KLA_POWER_LAW, "dimensionless": KLA_DIMENSIONLESS}
    if form not in kinds:
        raise InputError(f"unknown kLa form {form!r}; choose power-law or dimensionless",
                         "form", form)
    return ModelForm(kinds[form], power_basis, viscosity,
                     fixed=tuple((k, float(v)) for k, v in (fixed or {}).items()))


def fit_kla(data: Observations, *, power_basis: str, form: str = "power-law",
            viscosity: bool = False, medium_factor: bool = False,
            fixed: Mapping[str, float] | None = None, method: str = "ols",
            weights: str = "none", robust: str | None = None) -> FitResult:
    """Fit a kLa correlation; ``power_basis`` (gassed or ungassed P/V) must be chosen.

    With ``medium_factor`` a factor per coalescence class is fitted (the class
    ``coalescing`` is the reference when present).
    """
    model = kla_form(form=form, power_basis=power_basis, viscosity=viscosity, fixed=fixed)
    notes = []
    if medium_factor:
        if COALESCENCE not in data.categories:
            raise InputError("a medium factor needs the coalescence class of each run",
                             COALESCENCE)
        model = model.with_classes(data.categories[COALESCENCE])
        if len(model.medium_classes) < 2:
            notes.append("all runs are of one coalescence class: no medium factor fitted")
    elif COALESCENCE in data.categories and len(set(data.categories[COALESCENCE])) > 1:
        # coalescing and non-coalescing media follow different exponents (van't Riet 1979
        # gives separate correlations): one law over both is rarely what is wanted
        classes = ", ".join(sorted(set(map(str, data.categories[COALESCENCE]))))
        notes.append(f"the runs mix coalescence classes ({classes}) in one correlation: fit "
                     "each class on its own (e.g. --where \"coalescence = 'coalescing'\") or "
                     "add a medium factor")
    result = fit(model, data, method=method, weights=weights, robust=robust)
    return replace(result, warnings=result.warnings + tuple(notes)) if notes else result


def fit_sherwood(data: Observations, *, plus_two: bool = False,
                 fixed: Mapping[str, float] | None = None, method: str = "ols",
                 weights: str = "none", robust: str | None = None) -> FitResult:
    """Fit ``Sh = [2 +] A Re^b Sc^c``; e.g. ``fixed={"c_schmidt": 1/3}``."""
    model = ModelForm(SHERWOOD, plus_two=plus_two,
                      fixed=tuple((k, float(v)) for k, v in (fixed or {}).items()))
    return fit(model, data, method=method, weights=weights, robust=robust)
