"""Model forms, per-run data checks, the published catalogue and domains."""

import inspect
import json
import re

import numpy as np
import pytest

from scaleup.correlate import film, published
from scaleup.correlate.domain import Domain, domain_from_runs, stated_domain
from scaleup.correlate.models import (
    DENSITY,
    GAS_VELOCITY,
    GASSED_PV,
    UNGASSED_PV,
    VISCOSITY,
    ModelForm,
    kla_observations,
    sherwood_observations,
)
from scaleup.errors import InputError, OutOfRange
from scaleup.units import G

POINTS = {GASSED_PV: np.array([500.0, 2000.0]), GAS_VELOCITY: np.array([0.005, 0.02]),
          VISCOSITY: np.array([1e-3, 2e-3]), DENSITY: np.array([1000.0, 1050.0]),
          "coalescence": np.array(["coalescing", "non-coalescing"])}


def test_power_law_design_is_logs_of_the_variables():
    X, offset = ModelForm("kla-power-law", viscosity_term=True).design(POINTS)
    np.testing.assert_allclose(X[:, 1], np.log(POINTS[GASSED_PV]), rtol=1e-15)
    np.testing.assert_allclose(X[:, 2], np.log(POINTS[GAS_VELOCITY]), rtol=1e-15)
    np.testing.assert_allclose(X[:, 3], np.log(POINTS[VISCOSITY]), rtol=1e-15)
    assert np.all(X[:, 0] == 1.0) and np.all(offset == 0.0)


def test_ungassed_basis_reads_the_ungassed_power():
    form = ModelForm("kla-power-law", power_basis="ungassed")
    with pytest.raises(InputError, match=UNGASSED_PV):
        form.design(POINTS)
    X, _ = form.design({**POINTS, UNGASSED_PV: np.array([800.0, 3000.0])})
    np.testing.assert_allclose(X[:, 1], np.log([800.0, 3000.0]))


def test_dimensionless_groups_by_hand():
    form = ModelForm("kla-dimensionless")
    X, _ = form.design(POINTS)
    nu = POINTS[VISCOSITY] / POINTS[DENSITY]
    pv_star = POINTS[GASSED_PV] / (POINTS[DENSITY] * (nu * G**4) ** (1 / 3))
    us_star = POINTS[GAS_VELOCITY] / (nu * G) ** (1 / 3)
    np.testing.assert_allclose(X[:, 1], np.log(pv_star), rtol=1e-13)
    np.testing.assert_allclose(X[:, 2], np.log(us_star), rtol=1e-13)
    kla = np.array([0.03, 0.08])
    z = form.transform(kla, POINTS)
    np.testing.assert_allclose(np.exp(z), kla * (nu / G**2) ** (1 / 3), rtol=1e-13)
    np.testing.assert_allclose(form.untransform(z, POINTS), kla, rtol=1e-13)


def test_fixed_exponent_moves_into_the_offset():
    form = ModelForm("sherwood", plus_two=True, fixed=(("c_schmidt", 1 / 3),))
    points = {"reynolds": np.array([10.0, 100.0]), "schmidt": np.array([500.0, 800.0])}
    X, offset = form.design(points)
    assert form.parameter_names == ("ln_A", "b_reynolds")
    assert X.shape == (2, 2)
    np.testing.assert_allclose(offset, np.log(points["schmidt"]) / 3)
    sh = np.array([20.0, 60.0])
    np.testing.assert_allclose(form.untransform(form.transform(sh, points), points), sh)
    with pytest.raises(OutOfRange, match="above 2"):
        form.transform(np.array([1.5, 30.0]), points)


def test_medium_factor_columns_and_unknown_class():
    form = ModelForm("kla-power-law").with_classes(np.array(["non-coalescing", "coalescing"]))
    assert form.medium_classes == ("coalescing", "non-coalescing")
    assert form.parameter_names[-1] == "ln_factor_non-coalescing"
    X, _ = form.design(POINTS)
    np.testing.assert_array_equal(X[:, -1], [0.0, 1.0])
    with pytest.raises(InputError, match="not in the fitted data"):
        form.design({**POINTS, "coalescence": np.array(["foaming", "coalescing"])})


def test_form_round_trips_through_json():
    form = ModelForm("kla-power-law", "ungassed", True, ("coalescing", "non-coalescing"),
                     fixed=(("b_gas_velocity", 0.5),))
    assert ModelForm.from_dict(json.loads(json.dumps(form.to_dict()))) == form


def test_form_refuses_unknown_names():
    with pytest.raises(InputError, match="unknown form"):
        ModelForm("kla-cubic")
    with pytest.raises(InputError, match="not a parameter"):
        ModelForm("sherwood", fixed=(("a_power", 1.0),))
    with pytest.raises(InputError, match="every parameter is fixed"):
        ModelForm("sherwood", fixed=(("ln_A", 0.0), ("b_reynolds", 0.5), ("c_schmidt", 0.3)))


def test_observations_name_the_bad_run():
    with pytest.raises(OutOfRange, match="run R-7") as info:
        kla_observations([0.02, -0.01], gassed_power_per_volume_w_m3=[500, 600],
                         superficial_velocity_m_s=[0.01, 0.01], run_id=["R-6", "R-7"])
    assert info.value.field == "kla_per_s"
    with pytest.raises(InputError, match="2 values but there are 3 runs"):
        kla_observations([0.02, 0.03, 0.04], gassed_power_per_volume_w_m3=[500, 600],
                         superficial_velocity_m_s=[0.01, 0.01, 0.02])
    with pytest.raises(InputError, match="gassed or the ungassed"):
        kla_observations([0.02], superficial_velocity_m_s=[0.01])
    obs = sherwood_observations([20.0, 30.0], reynolds=[10, 40], schmidt=[500, 500],
                                vessel=["A", "B"])
    assert obs.subset(np.array([False, True])).response.tolist() == [30.0]


def test_every_catalogue_entry_evaluates_and_describes_itself():
    kla_points = {GASSED_PV: np.array([1000.0]), GAS_VELOCITY: np.array([0.01])}
    for key, entry in published.kla_correlations.items():
        value = entry.predict(kla_points)[0]
        assert 0.005 < value < 0.5, key  # every kLa correlation gives a kLa of 1/s order
        assert json.dumps(entry.describe())
    sh_points = {"reynolds": np.array([100.0]), "schmidt": np.array([500.0])}
    for entry in published.sherwood_correlations.values():
        assert 40 < entry.predict(sh_points)[0] < 60


def test_constants_recorded_from_memory_say_so():
    # the flag drives the CLI's "check the source" warning; the note is what people read
    registries = (published.kla_correlations, published.sherwood_correlations,
                  published.kl_correlations)
    flagged = {k for r in registries for k, e in r.items() if e.from_memory}
    assert flagged == {"smith-1977", "linek-1987", "nocentini-1993", "zhu-2001"}
    for registry in registries:
        for key, entry in registry.items():
            assert ("from memory" in entry.note) or not entry.from_memory, key


def test_calderbank_large_bubbles_transfer_faster_than_small():
    # Calderbank and Moo-Young (1961): mobile surfaces (large bubbles) give several times
    # the kL of rigid ones; here Sc = 500 gives 0.42/0.31 * 500**(1/6) = 3.8
    ratio = film.kl_Calderbank_Moo_Young_large(1e-3, 1000.0, 2e-9) / \
        film.kl_Calderbank_Moo_Young_small(1e-3, 1000.0, 2e-9)
    assert ratio == pytest.approx(0.42 / 0.31 * 500 ** (1 / 6), rel=1e-12)


def test_lamont_scott_scales_with_dissipation_to_the_quarter():
    k1 = film.kl_Lamont_Scott(0.1, 1e-6, 2e-9)
    k16 = film.kl_Lamont_Scott(1.6, 1e-6, 2e-9)
    assert k16 / k1 == pytest.approx(2.0, rel=1e-12)


def test_method_lister_and_dispatchers():
    assert "vant-riet-coalescing" in published.kla_methods(1000.0, 0.01, 1.0, "coalescing")
    assert "vant-riet-coalescing" not in published.kla_methods(20000.0, 0.01)
    assert published.kla_methods(check_ranges=False) == list(published.kla_correlations)
    with pytest.raises(ValueError, match="unknown kLa method"):
        published.kla(1000.0, 0.01, method="nobody-2020")
    with pytest.raises(ValueError, match="unknown Sherwood method"):
        published.sherwood(100.0, 500.0, method="nobody")
    with pytest.raises(InputError, match="unknown published"):
        published.published_correlation("nobody")


_CORRELATION = re.compile(r"^(kla|kl|sherwood)_\w*[A-Z]")


@pytest.mark.parametrize("function", [
    f for module in (published, film) for name, f in inspect.getmembers(module,
                                                                        inspect.isfunction)
    if _CORRELATION.match(name) and f.__module__ == module.__name__])
def test_correlation_docstrings_give_every_parameter_a_unit(function):
    doc = inspect.getdoc(function)
    for section in ("Parameters", "Returns", "Notes", "Examples", "References", ".. math::"):
        assert section in doc, (function.__name__, section)
    params = doc.split("Parameters\n----------\n")[1].split("\n\n")[0].split("Returns")[0]
    for name in inspect.signature(function).parameters:
        block = re.search(rf"^(\w+, )*{name}( ,\w+)*\b.*?:.*?\n((?:    .*\n?)+)", params,
                          re.MULTILINE)
        assert block and re.search(r"\[[^\]]*\]", block.group(3)), (function.__name__, name)
    returns = doc.split("Returns\n-------\n")[1].split("\n\n")[0]
    assert re.search(r"\[[^\]]*\]", returns), function.__name__


def test_domain_flags_ranges_and_joint_extrapolation():
    # runs along a diagonal: both high or both low
    x = np.array([1.0, 2.0, 4.0, 8.0, 16.0])
    domain = domain_from_runs({"x": x, "y": x * np.array([1.0, 1.1, 0.9, 1.05, 1.0])},
                              {"coalescence": np.array(["coalescing"] * 5)})
    inside = domain.check({"x": [4.0], "y": [4.0], "coalescence": ["coalescing"]})
    assert not inside.extrapolated[0]
    corner = domain.check({"x": [16.0], "y": [1.0]})  # each in range, jointly far
    assert corner.extrapolated[0] and corner.distance_ratio[0] > 1
    assert corner.range_factor["x"][0] == 1.0
    beyond = domain.check({"x": [64.0], "y": [16.0]})
    assert beyond.range_factor["x"][0] == pytest.approx(4.0)
    assert "4 times beyond" in beyond.messages()[0][0]
    other = domain.check({"x": [4.0], "y": [4.0], "coalescence": ["non-coalescing"]})
    assert other.extrapolated[0]
    assert domain.check({"x": [4.0]}).unchecked == ("y", "coalescence")
    assert Domain.from_dict(json.loads(json.dumps(domain.to_dict()))) == domain


def test_stated_domain_open_bounds():
    domain = stated_domain(vessel_volume_m3=(None, 2.6))
    result = domain.check({"vessel_volume_m3": [0.001, 5.2]})
    assert result.extrapolated.tolist() == [False, True]
    assert result.range_factor["vessel_volume_m3"][1] == pytest.approx(2.0)


def test_runs_to_observations_a_column_at_a_time():
    from scaleup.correlate.runs import kla_observations_from_columns, kla_observations_from_runs

    rows = [
        {"id": 1, "kla_per_s": 0.02, "gassed_power_per_volume_w_m3": 500.0,
         "superficial_gas_velocity_m_s": 0.005, "kla_stderr_per_s": 0.001, "vessel": "A",
         "coalescence": "coalescing", "viscosity_pa_s": 1e-3},
        {"id": 2, "kla_per_s": None, "gassed_power_per_volume_w_m3": 0.0,
         "superficial_gas_velocity_m_s": 0.005, "vessel": "A"},
        {"id": 3, "kla_per_s": 0.05, "gassed_power_per_volume_w_m3": 2000.0,
         "superficial_gas_velocity_m_s": 0.01, "kla_stderr_per_s": float("nan"),
         "vessel": "B", "coalescence": "coalescing", "viscosity_pa_s": 1e-3},
    ]
    obs, skipped = kla_observations_from_runs(rows)
    assert skipped == ["run 2: no kla_per_s or gassed_power_per_volume_w_m3"]
    assert obs.run_id.tolist() == [1, 3] and obs.vessel.tolist() == ["A", "B"]
    np.testing.assert_array_equal(obs.response, [0.02, 0.05])
    np.testing.assert_array_equal(obs.response_stderr, [0.001, 0.0])  # NaN stderr: none
    assert VISCOSITY in obs.variables and UNGASSED_PV not in obs.variables  # not in every run
    assert obs.categories["coalescence"].tolist() == ["coalescing", "coalescing"]
    columns = {k: [r.get(k) for r in rows] for k in {k for r in rows for k in r}}
    again, skipped_again = kla_observations_from_columns(columns)
    assert skipped_again == skipped
    np.testing.assert_array_equal(again.variables[GASSED_PV], obs.variables[GASSED_PV])
    with pytest.raises(InputError, match="2 run"):
        kla_observations_from_runs(rows[1:2] * 2)
    with pytest.raises(InputError, match="the selection is empty"):
        kla_observations_from_columns({})
