"""Correlation fitting checked against the outside world.

* statsmodels (general-purpose reference library): OLS/WLS estimates, standard errors,
  confidence intervals, prediction intervals, R2, AIC/BIC, influence measures, to 1e-8
  relative (both are exact least-squares solutions; the tolerance is rounding only).
* van't Riet (1979), the equations as stated: Pg/V = 1000 W/m3, us = 0.01 m/s give
  0.0412 1/s (coalescing) and 0.100 1/s (non-coalescing).
* Synthetic campaigns drawn from van't Riet's coalescing correlation with log-normal noise:
  95 % intervals cover the true values 93-97 % of the time; leave-one-vessel-out finds a
  built-in scale bias.
"""

import numpy as np
import pytest
import statsmodels.api as sm
from statsmodels.stats.outliers_influence import OLSInfluence

from scaleup.correlate import (
    fit_kla,
    fit_sherwood,
    kla,
    kla_correlations,
    kla_observations,
    leave_one_vessel_out,
    sherwood_observations,
)
from scaleup.correlate.published import kla_vant_Riet

RTOL = 1e-8


def _campaign(rng, n=40, sigma=0.12, stderr=False):
    pv = np.exp(rng.uniform(np.log(200.0), np.log(5000.0), n))
    us = np.exp(rng.uniform(np.log(0.002), np.log(0.03), n))
    kla_true = kla_vant_Riet(pv, us, coalescing=True)
    measured = kla_true * np.exp(rng.normal(0.0, sigma, n))
    se = measured * rng.uniform(0.03, 0.2, n) if stderr else None
    obs = kla_observations(measured, gassed_power_per_volume_w_m3=pv,
                           superficial_velocity_m_s=us, kla_stderr_per_s=se)
    return obs, pv, us, measured, se


def _statsmodels(pv, us, measured, weights):
    X = sm.add_constant(np.column_stack([np.log(pv), np.log(us)]))
    return X, sm.WLS(np.log(measured), X, weights=weights).fit()


@pytest.mark.parametrize("weights", ["none", "stderr"])
def test_log_space_least_squares_equals_statsmodels(weights):
    obs, pv, us, measured, se = _campaign(np.random.default_rng(11), stderr=True)
    ours = fit_kla(obs, power_basis="gassed", weights=weights)
    w = np.ones(obs.n) if weights == "none" else (measured / se) ** 2
    X, ref = _statsmodels(pv, us, measured, w)
    np.testing.assert_allclose(ours.params, ref.params, rtol=RTOL)
    np.testing.assert_allclose(ours.stderr, ref.bse, rtol=RTOL)
    np.testing.assert_allclose(ours.conf_int(0.95), ref.conf_int(0.05), rtol=RTOL)
    np.testing.assert_allclose(ours.cov, ref.cov_params(), rtol=RTOL)
    np.testing.assert_allclose(ours.residual_variance, ref.scale, rtol=RTOL)
    assert ours.statistics["r2_log"] == pytest.approx(ref.rsquared, rel=RTOL)
    assert ours.statistics["llf"] == pytest.approx(ref.llf, rel=RTOL)
    assert ours.statistics["aic"] == pytest.approx(ref.aic, rel=RTOL)
    assert ours.statistics["bic"] == pytest.approx(ref.bic, rel=RTOL)
    for i, entry in enumerate(ours.parameters()):
        if entry["name"] != "C":
            assert entry["p_value"] == pytest.approx(ref.pvalues[i], rel=1e-6)


@pytest.mark.parametrize("weights", ["none", "stderr"])
def test_confidence_and_prediction_intervals_equal_statsmodels(weights):
    obs, pv, us, measured, se = _campaign(np.random.default_rng(12), stderr=True)
    ours = fit_kla(obs, power_basis="gassed", weights=weights)
    w = np.ones(obs.n) if weights == "none" else (measured / se) ** 2
    _, ref = _statsmodels(pv, us, measured, w)
    new_pv = np.array([300.0, 1500.0, 8000.0])
    new_us = np.array([0.003, 0.012, 0.05])
    new_w = 2.5  # a new run's weight, passed to both
    prediction = ours.predict({"gassed_power_per_volume_w_m3": new_pv,
                               "superficial_velocity_m_s": new_us}, weight=new_w)
    X_new = sm.add_constant(np.column_stack([np.log(new_pv), np.log(new_us)]),
                            has_constant="add")
    frame = ref.get_prediction(X_new, weights=new_w).summary_frame(alpha=0.05)
    np.testing.assert_allclose(np.log(prediction.value), frame["mean"], rtol=RTOL)
    np.testing.assert_allclose(np.log(prediction.ci_low), frame["mean_ci_lower"], rtol=RTOL)
    np.testing.assert_allclose(np.log(prediction.ci_high), frame["mean_ci_upper"], rtol=RTOL)
    np.testing.assert_allclose(np.log(prediction.pi_low), frame["obs_ci_lower"], rtol=RTOL)
    np.testing.assert_allclose(np.log(prediction.pi_high), frame["obs_ci_upper"], rtol=RTOL)
    np.testing.assert_allclose(prediction.se_mean, frame["mean_se"], rtol=RTOL)


def test_influence_measures_equal_statsmodels():
    obs, pv, us, measured, _ = _campaign(np.random.default_rng(13))
    ours = fit_kla(obs, power_basis="gassed")
    _, ref = _statsmodels(pv, us, measured, np.ones(obs.n))
    influence = OLSInfluence(ref)
    d = ours.diagnostics
    np.testing.assert_allclose(d["leverage"], influence.hat_matrix_diag, rtol=RTOL)
    np.testing.assert_allclose(d["studentized_internal"], influence.resid_studentized_internal,
                               rtol=RTOL)
    np.testing.assert_allclose(d["studentized_external"], influence.resid_studentized_external,
                               rtol=RTOL)
    np.testing.assert_allclose(d["cooks_distance"], influence.cooks_distance[0], rtol=RTOL)


def test_sherwood_fit_with_fixed_schmidt_exponent_equals_statsmodels_with_offset():
    rng = np.random.default_rng(14)
    re = np.exp(rng.uniform(np.log(5.0), np.log(500.0), 30))
    sc = np.exp(rng.uniform(np.log(300.0), np.log(900.0), 30))
    sh = 0.6 * re**0.5 * sc ** (1 / 3) * np.exp(rng.normal(0, 0.05, 30))
    ours = fit_sherwood(sherwood_observations(sh, reynolds=re, schmidt=sc),
                        fixed={"c_schmidt": 1 / 3})
    X = sm.add_constant(np.log(re))
    ref = sm.OLS(np.log(sh) - np.log(sc) / 3, X).fit()
    np.testing.assert_allclose(ours.params, ref.params, rtol=RTOL)
    np.testing.assert_allclose(ours.stderr, ref.bse, rtol=RTOL)


def test_vant_riet_published_values():
    # van't Riet (1979), Ind. Eng. Chem. Process Des. Dev. 18, 357, as the equations state:
    # 0.026 * 1000**0.4 * 0.01**0.5 = 0.0412 1/s; 0.002 * 1000**0.7 * 0.01**0.2 = 0.100 1/s
    assert float(kla(1000.0, 0.01, "vant-riet-coalescing")) == pytest.approx(0.0412, abs=5e-5)
    assert float(kla(1000.0, 0.01, "vant-riet-noncoalescing")) == pytest.approx(0.100,
                                                                                   abs=5e-4)
    points = {"gassed_power_per_volume_w_m3": [1000.0], "superficial_velocity_m_s": [0.01]}
    assert kla_correlations["vant-riet-coalescing"].predict(points)[0] == pytest.approx(
        0.0412, abs=5e-5)


def test_interval_coverage_over_synthetic_campaigns():
    # 2000 campaigns of 24 runs from van't Riet (1979) coalescing with 15 % log-normal
    # scatter: each 95 % parameter interval, and the 95 % prediction interval of a new run,
    # should cover the truth 93-97 % of the time (binomial s.e. 0.5 %).
    rng = np.random.default_rng(2024)
    truth = np.array([np.log(0.026), 0.4, 0.5])
    n_campaigns, n = 2000, 24
    pv = np.exp(rng.uniform(np.log(200.0), np.log(5000.0), n))
    us = np.exp(rng.uniform(np.log(0.002), np.log(0.03), n))
    new = {"gassed_power_per_volume_w_m3": [2500.0], "superficial_velocity_m_s": [0.02]}
    new_true = float(kla_vant_Riet(2500.0, 0.02))
    covered = np.zeros(3)
    covered_new = 0
    for _ in range(n_campaigns):
        measured = kla_vant_Riet(pv, us) * np.exp(rng.normal(0.0, 0.15, n))
        result = fit_kla(kla_observations(measured, gassed_power_per_volume_w_m3=pv,
                                          superficial_velocity_m_s=us), power_basis="gassed")
        ci = result.conf_int(0.95)
        covered += (ci[:, 0] <= truth) & (truth <= ci[:, 1])
        new_run = new_true * np.exp(rng.normal(0.0, 0.15))
        p = result.predict(new)
        covered_new += p.pi_low[0] <= new_run <= p.pi_high[0]
    coverage = covered / n_campaigns
    assert np.all((coverage >= 0.93) & (coverage <= 0.97)), coverage
    assert 0.93 <= covered_new / n_campaigns <= 0.97


def _vessel_campaign(rng, scale_exponent):
    volumes = {"V-20L": 0.02, "V-300L": 0.3, "V-3m3": 3.0, "V-30m3": 30.0}
    k, pv, us, vessel, volume = [], [], [], [], []
    for name, v in volumes.items():
        p = np.exp(rng.uniform(np.log(300.0), np.log(3000.0), 12))
        u = np.exp(rng.uniform(np.log(0.003), np.log(0.02), 12))
        k.append(kla_vant_Riet(p, u) * v**scale_exponent * np.exp(rng.normal(0, 0.1, 12)))
        pv.append(p)
        us.append(u)
        vessel += [name] * 12
        volume += [v] * 12
    return kla_observations(np.concatenate(k), gassed_power_per_volume_w_m3=np.concatenate(pv),
                            superficial_velocity_m_s=np.concatenate(us), vessel=vessel,
                            vessel_volume_m3=volume)


def test_leave_one_vessel_out_detects_a_built_in_scale_bias():
    # kLa falls as V^-0.05 beyond van't Riet (11 % per tenfold volume): a power law in
    # P/V and us alone cannot carry it, and the held-out vessels show it.
    rng = np.random.default_rng(7)
    obs = _vessel_campaign(rng, -0.05)
    lovo = leave_one_vessel_out(fit_kla(obs, power_basis="gassed"), obs)
    bias = lovo.scale_bias
    assert bias.significant and bias.p_value < 0.01
    # held-out predictions run high at large scale: predicted/measured rises with volume
    assert bias.slope_per_decade > 0
    assert "scale-dependent bias" in bias.message
    smallest = min(lovo.folds, key=lambda f: f.volume_m3)
    largest = max(lovo.folds, key=lambda f: f.volume_m3)
    assert smallest.mean_log_ratio < 0 < largest.mean_log_ratio


def test_leave_one_vessel_out_false_alarm_rate_is_near_nominal():
    # Without a scale effect the trend test should fire about 5 % of the time.
    rng = np.random.default_rng(8)
    alarms = 0
    trials = 120
    for _ in range(trials):
        obs = _vessel_campaign(rng, 0.0)
        alarms += leave_one_vessel_out(fit_kla(obs, power_basis="gassed"),
                                       obs).scale_bias.significant
    assert alarms / trials <= 0.12
