"""Does a correlation scale? Leave-one-vessel-out, scale-bias test, comparison tables.

Leave-one-vessel-out (LOVO) fits the correlation on the runs of all other vessels and
predicts the held-out vessel: the honest test of a correlation meant to be used at another
scale. For each held-out vessel the mean log error ``mean ln(pred/meas)`` is tested
against zero (its standard error combines the fitted curve's uncertainty at the vessel's
runs and the scatter of those runs). The trend of these biases with ``log10(volume)`` is a
weighted meta-regression with multiplicative over-dispersion (Thompson and Sharp, 1999):
a significant slope is a scale-dependent bias, reported in words with its size per tenfold
change in volume and its p-value.
"""

from __future__ import annotations

from collections.abc import Mapping
from dataclasses import asdict, dataclass

import numpy as np
from scipy import stats

from scaleup.correlate.diagnostics import error_measures
from scaleup.correlate.fitting import FitResult, fit
from scaleup.correlate.models import VESSEL_VOLUME, Observations
from scaleup.correlate.published import PublishedCorrelation
from scaleup.errors import InputError, ScaleupError

SIGNIFICANCE = 0.05


@dataclass(frozen=True)
class HeldOutVessel:
    """Predictions for one vessel from a fit on all the others."""

    vessel: str
    volume_m3: float | None
    n_runs: int
    mean_log_ratio: float | None  # mean ln(pred/meas); > 0: over-predicted
    stderr_log: float | None
    p_value: float | None
    rmse_log: float | None
    mean_bias_fraction: float | None
    max_abs_error_fraction: float | None
    within_20_fraction: float | None
    extrapolated_fraction: float | None  # share of its runs outside the training domain
    parameters: dict | None  # name -> value of the fold's fit
    error: str | None = None


@dataclass(frozen=True)
class ScaleBias:
    """Trend of held-out bias with vessel size."""

    slope_per_decade: float  # change of mean ln(pred/meas) per tenfold volume
    stderr: float
    p_value: float
    n_vessels: int
    dispersion: float
    significant: bool
    message: str


@dataclass(frozen=True)
class LeaveOneVesselOut:
    folds: tuple[HeldOutVessel, ...]
    pooled: dict | None  # error measures over every held-out prediction
    scale_bias: ScaleBias | None
    messages: tuple[str, ...]

    def to_dict(self) -> dict:
        return {"folds": [asdict(f) for f in self.folds], "pooled": self.pooled,
                "scale_bias": None if self.scale_bias is None else asdict(self.scale_bias),
                "messages": list(self.messages)}


def _fold(result: FitResult, data: Observations, vessel: str, mask: np.ndarray,
          volume: float | None) -> tuple[HeldOutVessel, np.ndarray | None]:
    held = data.subset(mask)
    try:
        train = fit(result.form, data.subset(~mask), method=result.method,
                    weights=result.weights, robust=result.robust)
        points = held.points()
        prediction = train.predict(points)
    except (InputError, ScaleupError, ArithmeticError) as exc:
        return HeldOutVessel(vessel, volume, held.n, *([None] * 9), error=str(exc)), None
    measured_z = result.form.transform(held.response, points)
    # ln(pred/meas) in the form's log space (for kLa forms, that of kLa itself)
    log_ratio = prediction.z - measured_z
    n = held.n
    X, _ = train.design_rows(points)
    xbar = X.mean(axis=0)
    curve_var = float(xbar @ train.cov @ xbar)
    scatter = (float(np.var(log_ratio, ddof=1)) if n >= 3
               else train.statistics["rmse_log"] ** 2)
    se = float(np.sqrt(curve_var + scatter / n))
    df = n - 1 if n >= 3 else train.df_resid
    mean = float(np.mean(log_ratio))
    p = float(2 * stats.t.sf(abs(mean) / se, df)) if se > 0 else 0.0
    errors = error_measures(prediction.value, held.response)
    params = {name: float(v) for name, v in zip(train.parameter_names, train.params,
                                                strict=True)}
    return HeldOutVessel(vessel, volume, n, mean, se, p, errors["rmse_log"],
                         errors["mean_bias_fraction"], errors["max_abs_error_fraction"],
                         errors["within_20_fraction"],
                         float(np.mean(prediction.extrapolation.extrapolated)), params), \
        np.column_stack([prediction.value, held.response])


def leave_one_vessel_out(result: FitResult, data: Observations) -> LeaveOneVesselOut:
    """Refit ``result``'s correlation without each vessel in turn and predict that vessel.

    Parameters
    ----------
    result : FitResult
        The fit on all runs (its form, method, weights and robust loss are reused).
    data : Observations
        The same runs, with ``vessel`` labels (and ``vessel_volume_m3`` for the trend).

    Returns
    -------
    LeaveOneVesselOut
    """
    if data.vessel is None:
        raise InputError("leave-one-vessel-out needs the vessel of each run", "vessel")
    labels = np.unique(data.vessel)
    if labels.size < 2:
        return LeaveOneVesselOut((), None, None,
                                 ("all runs are from one vessel: a correlation's behaviour "
                                  "across scales cannot be tested",))
    volumes = data.variables.get(VESSEL_VOLUME)
    folds, pairs = [], []
    for vessel in labels:
        mask = data.vessel == vessel
        volume = None if volumes is None else float(np.median(volumes[mask]))
        fold, pair = _fold(result, data, str(vessel), mask, volume)
        folds.append(fold)
        if pair is not None:
            pairs.append(pair)
    pooled = None
    if pairs:
        both = np.vstack(pairs)
        pooled = error_measures(both[:, 0], both[:, 1])
    messages = []
    quantity = "kLa" if data.response_name == "kla_per_s" else "Sherwood number"
    for f in folds:
        size = f" ({f.volume_m3:.3g} m3)" if f.volume_m3 is not None else ""
        if f.error:
            messages.append(f"vessel {f.vessel}{size} could not be predicted from the others: "
                            f"{f.error}")
        elif f.p_value is not None and f.p_value < SIGNIFICANCE:
            word = "over" if f.mean_log_ratio > 0 else "under"
            messages.append(f"vessel {f.vessel}{size}: fitted on the other vessels, the "
                            f"correlation {word}-predicts its {quantity} by "
                            f"{abs(np.expm1(f.mean_log_ratio)) * 100:.0f} % on average "
                            f"(p = {f.p_value:.2g})")
    bias = scale_bias(folds)
    if bias is not None:
        messages.append(bias.message)
    return LeaveOneVesselOut(tuple(folds), pooled, bias, tuple(messages))


def scale_bias(folds: tuple[HeldOutVessel, ...] | list[HeldOutVessel]) -> ScaleBias | None:
    """Weighted trend of held-out vessel biases against log10(volume); None if untestable.

    A meta-regression of ``mean_log_ratio`` on ``log10(volume)`` with weights
    ``1/stderr^2``; when the biases scatter more than their standard errors allow, the
    slope's variance is inflated by that over-dispersion and a t distribution with
    ``k - 2`` degrees of freedom is used (Thompson and Sharp 1999).
    """
    usable = [f for f in folds if f.error is None and f.volume_m3 and f.stderr_log]
    if len({f.volume_m3 for f in usable}) < 2:
        return None
    x = np.log10([f.volume_m3 for f in usable])
    d = np.array([f.mean_log_ratio for f in usable])
    w = 1.0 / np.array([f.stderr_log for f in usable]) ** 2
    k = len(usable)
    xbar = np.average(x, weights=w)
    sxx = float(np.sum(w * (x - xbar) ** 2))
    slope = float(np.sum(w * (x - xbar) * (d - np.average(d, weights=w))) / sxx)
    intercept = np.average(d, weights=w) - slope * xbar
    q = float(np.sum(w * (d - intercept - slope * x) ** 2))
    dispersion = max(1.0, q / (k - 2)) if k > 2 else 1.0
    se = float(np.sqrt(dispersion / sxx))
    if dispersion > 1.0:
        p = float(2 * stats.t.sf(abs(slope) / se, k - 2))
    else:
        p = float(2 * stats.norm.sf(abs(slope) / se))
    significant = p < SIGNIFICANCE
    per_decade = np.expm1(slope) * 100
    span = f"{k} vessels from {min(f.volume_m3 for f in usable):.3g} to " \
           f"{max(f.volume_m3 for f in usable):.3g} m3"
    if significant:
        direction = "rise" if slope > 0 else "fall"
        message = (f"scale-dependent bias: predicted/measured values of held-out vessels "
                   f"{direction}s by {abs(per_decade):.0f} % per tenfold volume "
                   f"(slope {slope:+.3f} +- {se:.3f} in ln per decade, p = {p:.2g}, {span}); "
                   "this correlation should not be extrapolated in scale as it stands")
    else:
        message = (f"no significant scale trend in held-out errors: {per_decade:+.0f} % per "
                   f"tenfold volume (slope {slope:+.3f} +- {se:.3f}, p = {p:.2f}, {span})")
        if k < 3:
            message += "; with two vessel sizes the test has little power"
    return ScaleBias(slope, se, p, k, dispersion, significant, message)


def compare_correlations(models: Mapping[str, FitResult | PublishedCorrelation],
                         data: Observations) -> list[dict]:
    """Fitted and published correlations side by side on the same runs.

    Parameters
    ----------
    models : mapping of str to FitResult or PublishedCorrelation
        Name shown in the table to the correlation.
    data : Observations
        The runs to compare on.

    Returns
    -------
    list of dict
        Per model: ``name``, ``equation``, ``source``, ``n_runs``, ``n_in_domain`` (runs
        inside its fitted or stated range), ``rmse_log``, ``mean_bias_fraction``,
        ``max_abs_error_fraction``, ``within_20_fraction``; sorted by ``rmse_log``.
    """
    points = data.points()
    rows = []
    for name, model in models.items():
        if isinstance(model, FitResult):
            prediction = model.predict(points)
            predicted, outside = prediction.value, prediction.extrapolation.extrapolated
            equation, source = model.form.equation(), "fitted"
        else:
            predicted = model.predict(points)
            outside = model.domain.check(points).extrapolated
            equation, source = model.equation, model.source
        predicted = np.broadcast_to(predicted, data.response.shape)
        row = {"name": name, "equation": equation, "source": source, "n_runs": data.n,
               "n_in_domain": int(np.sum(~outside))}
        row.update(error_measures(predicted, data.response))
        rows.append(row)
    return sorted(rows, key=lambda r: r["rmse_log"])


@dataclass(frozen=True)
class FitReport:
    """A fit with what an engineer needs beside it: LOVO, influential runs, left-out runs."""

    result: FitResult
    data: Observations
    loo_vessel: LeaveOneVesselOut | None
    selection: str = ""
    skipped: tuple[str, ...] = ()
    notes: tuple[str, ...] = ()

    @property
    def kind(self) -> str:
        return "sherwood" if self.result.form.response_name == "sherwood" else "kla"

    @property
    def warnings(self) -> list[str]:
        out = list(self.result.warnings) + list(self.notes)
        if self.skipped:
            out.append(f"{len(self.skipped)} selected record(s) left out: "
                       + "; ".join(self.skipped[:5]) + (" ..." if len(self.skipped) > 5 else ""))
        if self.loo_vessel is not None:
            out.extend(self.loo_vessel.messages)
        return out

    def influential_runs(self, most: int = 5) -> list[dict]:
        """Runs whose Cook's distance exceeds 4/n, largest first (at most ``most``)."""
        d = self.result.diagnostics
        cooks = np.nan_to_num(np.asarray(d["cooks_distance"], float), nan=np.inf)
        order = [i for i in np.argsort(-cooks) if cooks[i] > 4.0 / self.result.n_runs][:most]
        return [{"run_id": self.result.run_ids[i], "cooks_distance": float(cooks[i]),
                 "leverage": float(d["leverage"][i]),
                 "studentized_residual": float(d["studentized_external"][i]),
                 "flagged_by_robust_fit": bool(d["flagged"][i])} for i in order]

    def summary(self) -> dict:
        """The fit as the command line's JSON and the workbench show it."""
        r = self.result
        s = r.statistics
        return {"kind": self.kind, "equation": r.form.equation(), "form": r.form.kind,
                "power_basis": r.form.power_basis if self.kind == "kla" else None,
                "method": r.method, "weights": r.weights, "robust": r.robust,
                "parameters": r.parameters(), "r2_log": s["r2_log"], "rmse_log": s["rmse_log"],
                "aic": s["aic"], "bic": s["bic"], "n_runs": r.n_runs, "statistics": s,
                "domain": r.domain.to_dict(),
                "loo_vessel": None if self.loo_vessel is None else self.loo_vessel.to_dict(),
                "bootstrap": r.bootstrap, "influential_runs": self.influential_runs(),
                "selection": self.selection, "warnings": self.warnings}

    def stored(self) -> dict:
        """What a saved fit keeps: the full fit (reloadable) plus validation and selection."""
        return {**self.result.to_dict(), "selection": self.selection,
                "loo_vessel": None if self.loo_vessel is None else self.loo_vessel.to_dict(),
                "skipped": list(self.skipped)}


def report_fit(result: FitResult, data: Observations, *, bootstrap: int = 0,
               bootstrap_kind: str = "runs", seed: int | None = 0, selection: str = "",
               skipped: tuple[str, ...] | list[str] = (),
               notes: tuple[str, ...] | list[str] = ()) -> FitReport:
    """Bundle a fit with leave-one-vessel-out and, if asked, a bootstrap summary.

    Parameters
    ----------
    result : FitResult
        The fit on all runs.
    data : Observations
        Its runs.
    bootstrap : int
        Number of bootstrap resamples (0: none).
    bootstrap_kind : str
        ``"runs"`` or ``"vessels"``.
    seed : int, optional
        Bootstrap seed.
    selection : str
        The filter that chose the runs (recorded with a saved fit).
    skipped : sequence of str
        Records left out and why.
    notes : sequence of str
        Other remarks on the data (e.g. properties filled in), shown with the warnings.

    Returns
    -------
    FitReport
    """
    from scaleup.correlate.resampling import attach_bootstrap

    if bootstrap:
        result = attach_bootstrap(result, data, kind=bootstrap_kind, n_resamples=bootstrap,
                                  seed=seed)
    lovo = leave_one_vessel_out(result, data) if data.vessel is not None else None
    return FitReport(result, data, lovo, selection, tuple(skipped), tuple(notes))
