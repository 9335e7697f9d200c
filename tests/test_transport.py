"""Transport basics: fluxes, Fick's law, kL models checked against exact solutions."""

from __future__ import annotations

import numpy as np
import pytest
from hypothesis import given, settings
from hypothesis import strategies as st
from scipy import integrate, special

from scaleup.errors import InputError, OutOfRange
from scaleup.props import transport as tr

D_O2 = 2.0e-9


def test_convective_fluxes_and_enthalpy_flux():
    W = tr.mass_flux_convective(997.0, 0.02)
    assert W == pytest.approx(19.94)
    assert tr.molar_flux_convective(0.25, 0.02) == pytest.approx(0.005)
    q = tr.heat_flux_convective(W, 4180.0, 310.15, 298.15)
    assert q == pytest.approx(19.94 * 4180.0 * 12.0)
    assert tr.heat_flux_convective(W, 4180.0, 298.15, 298.15) == 0.0


def test_fick_sign_convention_flux_runs_down_the_gradient():
    assert tr.flux_Fick(D_O2, -100.0) > 0
    assert tr.flux_Fick_film(D_O2, 0.2, 0.0, 1e-5) == pytest.approx(D_O2 * 0.2 / 1e-5)
    assert tr.flux_Fick_film(D_O2, 0.0, 0.2, 1e-5) < 0


def test_profile_flux_is_exact_for_a_linear_film_on_uneven_spacing():
    z = np.array([0.0, 1e-6, 4e-6, 9e-6, 2e-5])
    c = 0.24 * (1 - z / 2e-5)
    np.testing.assert_allclose(tr.flux_Fick_profile(D_O2, z, c), D_O2 * 0.24 / 2e-5,
                               rtol=1e-9)


def test_profile_flux_at_the_surface_of_an_unsteady_penetration_profile():
    # exact: c = c* erfc(z / (2 sqrt(D t))) gives J(0) = c* sqrt(D / (pi t))
    t, c_star = 0.05, 0.24
    z = np.linspace(0.0, 6 * np.sqrt(D_O2 * t), 4001)
    c = c_star * special.erfc(z / (2 * np.sqrt(D_O2 * t)))
    J = tr.flux_Fick_profile(D_O2, z, c)
    assert J[0] == pytest.approx(c_star * np.sqrt(D_O2 / (np.pi * t)), rel=1e-5)


def test_higbie_is_the_time_average_of_the_instantaneous_flux():
    # mean of sqrt(D / (pi t)) over 0..tc is 2 sqrt(D / (pi tc))
    tc = 0.02
    mean, _ = integrate.quad(lambda t: np.sqrt(D_O2 / (np.pi * t)), 0.0, tc)
    assert tr.kl_penetration_Higbie(D_O2, tc) == pytest.approx(mean / tc, rel=1e-8)


def test_danckwerts_is_the_age_average_of_the_instantaneous_flux():
    # surface ages exponentially distributed, psi(t) = s exp(-s t)
    s = 8.0
    mean, _ = integrate.quad(lambda t: s * np.exp(-s * t) * np.sqrt(D_O2 / (np.pi * t)),
                             0.0, np.inf)
    assert tr.kl_renewal_Danckwerts(D_O2, s) == pytest.approx(mean, rel=1e-7)


@given(st.floats(1e-10, 1e-8), st.floats(1e-6, 1e-2))
@settings(max_examples=50, deadline=None)
def test_model_parameters_invert(D, kl):
    assert tr.kl_film_Lewis_Whitman(D, tr.film_thickness(D, kl)) == pytest.approx(kl)
    assert tr.kl_penetration_Higbie(D, tr.contact_time_Higbie(D, kl)) == pytest.approx(kl)
    assert tr.kl_renewal_Danckwerts(D, tr.renewal_rate_Danckwerts(D, kl)) == pytest.approx(kl)


def test_mass_transfer_coefficient_from_flux():
    assert tr.mass_transfer_coefficient(2.4e-5, 0.24) == pytest.approx(1e-4)
    with pytest.raises(InputError, match="driving force is zero"):
        tr.mass_transfer_coefficient(1e-5, 0.0)


def test_convert_kl_o2_to_h2_bounds():
    r = tr.convert_kl(1.0e-4, 2.0e-9, 5.0e-9)
    assert r.film == pytest.approx(2.5e-4) and r.penetration == pytest.approx(1e-4 * 2.5 ** 0.5)
    assert (r.low, r.high) == (r.penetration, r.film)
    assert r.estimate == r.penetration
    slower = tr.convert_kl(1.0e-4, 5.0e-9, 2.0e-9)
    assert slower.low == slower.film and slower.high == slower.penetration


@given(st.floats(1e-6, 1.0), st.floats(1e-10, 1e-8), st.floats(1e-10, 1e-8),
       st.floats(0.5, 1.0))
@settings(max_examples=50, deadline=None)
def test_convert_kl_estimate_lies_in_its_range_and_round_trips(kl, D1, D2, n):
    r = tr.convert_kl(kl, D1, D2, exponent=n)
    assert r.low * (1 - 1e-12) <= r.estimate <= r.high * (1 + 1e-12)
    back = tr.convert_kl(r.estimate, D2, D1, exponent=n).estimate
    assert back == pytest.approx(kl, rel=1e-10)


@pytest.mark.parametrize("call, error, match", [
    (lambda: tr.convert_kl(1e-4, 2e-9, 4e-9, exponent=2.0), InputError, "exponent 2"),
    (lambda: tr.convert_kl(-1e-4, 2e-9, 4e-9), OutOfRange, "kl"),
    (lambda: tr.flux_Fick_film(D_O2, -0.1, 0.0, 1e-5), OutOfRange, "c_0"),
    (lambda: tr.kl_film_Lewis_Whitman(D_O2, 0.0), OutOfRange, "thickness"),
    (lambda: tr.flux_Fick_profile(D_O2, [0, 2e-5, 1e-5], [0.2, 0.1, 0.0]), InputError,
     "strictly increasing"),
    (lambda: tr.flux_Fick_profile(D_O2, [0, 1e-5], [0.2, 0.1]), InputError, "at least 3"),
    (lambda: tr.mass_flux_convective(-1.0, 0.1), OutOfRange, "density"),
])
def test_bad_input_gives_a_clear_message(call, error, match):
    with pytest.raises(error, match=match):
        call()
