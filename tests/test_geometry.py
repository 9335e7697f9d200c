"""Vessel and impeller geometry: volumes, inverse fill, validation, scaling."""

from __future__ import annotations

import math

import numpy as np
import pytest
from hypothesis import assume, given, settings
from hypothesis import strategies as st

from scaleup.errors import InputError
from scaleup.hydro.geometry import (
    Impeller,
    Sparger,
    Vessel,
    head_depth,
    liquid_height_for_volume,
    liquid_volume,
    scale_by_factor,
    scale_to_volume,
    standard_vessel,
)


def pilot(bottom: str = "flat") -> Vessel:
    return Vessel(0.3, 0.45, (Impeller("disc-turbine", 0.1, 0.1),
                              Impeller("pitched-blade-4", 0.1, 0.3)),
                  bottom=bottom, sparger=Sparger("ring", 0.05, 0.07), jacket_area=0.4,
                  jacket_bottom=0.0, jacket_top=0.4, coil_area=0.2, coil_bottom=0.05,
                  coil_top=0.35)


def test_flat_volume_is_a_cylinder():
    v = Vessel(2.0, 3.0)
    assert v.volume == pytest.approx(math.pi * 3.0, rel=1e-12)


def test_elliptical_volume_adds_the_head_below_the_tangent_line():
    T, H = 1.2, 1.5
    v = Vessel(T, H, bottom="elliptical")
    expected = math.pi * T ** 3 / 24 + math.pi * T ** 2 / 4 * (H - T / 4)
    assert v.volume == pytest.approx(expected, rel=1e-12)


def test_partly_filled_elliptical_head_is_a_spheroid_cap():
    # volume of a spheroid cap of height z: pi a^2 (z^2/b - z^3/(3 b^2)), a = T/2, b = T/4
    T, z = 1.0, 0.1
    v = Vessel(T, z, bottom="elliptical")
    a, b = T / 2, T / 4
    assert v.volume == pytest.approx(math.pi * a * a * (z * z / b - z ** 3 / (3 * b * b)))


@pytest.mark.parametrize("bottom", ["flat", "elliptical", "torispherical"])
def test_height_from_volume_inverts_volume_from_height(bottom):
    v = Vessel(1.5, 2.0, bottom=bottom)
    heights = np.array([0.01, 0.1, 0.25, v.head_depth, 0.5, 1.9])
    heights = heights[heights > 0]
    volumes = liquid_volume(v, heights)
    assert np.allclose(liquid_height_for_volume(v, volumes), heights, rtol=1e-9, atol=1e-12)


def test_volume_rises_with_height_for_every_bottom():
    for bottom in ("flat", "elliptical", "torispherical"):
        v = Vessel(1.0, 2.0, bottom=bottom)
        vol = liquid_volume(v, np.linspace(0.001, 2.0, 400))
        assert np.all(np.diff(vol) > 0)


def test_head_depths():
    assert head_depth(2.0, "flat") == 0.0
    assert head_depth(2.0, "elliptical") == pytest.approx(0.5)
    # ASME F&D (f = 1, k = 0.06): 0.1693 D (standard head dimensions, from memory)
    assert head_depth(1.0, "torispherical", 1.0, 0.06) == pytest.approx(0.1693, abs=1e-4)


def test_impellers_are_kept_bottom_first_and_spacings_derived():
    v = Vessel(1.0, 2.0, (Impeller("pitched-blade-4", 0.4, 1.2),
                          Impeller("disc-turbine", 0.4, 0.3)))
    assert [i.type for i in v.impellers] == ["disc-turbine", "pitched-blade-4"]
    assert v.spacings == pytest.approx((0.9,))


def test_impeller_defaults_come_from_the_catalogue():
    imp = Impeller("disc-turbine", 0.2, 0.2)
    assert imp.blades == 6
    assert imp.blade_width == pytest.approx(0.04)


@pytest.mark.parametrize("make,field", [
    (lambda: Vessel(0.3, 0.3, (Impeller("disc-turbine", 0.3, 0.1),)), "impeller diameter"),
    (lambda: Vessel(0.3, 0.3, (Impeller("disc-turbine", 0.35, 0.1),)), "impeller diameter"),
    (lambda: Vessel(0.3, 0.3, (Impeller("disc-turbine", 0.1, 0.31),)), "impeller clearance"),
    (lambda: Impeller("disc-turbine", 0.1, -0.1), "impeller clearance"),
    (lambda: Impeller("disc-turbine", -0.1, 0.1), "impeller diameter"),
    (lambda: Vessel(-1.0, 1.0), "tank diameter"),
    (lambda: Vessel(1.0, 0.0), "liquid height"),
    (lambda: Vessel(1.0, 1.0, bottom="conical"), "bottom"),
    (lambda: Vessel(1.0, 1.0, baffles=-1), "baffles"),
    (lambda: Vessel(1.0, 1.0, sparger=Sparger("ring", 1.2)), "sparger height"),
    (lambda: Vessel(1.0, 1.0, jacket_area=2.0, jacket_bottom=0.5, jacket_top=0.2),
     "jacket height"),
])
def test_impossible_geometry_is_refused_with_the_field_named(make, field):
    with pytest.raises(InputError) as err:
        make()
    assert err.value.field == field


def test_d_not_below_t_message_names_both_diameters():
    with pytest.raises(InputError, match="0.3 m is not smaller than the tank diameter 0.3 m"):
        Vessel(0.3, 0.3, (Impeller("disc-turbine", 0.3, 0.1),))


def test_unknown_impeller_type_lists_known_types():
    with pytest.raises(InputError, match="known types: disc-turbine, concave-disc-turbine"):
        Impeller("turbo-9000", 0.1, 0.1)


def test_wetted_heat_transfer_areas_follow_the_liquid_level():
    v = pilot()
    assert v.wetted_jacket_area() == pytest.approx(0.4)  # fully covered: H = 0.45 > 0.4
    assert v.wetted_jacket_area(0.2) == pytest.approx(0.2)
    assert v.wetted_coil_area(0.2) == pytest.approx(0.2 * 0.15 / 0.30)
    assert v.wetted_coil_area(0.01) == 0.0


@pytest.mark.parametrize("bottom", ["flat", "elliptical", "torispherical"])
def test_geometric_scaling_keeps_every_ratio(bottom):
    small = pilot(bottom)
    big = scale_to_volume(small, 20.0)
    assert big.volume == pytest.approx(20.0, rel=1e-9)
    s = big.tank_diameter / small.tank_diameter
    assert big.aspect_ratio == pytest.approx(small.aspect_ratio)
    for a, b in zip(small.impellers, big.impellers, strict=True):
        assert b.diameter / big.T == pytest.approx(a.diameter / small.T)
        assert b.clearance / big.T == pytest.approx(a.clearance / small.T)
        assert b.blade_width / b.diameter == pytest.approx(a.blade_width / a.diameter)
    assert big.sparger.height == pytest.approx(small.sparger.height * s)
    assert big.jacket_area == pytest.approx(small.jacket_area * s * s)
    assert big.head_pressure == small.head_pressure


@settings(max_examples=40, deadline=None)
@given(st.floats(0.01, 500.0), st.sampled_from(["flat", "elliptical", "torispherical"]))
def test_scale_up_then_down_is_the_identity(volume, bottom):
    small = pilot(bottom)
    back = scale_to_volume(scale_to_volume(small, volume), small.volume)
    assert back.tank_diameter == pytest.approx(small.tank_diameter, rel=1e-9)
    assert back.liquid_height == pytest.approx(small.liquid_height, rel=1e-9)
    for a, b in zip(small.impellers, back.impellers, strict=True):
        assert b.diameter == pytest.approx(a.diameter, rel=1e-9)
        assert b.clearance == pytest.approx(a.clearance, rel=1e-9)
    assert back.coil_top == pytest.approx(small.coil_top, rel=1e-9)


@settings(max_examples=30, deadline=None)
@given(st.floats(0.1, 200.0), st.floats(1.0, 3.0), st.floats(0.25, 0.5))
def test_non_similar_scaling_meets_the_explicit_targets(volume, h_t, d_t):
    # the pilot's top impeller sits 2 D above the bottom one, at C = T/3; right at the
    # boundary the test's arithmetic and the code's may round to opposite sides
    assume(abs(1 / 3 + 2 * d_t - h_t) > 1e-9)
    if 1 / 3 + 2 * d_t >= h_t:
        with pytest.raises(InputError, match="above the liquid"):
            scale_to_volume(pilot("torispherical"), volume, aspect_ratio=h_t, impeller_ratio=d_t)
        return
    big = scale_to_volume(pilot("torispherical"), volume, aspect_ratio=h_t, impeller_ratio=d_t)
    assert big.volume == pytest.approx(volume, rel=1e-9)
    assert big.aspect_ratio == pytest.approx(h_t, rel=1e-9)
    assert all(i.diameter / big.T == pytest.approx(d_t) for i in big.impellers)
    # the bottom impeller keeps its C/T, the spacing keeps its ratio to D
    small = pilot()
    assert big.impellers[0].clearance / big.T == pytest.approx(small.impellers[0].clearance
                                                               / small.T)
    assert big.spacings[0] / big.impellers[0].diameter == pytest.approx(
        small.spacings[0] / small.impellers[0].diameter)


def test_non_similar_scaling_refuses_an_impeller_above_the_liquid():
    tall = standard_vessel(1.0, count=3)  # impellers at T/3, 4T/3, 7T/3 in H = 3T
    with pytest.raises(InputError, match="above the liquid"):
        scale_to_volume(tall, 10.0, aspect_ratio=1.2)


def test_scaling_refuses_a_fill_inside_the_head():
    with pytest.raises(InputError, match="inside the bottom head"):
        scale_to_volume(Vessel(1.0, 1.0, bottom="elliptical"), 5.0, aspect_ratio=0.2)


def test_scale_by_factor_scales_areas_by_the_square():
    v = scale_by_factor(pilot(), 3.0)
    assert v.coil_area == pytest.approx(0.2 * 9)
    assert v.baffle_width == pytest.approx(0.03 * 3)


def test_standard_vessel_layout():
    v = standard_vessel(3.0, count=2)
    assert v.liquid_height == pytest.approx(6.0)
    assert [i.clearance for i in v.impellers] == pytest.approx([1.0, 4.0])
    assert v.baffle_width == pytest.approx(0.3)
