"""Sulfite oxidation: stoichiometry, rate from samples, caveats, refusals."""

from __future__ import annotations

import math

import numpy as np
import pytest

from scaleup.errors import InputError
from scaleup.measure.sulfite import (
    CAVEATS,
    otr_sulfite,
    sulfite_oxidation,
    sulfite_rate_from_samples,
)


def test_one_mole_of_oxygen_per_two_of_sulfite():
    # 2 SO3(2-) + O2 -> 2 SO4(2-): exact stoichiometry
    assert otr_sulfite(0.2) == pytest.approx(0.1)
    assert np.allclose(otr_sulfite(np.array([0.1, 0.4])), [0.05, 0.2])


def test_rate_from_samples_recovers_a_linear_fall():
    rng = np.random.default_rng(2)
    t = np.arange(0.0, 3600.0, 300.0)
    conc = 500.0 - 0.05 * t + rng.normal(0.0, 0.5, t.size)
    rate, se, n = sulfite_rate_from_samples(t, conc)
    assert n == t.size
    assert rate == pytest.approx(0.05, abs=4 * se)
    assert 0 < se < 0.001


def test_result_carries_the_caveats_and_kla_when_c_star_is_given():
    r = sulfite_oxidation(t_s=[0, 600, 1200, 1800], sulfite=[500, 470, 440, 410], c_star=0.2)
    assert r.otr_mol_m3_s == pytest.approx(0.025)
    assert r.kla_per_s == pytest.approx(0.125)
    assert r.caveats == CAVEATS
    assert any("catalyst" in c for c in r.caveats)
    assert any("non-coalescing" in c for c in r.caveats)
    assert any("not a broth value" in c for c in r.caveats)


def test_two_samples_give_a_rate_but_warn():
    r = sulfite_oxidation(t_s=[0, 600], sulfite=[500, 470])
    assert r.otr_mol_m3_s == pytest.approx(0.025)
    assert math.isnan(r.otr_stderr_mol_m3_s) and r.warnings


@pytest.mark.parametrize("kwargs,words", [
    ({}, "either"),
    ({"sulfite_rate": 0.1, "t_s": [0, 1], "sulfite": [1, 0]}, "either"),
    ({"sulfite_rate": -0.1}, "not positive"),
    ({"t_s": [0, 600], "sulfite": [400, 450]}, "not positive"),
    ({"t_s": [0], "sulfite": [400]}, "at least two"),
])
def test_refusals_say_why(kwargs, words):
    with pytest.raises(InputError, match=words):
        sulfite_oxidation(**kwargs)
