"""Fitting: recovery, weights, nonlinear and robust fits, saved fits, bootstrap."""

import json

import numpy as np
import pytest

from scaleup.correlate import (
    FitResult,
    bootstrap,
    fit,
    fit_kla,
    fit_sherwood,
    kla_observations,
    sherwood_observations,
)
from scaleup.correlate.published import kla_vant_Riet
from scaleup.correlate.resampling import attach_bootstrap, resample_blocks
from scaleup.errors import InputError

TRUE = np.array([np.log(0.026), 0.4, 0.5])


def _runs(seed=0, n=30, sigma=0.1, vessels=("A", "B", "C"), classes=None, factor=1.0):
    rng = np.random.default_rng(seed)
    pv = np.exp(rng.uniform(np.log(200.0), np.log(5000.0), n))
    us = np.exp(rng.uniform(np.log(0.002), np.log(0.03), n))
    kla = kla_vant_Riet(pv, us) * np.exp(rng.normal(0.0, sigma, n))
    coalescence = None
    if classes is not None:
        coalescence = np.array(classes * (n // len(classes)))
        kla = np.where(coalescence == "non-coalescing", kla * factor, kla)
    return kla_observations(kla, gassed_power_per_volume_w_m3=pv, superficial_velocity_m_s=us,
                            kla_stderr_per_s=0.1 * kla, coalescence=coalescence,
                            vessel=np.array(vessels * (n // len(vessels))),
                            vessel_volume_m3=np.array([0.02, 0.3, 3.0, 0.3][:len(vessels)]
                                                      * (n // len(vessels))),
                            run_id=np.arange(100, 100 + n))


def test_fit_recovers_vant_riet_within_its_intervals():
    result = fit_kla(_runs(), power_basis="gassed")
    ci = result.conf_int()
    assert np.all((ci[:, 0] < TRUE) & (TRUE < ci[:, 1]))
    table = {p["name"]: p for p in result.parameters()}
    assert table["C"]["ci95"][0] < 0.026 < table["C"]["ci95"][1]
    assert table["C"]["stderr"] == pytest.approx(table["C"]["value"] * result.stderr[0])
    assert result.statistics["r2_log"] > 0.9
    assert result.statistics["rmse_log"] == pytest.approx(0.1, rel=0.35)
    assert result.run_ids[0] == 100


def test_nonlinear_fit_agrees_with_log_fit_on_exact_data():
    obs = _runs(sigma=0.0)
    log_fit = fit_kla(obs, power_basis="gassed")
    nls = fit_kla(obs, power_basis="gassed", method="nls")
    np.testing.assert_allclose(nls.params, TRUE, atol=1e-7)
    np.testing.assert_allclose(log_fit.params, TRUE, atol=1e-10)
    assert nls.error_space == "linear"


def test_nonlinear_intervals_cover_the_curve():
    result = fit_kla(_runs(seed=3, sigma=0.15), power_basis="gassed", method="nls",
                     weights="stderr")
    points = {"gassed_power_per_volume_w_m3": [1000.0], "superficial_velocity_m_s": [0.01]}
    p = result.predict(points)
    assert p.ci_low[0] < p.value[0] < p.ci_high[0]
    assert p.pi_low[0] < p.ci_low[0] and p.pi_high[0] > p.ci_high[0]
    assert p.ci_low[0] < float(kla_vant_Riet(1000.0, 0.01)) < p.ci_high[0]


def test_robust_fit_flags_a_bad_run_and_resists_it():
    obs = _runs(seed=5, n=30, sigma=0.08)
    bad = obs.response.copy()
    bad[7] *= 3.0  # a run logged in 1/min instead of 1/s would be far worse; this is a slip
    spoiled = kla_observations(bad, gassed_power_per_volume_w_m3=obs.variables[
        "gassed_power_per_volume_w_m3"], superficial_velocity_m_s=obs.variables[
        "superficial_velocity_m_s"], run_id=obs.run_id)
    plain = fit_kla(spoiled, power_basis="gassed")
    for loss in ("soft_l1", "huber"):
        robust = fit_kla(spoiled, power_basis="gassed", robust=loss)
        assert robust.diagnostics["flagged"].tolist().count(True) >= 1
        assert bool(robust.diagnostics["flagged"][7])
        assert robust.statistics["aic"] is None
        assert "107" in robust.warnings[0]
        assert np.abs(robust.params - TRUE).max() < np.abs(plain.params - TRUE).max()
    # the plain fit's influence measures point at the same run
    assert int(np.nanargmax(plain.diagnostics["cooks_distance"])) == 7


def test_weights_need_a_stated_error_for_every_run():
    obs = _runs()
    no_stderr = kla_observations(obs.response, gassed_power_per_volume_w_m3=obs.variables[
        "gassed_power_per_volume_w_m3"], superficial_velocity_m_s=obs.variables[
        "superficial_velocity_m_s"])
    with pytest.raises(InputError, match="standard error"):
        fit_kla(no_stderr, power_basis="gassed", weights="stderr")
    with pytest.raises(InputError, match="use method ols"):
        fit_kla(obs, power_basis="gassed", method="nls", robust="huber")


def test_too_few_runs_or_no_spread_is_refused():
    obs = _runs(n=3, vessels=("A",))
    with pytest.raises(InputError, match="at least 4"):
        fit_kla(obs, power_basis="gassed")
    flat = kla_observations([0.02, 0.03, 0.04, 0.05], gassed_power_per_volume_w_m3=[
        300, 600, 900, 1200], superficial_velocity_m_s=[0.01] * 4)
    with pytest.raises(InputError, match="b_gas_velocity has no spread"):
        fit_kla(flat, power_basis="gassed")


def test_medium_factor_is_recovered():
    obs = _runs(seed=9, n=40, vessels=("A", "B"), classes=["coalescing", "non-coalescing"],
                factor=2.0)
    result = fit_kla(obs, power_basis="gassed", medium_factor=True)
    table = {p["name"]: p for p in result.parameters()}
    factor = table["factor_non-coalescing"]
    assert factor["ci95"][0] < 2.0 < factor["ci95"][1]
    single = fit_kla(_runs(classes=["coalescing"]), power_basis="gassed", medium_factor=True)
    assert "one coalescence class" in single.warnings[-1]


def test_saved_fit_round_trips_through_json_and_predicts_the_same():
    result = fit_kla(_runs(), power_basis="gassed", weights="stderr")
    result = attach_bootstrap(result, _runs(), n_resamples=200)
    text = json.dumps(result.to_dict(), allow_nan=True)
    back = FitResult.from_dict(json.loads(text))
    points = {"gassed_power_per_volume_w_m3": [800.0, 2500.0],
              "superficial_velocity_m_s": [0.005, 0.02], "vessel_volume_m3": [0.3, 30.0]}
    a, b = result.predict(points), back.predict(points)
    for field in ("value", "ci_low", "ci_high", "pi_low", "pi_high"):
        np.testing.assert_allclose(getattr(a, field), getattr(b, field), rtol=1e-15)
    assert b.extrapolation.extrapolated.tolist() == [False, True]  # 30 m3 beyond 3 m3
    assert back.bootstrap["n_resamples"] == 200
    assert back.package_version and back.created_at
    with pytest.raises(InputError, match="schema"):
        FitResult.from_dict({"schema": "other"})


def test_simulation_matches_the_prediction_interval():
    result = fit_kla(_runs(seed=4), power_basis="gassed")
    points = {"gassed_power_per_volume_w_m3": [1500.0], "superficial_velocity_m_s": [0.01]}
    p = result.predict(points)
    draws = result.simulate(points, 40000, np.random.default_rng(0))[:, 0]
    lo, hi = np.percentile(draws, [2.5, 97.5])
    # normal parameter draws vs t quantiles (27 df): about 3 % narrower in log space
    assert np.log(lo) == pytest.approx(np.log(p.pi_low[0]), abs=0.03)
    assert np.log(hi) == pytest.approx(np.log(p.pi_high[0]), abs=0.03)
    mean_only = result.simulate(points, 40000, np.random.default_rng(1), observation=False)
    assert np.std(np.log(mean_only)) == pytest.approx(p.se_mean[0], rel=0.05)


def test_vectorised_bootstrap_equals_refitting_each_resample():
    obs = _runs(seed=2, n=24, vessels=("A", "B", "C", "D"))
    result = fit_kla(obs, power_basis="gassed", weights="stderr")
    fast = bootstrap(result.form, obs, n_resamples=50, seed=3, weights="stderr")
    draws = np.vstack(list(resample_blocks(obs.n, 50, seed=3)))
    for row, draw in enumerate(draws[:10]):
        refit = fit(result.form, obs.subset(draw), weights="stderr")
        np.testing.assert_allclose(fast.params[row], refit.params, rtol=1e-10)
    vessels = bootstrap(result.form, obs, kind="vessels", n_resamples=30, seed=4,
                        weights="stderr")
    labels = np.unique(obs.vessel)
    draws = next(resample_blocks(labels.size, 30, seed=4))
    runs = np.concatenate([np.flatnonzero(obs.vessel == labels[v]) for v in draws[0]])
    refit = fit(result.form, obs.subset(runs), weights="stderr")
    np.testing.assert_allclose(vessels.params[0], refit.params, rtol=1e-10)


def test_bootstrap_interval_brackets_the_estimate_and_robust_bootstrap_runs():
    obs = _runs(seed=6, n=30)
    result = fit_kla(obs, power_basis="gassed")
    boot = bootstrap(result.form, obs, n_resamples=400, seed=1)
    ci = boot.interval()
    assert np.all((ci[:, 0] < result.params) & (result.params < ci[:, 1]))
    # bootstrap and t-based standard errors agree for normal errors (within ~25 % at n=30)
    np.testing.assert_allclose(boot.stderr(), result.stderr, rtol=0.3)
    robust = bootstrap(result.form, obs, n_resamples=20, seed=1, robust="huber")
    assert robust.params.shape == (20, 3) and robust.n_dropped == 0


def test_cluster_bootstrap_drops_inestimable_resamples():
    # two vessels, each at one gas velocity: a resample of one vessel twice cannot
    # separate the gas-velocity exponent
    pv = np.tile([300.0, 900.0, 2700.0], 2)
    us = np.repeat([0.005, 0.02], 3)
    kla = kla_vant_Riet(pv, us) * np.exp(np.random.default_rng(0).normal(0, 0.05, 6))
    obs = kla_observations(kla, gassed_power_per_volume_w_m3=pv, superficial_velocity_m_s=us,
                           vessel=["A"] * 3 + ["B"] * 3)
    result = fit_kla(obs, power_basis="gassed")
    boot = bootstrap(result.form, obs, kind="vessels", n_resamples=200, seed=0)
    assert 60 < boot.n_dropped < 140  # half the draws pick one vessel twice
    assert np.isfinite(boot.interval()).all()


def test_sherwood_plus_two_recovers_ranz_marshall():
    rng = np.random.default_rng(10)
    re = np.exp(rng.uniform(np.log(2.0), np.log(200.0), 40))
    sc = np.exp(rng.uniform(np.log(0.7), np.log(2.5), 40))
    sh = (2.0 + 0.6 * re**0.5 * sc ** (1 / 3)) * np.exp(rng.normal(0, 0.02, 40))
    obs = sherwood_observations(sh, reynolds=re, schmidt=sc)
    result = fit_sherwood(obs, plus_two=True, fixed={"c_schmidt": 1 / 3})
    table = {p["name"]: p for p in result.parameters()}
    assert table["A"]["ci95"][0] < 0.6 < table["A"]["ci95"][1]
    assert table["b_reynolds"]["ci95"][0] < 0.5 < table["b_reynolds"]["ci95"][1]
    assert table["c_schmidt"]["fixed"] and table["c_schmidt"]["value"] == pytest.approx(1 / 3)
    p = result.predict({"reynolds": [50.0], "schmidt": [1.0]})
    assert p.value[0] == pytest.approx(2.0 + 0.6 * 50**0.5, rel=0.03)


def test_mixing_coalescence_classes_without_a_medium_factor_is_warned():
    """van't Riet (1979) gives separate coalescing / non-coalescing correlations; a single
    law over both classes gets a warning that says how to split them."""
    import numpy as np

    from scaleup.correlate import kla_observations
    from scaleup.correlate.fitting import fit_kla

    rng = np.random.default_rng(3)
    n = 24
    pv = rng.uniform(200, 3000, n)
    us = rng.uniform(0.003, 0.02, n)
    classes = np.array(["coalescing", "non-coalescing"] * (n // 2))
    kla = np.where(classes == "coalescing", 0.026 * pv**0.4 * us**0.5,
                   0.002 * pv**0.7 * us**0.2) * np.exp(rng.normal(0, 0.05, n))
    data = kla_observations(kla, gassed_power_per_volume_w_m3=pv, superficial_velocity_m_s=us,
                            coalescence=classes)
    mixed = fit_kla(data, power_basis="gassed")
    assert any("mix coalescence classes" in w for w in mixed.warnings)
    split = fit_kla(data, power_basis="gassed", medium_factor=True)
    assert not any("mix coalescence classes" in w for w in split.warnings)
