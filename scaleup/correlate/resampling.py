"""Bootstrap of a fitted correlation: runs, or whole vessels, resampled with replacement.

For least-squares fits in log space the resampled fits are computed together: a resample
is a vector of counts (how often each run was drawn), and its normal equations are the
counts times precomputed per-run outer products, ``G_b = sum_i c_bi w_i x_i x_i'``, so a
block of resamples is one matrix product followed by a batched solve. Columns are centred
and scaled first, which keeps those normal equations well conditioned (the estimates agree
with a QR/SVD refit to about 1e-12). Robust and nonlinear fits are refitted one resample
at a time.

Percentile intervals do not assume normal errors. The vessel (cluster) bootstrap treats
runs in one vessel as dependent: with few vessels it is coarse, and resamples that cannot
separate the parameters (e.g. all draws of one vessel with one gas rate) are dropped and
counted.
"""

from __future__ import annotations

from collections.abc import Iterator
from dataclasses import dataclass

import numpy as np

from scaleup.correlate.fitting import FitResult, fit, fit_weights
from scaleup.correlate.models import ModelForm, Observations
from scaleup.errors import InputError

KINDS = ("runs", "vessels")
# Resamples per block: bounds the count matrix at block * n floats.
_BLOCK = 256
# A resample whose normal matrix is this close to singular is dropped, not solved.
_CONDITION_LIMIT = 1e12


@dataclass(frozen=True)
class BootstrapResult:
    """Parameter vectors of the resampled fits and their percentile intervals."""

    kind: str
    params: np.ndarray  # (B, p), NaN rows for dropped resamples
    parameter_names: tuple[str, ...]
    n_dropped: int
    level: float

    @property
    def valid(self) -> np.ndarray:
        return self.params[np.all(np.isfinite(self.params), axis=1)]

    def interval(self) -> np.ndarray:
        """Percentile intervals, shape (p, 2)."""
        tail = 50.0 * (1.0 - self.level)
        return np.percentile(self.valid, [tail, 100.0 - tail], axis=0).T

    def stderr(self) -> np.ndarray:
        return np.std(self.valid, axis=0, ddof=1)

    def summary(self) -> dict:
        """JSON-safe summary stored with a fit."""
        ci = self.interval()
        se = self.stderr()
        return {"kind": self.kind, "n_resamples": int(self.params.shape[0]),
                "n_dropped": self.n_dropped, "level": self.level,
                "parameters": [{"name": n, "stderr": float(se[i]),
                                "ci": [float(ci[i, 0]), float(ci[i, 1])]}
                               for i, n in enumerate(self.parameter_names)]}


def resample_blocks(n_units: int, n_resamples: int, seed: int | None = 0,
                    block: int = _BLOCK) -> Iterator[np.ndarray]:
    """Index arrays of resamples, ``block`` at a time, each of shape (b, n_units).

    Deterministic for a given seed, so another implementation can refit the same resamples.
    """
    rng = np.random.default_rng(seed)
    done = 0
    while done < n_resamples:
        b = min(block, n_resamples - done)
        # 32-bit indices draw about twice as fast as 64-bit ones and count faster
        yield rng.integers(0, n_units, size=(b, n_units), dtype=np.int32)
        done += b


def _counts(indices: np.ndarray, n_units: int) -> np.ndarray:
    # one bincount per row is about twice as fast as one over offset, flattened indices
    counts = np.empty(indices.shape, dtype=float)
    for row, draw in enumerate(indices):
        counts[row] = np.bincount(draw, minlength=n_units)
    return counts


class _NormalEquations:
    """Per-run pieces of the weighted normal equations in centred, scaled coordinates."""

    def __init__(self, X: np.ndarray, z: np.ndarray, w: np.ndarray):
        n, p = X.shape
        constant = np.flatnonzero(np.all(X == X[0], axis=0) & (X[0] != 0))
        self.intercept = int(constant[0]) if constant.size else None
        shift = np.zeros(p) if self.intercept is None else X.mean(axis=0)
        if self.intercept is not None:
            shift[self.intercept] = 0.0
        spread = X.std(axis=0)
        spread = np.where(spread > 0, spread, np.abs(X).max(axis=0))
        spread = np.where(spread > 0, spread, 1.0)
        if self.intercept is not None:
            spread[self.intercept] = X[0, self.intercept]
        self.shift, self.spread, self.p = shift, spread, p
        self.z_shift = float(np.average(z, weights=w)) if self.intercept is not None else 0.0
        Xs = (X - shift) / spread
        zs = z - self.z_shift
        outer = (Xs[:, :, None] * Xs[:, None, :]).reshape(n, p * p) * w[:, None]
        self.pieces = np.hstack([outer, Xs * (w * zs)[:, None]])

    def solve(self, counts: np.ndarray) -> np.ndarray:
        """Estimates for each row of ``counts`` (b, n); NaN rows where singular."""
        p = self.p
        sums = counts @ self.pieces
        G = sums[:, : p * p].reshape(-1, p, p)
        r = sums[:, p * p:]
        ok = np.linalg.cond(G) < _CONDITION_LIMIT
        G[~ok] = np.eye(p)
        theta = np.linalg.solve(G, r[..., None])[..., 0] / self.spread
        if self.intercept is not None:
            theta[:, self.intercept] += self.z_shift - theta @ self.shift
        theta[~ok] = np.nan
        return theta


def bootstrap(form: ModelForm, data: Observations, *, kind: str = "runs",
              n_resamples: int = 2000, seed: int | None = 0, method: str = "ols",
              weights: str = "none", robust: str | None = None,
              level: float = 0.95) -> BootstrapResult:
    """Resample runs (or vessels) with replacement and refit ``form`` to each resample.

    Parameters
    ----------
    form : ModelForm
        The fitted form (as in ``FitResult.form``).
    data : Observations
        The runs of the fit.
    kind : str
        ``"runs"`` or ``"vessels"`` (clusters: every run of a drawn vessel enters).
    n_resamples : int
        Number of resamples.
    seed : int, optional
        Seed of the random generator (reproducible intervals).
    method, weights, robust : str
        As for :func:`scaleup.correlate.fitting.fit`.
    level : float
        Interval level [-].

    Returns
    -------
    BootstrapResult
    """
    if kind not in KINDS:
        raise InputError(f"unknown bootstrap kind {kind!r}; choose runs or vessels", "kind",
                         kind)
    if n_resamples < 2:
        raise InputError("need at least 2 resamples", "n_resamples", n_resamples)
    if kind == "vessels":
        if data.vessel is None:
            raise InputError("a vessel bootstrap needs the vessel of each run", "vessel")
        labels, cluster = np.unique(data.vessel, return_inverse=True)
        if labels.size < 2:
            raise InputError("a vessel bootstrap needs runs from at least two vessels",
                             "vessel")
        n_units = labels.size
    else:
        cluster, n_units = None, data.n
    names = form.parameter_names
    blocks = resample_blocks(n_units, n_resamples, seed)
    if method == "ols" and robust is None:
        points = data.points()
        X, offset = form.design(points)
        z = form.transform(data.response, points) - offset
        equations = _NormalEquations(X, z, fit_weights(form, data, weights, "log"))
        out = []
        for idx in blocks:
            counts = _counts(idx, n_units)
            out.append(equations.solve(counts if cluster is None else counts[:, cluster]))
        params = np.vstack(out)
    else:
        params = np.full((n_resamples, len(names)), np.nan)
        row = 0
        for idx in blocks:
            for draw in idx:
                runs = draw if cluster is None else np.concatenate(
                    [np.flatnonzero(cluster == v) for v in draw])
                try:
                    params[row] = fit(form, data.subset(runs), method=method, weights=weights,
                                      robust=robust).params
                except (InputError, ArithmeticError):
                    pass  # an inestimable resample is dropped and counted below
                row += 1
    dropped = int(np.sum(~np.all(np.isfinite(params), axis=1)))
    if n_resamples - dropped < 2:
        raise InputError("almost every resample was inestimable; the bootstrap has nothing "
                         "to report", "bootstrap")
    return BootstrapResult(kind, params, names, dropped, level)


def attach_bootstrap(result: FitResult, data: Observations, **options) -> FitResult:
    """``result`` with the summary of a bootstrap of the same fit settings attached."""
    boot = bootstrap(result.form, data, method=result.method, weights=result.weights,
                     robust=result.robust, **options)
    return result.with_bootstrap(boot.summary())
