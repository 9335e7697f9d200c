"""Dynamic method: OUR from the fall, kLa from the recovery, C* from both."""

from __future__ import annotations

import numpy as np
import pytest

from scaleup.measure.curves import CurveRejected
from scaleup.measure.dynamic import fit_dynamic


def culture(t, *, k=0.02, our=0.4, c_star=100.0, off=120.0, on=220.0):
    """DO of a respiring culture: steady, gas off (falls at OUR), gas on (first-order recovery)."""
    c_ss = c_star - our / k
    low = c_ss - our * (on - off)
    fall = c_ss - our * np.clip(t - off, 0.0, None)
    rise = c_ss - (c_ss - low) * np.exp(-k * np.clip(t - on, 0.0, None))
    return np.where(t < on, fall, rise)


def test_noisy_test_gives_kla_our_and_c_star():
    rng = np.random.default_rng(6)
    t = np.arange(0.0, 700.0, 0.5)
    d = fit_dynamic(t, culture(t) + rng.normal(0.0, 0.3, t.size))
    assert d.kla_per_s == pytest.approx(0.02, abs=4 * d.kla_stderr_per_s)
    assert d.our_per_s == pytest.approx(0.4, abs=4 * d.our_stderr_per_s)
    assert d.c_star == pytest.approx(100.0, abs=4 * d.c_star_stderr)
    assert d.c_steady == pytest.approx(80.0, abs=0.5)
    assert 117.0 <= d.gas_off_s <= 123.0 and 218.0 <= d.gas_on_s <= 222.0
    assert any("constant" in w for w in d.warnings)


def test_given_c_star_gives_a_second_our_estimate():
    t = np.arange(0.0, 700.0, 0.5)
    d = fit_dynamic(t, culture(t), gas_on_s=220.0, c_star=100.0)
    assert d.our_from_c_star_per_s == pytest.approx(0.4, rel=1e-6)
    d = fit_dynamic(t, culture(t), gas_on_s=220.0, c_star=120.0)
    assert any("differ by more than 20 %" in w for w in d.warnings)


def test_probe_lag_is_modelled_in_the_recovery():
    t = np.arange(0.0, 900.0, 0.5)
    on, k, tau = 220.0, 0.02, 8.0
    c = culture(t, k=k, on=on)
    rise = t >= on
    s = t[rise] - on
    c_ss, low = 80.0, 80.0 - 0.4 * 100.0
    c[rise] = c_ss - (c_ss - low) * (np.exp(-k * s) - k * tau * np.exp(-s / tau)) / (1 - k * tau)
    d = fit_dynamic(t, c, gas_on_s=on, tau_p_s=tau)
    assert d.kla_per_s == pytest.approx(k, rel=1e-6)


@pytest.mark.parametrize("c,words", [
    (np.linspace(10.0, 90.0, 400), "no fall followed by a rise"),
    (np.full(400, 50.0), "no fall followed by a rise"),
])
def test_records_without_a_dynamic_test_are_rejected(c, words):
    with pytest.raises(CurveRejected, match=words):
        fit_dynamic(np.arange(400.0), c)
