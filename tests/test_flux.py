"""Flux measurements: kL, film thickness and the groups, checked against fluids.core."""

from __future__ import annotations

import pytest

from scaleup.errors import InputError
from scaleup.measure.flux import (
    analyse_flux,
    film_thickness_Whitman,
    kl_from_flux,
    reynolds,
    schmidt,
    sherwood,
)


def test_groups_match_the_fluids_library():
    from fluids.core import Reynolds, Schmidt, Sherwood

    # fluids (Bell, Caleb; general-purpose reference library): same definitions
    assert reynolds(0.2, 0.003, 998.0, 1.0e-3) == pytest.approx(
        Reynolds(V=0.2, D=0.003, rho=998.0, mu=1.0e-3), rel=1e-12)
    assert schmidt(1.0e-3, 998.0, 2.0e-9) == pytest.approx(
        Schmidt(D=2.0e-9, mu=1.0e-3, rho=998.0), rel=1e-12)
    assert sherwood(1e-4, 0.003, 2e-9) == pytest.approx(Sherwood(K=1e-4, L=0.003, D=2e-9),
                                                        rel=1e-12)


def test_kl_and_film_thickness_are_consistent():
    kl = kl_from_flux(3e-5, 0.26, 0.06)
    assert kl == pytest.approx(1.5e-4)
    delta = film_thickness_Whitman(2.1e-9, kl)
    assert delta * kl == pytest.approx(2.1e-9)
    assert sherwood(kl, delta, 2.1e-9) == pytest.approx(1.0)  # Sh on the film thickness is 1


def test_analysis_from_rate_and_area_gives_every_group():
    r = analyse_flux(rate=3e-9, area=2e-5, c_interface=0.26, c_bulk=0.06, D=2.1e-9,
                     L=0.004, V=0.22, rho=997.0, mu=0.89e-3)
    assert r.flux_mol_m2_s == pytest.approx(1.5e-4)
    assert r.kl_m_s == pytest.approx(7.5e-4)
    assert r.sherwood == pytest.approx(7.5e-4 * 0.004 / 2.1e-9)
    assert r.reynolds == pytest.approx(997.0 * 0.22 * 0.004 / 0.89e-3)
    assert r.schmidt == pytest.approx(0.89e-3 / (997.0 * 2.1e-9))
    bare = analyse_flux(flux=1e-5, c_interface=0.26, c_bulk=0.06, D=2e-9)
    assert bare.sherwood is None and bare.reynolds is None and bare.schmidt is None


def test_desorption_flux_with_a_negative_driving_force_is_fine():
    assert kl_from_flux(-2e-5, 0.05, 0.25) == pytest.approx(1e-4)


@pytest.mark.parametrize("kwargs,words", [
    ({"flux": 1e-5, "c_interface": 0.2, "c_bulk": 0.2, "D": 2e-9}, "no driving force"),
    ({"flux": -1e-5, "c_interface": 0.2, "c_bulk": 0.0, "D": 2e-9}, "against"),
    ({"c_interface": 0.2, "c_bulk": 0.0, "D": 2e-9}, "give the flux"),
    ({"rate": 1e-9, "area": 0.0, "c_interface": 0.2, "c_bulk": 0.0, "D": 2e-9}, "area"),
])
def test_refusals(kwargs, words):
    with pytest.raises(InputError, match=words):
        analyse_flux(**kwargs)
