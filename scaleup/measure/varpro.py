"""Gauss-Newton steps of separable least-squares fits of step responses, and their statistics.

Both fit engines (:mod:`scaleup.measure.expfit`, from sums over the samples, and
:mod:`scaleup.measure.taylorfit`, from moments) hand the same seven sums to
:class:`_Steps`: for the model C = alpha + beta g(t; k), with v = dg/dk and the data centred,
(Sg, Sgg, Scg, Sv, Svv, Sgv, Scv). For a fixed k the linear parameters follow in closed form;
the step in k is Kaufman's Gauss-Newton step on the variable-projection functional (Golub and
Pereyra [1]_, Kaufman [2]_).

References
----------
.. [1] Golub, G. H.; Pereyra, V. "The differentiation of pseudo-inverses and nonlinear least
   squares problems whose variables separate." SIAM J. Numer. Anal. 10 (1973) 413-432.
.. [2] Kaufman, L. "A variable projection method for solving separable nonlinear least
   squares problems." BIT 15 (1975) 49-57.
"""

from __future__ import annotations

from dataclasses import dataclass

import numpy as np


@dataclass(frozen=True, eq=False)
class BatchFit:
    """Estimates for a batch of ``m`` curves (arrays of shape ``(m,)``; ``cov`` is (m, 3, 3)).

    ``cov`` is the covariance of (c_inf, c0, kla) from the Jacobian at the optimum, scaled by
    the residual variance ``ssr / (n_points - 3)`` as in ordinary nonlinear least squares.
    Concentrations are in the unit of the data; ``kla_per_s`` in 1/s.
    """

    kla_per_s: np.ndarray
    kla_stderr_per_s: np.ndarray
    c_inf: np.ndarray
    c_inf_stderr: np.ndarray
    c0: np.ndarray
    c0_stderr: np.ndarray
    cov: np.ndarray
    ssr: np.ndarray
    n_points: np.ndarray
    iterations: np.ndarray
    converged: np.ndarray


def _lag_sums(a, b, e1, e2, ec, t1, t2, tc, et, ef, tf, f1, f2, fc):
    """Sums of g = p e - q f and v = r (e - d t e - f) from sums of e, t e and f.

    d = b - a, p = b/d, q = a/d, r = b/d^2 (the textbook form, used away from a = b).
    """
    d = b - a
    p, q, r = b / d, a / d, b / (d * d)
    s_g = p * e1 - q * f1
    s_gg = p * p * e2 - 2 * p * q * ef + q * q * f2
    s_cg = p * ec - q * fc
    s_u = e1 - d * t1 - f1
    s_uu = e2 + d * d * t2 + f2 - 2 * d * et - 2 * ef + 2 * d * tf
    s_gu = p * (e2 - d * et - ef) - q * (ef - d * tf - f2)
    s_cu = ec - d * tc - fc
    return np.array([s_g, s_gg, s_cg, r * s_u, r * r * s_uu, r * s_gu, r * s_cu])


class _Steps:
    """Gauss-Newton bookkeeping for ``m`` separable fits: the best point so far, the step
    and whether each fit is still going.

    Each step is Kaufman's Gauss-Newton step on the variable-projection functional; a step
    that raises the residual sum of squares (beyond its rounding floor) is halved, and kLa is
    kept positive.
    """

    def __init__(self, k: np.ndarray, max_iter: int, rtol: float):
        m = k.size
        self.k = k
        self.k_best = k.copy()
        self.ssr_best = np.full(m, np.inf)
        self.step = np.zeros(m)
        self.best = np.zeros((7, m))
        self.lin_best = np.zeros((2, m))
        self.active = np.ones(m, bool)
        self.converged = np.zeros(m, bool)
        self.iterations = np.zeros(m, int)
        self.since = np.zeros(m, int)  # iterations since the last restart
        self.max_iter, self.rtol = max_iter, rtol

    def restart(self, rows: np.ndarray) -> None:
        """Fit ``rows`` afresh (a new window) from their best kLa."""
        self.converged[rows], self.active[rows] = False, True
        self.ssr_best[rows], self.k[rows], self.since[rows] = np.inf, self.k_best[rows], 0

    def update(self, rows: np.ndarray, sums: np.ndarray, n: np.ndarray, s_c: np.ndarray,
               s_cc: np.ndarray) -> np.ndarray:
        """One step for ``rows`` from their sums at k and their window's count, data sum and
        sum of squares (data centred on ``shift``); returns the rows that converged."""
        self.iterations[rows] += 1
        self.since[rows] += 1
        s_g, s_gg, s_cg, s_v, s_vv, s_gv, s_cv = sums
        det = n * s_gg - s_g * s_g
        with np.errstate(divide="ignore", invalid="ignore"):
            alpha = (s_gg * s_c - s_g * s_cg) / det
            beta = (n * s_cg - s_g * s_c) / det
            ssr = s_cc - alpha * s_c - beta * s_cg
        floor = 1e-12 * s_cc + 1e-300  # rounding floor of an SSR computed from these sums
        better = np.isfinite(ssr) & (ssr <= self.ssr_best[rows] + floor)
        acc = rows[better]
        self.k_best[acc] = self.k[acc]
        self.ssr_best[acc] = ssr[better]
        self.best[:, acc] = sums[:, better]
        self.lin_best[:, acc] = alpha[better], beta[better]
        with np.errstate(divide="ignore", invalid="ignore", over="ignore"):
            grad = s_cv - alpha * s_v - beta * s_gv
            proj = s_vv - (s_gg * s_v**2 - 2 * s_g * s_v * s_gv + n * s_gv**2) / det
            gn = grad / (beta * proj)
        gn = np.where(np.isfinite(gn), gn, 0.0)
        new_step = np.where(better, gn, self.step[rows] / 2.0)
        base = self.k_best[rows]
        # keep kLa positive and move at most tenfold per iteration
        trial = np.clip(base + new_step, base / 10.0, base * 10.0)
        new_step = trial - base
        done = np.abs(new_step) <= self.rtol * base
        self.converged[rows[done]] = True
        self.active[rows[done]] = False
        self.step[rows] = new_step
        self.k[rows] = trial
        self.active[rows[self.since[rows] >= self.max_iter]] = False
        return rows[done]

    def result(self, n: np.ndarray, shift: np.ndarray) -> BatchFit:
        """Estimates and covariances of every fit (``shift`` added back to the data)."""
        return _statistics(n, shift, self.k_best, self.ssr_best, self.best, self.lin_best,
                           self.iterations, self.converged)


def _statistics(n, shift, k_best, ssr_best, best, lin_best, iterations, converged
                ) -> BatchFit:
    """Covariance of (alpha, beta, k) from J'J, then of (c_inf = alpha, c0 = alpha + beta, k)."""
    m = k_best.size
    s_g, s_gg, _, s_v, s_vv, s_gv, _ = best
    alpha, beta = lin_best
    jtj = np.empty((m, 3, 3))
    jtj[:, 0, 0], jtj[:, 0, 1], jtj[:, 0, 2] = n, s_g, beta * s_v
    jtj[:, 1, 1], jtj[:, 1, 2] = s_gg, beta * s_gv
    jtj[:, 2, 2] = beta * beta * s_vv
    jtj[:, 1, 0], jtj[:, 2, 0], jtj[:, 2, 1] = jtj[:, 0, 1], jtj[:, 0, 2], jtj[:, 1, 2]
    dof = n - 3.0
    finite = np.isfinite(jtj).all(axis=(1, 2))
    inv = np.full((m, 3, 3), np.nan)
    with np.errstate(divide="ignore", invalid="ignore"):
        s2 = np.where(dof > 0, np.maximum(ssr_best, 0.0) / dof, np.nan)
        if finite.any():
            sub = jtj[finite]
            ok = np.abs(np.linalg.det(sub)) > 0
            rows = np.flatnonzero(finite)[ok]
            inv[rows] = np.linalg.inv(sub[ok])
    transform = np.array([[1.0, 0, 0], [1.0, 1.0, 0], [0, 0, 1.0]])
    cov = s2[:, None, None] * (transform @ inv @ transform.T)
    with np.errstate(invalid="ignore"):
        se = np.sqrt(np.diagonal(cov, axis1=1, axis2=2))
    return BatchFit(
        kla_per_s=k_best, kla_stderr_per_s=se[:, 2],
        c_inf=alpha + shift, c_inf_stderr=se[:, 0],
        c0=alpha + beta + shift, c0_stderr=se[:, 1],
        cov=cov, ssr=ssr_best, n_points=n.astype(int), iterations=iterations,
        converged=converged & np.isfinite(ssr_best))
