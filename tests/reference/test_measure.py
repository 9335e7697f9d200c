"""measure/ against published values and general-purpose reference libraries.

Each check names its source beside the expected value.
"""

from __future__ import annotations

import numpy as np
import pytest

from scaleup.measure import expfit
from scaleup.measure.curves import analyse_curve
from scaleup.measure.gas_balance import gas_balance_inert
from scaleup.measure.sulfite import sulfite_rate_from_samples
from scaleup.measure.temperature import kla_20_ASCE, sotr_ASCE, temperature_factor_ASCE


def test_inert_gas_balance_exact_algebra():
    # Exact algebra of the inert (N2 + Ar) balance, by hand: inert fraction 1 - 0.2095 - 0.0004
    # = 0.7901 in, 1 - 0.19 - 0.015 = 0.7950 out; F_out/F_in = 0.7901/0.7950 = 0.99384;
    # O2 taken up 0.2095 - 0.19 * 0.99384 = 0.02067 mol per mol feed; RQ about 0.70.
    b = gas_balance_inert(1.0, 0.2095, 0.19, 0.0004, 0.015, 1.0)
    assert b.outlet_to_inlet == pytest.approx(0.99384, abs=5e-6)
    assert b.o2_per_mol_feed == pytest.approx(0.02067, abs=5e-6)
    assert b.rq == pytest.approx(0.70, abs=0.005)


@pytest.mark.parametrize("celsius,factor", [
    (25.0, 0.8882),  # ASCE/EWRI 2-06, theta = 1.024: 1.024^(20 - 25) = 0.8882
    (15.0, 1.1259),  # ASCE/EWRI 2-06, theta = 1.024: 1.024^(20 - 15) = 1.1259
    (20.0, 1.0),     # standard temperature itself
])
def test_theta_correction_ASCE(celsius, factor):
    assert temperature_factor_ASCE(273.15 + celsius) == pytest.approx(factor, abs=5e-5)
    assert kla_20_ASCE(0.02, 273.15 + celsius) == pytest.approx(0.02 * factor, rel=1e-4)


def test_sotr_is_kla20_times_c_star_times_volume():
    # ASCE/EWRI 2-06 definition SOTR = kLa20 C*20 V; C*20 = 9.09 mg/L for air-saturated clean
    # water at 20 degC, 1 atm (Standard Methods 4500-O table, from memory): 0.2841 mol/m3
    c_star = 9.09e-3 / 31.998e-3
    assert sotr_ASCE(0.01, c_star, 50.0) == pytest.approx(0.01 * 0.28408 * 50.0, rel=1e-4)


def _curve_fit(t, c, tau, p0):
    from scipy.optimize import curve_fit

    def model(tt, c_inf, c0, k):
        if tau == 0:
            g = np.exp(-k * tt)
        else:
            g = (np.exp(-k * tt) - k * tau * np.exp(-tt / tau)) / (1 - k * tau)
        return c_inf - (c_inf - c0) * g

    p, cov = curve_fit(model, t, c, p0=p0, xtol=1e-14, ftol=1e-14, gtol=1e-14, maxfev=20000)
    return p, np.sqrt(np.diag(cov))


@pytest.mark.parametrize("seed,k,tau,noise", [
    (1, 0.02, 0.0, 0.5), (2, 0.02, 8.0, 0.5), (3, 0.006, 20.0, 1.0), (4, 0.08, 2.0, 0.2),
])
def test_fit_matches_scipy_curve_fit_to_1e6(seed, k, tau, noise):
    # scipy.optimize.curve_fit (general-purpose reference library), same data, same samples:
    # estimates and standard errors (pcov with absolute_sigma=False) to 1e-6 relative
    rng = np.random.default_rng(seed)
    t = np.arange(0.0, 6.0 / k, 0.5)
    if tau:
        g = (np.exp(-k * t) - k * tau * np.exp(-t / tau)) / (1 - k * tau)
    else:
        g = np.exp(-k * t)
    c = 95.0 - 90.0 * g + rng.normal(0.0, noise, t.size)
    res = analyse_curve(t, c, tau_p_s=tau, start_s=0.0)
    fit = res.nonlinear
    used = np.isin(t, fit.times_s)
    p, se = _curve_fit(t[used], c[used], tau, [fit.c_inf * 1.01, fit.c0 + 1, fit.kla_per_s * 1.1])
    assert fit.kla_per_s == pytest.approx(p[2], rel=1e-6)
    assert fit.c_inf == pytest.approx(p[0], rel=1e-6)
    assert fit.c0 == pytest.approx(p[1], rel=1e-6)
    assert fit.kla_stderr_per_s == pytest.approx(se[2], rel=1e-6)
    assert fit.c_inf_stderr == pytest.approx(se[0], rel=1e-6)
    assert fit.c0_stderr == pytest.approx(se[1], rel=1e-6)


def test_batch_engine_matches_curve_fit_on_a_ragged_batch():
    # scipy.optimize.curve_fit, one call per curve, against one batch with masks
    rng = np.random.default_rng(12)
    m, n = 12, 700
    t = np.tile(np.arange(n, dtype=float), (m, 1))
    k = rng.uniform(0.005, 0.05, m)
    tau = np.where(np.arange(m) % 3 == 0, 0.0, rng.uniform(2.0, 12.0, m))
    g = np.array([expfit.response(t[i], k[i], tau[i]) for i in range(m)])
    c = 90.0 - 85.0 * g + rng.normal(0.0, 0.5, (m, n))
    mask = np.ones((m, n), bool)
    for i in range(m):
        mask[i, :rng.integers(0, 30)] = False
        mask[i, n - rng.integers(0, 300):] = False
    fit = expfit.fit_batch(t, c, mask, tau)
    for i in range(m):
        p, se = _curve_fit(t[i, mask[i]], c[i, mask[i]], tau[i], [90.0, 5.0, k[i]])
        assert fit.kla_per_s[i] == pytest.approx(p[2], rel=1e-6)
        assert fit.kla_stderr_per_s[i] == pytest.approx(se[2], rel=1e-6)


def test_log_linear_matches_statsmodels_ols():
    # statsmodels OLS (general-purpose reference library) on ln(C_inf - C) against time
    import statsmodels.api as sm

    rng = np.random.default_rng(21)
    t = np.arange(0.0, 500.0, 2.0)
    c = 100.0 - 95.0 * np.exp(-0.012 * t) + rng.normal(0.0, 0.4, t.size)
    ll = analyse_curve(t, c, start_s=0.0, c_star=100.0, method="log-linear").primary
    used = np.isin(t, ll.times_s)
    ols = sm.OLS(np.log(100.0 - c[used]), sm.add_constant(t[used])).fit()
    assert ll.kla_per_s == pytest.approx(-ols.params[1], rel=1e-9)
    assert ll.kla_stderr_per_s == pytest.approx(ols.bse[1], rel=1e-9)
    low, high = ols.conf_int(alpha=0.05)[1]
    assert ll.kla_ci95_per_s[0] == pytest.approx(-high, rel=1e-9)
    assert ll.kla_ci95_per_s[1] == pytest.approx(-low, rel=1e-9)


def test_sulfite_rate_matches_statsmodels_ols():
    # statsmodels OLS slope and its standard error
    import statsmodels.api as sm

    t = np.array([0.0, 600.0, 1200.0, 1800.0, 2400.0, 3000.0])
    conc = np.array([502.0, 468.0, 441.0, 409.0, 382.0, 348.0])
    rate, se, _ = sulfite_rate_from_samples(t, conc)
    ols = sm.OLS(conc, sm.add_constant(t)).fit()
    assert rate == pytest.approx(-ols.params[1], rel=1e-12)
    assert se == pytest.approx(ols.bse[1], rel=1e-12)
