"""Gassing-out curves: synthetic recovery, probe lag, windows, start detection, bad curves.

Synthetic curves are built here from the textbook formulas, not from the package, so a wrong
model in the package cannot agree with itself. Checks against outside libraries (scipy,
statsmodels) are in tests/reference/test_measure.py.
"""

from __future__ import annotations

import numpy as np
import pytest

from scaleup.errors import InputError
from scaleup.measure import expfit
from scaleup.measure.curves import (
    DEFAULT_WINDOW,
    CurveRejected,
    Rejected,
    analyse_curve,
    analyse_curves,
    curve_methods,
    detect_start,
    fit_probe_step,
    lag_bias,
)


def lagged(t, k, tau, c_inf=100.0, c0=5.0):
    """Probe reading of a first-order rise through a first-order probe (two lags in series)."""
    t = np.asarray(t, dtype=float)
    if tau == 0:
        g = np.exp(-k * t)
    elif np.isclose(k * tau, 1.0):
        g = (1 + t / tau) * np.exp(-t / tau)
    else:
        g = (np.exp(-k * t) - k * tau * np.exp(-t / tau)) / (1 - k * tau)
    return c_inf - (c_inf - c0) * g


T = np.arange(0.0, 600.0, 1.0)


@pytest.mark.parametrize("k,tau", [(0.01, 0.0), (0.02, 8.0), (0.05, 3.0), (0.004, 30.0)])
def test_noise_free_curves_are_recovered_exactly(k, tau):
    res = analyse_curve(T, lagged(T, k, tau), tau_p_s=tau, start_s=0.0)
    fit = res.nonlinear
    assert fit.kla_per_s == pytest.approx(k, rel=1e-8)
    assert fit.c_inf == pytest.approx(100.0, rel=1e-9)
    assert fit.c0 == pytest.approx(5.0, rel=1e-7)
    assert fit.n_points > 20 and fit.method == "nonlinear"


@pytest.mark.parametrize("ktau", [0.97, 0.999, 1.0, 1.001, 1.03, 1.6])
def test_lag_model_holds_through_k_tau_equal_one(ktau):
    k = 0.02
    t = np.arange(0.0, 1500.0, 1.0)
    res = analyse_curve(t, lagged(t, k, ktau / k), tau_p_s=ktau / k, start_s=0.0)
    assert res.nonlinear.kla_per_s == pytest.approx(k, rel=1e-7)
    assert any("probe is slow" in w for w in res.warnings)


def test_stable_and_direct_forms_agree_where_they_meet():
    t = np.linspace(0.0, 800.0, 2001)[None, :]
    b = np.array([[0.1]])
    for ratio in (0.9, 0.95, 0.96, 1.04, 1.05, 1.2):
        g1, v1 = expfit._lag_direct(t, b * ratio, b)
        g2, v2 = expfit._lag_stable(t, b * ratio, b)
        np.testing.assert_allclose(g1, g2, atol=1e-13)
        np.testing.assert_allclose(v1, v2, atol=1e-10 * np.abs(v1).max())


def test_derivative_matches_a_central_difference():
    t = np.linspace(0.0, 300.0, 301)[None, :]
    for k, tau in ((0.02, 0.0), (0.02, 8.0), (0.1, 10.2), (0.3, 8.0)):
        _, v = expfit._basis(t, np.array([k]), np.array([tau]))
        h = 1e-7 * k
        up = expfit.response(t, k + h, tau)
        down = expfit.response(t, k - h, tau)
        np.testing.assert_allclose(v, (up - down) / (2 * h), atol=1e-6 * np.abs(v).max())


def test_noisy_lagged_curve_is_recovered_within_its_interval():
    rng = np.random.default_rng(11)
    c = lagged(T, 0.015, 6.0) + rng.normal(0.0, 0.4, T.size)
    fit = analyse_curve(T, c, tau_p_s=6.0, start_s=0.0).primary
    lo, hi = fit.kla_ci95_per_s
    assert lo < 0.015 < hi
    assert fit.kla_stderr_per_s == pytest.approx((hi - lo) / (2 * 1.97), rel=0.01)
    assert fit.rmse == pytest.approx(0.4, rel=0.15)
    assert 1.5 < fit.durbin_watson < 2.5
    assert fit.residuals.shape == fit.times_s.shape == (fit.n_points,)
    assert fit.covariance.shape == (3, 3)
    assert fit.covariance[2, 2] == pytest.approx(fit.kla_stderr_per_s**2)


@pytest.mark.parametrize("tau", [0.0, 8.0])
def test_interval_covers_the_true_kla_95_percent_of_the_time(tau):
    """2,000 noisy curves: the coverage must be consistent with 95 %.

    A nominal 95 % interval covers a fraction that scatters around 0.95 with a binomial
    standard error of sqrt(0.95 * 0.05 / 2000) = 0.0049; three of those below is the bound.
    """
    rng = np.random.default_rng(2024 + int(tau))
    t = np.arange(0.0, 300.0, 1.0)
    k_true = 0.02
    n = 2000
    clean = lagged(t, k_true, tau)
    curves = [(t, clean + rng.normal(0.0, 1.0, t.size)) for _ in range(n)]
    results = analyse_curves(curves, tau_p_s=tau, start_s=0.0)
    lo = np.array([r.primary.kla_ci95_per_s[0] for r in results])
    hi = np.array([r.primary.kla_ci95_per_s[1] for r in results])
    coverage = np.mean((lo < k_true) & (k_true < hi))
    assert 0.95 - 3 * 0.0049 <= coverage <= 0.95 + 3 * 0.0049


def test_uncorrected_fit_bias_matches_the_expected_bias():
    """Ideal-probe fits to noisy lagged curves read low by what the noise-free curve predicts."""
    rng = np.random.default_rng(7)
    k, tau = 0.02, 8.0
    t = np.arange(0.0, 400.0, 0.5)
    expected = lag_bias(k, tau, t)
    assert expected < -0.05  # the design must show a real bias for the test to mean something
    m = 400
    c = lagged(t, k, tau)[None, :] + rng.normal(0.0, 0.5, (m, t.size))
    fit = expfit.fit_batch(np.tile(t, (m, 1)), c, np.ones(c.shape, bool), 0.0)
    observed = fit.kla_per_s / k - 1.0
    standard_error = observed.std(ddof=1) / np.sqrt(m)
    assert observed.mean() == pytest.approx(expected, abs=4 * standard_error + 1e-4)


def test_analysis_reports_the_lag_bias_of_its_own_samples_and_warns():
    res = analyse_curve(T, lagged(T, 0.03, 10.0), tau_p_s=10.0, start_s=0.0,
                        window=(0.0, 0.98))
    fit = res.nonlinear
    assert res.lag_bias == pytest.approx(lag_bias(0.03, 10.0, fit.times_s - fit.start_s),
                                         rel=1e-6)
    assert any("probe lag" in w and "low" in w for w in res.warnings)


def test_log_linear_is_reported_beside_and_can_be_primary():
    rng = np.random.default_rng(3)
    c = lagged(T, 0.01, 0.0) + rng.normal(0.0, 0.3, T.size)
    both = analyse_curve(T, c, start_s=0.0, c_star=100.0)
    assert both.method == "nonlinear" and both.log_linear is not None
    assert both.log_linear.kla_per_s == pytest.approx(0.01, rel=0.03)
    ll = analyse_curve(T, c, start_s=0.0, c_star=100.0, method="log-linear")
    assert ll.primary.method == "log-linear"
    assert ll.primary.kla_per_s == pytest.approx(both.log_linear.kla_per_s)
    assert ll.summary()["nonlinear_kla_per_s"] == pytest.approx(both.nonlinear.kla_per_s)
    assert curve_methods() == ["nonlinear", "log-linear"]


def test_units_do_not_change_kla_and_nan_gaps_are_skipped():
    rng = np.random.default_rng(5)
    pct = lagged(T, 0.012, 0.0) + rng.normal(0.0, 0.3, T.size)
    mg_l = pct * 7.9 / 100.0
    a = analyse_curve(T, pct, start_s=0.0).primary
    b = analyse_curve(T, mg_l, start_s=0.0).primary
    assert b.kla_per_s == pytest.approx(a.kla_per_s, rel=1e-9)
    assert b.c_inf == pytest.approx(a.c_inf * 0.079, rel=1e-9)
    gappy = pct.copy()
    gappy[100:140] = np.nan
    res = analyse_curve(T, gappy, start_s=0.0)
    assert res.primary.kla_per_s == pytest.approx(0.012, rel=0.03)
    assert any("40 samples" in w for w in res.warnings)


def test_falling_curve_desorption_is_fitted_too():
    res = analyse_curve(T, lagged(T, 0.01, 0.0, c_inf=10.0, c0=95.0), start_s=0.0)
    assert res.primary.kla_per_s == pytest.approx(0.01, rel=1e-8)
    assert res.primary.c0 == pytest.approx(95.0, rel=1e-8)


def test_start_is_detected_after_a_flat_prefix():
    rng = np.random.default_rng(8)
    t = np.arange(0.0, 700.0, 1.0)
    c = np.where(t < 60, 3.0, lagged(t - 60, 0.015, 0.0, c0=3.0)) + rng.normal(0, 0.3, t.size)
    start = detect_start(t, c)
    assert 55.0 <= start <= 64.0
    res = analyse_curve(t, c)
    assert res.start_detected and res.primary.start_s == start
    assert res.primary.kla_per_s == pytest.approx(0.015, rel=0.03)


def test_data_starting_on_the_rise_start_at_the_first_sample():
    assert detect_start(T, lagged(T, 0.02, 0.0)) == 0.0


def test_window_is_the_stated_fraction_of_the_fitted_rise():
    assert DEFAULT_WINDOW == (0.2, 0.98)
    k = 0.01
    fit = analyse_curve(T, lagged(T, k, 0.0, c0=0.0), start_s=0.0).primary
    # the ideal rise reaches 20 % at -ln(0.8)/k and 98 % at -ln(0.02)/k
    assert fit.window_s[0] == pytest.approx(np.ceil(-np.log(0.8) / k), abs=1.0)
    assert fit.window_s[1] == pytest.approx(np.floor(-np.log(0.02) / k), abs=1.0)
    narrow = analyse_curve(T, lagged(T, k, 0.0), start_s=0.0, window=(0.5, 0.9)).primary
    assert narrow.n_points < fit.n_points


def test_a_curve_that_stops_early_warns_about_extrapolating_c_inf():
    t = np.arange(0.0, 80.0, 0.5)
    res = analyse_curve(t, lagged(t, 0.01, 0.0), start_s=0.0)
    assert any("C_inf is extrapolated" in w for w in res.warnings)


@pytest.mark.parametrize("t,c,code,words", [
    (T, np.full(T.size, 42.0), "flat", "flat"),
    (T[:3], np.array([1.0, 5.0, 9.0]), "too_short", "at least 5"),
    (T, np.full(T.size, np.nan), "all_nan", "missing"),
    (np.array([0.0, 1.0, 2.0, 1.5, 4.0, 5.0]), np.arange(6.0), "time_not_increasing",
     "does not increase"),
])
def test_bad_curves_get_their_own_reason(t, c, code, words):
    with pytest.raises(CurveRejected) as info:
        analyse_curve(t, c)
    assert info.value.code == code
    assert words in str(info.value)
    assert isinstance(info.value, InputError)


def test_saturated_curve_is_told_apart_from_a_flat_one():
    rng = np.random.default_rng(1)
    with pytest.raises(CurveRejected, match="saturated from the start") as info:
        analyse_curve(T, 99.5 + rng.normal(0, 0.2, T.size), c_star=100.0)
    assert info.value.code == "saturated"


def test_batch_keeps_order_and_gives_rejected_slots_and_progress():
    calls = []
    noise = np.random.default_rng(9).normal(0.0, 0.3, T.size)
    curves = [(T, lagged(T, 0.01, 0.0)), (T, np.full(T.size, 5.0)),
              (T[:400], lagged(T[:400], 0.03, 4.0) + noise[:400])]
    out = analyse_curves(curves, tau_p_s=[0.0, 0.0, 4.0], start_s=0.0,
                         progress=lambda d, n: calls.append((d, n)))
    assert isinstance(out[1], Rejected) and out[1].code == "flat"
    assert out[0].primary.kla_per_s == pytest.approx(0.01, rel=1e-8)
    assert out[2].primary.kla_per_s == pytest.approx(0.03, rel=0.02)
    assert calls[-1] == (3, 3)
    single = analyse_curve(*curves[2], tau_p_s=4.0, start_s=0.0).summary()
    for key, value in out[2].summary().items():
        if isinstance(value, float):
            assert value == pytest.approx(single[key], rel=1e-7), key


@pytest.mark.parametrize("kwargs,field", [
    ({"window": (0.9, 0.2)}, "window"), ({"method": "spline"}, "method"),
    ({"tau_p_s": -1.0}, "tau_p_s"), ({"start_s": 5000.0}, "start_s"),
])
def test_bad_settings_are_refused_by_name(kwargs, field):
    with pytest.raises(InputError) as info:
        analyse_curve(T, lagged(T, 0.01, 0.0), **kwargs)
    assert info.value.field == field


def test_probe_step_gives_the_time_constant():
    rng = np.random.default_rng(4)
    t = np.arange(0.0, 60.0, 0.1)
    c = 100 * (1 - np.exp(-t / 7.5)) + rng.normal(0, 0.3, t.size)
    step = fit_probe_step(t, c, start_s=0.0)
    assert step.tau_p_s == pytest.approx(7.5, abs=4 * step.tau_p_stderr_s)
    assert step.tau_p_stderr_s < 0.1


def _public_functions():
    import importlib
    import inspect

    names = ["expfit", "curves", "curve_checks", "curve_table", "dynamic", "gas_balance",
             "sulfite", "flux", "temperature", "replicates", "stored", "loglinear",
             "taylorfit", "lagbias", "windowfit", "varpro", "curve_start"]
    for module_name in names:
        module = importlib.import_module(f"scaleup.measure.{module_name}")
        for name, func in inspect.getmembers(module, inspect.isfunction):
            if not name.startswith("_") and func.__module__ == module.__name__:
                yield f"{module_name}.{name}", func


@pytest.mark.parametrize("name,func", list(_public_functions()))
def test_public_functions_document_every_parameter_with_a_unit(name, func):
    import inspect
    import re

    doc = inspect.getdoc(func) or ""
    assert "Parameters\n----------" in doc or not inspect.signature(func).parameters, name
    if "Parameters\n----------" not in doc:
        return
    section = doc.split("Parameters\n----------", 1)[1].split("\nReturns")[0]
    documented = {}
    for block in re.split(r"\n(?=\S)", section):
        head, _, body = block.partition("\n")
        names, _, kind = head.partition(" : ")
        for n in names.split(","):
            documented[n.strip()] = (kind, body)
    for param in inspect.signature(func).parameters:
        assert param in documented, f"{name}: parameter {param} is not documented"
        kind, body = documented[param]
        if ("float" in kind or "array" in kind) and "bool" not in kind:
            assert re.search(r"\[[^\]]*\]", body), f"{name}: {param} has no [unit]"
    assert "Returns\n-------" in doc, f"{name}: no Returns section"


def _reference_window_iteration(t, c, tau, lo=0.2, hi=0.98):
    """The window iteration written out plainly, one curve at a time with the plain fit
    engine: a rough fit on every n // 150-th sample, then fit, locate the window of the fit,
    refit from there, until the window stays put (six fits at most, the last one kept)."""
    every = max(1, t.size // 150)
    rough = expfit.fit_batch(t[None, ::every], c[None, ::every],
                             np.ones((1, t[::every].size), bool), tau)
    k = float(rough.kla_per_s[0])
    window = None
    for _ in range(6):
        t_lo = expfit.time_at_fraction(np.array([k]), np.array([tau]), lo)[0]
        t_hi = expfit.time_at_fraction(np.array([k]), np.array([tau]), hi)[0]
        new = (int(np.searchsorted(t, t_lo, "left")), int(np.searchsorted(t, t_hi, "right")))
        if new == window:
            break
        window = new
        a, b = window
        k = float(expfit.fit_batch(t[None, a:b], c[None, a:b], np.ones((1, b - a), bool), tau,
                                   np.array([k])).kla_per_s[0])
    return k, window


def test_batch_follows_the_plain_window_iteration_even_where_windows_cycle():
    # with noise, the window edge of about one curve in twenty flips between two samples
    # from fit to fit; the result is then the sixth fit's, and the batch must land on it too
    rng = np.random.default_rng(12)
    m, t = 60, np.linspace(0.0, 600.0, 3000)
    k, tau = rng.uniform(0.005, 0.05, m), rng.uniform(2.0, 15.0, m)
    curves = [(t, lagged(t, k[i], tau[i], 95.0, 4.0) + rng.normal(0.0, 0.5, t.size))
              for i in range(m)]
    out = analyse_curves(curves, tau_p_s=tau, start_s=0.0)
    for i, res in enumerate(out):
        k_ref, (a, b) = _reference_window_iteration(t, curves[i][1], tau[i])
        fit = res.nonlinear
        assert fit.kla_per_s == pytest.approx(k_ref, rel=1e-7)
        assert (fit.window_s, fit.n_points) == ((t[a], t[b - 1]), b - a)


def test_a_curve_gets_the_same_result_alone_and_in_a_ragged_batch():
    rng = np.random.default_rng(21)
    curves, taus, starts = [], [], []
    for i in range(12):
        n = int(rng.integers(300, 2500))
        t = np.arange(n) * rng.uniform(0.2, 1.0) + rng.uniform(-20.0, 20.0)
        k = rng.uniform(0.01, 0.04)
        curves.append((t, lagged(t - t[0], k, [0.0, 5.0][i % 2], 100.0, 5.0)
                       + rng.normal(0.0, 0.3, n)))
        taus.append([0.0, 5.0][i % 2])
        starts.append(float(t[0]) if i % 3 else None)
    batch = analyse_curves(curves, tau_p_s=taus, start_s=starts)
    for i, res in enumerate(batch):
        alone = analyse_curve(*curves[i], tau_p_s=taus[i], start_s=starts[i]).summary()
        for key, value in res.summary().items():
            if isinstance(value, float) or (isinstance(value, list) and value
                                            and isinstance(value[0], float)):
                assert value == pytest.approx(alone[key], rel=1e-7, abs=1e-12), (i, key)
            else:
                assert value == alone[key], (i, key)


def test_batch_start_detection_matches_the_one_curve_detection():
    from scaleup.measure.curve_start import detect_starts

    rng = np.random.default_rng(6)
    m, n = 80, 1200
    t = np.tile(np.arange(n) * 0.5, (m, 1))
    delay = rng.uniform(0.0, 0.5, m) * t[0, -1] * (rng.random(m) < 0.7)
    rise = 90.0 - 87.0 * np.exp(-rng.uniform(0.005, 0.05, m)[:, None]
                                * np.maximum(t - delay[:, None], 0.0))
    c = np.where(t < delay[:, None], 3.0, rise)
    c = c + rng.choice([0.0, 0.1, 0.5, 2.0], (m, 1)) * rng.normal(0.0, 1.0, (m, n))
    c[::5] = 93.0 - c[::5]  # desorption curves fall
    expected = [detect_start(t[i], c[i]) for i in range(m)]
    np.testing.assert_array_equal(detect_starts(t, c, np.full(m, n)), expected)


def test_taylor_moments_give_the_sums_of_the_plain_engine():
    from scaleup.measure import taylorfit

    rng = np.random.default_rng(2)
    m, n = 30, 800
    t = np.tile(np.linspace(0.0, 400.0, n), (m, 1))
    k = rng.uniform(0.01, 0.05, m)
    tau = np.where(np.arange(m) % 2, rng.uniform(2.0, 12.0, m), 0.0)
    c = 90.0 - 85.0 * expfit.row_response(t, k, tau) + rng.normal(0.0, 0.5, (m, n))
    first, stop = np.full(m, 20), np.full(m, 700)
    ex = taylorfit.Expansion(taylorfit.Source(t, c, np.zeros(m)), tau, first, stop)
    ex.expand(np.arange(m), k, fresh=True)
    cols = np.arange(n)
    mask = (cols >= first[:, None]) & (cols < stop[:, None])
    near = k * (1.0 + 0.9 * taylorfit.RADIUS / (k * ex.h))  # close to the radius
    plain = expfit._Chunk(t, c, mask, tau).sums(near.copy())
    moments = ex.sums(np.arange(m), near)
    scale = np.abs(plain).max(axis=1, keepdims=True)
    np.testing.assert_allclose(moments / scale, plain / scale, atol=1e-12)


@pytest.mark.parametrize("a,dt,n", [(0.02, 0.25, 2000), (0.5, 1.0, 30), (1e-4, 0.1, 5000),
                                    (3.0, 0.01, 1000), (0.05, 2.0, 1)])
def test_geometric_moments_are_the_sums_they_stand_for(a, dt, n):
    from scaleup.measure.lagbias import geometric_moments

    t = 7.5 + dt * np.arange(n)
    sums = geometric_moments(np.array([a]), np.array([7.5]), np.array([dt]), np.array([n]))
    for got, weight in zip(sums, (1.0, t, t * t), strict=True):
        assert got[0] == pytest.approx((weight * np.exp(-a * t)).sum(), rel=1e-12)


def test_closed_form_lag_bias_equals_the_fit_on_the_samples():
    from scaleup.measure.lagbias import lag_bias_batch

    rng = np.random.default_rng(4)
    m, n = 40, 3000
    t = np.tile(np.linspace(0.0, 600.0, n), (m, 1))
    k, tau = rng.uniform(0.005, 0.05, m), rng.uniform(2.0, 15.0, m)
    first = np.searchsorted(t[0], expfit.time_at_fraction(k, tau, 0.2))
    stop = np.searchsorted(t[0], expfit.time_at_fraction(k, tau, 0.98), "right")
    rows = np.arange(m)
    even = lag_bias_batch(t, np.zeros(m), np.full(m, 600.0 / (n - 1)), rows, k, tau, first,
                          stop)
    sampled = lag_bias_batch(t, np.zeros(m), np.full(m, np.nan), rows, k, tau, first, stop)
    assert (even < -0.01).sum() > m // 2  # real biases, for the comparison to mean something
    np.testing.assert_allclose(even, sampled, atol=1e-8)


def test_gaps_and_a_detected_start_give_the_result_of_the_curve_without_the_gaps():
    rng = np.random.default_rng(13)
    t = np.arange(0.0, 700.0, 1.0)
    c = np.where(t < 60, 3.0, lagged(t - 60, 0.015, 0.0, c0=3.0)) + rng.normal(0, 0.3, t.size)
    gappy = c.copy()
    gappy[200:230] = np.nan
    keep = np.isfinite(gappy)
    with_gaps = analyse_curve(t, gappy).summary()
    without = analyse_curve(t[keep], c[keep]).summary()
    assert with_gaps["start_detected"] and with_gaps["start_s"] == without["start_s"]
    assert with_gaps["kla_per_s"] == pytest.approx(without["kla_per_s"], rel=1e-12)
    assert with_gaps["warnings"][0].startswith("30 samples with a missing time or value")


def test_a_curve_keeps_its_log_linear_fit_beside_one_that_gets_none():
    # the second curve's C* lies far above its data, so no sample falls in its log-linear
    # window; the sums of the curve before it once lost their last sample to that
    rng = np.random.default_rng(2)
    t = np.linspace(0.0, 300.0, 301)
    a = 95.0 - 90.0 * np.exp(-0.03 * t) + rng.normal(0.0, 0.3, t.size)
    b = 95.0 - 90.0 * np.exp(-0.02 * t) + rng.normal(0.0, 0.3, t.size)
    both = analyse_curves([(t, a), (t, b)], start_s=0.0, c_star=[None, 1000.0])
    alone = analyse_curves([(t, a)], start_s=0.0)[0]
    assert both[1].log_linear is None
    assert any("only 0 samples" in w for w in both[1].warnings)
    assert both[0].log_linear.kla_per_s == alone.log_linear.kla_per_s
    assert both[0].log_linear.n_points == alone.log_linear.n_points
    assert both[0].log_linear.r_squared == alone.log_linear.r_squared
