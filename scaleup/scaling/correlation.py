"""One view of a kLa correlation for the scale-up engine, fitted or published.

Every kLa form the package fits or publishes is log-linear: ``ln kLa = x @ theta + offset
+ ln s + e`` with parameters ``theta ~ N(params, cov)`` and a new vessel's own scatter
``e ~ N(0, sd^2)``. A fitted correlation brings its parameters, covariance, residual variance
and fitted domain (:class:`scaleup.correlate.fitting.FitResult`). A published one has no
parameter covariance: its stated accuracy is read as a 95 % band of a log-normal scatter
(van't Riet 1979 states 20-40 %; the upper end is used), and its stated ranges are its domain.
"""

from __future__ import annotations

import math
from collections.abc import Mapping
from dataclasses import dataclass

import numpy as np

from scaleup.correlate.domain import Extrapolation
from scaleup.correlate.fitting import FitResult
from scaleup.correlate.models import (
    COALESCENCE,
    DENSITY,
    GAS_VELOCITY,
    GASSED_PV,
    UNGASSED_PV,
    VESSEL_VOLUME,
    VISCOSITY,
)
from scaleup.correlate.published import PublishedCorrelation, kla_correlations
from scaleup.errors import InputError

# Relative accuracy read as the half-width of a 95 % band, per published correlation. van't
# Riet (1979) states 20-40 %; for the others, recalled from memory without a stated accuracy,
# the same 40 % is assumed (common practice, no source).
PUBLISHED_ACCURACY = {"vant-riet-coalescing": 0.40, "vant-riet-noncoalescing": 0.40}
DEFAULT_PUBLISHED_ACCURACY = 0.40
Z95 = 1.959963984540054  # two-sided 95 % normal quantile


@dataclass(frozen=True)
class KlaModel:
    """A kLa correlation seen as a log-linear model with parameter and scatter uncertainty.

    Attributes
    ----------
    name : str
        The fit's name or the published key.
    kind : str
        "fitted" or "published".
    fit : FitResult or None
    published : PublishedCorrelation or None
    scatter_sd : float
        Standard deviation of a new vessel's scatter in ln kLa (log space) or in kLa [1/s]
        (linear error space of a nonlinear fit).
    error_space : str
        "log" or "linear".
    """

    name: str
    kind: str
    fit: FitResult | None = None
    published: PublishedCorrelation | None = None
    scatter_sd: float = 0.0
    error_space: str = "log"

    # -- construction ------------------------------------------------------------------
    @classmethod
    def from_fit(cls, fit: FitResult, name: str = "fit") -> KlaModel:
        if fit.form.response_name != "kla_per_s":
            raise InputError(f"fit {name!r} is a Sherwood correlation; the scale-up needs a kLa "
                             "correlation", "correlation", name)
        sd = math.sqrt(fit.residual_variance / fit.prediction_weight)
        return cls(name, "fitted", fit=fit, scatter_sd=sd, error_space=fit.error_space)

    @classmethod
    def from_published(cls, key: str) -> KlaModel:
        if key not in kla_correlations:
            raise InputError(f"unknown published kLa correlation {key!r}; known: "
                             f"{', '.join(kla_correlations)}", "correlation", key)
        accuracy = PUBLISHED_ACCURACY.get(key, DEFAULT_PUBLISHED_ACCURACY)
        return cls(key, "published", published=kla_correlations[key],
                   scatter_sd=math.log(1.0 + accuracy) / Z95)

    # -- the model ---------------------------------------------------------------------
    @property
    def n_params(self) -> int:
        return 0 if self.fit is None else len(self.fit.params)

    @property
    def params(self) -> np.ndarray:
        return np.zeros(0) if self.fit is None else self.fit.params

    @property
    def cov(self) -> np.ndarray:
        return np.zeros((0, 0)) if self.fit is None else self.fit.cov

    @property
    def variables(self) -> tuple[str, ...]:
        if self.fit is not None:
            return self.fit.form.required_variables
        return self.published.variables

    def design(self, points: Mapping[str, np.ndarray]) -> tuple[np.ndarray, np.ndarray,
                                                               np.ndarray]:
        """Rows ``X`` (m, p), offsets (m,) and log scales (m,): median ln kLa =
        ``X @ params + offset + log_scale``."""
        if self.fit is not None:
            X, offset = self.fit.design_rows(points)
            log_scale = np.broadcast_to(np.log(self.fit.form.scale(points)), offset.shape)
            return X, offset, np.array(log_scale, dtype=float)
        value = self.published.predict(points)
        return np.zeros((value.size, 0)), np.log(value), np.zeros(value.size)

    def log_median(self, points: Mapping[str, np.ndarray]) -> tuple[np.ndarray, np.ndarray]:
        """Median ln kLa of each point and the variance of its mean (parameter part)."""
        X, offset, log_scale = self.design(points)
        z = X @ self.params + offset + log_scale
        var = np.einsum("ij,jk,ik->i", X, self.cov, X) if X.shape[1] else np.zeros(z.size)
        return z, var

    def median(self, points: Mapping[str, np.ndarray]) -> np.ndarray:
        """The correlation's kLa at the points [1/s]."""
        return np.exp(self.log_median(points)[0])

    def quantile(self, points: Mapping[str, np.ndarray], probability: float) -> np.ndarray:
        """kLa a new vessel exceeds with ``probability`` (normal theory) [1/s]."""
        from scipy.stats import norm

        z, var = self.log_median(points)
        q = norm.ppf(1.0 - probability)
        if self.error_space == "log":
            return np.exp(z + q * np.sqrt(var + self.scatter_sd ** 2))
        value = np.exp(z)
        return value + q * np.sqrt(value ** 2 * var + self.scatter_sd ** 2)

    def prediction_interval(self, points: Mapping[str, np.ndarray], level: float = 0.95
                            ) -> tuple[np.ndarray, np.ndarray, np.ndarray]:
        """Median and a ``level`` prediction interval of a new vessel's kLa [1/s].

        A fit's interval is its own (t-based, :meth:`FitResult.predict`); a published
        correlation's is its stated accuracy.
        """
        if self.fit is not None:
            pred = self.fit.predict(points, level)
            return pred.value, pred.pi_low, pred.pi_high
        from scipy.stats import norm

        value = self.median(points)
        half = norm.ppf(0.5 + level / 2.0) * self.scatter_sd
        return value, value * np.exp(-half), value * np.exp(half)

    def extrapolation(self, points: Mapping[str, np.ndarray]) -> Extrapolation:
        """How far each point lies outside the fitted or stated domain."""
        domain = self.fit.domain if self.fit is not None else self.published.domain
        return domain.check(points)

    def describe(self) -> dict:
        if self.fit is not None:
            return {"name": self.name, "kind": self.kind, "equation": self.fit.form.equation(),
                    "n_runs": self.fit.n_runs, "scatter_sd": self.scatter_sd,
                    "error_space": self.error_space}
        return {"name": self.name, "kind": self.kind, "equation": self.published.equation,
                "source": self.published.source, "scatter_sd": self.scatter_sd,
                "error_space": "log", "from_memory": self.published.from_memory}


def kla_points(op, coalescence: str = "coalescing") -> dict[str, np.ndarray]:
    """The variables a kLa correlation reads, from an operating point (flattened arrays).

    Parameters
    ----------
    op : scaleup.hydro.point.OperatingPoint
        The operating point(s).
    coalescence : str
        Coalescence class of the medium [-].

    Returns
    -------
    dict of str to numpy.ndarray
        Gassed and ungassed P/V [W/m3], us [m/s], viscosity [Pa s], density [kg/m3],
        coalescence and vessel volume [m3], one value per point.
    """
    # gassed power is positive wherever the speed is (hydro.power holds Pg/P above a floor
    # even when deeply flooded), so the log-linear forms stay finite
    pgv = np.atleast_1d(np.asarray(op.gassed_power_per_volume, float)).ravel()
    pv = np.broadcast_to(np.asarray(op.power_per_volume, float), np.shape(
        op.gassed_power_per_volume)).ravel()
    us = np.broadcast_to(np.asarray(op.superficial_gas_velocity, float), np.shape(
        op.gassed_power_per_volume)).ravel()
    pv, us = np.atleast_1d(pv), np.atleast_1d(us)
    m = pgv.size
    return {GASSED_PV: pgv, UNGASSED_PV: pv, GAS_VELOCITY: us,
            VISCOSITY: np.full(m, op.viscosity), DENSITY: np.full(m, op.density),
            VESSEL_VOLUME: np.full(m, op.liquid_volume), COALESCENCE: np.full(m, coalescence)}


def default_published(coalescence: str) -> str:
    """The published correlation used when none is chosen: van't Riet for the class."""
    return "vant-riet-noncoalescing" if coalescence == "non-coalescing" \
        else "vant-riet-coalescing"
