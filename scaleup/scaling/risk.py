"""Risk of missing the duty: Monte Carlo over the correlation's uncertainty.

A draw is one possible full-scale vessel: parameters from ``N(params, cov)`` (the fit's
uncertainty), plus the vessel's own scatter about the correlation (the residual of a new
run), plus optionally an uncertainty of the physical properties, taken as a log-normal factor
on the driving force (C* and a set-point in % of saturation scale together). The duty is met
when ``kLa * factor >= kLa_required`` (see :func:`scaleup.scaling.oxygen.required_kla`).

Across the points of a map (a speed x gas-rate grid) the draws are shared: each draw is one
vessel seen at every operating point, so the map is a set of coherent scenarios, and each
point's probability is still an unbiased Monte Carlo estimate. Everything is vectorised:
one matrix product per block of points.
"""

from __future__ import annotations

from collections.abc import Callable, Mapping
from dataclasses import dataclass

import numpy as np

from scaleup.errors import InputError
from scaleup.scaling.correlation import KlaModel

DEFAULT_DRAWS = 20_000
_BLOCK_ELEMENTS = 4_000_000  # draws x points per block: ~32 MB of float64
PERCENTILES = (5.0, 50.0, 95.0)


@dataclass(frozen=True)
class Draws:
    """Random draws shared by every point: parameters, scatter and property factor."""

    theta: np.ndarray  # (n, p)
    scatter: np.ndarray  # (n,)
    log_property: np.ndarray  # (n,)

    @property
    def n(self) -> int:
        return int(self.scatter.size)


def draw(model: KlaModel, n_draws: int, rng: np.random.Generator | int | None = 0,
         property_sd: float = 0.0) -> Draws:
    """Draw parameters, scatter and the property factor for ``n_draws`` vessels.

    Parameters
    ----------
    model : KlaModel
        The correlation.
    n_draws : int
        Number of draws [-].
    rng : numpy.random.Generator or int or None
        Generator or seed (default seed 0: the same answer every time).
    property_sd : float
        Standard deviation of ln(driving-force factor) [-], e.g. 0.03 for 3 %.

    Returns
    -------
    Draws
    """
    if n_draws < 2:
        raise InputError(f"{n_draws}: a Monte Carlo needs at least 2 draws", "draws", n_draws)
    if property_sd < 0:
        raise InputError("a standard deviation cannot be negative", "property sd", property_sd)
    g = rng if isinstance(rng, np.random.Generator) else np.random.default_rng(rng)
    if model.n_params:
        theta = g.multivariate_normal(model.params, model.cov, size=n_draws,
                                      method="cholesky" if _positive_definite(model.cov)
                                      else "eigh")
    else:
        theta = np.zeros((n_draws, 0))
    scatter = g.normal(0.0, model.scatter_sd, n_draws) if model.scatter_sd > 0 \
        else np.zeros(n_draws)
    log_property = g.normal(0.0, property_sd, n_draws) if property_sd > 0 else np.zeros(n_draws)
    return Draws(theta, scatter, log_property)


def _positive_definite(cov: np.ndarray) -> bool:
    try:
        np.linalg.cholesky(cov)
    except np.linalg.LinAlgError:
        return False
    return True


def _log_kla_block(model: KlaModel, draws: Draws, X: np.ndarray, base: np.ndarray
                   ) -> np.ndarray:
    """ln kLa (log error space) or kLa (linear) of every draw at a block of points (n, m)."""
    z = draws.theta @ X.T + base if X.shape[1] else np.broadcast_to(base, (draws.n, base.size))
    if model.error_space == "log":
        return z + draws.scatter[:, None]
    return np.exp(z) + draws.scatter[:, None]


def probability_meets(model: KlaModel, points: Mapping[str, np.ndarray], kla_required,
                      draws: Draws) -> tuple[np.ndarray, np.ndarray]:
    """Probability that a full-scale vessel meets the duty at each point, by Monte Carlo.

    Parameters
    ----------
    model : KlaModel
        The correlation.
    points : mapping of str to array
        Correlation variables at ``m`` points (:func:`scaleup.scaling.correlation.kla_points`).
    kla_required : float or array
        kLa the duty needs at each point [1/s] (``inf``: cannot be met).
    draws : Draws
        The shared draws (:func:`draw`).

    Returns
    -------
    probability, standard_error : numpy.ndarray
        Per point [-]; the Monte Carlo standard error is sqrt(p (1 - p) / n).

    Examples
    --------
    >>> from scaleup.scaling.correlation import KlaModel
    >>> from scaleup.correlate.models import GASSED_PV, GAS_VELOCITY
    >>> m = KlaModel.from_published("vant-riet-coalescing")
    >>> pts = {GASSED_PV: [1000.0], GAS_VELOCITY: [0.01]}
    >>> p, se = probability_meets(m, pts, 0.0412, draw(m, 100_000))
    >>> round(float(p[0]), 2)  # the median kLa is 0.0412 1/s: even odds
    0.5
    """
    X, offset, log_scale = model.design(points)
    base = offset + log_scale
    required = np.broadcast_to(np.asarray(kla_required, float), base.shape)
    counts = np.zeros(base.size)
    if model.error_space == "log":
        # meets <=> [theta, e] . [x, 1] >= ln k_req - base, e = scatter + ln(property
        # factor): one product per block, in float32 (7 digits on ln kLa, far below the
        # Monte Carlo error), rows = points so the count runs along contiguous memory
        with np.errstate(divide="ignore"):
            threshold = (np.log(required) - base).astype(np.float32)
        A = np.column_stack([draws.theta, draws.scatter + draws.log_property]).astype(np.float32)
        B = np.column_stack([X, np.ones(base.size)]).astype(np.float32)
        block = max(1, _BLOCK_ELEMENTS // draws.n)
        for start in range(0, base.size, block):
            sl = slice(start, start + block)
            z = B[sl] @ A.T
            z -= threshold[sl, None]
            counts[sl] = np.count_nonzero(z >= 0, axis=1)
    else:
        factor = np.exp(draws.log_property)[:, None]
        block = max(1, _BLOCK_ELEMENTS // draws.n)
        for start in range(0, base.size, block):
            sl = slice(start, start + block)
            values = _log_kla_block(model, draws, X[sl], base[sl])
            counts[sl] = np.count_nonzero(values * factor >= required[sl], axis=0)
    p = counts / draws.n
    return p, np.sqrt(p * (1.0 - p) / draws.n)


def analytic_probability(model: KlaModel, points: Mapping[str, np.ndarray], kla_required,
                         property_sd: float = 0.0) -> np.ndarray:
    """Normal-theory probability of meeting the duty (log error space only) [-].

    .. math::
        P = \\Phi\\left(\\frac{\\hat z - \\ln k_La_{req}}
            {\\sqrt{x^T \\Sigma x + s^2 + s_p^2}}\\right)

    Parameters
    ----------
    model : KlaModel
        The correlation (log error space).
    points : mapping of str to array
        Correlation variables.
    kla_required : float or array
        [1/s].
    property_sd : float
        sd of ln(driving-force factor) [-].

    Returns
    -------
    numpy.ndarray
        Probability per point [-].
    """
    from scipy.stats import norm

    if model.error_space != "log":
        raise InputError("the normal-theory probability needs a log-space correlation",
                         "correlation", model.name)
    z, var = model.log_median(points)
    sd = np.sqrt(var + model.scatter_sd ** 2 + property_sd ** 2)
    with np.errstate(divide="ignore"):
        return norm.cdf((z - np.log(np.asarray(kla_required, float))) / sd)


@dataclass(frozen=True)
class PointRisk:
    """The risk at one operating point."""

    probability: float
    standard_error: float
    n_draws: int
    kla_percentiles: dict[str, float]
    otr_percentiles: dict[str, float] | None
    kla_required: float

    def to_dict(self) -> dict:
        return {"probability_meets_duty": self.probability,
                "probability_standard_error": self.standard_error, "n_draws": self.n_draws,
                "kla_required_per_s": self.kla_required,
                "kla_percentiles_per_s": self.kla_percentiles,
                "otr_capacity_percentiles_mol_m3_s": self.otr_percentiles}


def point_risk(model: KlaModel, point: Mapping[str, np.ndarray], kla_required: float,
               n_draws: int = DEFAULT_DRAWS, rng: np.random.Generator | int | None = 0,
               property_sd: float = 0.0,
               otr_of_kla: Callable[[np.ndarray], np.ndarray] | None = None) -> PointRisk:
    """Probability of meeting the duty at one point, with kLa and OTR-capacity bands.

    Parameters
    ----------
    model : KlaModel
        The correlation.
    point : mapping of str to array
        Correlation variables of one point.
    kla_required : float
        kLa the duty needs [1/s].
    n_draws : int
        Draws [-].
    rng : numpy.random.Generator or int or None
        Generator or seed.
    property_sd : float
        sd of ln(driving-force factor) [-].
    otr_of_kla : callable, optional
        Vectorised kLa [1/s] -> OTR capacity [mol/(m3 s)] at this point; gives the OTR band.

    Returns
    -------
    PointRisk
    """
    d = draw(model, n_draws, rng, property_sd)
    X, offset, log_scale = model.design(point)
    if X.shape[0] != 1:
        raise InputError("point_risk takes one operating point", "point")
    values = _log_kla_block(model, d, X, offset + log_scale)[:, 0]
    kla = np.exp(values) if model.error_space == "log" else values
    effective = kla * np.exp(d.log_property)
    meets = effective >= kla_required
    p = float(np.mean(meets))
    bands = {f"p{q:g}": float(v) for q, v in zip(PERCENTILES, np.percentile(kla, PERCENTILES),
                                                 strict=True)}
    otr = None
    if otr_of_kla is not None:
        capacity = np.asarray(otr_of_kla(np.maximum(effective, 0.0)))
        otr = {f"p{q:g}": float(v) for q, v in zip(PERCENTILES,
                                                   np.percentile(capacity, PERCENTILES),
                                                   strict=True)}
    return PointRisk(p, float(np.sqrt(p * (1 - p) / d.n)), d.n, bands, otr, float(kla_required))
