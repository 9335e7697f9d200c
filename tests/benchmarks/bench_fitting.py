"""Benchmark: fit + 2,000 bootstrap resamples + leave-one-vessel-out on 10,000 runs.

Ours: :func:`scaleup.correlate.fit_kla`, :func:`scaleup.correlate.bootstrap` (all
resamples through batched normal equations) and
:func:`scaleup.correlate.leave_one_vessel_out`.
Plain baseline, side by side: statsmodels OLS refitted on each resample and each fold, on
the very same resamples (both draw them from ``resample_blocks`` inside the timed part).

Run: ``python tests/benchmarks/bench_fitting.py``. Prints the best of several timings, the
ratio and the largest relative difference of the estimates; exits 1 if the estimates differ
by more than 1e-8 or the ratio is below 10.
"""

from __future__ import annotations

import sys
import time

import numpy as np
import statsmodels.api as sm

from scaleup.correlate import bootstrap, fit_kla, kla_observations, leave_one_vessel_out
from scaleup.correlate.published import kla_vant_Riet
from scaleup.correlate.resampling import resample_blocks

N_RUNS = 10_000
N_RESAMPLES = 2_000
VOLUMES = {"V-20L": 0.02, "V-300L": 0.3, "V-3m3": 3.0, "V-20m3": 20.0, "V-80m3": 80.0}
SEED = 42


def campaign() -> tuple:
    rng = np.random.default_rng(SEED)
    names = np.array(list(VOLUMES))[rng.integers(0, len(VOLUMES), N_RUNS)]
    volume = np.array([VOLUMES[v] for v in names])
    pv = np.exp(rng.uniform(np.log(200.0), np.log(5000.0), N_RUNS))
    us = np.exp(rng.uniform(np.log(0.002), np.log(0.03), N_RUNS))
    kla = kla_vant_Riet(pv, us) * np.exp(rng.normal(0.0, 0.12, N_RUNS))
    obs = kla_observations(kla, gassed_power_per_volume_w_m3=pv, superficial_velocity_m_s=us,
                           vessel=names, vessel_volume_m3=volume)
    return obs, pv, us, kla, names


def ours(obs):
    result = fit_kla(obs, power_basis="gassed")
    boot = bootstrap(result.form, obs, n_resamples=N_RESAMPLES, seed=SEED)
    lovo = leave_one_vessel_out(result, obs)
    return result.params, boot.params, np.array([list(f.parameters.values())
                                                 for f in lovo.folds])


def baseline(pv, us, kla, names):
    X = sm.add_constant(np.column_stack([np.log(pv), np.log(us)]))
    y = np.log(kla)
    full = sm.OLS(y, X).fit().params
    boot = []
    for block in resample_blocks(len(y), N_RESAMPLES, seed=SEED):
        for draw in block:
            boot.append(sm.OLS(y[draw], X[draw]).fit().params)
    folds = []
    for vessel in np.unique(names):
        keep = names != vessel
        fold = sm.OLS(y[keep], X[keep]).fit()
        fold.get_prediction(X[~keep]).summary_frame(alpha=0.05)
        folds.append(fold.params)
    return full, np.array(boot), np.array(folds)


def timed(function, *args, repeat: int):
    best, out = np.inf, None
    for _ in range(repeat):
        start = time.perf_counter()
        out = function(*args)
        best = min(best, time.perf_counter() - start)
    return best, out


def main() -> int:
    obs, pv, us, kla, names = campaign()
    t_ours, (p_ours, b_ours, f_ours) = timed(ours, obs, repeat=5)
    t_base, (p_base, b_base, f_base) = timed(baseline, pv, us, kla, names, repeat=2)
    diff = max(float(np.max(np.abs(a / b - 1.0)))
               for a, b in ((p_ours, p_base), (b_ours, b_base), (f_ours, f_base)))
    ratio = t_base / t_ours
    print(f"{N_RUNS} runs, {N_RESAMPLES} bootstrap resamples, {len(VOLUMES)} vessels held out")
    print(f"  scaleup (batched normal equations): {t_ours:8.3f} s")
    print(f"  statsmodels OLS refit per resample: {t_base:8.3f} s")
    print(f"  ratio: {ratio:.1f}x faster; largest relative difference of estimates {diff:.1e}")
    ok = diff <= 1e-8 and ratio >= 10.0
    print("PASS" if ok else "FAIL (need >= 10x and estimates within 1e-8)")
    return 0 if ok else 1


if __name__ == "__main__":
    sys.exit(main())
