"""Scale-up and design studies as plain data: the inputs and the results, JSON-safe.

These are what the service layer saves in the ``study`` table and what ``scaleup scale`` and
``scaleup design`` print: SI values under keys that carry their unit, ``warnings`` and the
``cautions`` of :func:`scaleup.cautions.cautions_for`. Pure: no I/O.
"""

from __future__ import annotations

import dataclasses

import numpy as np

from scaleup.cautions import cautions_for
from scaleup.hydro.geometry import Vessel
from scaleup.scaling import compression, heat
from scaleup.scaling.correlation import KlaModel
from scaleup.scaling.design import Design, design
from scaleup.scaling.evaluate import NO_LIMITS, Evaluation, Limits, Liquid, Process
from scaleup.scaling.rules import GAS_RULES, RULES, Comparison, PilotPoint, compare_rules
from scaleup.units import MOL_PER_NORMAL_M3

ESTIMATE_NOTE = ("Projections are estimates from correlations; the prediction intervals and "
                 "probabilities say how uncertain, not how wrong, they can be.")


def plain(value):
    """JSON-safe copy: numpy scalars and arrays to Python, NaN and infinities to None."""
    if isinstance(value, dict):
        return {str(k): plain(v) for k, v in value.items()}
    if isinstance(value, (list, tuple)):
        return [plain(v) for v in value]
    if isinstance(value, np.ndarray):
        return plain(value.tolist())
    if isinstance(value, np.generic):
        return plain(value.item())
    if isinstance(value, float) and not np.isfinite(value):
        return None
    return value


def package_version() -> str:
    """The installed version of this package (recorded with every saved study)."""
    from importlib.metadata import PackageNotFoundError, version

    try:
        return version("scaleup")
    except PackageNotFoundError:
        from scaleup import __version__

        return __version__


def _f(x) -> float:
    return float(np.asarray(x, float).reshape(-1)[0]) if np.size(x) else float("nan")


def vessel_dict(vessel: Vessel) -> dict:
    """A vessel's geometry as plain data (lengths m, areas m2, pressure Pa)."""
    out = dataclasses.asdict(vessel)
    out["liquid_volume_m3"] = vessel.volume
    return out


def extrapolation_dict(ev: Evaluation) -> dict:
    """How far one evaluated point lies outside the correlation's domain, as plain data."""
    ex = ev.extrapolation
    ratio = float(ex.distance_ratio[0]) if np.size(ex.distance_ratio) else float("nan")
    return {"extrapolated": bool(ex.extrapolated[0]), "messages": ex.messages()[0],
            "distance_ratio": ratio if np.isfinite(ratio) else None,
            "range_factors": {k: float(v[0]) for k, v in ex.range_factor.items()},
            "unchecked": list(ex.unchecked)}


def point_dict(ev: Evaluation) -> dict:
    """One evaluated point (scalar arrays) with the ``--json`` contract keys."""
    op = ev.op
    gas = _f(op.gas_flow)
    return {
        "speed_rps": _f(op.speed), "gas_flow_mol_s": gas,
        "gas_flow_nl_min": gas / MOL_PER_NORMAL_M3 * 60e3, "vvm": _f(op.vvm),
        "power_w": _f(op.power), "gassed_power_w": _f(op.gassed_power),
        "power_per_volume_w_m3": _f(op.power_per_volume),
        "gassed_power_per_volume_w_m3": _f(op.gassed_power_per_volume),
        "tip_speed_m_s": _f(op.tip_speed), "reynolds": _f(op.reynolds),
        "flow_number": _f(op.flow_number), "froude": _f(op.froude),
        "regime": str(np.asarray(op.regime).reshape(-1)[0]),
        "flooding_margin": _f(op.flooding_margin), "blend_time_95_s": _f(op.blend_time_95),
        "superficial_gas_velocity_m_s": _f(op.superficial_gas_velocity),
        "kla_per_s": _f(ev.kla), "kla_pi95_per_s": [_f(ev.kla_low), _f(ev.kla_high)],
        "kla_design_per_s": _f(ev.kla_design),
        "kla_required_per_s": _f(ev.kla_required),
        "otr_capacity_mol_m3_s": _f(ev.transfer.otr),
        "exit_o2_fraction": _f(ev.transfer.exit_fraction),
        "fraction_o2_used": _f(ev.transfer.fraction_used),
        "driving_force_mol_m3": _f(ev.transfer.driving_force),
        "do_setpoint_mol_m3": ev.c_liquid,
        "c_star_sparger_mol_m3": ev.solubility.bottom * 1.0,
        "heat_load_w": _f(ev.heat_load), "heat_removal_w": ev.heat_removal,
        "motor_power_w": _f(ev.motor_power), "agitator_power_w": _f(ev.agitator_power),
        "compressor_power_w": _f(ev.compressor_power), "total_power_w": _f(ev.total_power),
        "margins": {k: _f(v) for k, v in ev.margins.items()},
    }


def _cautions(process: Process, vessel: Vessel, rho: float) -> list[str]:
    supply = compression.sparger_supply_pressure(vessel, rho, process.line_loss)
    return cautions_for(o2_fraction=process.o2_fraction, pressure_pa=max(
        vessel.head_pressure, supply), scale=True) + [ESTIMATE_NOTE]


def _heat(vessel: Vessel, ev: Evaluation, process: Process, liquid: Liquid) -> dict:
    our = process.our if process.our is not None else _f(ev.transfer.otr)
    hb = heat.heat_balance(vessel, our, _f(ev.op.gassed_power), liquid.temperature,
                           process.cooling or heat.Cooling())
    return hb.to_dict()


def inputs_dict(liquid: Liquid, process: Process, limits: Limits, model: KlaModel,
                **more) -> dict:
    """The inputs of a study, complete enough to recompute it."""
    proc = dataclasses.asdict(process)
    return {"liquid": dataclasses.asdict(liquid), "process": proc, "limits": limits.to_dict(),
            "correlation": model.describe(), **more}


def scale_study(pilot: PilotPoint, target: Vessel, liquid: Liquid, process: Process,
                model: KlaModel, limits: Limits = NO_LIMITS, rules=tuple(RULES),
                gas_rule: str = "vvm") -> tuple[dict, dict]:
    """Compare the scale-up rules; return (inputs, results) as plain data.

    Parameters
    ----------
    pilot : PilotPoint
        The pilot vessel and operating point.
    target : Vessel
        The full-scale vessel.
    liquid : Liquid
        The broth.
    process : Process
        DO set-point, optional OUR, gas and power conventions.
    model : KlaModel
        The kLa correlation.
    limits : Limits
        Full-scale limits.
    rules : sequence of str
        Rules to compare.
    gas_rule : str
        Gas rule.

    Returns
    -------
    inputs, results : dict
    """
    c: Comparison = compare_rules(pilot, target, liquid, process, model, limits, rules,
                                  gas_rule)
    rows = []
    warnings: list[str] = list(c.pilot.warnings)
    for p in c.projections:
        row = {"rule": p.rule, "description": RULES[p.rule], "gas_rule": p.gas_rule}
        if p.evaluation is None:
            row.update({"speed_rps": None, "violations": list(p.violations),
                        "extrapolation": {"extrapolated": None, "messages": []},
                        "note": p.note})
        else:
            row.update(point_dict(p.evaluation))
            row["violations"] = list(p.violations)
            row["extrapolation"] = extrapolation_dict(p.evaluation)
            row["warnings"] = list(p.evaluation.warnings)
            warnings.extend(p.evaluation.warnings)
        rows.append(row)
    pilot_row = point_dict(c.pilot)
    pilot_row["kla_measured_per_s"] = pilot.kla_measured
    pilot_row["label"] = pilot.label
    results = {
        "kind": "scale", "scale_factor": c.scale_factor, "gas_rule": gas_rule,
        "gas_rule_description": GAS_RULES[gas_rule],
        "kla_target_per_s": c.kla_target, "kla_target_source": c.kla_target_source,
        "otr_target_mol_m3_s": c.otr_target, "pilot": pilot_row,
        "pilot_volume_m3": pilot.vessel.volume, "target_volume_m3": target.volume,
        "target_vessel": vessel_dict(target), "rules": rows,
        "correlation": model.describe(),
        "warnings": list(dict.fromkeys(warnings)),
        "cautions": _cautions(process, target, liquid.density),
    }
    inputs = inputs_dict(liquid, process, limits, model, pilot_vessel=vessel_dict(pilot.vessel),
                         pilot_speed_rps=pilot.speed, pilot_gas_flow_mol_s=pilot.gas_flow,
                         pilot_kla_measured_per_s=pilot.kla_measured, pilot_label=pilot.label,
                         target_vessel=vessel_dict(target), rules=list(rules),
                         gas_rule=gas_rule)
    return inputs, results


def design_study(vessel: Vessel, liquid: Liquid, process: Process, model: KlaModel,
                 limits: Limits = NO_LIMITS, grid: tuple[int, int] = (30, 30),
                 risk_draws: int = 20_000, map_draws: int = 2000,
                 seed: int | None = 0) -> tuple[dict, dict]:
    """Solve the duty-driven design; return (inputs, results) as plain data.

    Parameters
    ----------
    vessel : Vessel
        The full-scale vessel.
    liquid : Liquid
        The broth.
    process : Process
        The duty (OUR) at the DO set-point, confidence, gas, efficiencies.
    model : KlaModel
        The kLa correlation.
    limits : Limits
        The limits.
    grid : (int, int)
        Window grid, speeds x gas rates.
    risk_draws, map_draws : int
        Monte Carlo draws at the optimum and per window point.
    seed : int or None
        Monte Carlo seed.

    Returns
    -------
    inputs, results : dict
    """
    d: Design = design(vessel, liquid, process, model, limits, grid=grid,
                       risk_draws=risk_draws, map_draws=map_draws, seed=seed)
    results: dict = {"kind": "design", "feasible": d.feasible,
                     "binding_constraints": list(d.binding),
                     "infeasibility": list(d.infeasibility), "confidence": process.confidence,
                     "our_mol_m3_s": process.our, "liquid_volume_m3": vessel.volume,
                     "vessel": vessel_dict(vessel), "correlation": model.describe()}
    warnings: list[str] = []
    if d.evaluation is not None:
        results.update(point_dict(d.evaluation))
        results["extrapolation"] = extrapolation_dict(d.evaluation)
        results["heat"] = _heat(vessel, d.evaluation, process, liquid)
        warnings.extend(d.evaluation.warnings)
    else:
        results.update({"speed_rps": None, "gas_flow_mol_s": None, "gas_flow_nl_min": None,
                        "total_power_w": None, "agitator_power_w": None,
                        "compressor_power_w": None, "extrapolation": None})
    if d.risk is not None:
        results.update(d.risk.to_dict())
    else:
        results["probability_meets_duty"] = None
    results["window"] = d.window.to_dict(vessel.volume)
    results["warnings"] = list(dict.fromkeys(warnings))
    results["cautions"] = _cautions(process, vessel, liquid.density)
    inputs = inputs_dict(liquid, process, limits, model, vessel=vessel_dict(vessel),
                         grid=list(grid), risk_draws=risk_draws, map_draws=map_draws, seed=seed)
    return inputs, results
