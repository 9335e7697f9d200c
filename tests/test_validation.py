"""Leave-one-vessel-out, the scale-bias test and comparison tables."""

import json

import numpy as np
import pytest

from scaleup.correlate import (
    compare_correlations,
    fit_kla,
    kla_correlations,
    kla_observations,
    leave_one_vessel_out,
)
from scaleup.correlate.published import kla_vant_Riet
from scaleup.correlate.validation import HeldOutVessel, scale_bias
from scaleup.errors import InputError

VOLUMES = {"V-20L": 0.02, "V-300L": 0.3, "V-3m3": 3.0}


def _campaign(seed=0, exponent=0.0, per_vessel=10, vessels=VOLUMES, classes=None):
    rng = np.random.default_rng(seed)
    k, pv, us, names, volume, coalescence = [], [], [], [], [], []
    for i, (name, v) in enumerate(vessels.items()):
        p = np.exp(rng.uniform(np.log(300.0), np.log(3000.0), per_vessel))
        u = np.exp(rng.uniform(np.log(0.003), np.log(0.02), per_vessel))
        k.append(kla_vant_Riet(p, u) * v**exponent * np.exp(rng.normal(0, 0.1, per_vessel)))
        pv.append(p)
        us.append(u)
        names += [name] * per_vessel
        volume += [v] * per_vessel
        coalescence += [classes[i] if classes else "coalescing"] * per_vessel
    return kla_observations(np.concatenate(k), gassed_power_per_volume_w_m3=np.concatenate(pv),
                            superficial_velocity_m_s=np.concatenate(us), vessel=names,
                            vessel_volume_m3=volume, coalescence=coalescence)


def test_folds_report_each_vessel_and_serialise():
    obs = _campaign()
    lovo = leave_one_vessel_out(fit_kla(obs, power_basis="gassed"), obs)
    assert [f.vessel for f in lovo.folds] == sorted(VOLUMES)
    for fold in lovo.folds:
        assert fold.n_runs == 10 and fold.error is None
        assert set(fold.parameters) == {"ln_C", "a_power", "b_gas_velocity"}
        assert 0 <= fold.within_20_fraction <= 1
    # the held-out vessel's volume lies outside the other two's range only at the ends
    by_name = {f.vessel: f for f in lovo.folds}
    assert by_name["V-20L"].extrapolated_fraction == 1.0
    assert by_name["V-300L"].extrapolated_fraction < 1.0
    assert lovo.pooled["rmse_log"] == pytest.approx(0.1, rel=0.5)
    assert json.dumps(lovo.to_dict())


def test_no_trend_when_there_is_no_scale_effect():
    obs = _campaign(seed=1)
    lovo = leave_one_vessel_out(fit_kla(obs, power_basis="gassed"), obs)
    assert not lovo.scale_bias.significant
    assert lovo.scale_bias.message.startswith("no significant scale trend")


def test_a_class_seen_in_one_vessel_only_cannot_be_predicted():
    obs = _campaign(classes=["coalescing", "coalescing", "non-coalescing"])
    result = fit_kla(obs, power_basis="gassed", medium_factor=True)
    lovo = leave_one_vessel_out(result, obs)
    failed = {f.vessel: f.error for f in lovo.folds if f.error}
    assert list(failed) == ["V-3m3"]
    assert any("could not be predicted" in m for m in lovo.messages)


def test_one_vessel_cannot_test_scaling():
    obs = _campaign(vessels={"V-20L": 0.02})
    lovo = leave_one_vessel_out(fit_kla(obs, power_basis="gassed"), obs)
    assert lovo.folds == () and "one vessel" in lovo.messages[0]
    bare = kla_observations(obs.response, gassed_power_per_volume_w_m3=obs.variables[
        "gassed_power_per_volume_w_m3"], superficial_velocity_m_s=obs.variables[
        "superficial_velocity_m_s"])
    with pytest.raises(InputError, match="vessel of each run"):
        leave_one_vessel_out(fit_kla(bare, power_basis="gassed"), bare)


def _fold(volume, bias, se):
    return HeldOutVessel("V", volume, 10, bias, se, 0.5, 0.1, 0.0, 0.2, 0.9, 0.0, {})


def test_scale_bias_slope_of_exact_biases():
    # biases exactly on a line of +0.1 per decade, tiny standard errors
    folds = [_fold(v, 0.1 * np.log10(v), 0.01) for v in (0.01, 0.1, 1.0, 10.0)]
    bias = scale_bias(folds)
    assert bias.slope_per_decade == pytest.approx(0.1, rel=1e-12)
    assert bias.significant and bias.dispersion == 1.0
    assert "rises by 11 % per tenfold volume" in bias.message
    # two vessel sizes: slope from the two points, with the caveat if not significant
    two = scale_bias([_fold(0.02, 0.0, 0.2), _fold(2.0, 0.1, 0.2)])
    assert two.slope_per_decade == pytest.approx(0.05)
    assert "little power" in two.message
    assert scale_bias([_fold(1.0, 0.1, 0.1)]) is None


def test_overdispersed_biases_widen_the_slope_error():
    scattered = [_fold(v, b, 0.01) for v, b in ((0.01, 0.2), (0.1, -0.2), (1.0, 0.2),
                                                (10.0, -0.1))]
    bias = scale_bias(scattered)
    assert bias.dispersion > 100
    assert not bias.significant


def test_comparison_table_ranks_the_true_correlation_first():
    obs = _campaign(seed=2, per_vessel=20)
    models = {"fitted": fit_kla(obs, power_basis="gassed"),
              "vant-riet-coalescing": kla_correlations["vant-riet-coalescing"],
              "vant-riet-noncoalescing": kla_correlations["vant-riet-noncoalescing"]}
    rows = compare_correlations(models, obs)
    assert [r["name"] for r in rows][-1] == "vant-riet-noncoalescing"
    truth = next(r for r in rows if r["name"] == "vant-riet-coalescing")
    assert abs(truth["mean_bias_fraction"]) < 0.05
    assert truth["within_20_fraction"] > 0.8
    # van't Riet states V < 2.6 m3 and 500 < Pg/V < 10000 W/m3
    inside = (obs.variables["vessel_volume_m3"] < 2.6) & (
        obs.variables["gassed_power_per_volume_w_m3"] >= 500.0)
    assert truth["n_in_domain"] == int(inside.sum()) < 40
    assert rows[0]["n_in_domain"] == 60
