"""Where a correlation was fitted or stated to hold, and how far a new point lies outside it.

A fit records the range of each variable it saw and, for the continuous variables taken
together, the mean and covariance of their logarithms. A new point is an extrapolation when
any variable lies outside its range, or when its Mahalanobis distance in log space exceeds the
largest distance of any fitted run (a point can be inside every single range and still far
from all the data, e.g. high power with low gas rate when the runs only had both high or both
low). Published correlations carry their stated ranges only.

Everything here is plain data and survives a round trip through a JSON dict.
"""

from __future__ import annotations

from collections.abc import Mapping
from dataclasses import dataclass, field

import numpy as np

# Relative slack so a point exactly on a fitted bound (or at the largest fitted distance)
# is not called an extrapolation because of rounding.
_TOLERANCE = 1e-9


@dataclass(frozen=True)
class Extrapolation:
    """How far each of ``m`` points lies outside a domain.

    Attributes
    ----------
    extrapolated : numpy.ndarray of bool, shape (m,)
        True where a point is outside any range or beyond the joint domain.
    mahalanobis : numpy.ndarray, shape (m,)
        Mahalanobis distance in log space [-] (NaN when the domain has no joint part).
    distance_ratio : numpy.ndarray, shape (m,)
        ``mahalanobis`` divided by the largest distance among the fitted runs [-]; above 1
        means farther from the data than any run was.
    range_factor : dict of str to numpy.ndarray
        Per variable, how many times beyond its range the point lies [-]: 1 inside,
        ``x / high`` above, ``low / x`` below.
    unchecked : tuple of str
        Variables of the domain the points did not give (not checked).
    source : str
        ``"fitted"`` or ``"stated"``, as the domain checked against.
    """

    extrapolated: np.ndarray
    mahalanobis: np.ndarray
    distance_ratio: np.ndarray
    range_factor: dict[str, np.ndarray]
    unchecked: tuple[str, ...] = ()
    source: str = "fitted"

    def messages(self) -> list[list[str]]:
        """Per point, one sentence per way it extrapolates (empty list when inside)."""
        out: list[list[str]] = []
        for i in range(len(self.extrapolated)):
            lines = []
            for name, factor in self.range_factor.items():
                if factor[i] > 1 + _TOLERANCE:
                    lines.append(f"{name} is {factor[i]:.3g} times beyond its {self.source} "
                                 "range")
            if np.isfinite(self.distance_ratio[i]) and self.distance_ratio[i] > 1 + _TOLERANCE:
                lines.append(f"the combination of variables lies {self.distance_ratio[i]:.3g} "
                             "times farther from the data than any fitted run "
                             f"(Mahalanobis distance {self.mahalanobis[i]:.3g} in log space)")
            out.append(lines)
        return out


@dataclass(frozen=True)
class Domain:
    """The region a correlation holds in: ranges, seen categories and a joint log-space domain.

    Attributes
    ----------
    ranges : dict of str to (float or None, float or None)
        Low and high bound of each continuous variable, SI (None: not bounded).
    categories : dict of str to tuple of str
        Values seen of each categorical variable (e.g. coalescence classes).
    joint_variables : tuple of str
        Continuous variables of the joint (Mahalanobis) domain, in order.
    log_mean : tuple of float
        Mean of their natural logarithms.
    log_precision : tuple of tuple of float
        Pseudo-inverse of the covariance of their logarithms.
    max_distance : float or None
        Largest Mahalanobis distance of a fitted run [-].
    source : str
        ``"fitted"`` (from runs) or ``"stated"`` (a publication's ranges).
    """

    ranges: dict[str, tuple[float | None, float | None]]
    categories: dict[str, tuple[str, ...]] = field(default_factory=dict)
    joint_variables: tuple[str, ...] = ()
    log_mean: tuple[float, ...] = ()
    log_precision: tuple[tuple[float, ...], ...] = ()
    max_distance: float | None = None
    source: str = "fitted"

    def mahalanobis(self, points: Mapping[str, np.ndarray]) -> np.ndarray:
        """Mahalanobis distance in log space of each point [-] (NaN without a joint domain)."""
        if not self.joint_variables or any(v not in points for v in self.joint_variables):
            n = _length(points)
            return np.full(n, np.nan)
        logs = np.column_stack([np.log(np.asarray(points[v], dtype=float))
                                for v in self.joint_variables])
        diff = logs - np.asarray(self.log_mean)
        precision = np.asarray(self.log_precision)
        return np.sqrt(np.maximum(np.einsum("ij,jk,ik->i", diff, precision, diff), 0.0))

    def check(self, points: Mapping[str, np.ndarray]) -> Extrapolation:
        """Say for each point whether, and by how much, it lies outside this domain.

        Parameters
        ----------
        points : mapping of str to array_like
            Variable name to values [SI]; categorical variables as strings.

        Returns
        -------
        Extrapolation
        """
        n = _length(points)
        outside = np.zeros(n, dtype=bool)
        factors: dict[str, np.ndarray] = {}
        unchecked = []
        for name, (low, high) in self.ranges.items():
            if name not in points:
                unchecked.append(name)
                continue
            x = np.broadcast_to(np.asarray(points[name], dtype=float), (n,))
            factor = np.ones(n)
            if high is not None:
                factor = np.where(x > high, x / high, factor)
            if low is not None:
                factor = np.where(x < low, low / np.where(x > 0, x, np.nan), factor)
            factor = np.where(np.isnan(factor), np.inf, factor)
            factors[name] = factor
            outside |= factor > 1 + _TOLERANCE
        for name, seen in self.categories.items():
            if name not in points:
                unchecked.append(name)
                continue
            labels = np.broadcast_to(np.asarray(points[name], dtype=str), (n,))
            outside |= ~np.isin(labels, np.asarray(seen, dtype=str))
        distance = self.mahalanobis(points)
        if self.max_distance:
            ratio = distance / self.max_distance
            outside |= np.nan_to_num(ratio, nan=0.0) > 1 + _TOLERANCE
        else:
            ratio = np.full(n, np.nan)
        return Extrapolation(outside, distance, ratio, factors, tuple(unchecked), self.source)

    def to_dict(self) -> dict:
        """A plain dict (JSON-safe) that :meth:`from_dict` reads back."""
        return {
            "ranges": {k: [lo, hi] for k, (lo, hi) in self.ranges.items()},
            "categories": {k: list(v) for k, v in self.categories.items()},
            "joint_variables": list(self.joint_variables),
            "log_mean": list(self.log_mean),
            "log_precision": [list(r) for r in self.log_precision],
            "max_distance": self.max_distance,
            "source": self.source,
        }

    @classmethod
    def from_dict(cls, data: Mapping) -> Domain:
        """Rebuild a domain written by :meth:`to_dict`."""
        return cls(
            ranges={k: (v[0], v[1]) for k, v in data["ranges"].items()},
            categories={k: tuple(v) for k, v in data.get("categories", {}).items()},
            joint_variables=tuple(data.get("joint_variables", ())),
            log_mean=tuple(float(x) for x in data.get("log_mean", ())),
            log_precision=tuple(tuple(float(x) for x in r) for r in data.get("log_precision", ())),
            max_distance=data.get("max_distance"),
            source=data.get("source", "fitted"),
        )


def domain_from_runs(variables: Mapping[str, np.ndarray],
                     categorical: Mapping[str, np.ndarray] | None = None,
                     joint: tuple[str, ...] | None = None) -> Domain:
    """The domain spanned by fitted runs.

    Parameters
    ----------
    variables : mapping of str to array_like
        Continuous positive variables of the runs [SI], all the same length.
    categorical : mapping of str to array_like, optional
        Categorical variables (labels) of the runs.
    joint : tuple of str, optional
        Variables of the joint Mahalanobis domain (default: every variable in ``variables``
        that varies between runs).

    Returns
    -------
    Domain

    Examples
    --------
    >>> d = domain_from_runs({"x": [1.0, 2.0, 4.0, 8.0], "y": [1.0, 3.0, 2.0, 5.0]})
    >>> d.ranges["x"]
    (1.0, 8.0)
    >>> bool(d.check({"x": [16.0], "y": [2.0]}).extrapolated[0])
    True
    """
    arrays = {k: np.asarray(v, dtype=float) for k, v in variables.items()}
    ranges = {k: (float(np.min(v)), float(np.max(v))) for k, v in arrays.items()}
    cats = {k: tuple(sorted({str(x) for x in v})) for k, v in (categorical or {}).items()}
    if joint is None:
        joint = tuple(k for k, v in arrays.items() if np.ptp(np.log(v)) > 0)
    n = len(next(iter(arrays.values()))) if arrays else 0
    if not joint or n <= len(joint):
        return Domain(ranges, cats)
    logs = np.column_stack([np.log(arrays[k]) for k in joint])
    mean = logs.mean(axis=0)
    precision = np.linalg.pinv(np.atleast_2d(np.cov(logs, rowvar=False)))
    diff = logs - mean
    distances = np.sqrt(np.maximum(np.einsum("ij,jk,ik->i", diff, precision, diff), 0.0))
    return Domain(ranges, cats, tuple(joint), tuple(mean.tolist()),
                  tuple(tuple(r) for r in precision.tolist()), float(distances.max()))


def stated_domain(**ranges: tuple[float | None, float | None]) -> Domain:
    """A publication's stated validity ranges (no joint domain).

    Examples
    --------
    >>> stated_domain(vessel_volume_m3=(None, 2.6)).ranges
    {'vessel_volume_m3': (None, 2.6)}
    """
    return Domain(dict(ranges), source="stated")


def _length(points: Mapping[str, np.ndarray]) -> int:
    sizes = {np.size(v) for v in points.values()}
    return max(sizes) if sizes else 0
