"""Risk of missing the duty: Monte Carlo against normal theory, shared draws, speed."""

from __future__ import annotations

import time

import numpy as np
import pytest

from scaleup.correlate.fitting import fit_kla
from scaleup.correlate.models import GAS_VELOCITY, GASSED_PV, kla_observations
from scaleup.errors import InputError
from scaleup.scaling import risk
from scaleup.scaling.correlation import Z95, KlaModel


def synthetic_fit(n=24, sd=0.15, seed=3):
    """A kLa power law fitted to invented runs (synthetic recovery, not a reference)."""
    rng = np.random.default_rng(seed)
    pv = np.exp(rng.uniform(np.log(300), np.log(5000), n))
    us = np.exp(rng.uniform(np.log(0.003), np.log(0.02), n))
    kla = 0.02 * pv ** 0.5 * us ** 0.4 * np.exp(rng.normal(0, sd, n))
    data = kla_observations(kla, gassed_power_per_volume_w_m3=pv, superficial_velocity_m_s=us,
                            vessel_volume_m3=np.full(n, 0.02))
    return KlaModel.from_fit(fit_kla(data, power_basis="gassed"), "synthetic")


MODEL = synthetic_fit()


def points(pv, us):
    pv, us = np.broadcast_arrays(np.asarray(pv, float), np.asarray(us, float))
    return {GASSED_PV: pv.ravel(), GAS_VELOCITY: us.ravel()}


def test_monte_carlo_agrees_with_normal_theory():
    # log-linear model: P = Phi((z_hat - ln k_req) / sqrt(x' cov x + s^2)); the Monte Carlo
    # draws parameters from N(params, cov) and a normal residual, so the two must agree to
    # Monte Carlo precision (3 standard errors: a 99.7 % band)
    pts = points([800.0, 2000.0, 20000.0], [0.005, 0.01, 0.05])  # the last is far outside
    median = MODEL.median(pts)
    required = median * np.array([0.8, 1.0, 1.15])
    p_exact = risk.analytic_probability(MODEL, pts, required)
    p_mc, se = risk.probability_meets(MODEL, pts, required, risk.draw(MODEL, 200_000, 11))
    assert np.all(np.abs(p_mc - p_exact) <= 3 * se + 1e-12)
    assert p_exact[1] == pytest.approx(0.5, abs=1e-12)


def test_map_equals_point_by_point_with_the_same_draws():
    pts = points(np.geomspace(200, 8000, 7)[:, None], np.geomspace(0.002, 0.03, 5)[None, :])
    required = np.full(35, 0.05)
    draws = risk.draw(MODEL, 3000, 5)
    p_all, _ = risk.probability_meets(MODEL, pts, required, draws)
    for i in range(35):
        one = {k: v[i:i + 1] for k, v in pts.items()}
        p_one, _ = risk.probability_meets(MODEL, one, required[i:i + 1], draws)
        assert p_one[0] == p_all[i]


def test_published_scatter_gives_its_stated_band():
    m = KlaModel.from_published("vant-riet-coalescing")
    pts = points([1000.0], [0.01])
    median = m.median(pts)
    assert median[0] == pytest.approx(0.026 * 1000 ** 0.4 * 0.01 ** 0.5, rel=1e-12)
    # the stated 40 % accuracy is read as the upper end of a 95 % band
    p, se = risk.probability_meets(m, pts, median * 1.4, risk.draw(m, 200_000, 1))
    assert p[0] == pytest.approx(0.025, abs=3 * se[0])
    assert m.scatter_sd == pytest.approx(np.log(1.4) / Z95)


def test_property_uncertainty_pulls_probability_towards_even_odds():
    pts = points([1500.0], [0.01])
    required = MODEL.median(pts) * 0.8
    p0 = risk.analytic_probability(MODEL, pts, required)
    p1 = risk.analytic_probability(MODEL, pts, required, property_sd=0.2)
    assert 0.5 < p1[0] < p0[0]
    mc, se = risk.probability_meets(MODEL, pts, required, risk.draw(MODEL, 100_000, 2, 0.2))
    assert mc[0] == pytest.approx(p1[0], abs=3 * se[0])


def test_cannot_meet_an_infinite_requirement():
    p, _ = risk.probability_meets(MODEL, points([1000.0], [0.01]), np.inf,
                                  risk.draw(MODEL, 1000))
    assert p[0] == 0.0


def test_point_risk_of_100000_draws_well_under_a_second():
    pts = points([1500.0], [0.01])
    start = time.perf_counter()
    r = risk.point_risk(MODEL, pts, float(MODEL.median(pts)[0]), 100_000, 0,
                        otr_of_kla=lambda k: 0.2 * k)
    elapsed = time.perf_counter() - start
    assert elapsed < 1.0
    assert r.probability == pytest.approx(0.5, abs=3 * r.standard_error)
    assert r.kla_percentiles["p5"] < r.kla_percentiles["p50"] < r.kla_percentiles["p95"]
    assert r.otr_percentiles["p50"] == pytest.approx(0.2 * r.kla_percentiles["p50"], rel=0.01)


def test_draws_need_two():
    with pytest.raises(InputError):
        risk.draw(MODEL, 1)
