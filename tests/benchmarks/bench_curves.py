"""Batch curve fitting and the whole batch analysis against a plain loop of scipy curve_fit.

1,000 gassing-out curves of 3,000 samples each, seen through first-order probes (tau_p 2 to
15 s), with noise. The baseline is the plain loop: one ``scipy.optimize.curve_fit`` call per
curve with the textbook lagged model. Each comparison runs the two in turn for a few rounds
(``--repeat``): the loop once a round, the batch code as often as fits in the loop's time, so
that both are timed over the same stretch of a machine whose speed drifts (seen here: the
same analysis from 90 to 145 ms from one call to the next). Printed are the best time of
each, with samples per second, and the ratio: the median over the rounds of the loop's time
over the batch code's best time in the same round:

1. the fit engine (:func:`scaleup.measure.expfit.fit_batch`, separable least squares,
   vectorised over curves) against the loop, both on the whole curves from the same starting
   kLa;
2. the whole analysis (:func:`scaleup.measure.curves.analyse_curves`, what
   ``scaleup run analyse --all`` runs: checks, windows found from the fit and iterated, lag
   bias, log-linear beside) against the same loop, and, stricter, against a loop that fits
   only the windows the analysis settled on; its estimates are checked against curve_fit on
   those windows;
3. the whole analysis again, detecting the start of each curve instead of being told.

Run: ``python tests/benchmarks/bench_curves.py [n_curves] [n_samples] [--repeat N]``.
"""

from __future__ import annotations

import argparse
import os
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


def best_of(repeat: int, func, *args, **kwargs):
    """The result of ``func`` and its shortest wall time over ``repeat`` runs [s]."""
    best = np.inf
    for _ in range(repeat):
        start = time.perf_counter()
        result = func(*args, **kwargs)
        best = min(best, time.perf_counter() - start)
    return result, best


def side_by_side(repeat: int, baseline, contender):
    """Both callables timed in turn, ``repeat`` rounds: each round runs the baseline once and
    the contender as often as fits in the baseline's time (at least once), so that both are
    timed over about the same stretch of the machine's time, whatever else it is doing.

    Returns the last results, the shortest wall time of each [s] and the median over the
    rounds of the baseline's time over the contender's best in the same round [-].
    """
    best_base = best_other = np.inf
    ratios = []
    for _ in range(repeat):
        start = time.perf_counter()
        base = baseline()
        spent = time.perf_counter() - start
        used, round_best = 0.0, np.inf
        while used < spent:
            start = time.perf_counter()
            other = contender()
            took = time.perf_counter() - start
            round_best, used = min(round_best, took), used + took
        best_base, best_other = min(best_base, spent), min(best_other, round_best)
        ratios.append(spent / round_best)
    return base, other, best_base, best_other, float(np.median(ratios))


def line(label: str, seconds: float, samples: int, ratio: float | None = None) -> str:
    text = f"   {label:<36}: {seconds:7.3f} s  {samples / seconds:12,.0f} samples/s"
    return text + (f"   {ratio:5.1f} x the loop" if ratio else "")


def main(m: int = 1000, n: int = 3000, repeat: int = 5) -> None:
    t, c, tau = make_curves(m, n)
    mask = np.ones_like(t, dtype=bool)
    samples = m * n
    print(f"{m} curves x {n} samples with probe lag, {os.cpu_count()} CPU(s), "
          f"numpy {np.__version__}, {repeat} rounds per comparison")
    analyse_curves([(t[0], c[0])], tau_p_s=tau[0], start_s=0.0)  # warm imports and caches

    k0 = expfit.guess_kla(t[:, ::10], c[:, ::10], mask[:, ::10])
    loop, batch, t_loop, t_batch, x_batch = side_by_side(
        repeat, lambda: curve_fit_loop(t, c, mask, tau, k0),
        lambda: expfit.fit_batch(t, c, mask, tau, k0))
    # C0 can lie near zero, so its difference is taken relative to the rise C_inf - C0
    rise = np.abs(loop[:, 0] - loop[:, 1])
    rel = np.column_stack([np.abs(batch.c_inf / loop[:, 0] - 1.0),
                           np.abs(batch.c0 - loop[:, 1]) / rise,
                           np.abs(batch.kla_per_s / loop[:, 2] - 1.0)])
    print("\n1. fit engine, whole curves, same samples and starting kLa")
    print(line("curve_fit loop (baseline)", t_loop, samples))
    print(line("batch fit engine", t_batch, samples, x_batch))
    print(f"   largest relative difference (c_inf, c0 per rise, kLa): "
          f"{rel[:, 0].max():.1e}, {rel[:, 1].max():.1e}, {rel[:, 2].max():.1e}")

    curves = [(t[i], c[i]) for i in range(m)]
    _, results, t_loop2, t_full, x_full = side_by_side(
        repeat, lambda: curve_fit_loop(t, c, mask, tau, k0),
        lambda: analyse_curves(curves, tau_p_s=tau, start_s=0.0))
    windows = np.array([np.isin(t[i], r.primary.times_s) for i, r in enumerate(results)])
    k_full = np.array([r.primary.kla_per_s for r in results])
    loop_w, t_loop_w = best_of(repeat, curve_fit_loop, t, c, windows, tau, k_full * 1.05)
    rel_w = np.abs(k_full / loop_w[:, 2] - 1.0)
    print("\n2. whole analysis (checks, windows iterated, lag bias, log-linear beside)")
    print(line("curve_fit loop, timed beside it", t_loop2, samples))
    print(line("analyse_curves", t_full, samples, x_full))
    print(line("curve_fit on the final windows only", t_loop_w, samples))
    print(f"   analyse_curves against that stricter loop: {t_loop_w / t_full:.1f} x")
    print(f"   largest relative difference in kLa from curve_fit on the same windows: "
          f"{rel_w.max():.1e}")

    _, _, t_loop3, t_detect, x_detect = side_by_side(
        repeat, lambda: curve_fit_loop(t, c, mask, tau, k0),
        lambda: analyse_curves(curves, tau_p_s=tau))
    print("\n3. whole analysis, start of each curve detected")
    print(line("curve_fit loop, timed beside it", t_loop3, samples))
    print(line("analyse_curves", t_detect, samples, x_detect))

    ok = rel.max() < 1e-6 and rel_w.max() < 1e-6
    print(f"\nsame estimates to 1e-6 relative: {'yes' if ok else 'NO'}")
    print(f"fit engine {x_batch:.1f} x and whole analysis {x_full:.1f} x "
          f"({x_detect:.1f} x detecting the starts) faster than the plain curve_fit loop "
          "(median over the rounds of the loop's time over the batch code's best beside it)")


if __name__ == "__main__":
    parser = argparse.ArgumentParser(description=__doc__.splitlines()[0])
    parser.add_argument("n_curves", type=int, nargs="?", default=1000)
    parser.add_argument("n_samples", type=int, nargs="?", default=3000)
    parser.add_argument("--repeat", type=int, default=5, help="rounds per comparison")
    args = parser.parse_args()
    main(args.n_curves, args.n_samples, args.repeat)
