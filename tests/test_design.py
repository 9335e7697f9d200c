"""Duty-driven design: the optimum meets the duty and beats every feasible grid point."""

from __future__ import annotations

import numpy as np
import pytest

from scaleup.errors import InputError
from scaleup.hydro.geometry import scale_to_volume, standard_vessel
from scaleup.scaling import compression
from scaleup.scaling.correlation import KlaModel
from scaleup.scaling.design import design
from scaleup.scaling.evaluate import Limits, Liquid, Process, evaluate
from scaleup.scaling.oxygen import otr_capacity

WATER_30C = Liquid(303.15, 995.65, 0.797e-3, 0.0712)
MODEL = KlaModel.from_published("vant-riet-coalescing")
VESSEL = scale_to_volume(standard_vessel(1.0, count=2, aspect_ratio=2.0), 40.0)
LIMITS = Limits(max_tip_speed=7.0, min_flooding_margin=0.2)


@pytest.fixture(scope="module", params=[0.5, 0.9])
def solved(request):
    process = Process(our=40 / 3600, confidence=request.param)
    return process, design(VESSEL, WATER_30C, process, MODEL, LIMITS, grid=(30, 30),
                           risk_draws=20_000, map_draws=500)


def test_optimum_is_feasible_and_meets_the_duty(solved):
    process, d = solved
    assert d.feasible
    ev = evaluate(VESSEL, d.speed, d.gas_flow, WATER_30C, process, MODEL, LIMITS)
    assert bool(ev.feasible())
    # OTR capacity at the design kLa (median or the confidence quantile) covers the duty
    cap = otr_capacity(ev.kla_design, VESSEL.volume, d.gas_flow, ev.solubility, ev.c_liquid)
    assert float(cap.otr) >= process.our * (1 - 1e-6)
    assert "duty" in d.binding


def test_no_feasible_grid_point_has_lower_total_power(solved):
    _, d = solved
    w = d.window
    assert w.feasible.any()
    best_grid = np.min(np.where(w.feasible, w.total_power, np.inf))
    assert float(d.evaluation.total_power) <= best_grid * (1 + 1e-9)


def test_total_power_is_agitator_plus_compressor(solved):
    process, d = solved
    ev = d.evaluation
    assert float(ev.agitator_power) == pytest.approx(
        float(ev.op.gassed_power) / process.drive_efficiency, rel=1e-12)
    assert float(ev.compressor_power) == pytest.approx(float(compression.gas_compression_power(
        VESSEL, d.gas_flow, WATER_30C.density)), rel=1e-12)
    assert float(ev.total_power) == pytest.approx(float(ev.agitator_power)
                                                  + float(ev.compressor_power), rel=1e-12)


def test_probability_at_the_optimum_matches_the_confidence(solved):
    process, d = solved
    # the duty binds at the kLa the new vessel reaches with the chosen probability
    assert d.risk.probability == pytest.approx(process.confidence, abs=4 * d.risk.standard_error
                                               + 2e-3)


def test_probability_map_is_higher_where_feasible(solved):
    _, d = solved
    w = d.window
    assert w.probability.shape == w.feasible.shape
    assert np.all(w.probability[w.margins["duty"] > 0.3] > 0.5)


def test_infeasible_design_names_the_limit():
    process = Process(our=40 / 3600)
    d = design(VESSEL, WATER_30C, process, MODEL, Limits(max_tip_speed=2.0), grid=(12, 12),
               risk_draws=0, map_draws=0)
    assert not d.feasible and d.evaluation is None
    assert any(text.startswith("duty") or "tip speed" in text for text in d.infeasibility)


def test_deeply_flooded_points_keep_a_finite_kla():
    # slow and heavily gassed (Fl of the bottom disc turbine far above 0.1): the gassed
    # power is held above zero in the hydro layer, so P/V, kLa and OTR stay finite
    with np.errstate(all="raise"):
        ev = evaluate(VESSEL, np.array([0.3, 2.0]), 40.0, WATER_30C, Process(our=40 / 3600),
                      MODEL)
    assert ev.op.flow_number[0] > 1.0
    assert np.all(ev.op.gassed_power > 0) and np.all(np.isfinite(ev.kla))
    assert np.all(ev.kla > 0) and ev.kla[0] < ev.kla[1]


def test_design_needs_a_duty():
    with pytest.raises(InputError):
        design(VESSEL, WATER_30C, Process(), MODEL)


def _public_functions():
    import inspect

    from scaleup.scaling import (
        compression,
        correlation,
        heat,
        oxygen,
        risk,
        rules,
        study,
    )
    from scaleup.scaling import (
        design as design_module,
    )
    from scaleup.scaling import (
        evaluate as evaluate_module,
    )

    for module in (compression, correlation, design_module, evaluate_module, heat, oxygen, risk,
                   rules, study):
        for name, func in inspect.getmembers(module, inspect.isfunction):
            if func.__module__ == module.__name__ and not name.startswith("_"):
                yield f"{module.__name__}.{name}", func


@pytest.mark.parametrize("name,func", list(_public_functions()))
def test_public_functions_document_parameters_with_units(name, func):
    import inspect
    import re

    doc = inspect.getdoc(func) or ""
    assert doc, f"{name} has no docstring"
    if "Parameters\n----------" not in doc:
        return
    blocks = re.split(r"\n(?=\S)", doc.split("Parameters\n----------", 1)[1].split(
        "\nReturns")[0])
    documented = {}
    for block in blocks:
        head, _, body = block.partition("\n")
        names, _, kind = head.partition(" : ")
        for n in names.split(","):
            documented[n.strip()] = (kind, body)
    for param in inspect.signature(func).parameters:
        assert param in documented, f"{name}: parameter {param} is not documented"
        kind, body = documented[param]
        if "float" in kind:
            assert re.search(r"\[[^\]]*\]", body), f"{name}: {param} has no [unit]"
