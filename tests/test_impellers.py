"""The impeller catalogue: complete, consistent, cited, generic."""

from __future__ import annotations

import re

import pytest

from scaleup.errors import InputError
from scaleup.hydro.impellers import CATALOGUE, impeller_type, impeller_types
from scaleup.hydro.power import power_number_curve

REQUIRED_TYPES = ("disc-turbine", "concave-disc-turbine", "pitched-blade-4", "pitched-blade-6",
                  "hydrofoil-narrow", "hydrofoil-wide", "marine-propeller", "anchor",
                  "helical-ribbon")


def test_the_catalogue_holds_every_generic_type_of_the_issue():
    assert set(REQUIRED_TYPES) <= set(impeller_types())


@pytest.mark.parametrize("type_id", list(CATALOGUE))
def test_entries_are_physically_consistent(type_id):
    t = CATALOGUE[type_id]
    lo, hi = t.power_number_range
    assert lo <= t.power_number <= hi
    assert t.kp > 0 and 0 < t.re_laminar < t.re_turbulent
    # the laminar line lies above the plateau where it ends, so the curve falls monotonically
    assert t.kp / t.re_laminar > t.power_number
    assert 0 < t.blade_width_ratio < 1 and t.blades >= 2
    assert t.gassed in ("Cui", "linear", "none")
    assert 0.0 <= t.gassed_floor <= 1.0
    assert t.flooding in ("valid", "conservative", "outside")
    assert t.flow_number is None or 0.2 < t.flow_number < 1.5
    if t.np_transitional is not None:
        re_mid, np_mid = t.np_transitional
        assert t.re_laminar < re_mid < t.re_turbulent and np_mid > 0
        assert "np_transitional" in t.sources


@pytest.mark.parametrize("type_id", list(CATALOGUE))
def test_every_number_names_its_source(type_id):
    sources = CATALOGUE[type_id].sources
    for key in ("power_number", "kp", "gassed", "re_limits"):
        assert len(sources.get(key, "")) > 10, f"{type_id}: no source for {key}"
    for key, text in sources.items():
        # a citation has a year, or says plainly that it has none or is undated
        assert re.search(r"\(?(19|20)\d\d\)?|no source|assumed|undated", text), (type_id, key)


def test_ids_are_generic_words():
    # rule 1 of the project: generic types only (lowercase words, digits for blade counts)
    for type_id, t in CATALOGUE.items():
        assert re.fullmatch(r"[a-z]+(-[a-z0-9]+)*", type_id)
        assert t.id == type_id


def test_radial_turbines_draw_more_power_than_axial_impellers():
    # common practice, no source: disc turbine > pitched blade > hydrofoil
    np_ = {k: CATALOGUE[k].power_number for k in CATALOGUE}
    assert np_["disc-turbine"] > np_["concave-disc-turbine"] > np_["pitched-blade-6"]
    assert np_["pitched-blade-6"] > np_["pitched-blade-4"] > np_["hydrofoil-narrow"]


def test_unknown_type_lists_the_known_ones():
    with pytest.raises(InputError) as err:
        impeller_type("paddle-x")
    for type_id in REQUIRED_TYPES:
        assert type_id in str(err.value)
    assert err.value.field == "impeller"


def test_measured_power_number_overrides_the_catalogue():
    assert power_number_curve(1e6, "disc-turbine", np_turbulent=5.6) == pytest.approx(5.6)
    assert power_number_curve(1e6, "disc-turbine") == pytest.approx(5.0)
