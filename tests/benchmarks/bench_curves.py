"""Batch curve fitting against a plain loop of scipy.optimize.curve_fit, side by side.

1,000 gassing-out curves of 3,000 samples each, seen through first-order probes (tau_p 2 to
15 s), with noise. Two comparisons, both on the same samples and from the same starting kLa:

1. the batch engine (:func:`scaleup.measure.expfit.fit_batch`, separable least squares,
   vectorised over curves) against one ``curve_fit`` call per curve;
2. the whole analysis (:func:`scaleup.measure.curves.analyse_curves`: checks, windows found
   from the fit and iterated, lag bias, log-linear beside) against ``curve_fit`` on the
   windows the analysis settled on (a plain loop that does only the last fit).

Run: ``python tests/benchmarks/bench_curves.py [n_curves] [n_samples]``.
"""

from __future__ import annotations

import os
import sys
import time

import numpy as np
from scipy.optimize import curve_fit

from scaleup.measure import expfit
from scaleup.measure.curves import analyse_curves


def make_curves(m: int, n: int, seed: int = 1):
    rng = np.random.default_rng(seed)
    t = np.tile(np.linspace(0.0, 600.0, n), (m, 1))
    k = rng.uniform(0.005, 0.05, m)
    tau = rng.uniform(2.0, 15.0, m)
    c_inf = rng.uniform(90.0, 100.0, m)
    c0 = rng.uniform(0.0, 10.0, m)
    g = ((np.exp(-k[:, None] * t) - (k * tau)[:, None] * np.exp(-t / tau[:, None]))
         / (1.0 - k * tau)[:, None])
    c = c_inf[:, None] - (c_inf - c0)[:, None] * g + rng.normal(0.0, 0.5, (m, n))
    return t, c, tau


def curve_fit_loop(t, c, mask, tau, k0):
    """The plain baseline: one scipy curve_fit per curve, textbook lagged model.

    It gets the analytic Jacobian: without it the finite-difference steps leave curve_fit's
    kLa up to a few 1e-7 from the least-squares optimum on flat sums of squares (checked
    against a direct scan of the projected sum of squares), and it is faster with it.
    """
    out = np.empty((len(t), 3))
    for i in range(len(t)):
        ti, ci, tp = t[i][mask[i]], c[i][mask[i]], tau[i]

        def model(tt, c_inf, c0, k, tp=tp):
            return c_inf - (c_inf - c0) * (np.exp(-k * tt) - k * tp * np.exp(-tt / tp)) / (
                1.0 - k * tp)

        def jacobian(tt, c_inf, c0, k, tp=tp):
            e, f = np.exp(-k * tt), np.exp(-tt / tp)
            g = (e - k * tp * f) / (1.0 - k * tp)
            dg = ((-tt * e - tp * f) * (1.0 - k * tp) + tp * (e - k * tp * f)) / (1.0 - k * tp) ** 2
            return np.column_stack([1.0 - g, g, -(c_inf - c0) * dg])

        out[i], _ = curve_fit(model, ti, ci, p0=[ci[-1], ci[0], k0[i]], jac=jacobian)
    return out


def timed(func, *args, **kwargs):
    start = time.perf_counter()
    result = func(*args, **kwargs)
    return result, time.perf_counter() - start


def main(m: int = 1000, n: int = 3000) -> None:
    t, c, tau = make_curves(m, n)
    mask = np.ones_like(t, dtype=bool)
    samples = m * n
    print(f"{m} curves x {n} samples with probe lag, {os.cpu_count()} CPU(s), "
          f"numpy {np.__version__}")
    analyse_curves([(t[0], c[0])], tau_p_s=tau[0], start_s=0.0)  # warm imports and caches

    k0 = expfit.guess_kla(t[:, ::10], c[:, ::10], mask[:, ::10])
    batch, t_batch = timed(expfit.fit_batch, t, c, mask, tau, k0)
    loop, t_loop = timed(curve_fit_loop, t, c, mask, tau, k0)
    # C0 can lie near zero, so its difference is taken relative to the rise C_inf - C0
    rise = np.abs(loop[:, 0] - loop[:, 1])
    rel = np.column_stack([np.abs(batch.c_inf / loop[:, 0] - 1.0),
                           np.abs(batch.c0 - loop[:, 1]) / rise,
                           np.abs(batch.kla_per_s / loop[:, 2] - 1.0)])
    print("\n1. fit on the whole curve, same samples and starting kLa")
    print(f"   curve_fit loop : {t_loop:8.3f} s  {samples / t_loop:12,.0f} samples/s")
    print(f"   batch engine   : {t_batch:8.3f} s  {samples / t_batch:12,.0f} samples/s")
    print(f"   ratio          : {t_loop / t_batch:8.1f} x faster")
    print(f"   largest relative difference (c_inf, c0 per rise, kLa): "
          f"{rel[:, 0].max():.1e}, {rel[:, 1].max():.1e}, {rel[:, 2].max():.1e}")

    curves = [(t[i], c[i]) for i in range(m)]
    results, t_full = timed(analyse_curves, curves, tau_p_s=tau, start_s=0.0)
    windows = np.array([np.isin(t[i], r.primary.times_s) for i, r in enumerate(results)])
    k_full = np.array([r.primary.kla_per_s for r in results])
    loop_w, t_loop_w = timed(curve_fit_loop, t, c, windows, tau, k_full * 1.05)
    rel_w = np.abs(k_full / loop_w[:, 2] - 1.0)
    print("\n2. whole analysis (checks, windows iterated, lag bias, log-linear) against")
    print("   curve_fit on the final windows only")
    print(f"   curve_fit loop : {t_loop_w:8.3f} s")
    print(f"   analyse_curves : {t_full:8.3f} s  {samples / t_full:12,.0f} samples/s")
    print(f"   ratio          : {t_loop_w / t_full:8.1f} x")
    print(f"   largest relative difference in kLa: {rel_w.max():.1e}")
    ok = rel.max() < 1e-6 and rel_w.max() < 1e-6
    print(f"\nsame estimates to 1e-6 relative: {'yes' if ok else 'NO'}")


if __name__ == "__main__":
    main(*(int(a) for a in sys.argv[1:3]))
