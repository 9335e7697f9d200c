"""Scale-up rules: project a pilot operating point to a full-scale vessel, rule by rule.

Each speed rule fixes one quantity between pilot and full scale and so fixes the full-scale
speed; each gas rule fixes how the gas flow scales. For geometrically similar vessels with a
linear scale factor S on the diameter, in the turbulent regime (constant power number), the
standard scale-up algebra (Oldshue 1983, Fluid Mixing Technology, Ch. 8) gives:

=================  ==================  =================
rule               N2 / N1             (P/V)2 / (P/V)1
=================  ==================  =================
constant P/V       S^(-2/3)            1
constant tip speed S^(-1)              S^(-1)
constant speed     1                   S^2
constant Reynolds  S^(-2)              S^(-4)
=================  ==================  =================

Here nothing is assumed: every rule is solved with the full hydrodynamics (power curves,
gassed power, hydrostatic pressure), so the algebra above is a check, not the method.

Speed rules (:data:`RULES`): ``p-per-v`` (ungassed P/V), ``pg-per-v`` (gassed P/V),
``tip-speed``, ``speed`` (same N: blend time held only for similar vessels in the same
regime), ``reynolds``, ``kla`` (the correlation's kLa at full scale equals the pilot's kLa,
the measured one when the run has it), ``otr`` (OTR capacity at the DO set-point equal).
Gas rules (:data:`GAS_RULES`): ``vvm`` (normal volume per liquid volume), ``superficial``
(us at mid-height), ``flow-number`` (Fl of the bottom impeller at its own pressure).
"""

from __future__ import annotations

from collections.abc import Callable
from dataclasses import dataclass

import numpy as np

from scaleup.errors import InputError
from scaleup.hydro.dispersion import hydrostatic_pressure
from scaleup.hydro.geometry import Vessel
from scaleup.scaling import oxygen
from scaleup.scaling.correlation import KlaModel
from scaleup.scaling.evaluate import (
    NO_LIMITS,
    Evaluation,
    Limits,
    Liquid,
    Process,
    evaluate,
    vessel_solubility,
    violations,
)
from scaleup.units import R

RULES = {
    "p-per-v": "constant ungassed power per volume",
    "pg-per-v": "constant gassed power per volume",
    "tip-speed": "constant tip speed",
    "speed": "constant speed",
    "reynolds": "constant Reynolds number",
    "kla": "constant kLa (solved with the correlation)",
    "otr": "constant OTR capacity at the DO set-point (solved)",
}
GAS_RULES = {
    "vvm": "constant vvm (normal gas volume per liquid volume per minute)",
    "superficial": "constant superficial gas velocity at mid-height",
    "flow-number": "constant gas flow number of the bottom impeller",
}
_GRID = 48  # speeds tried at once to bracket a solved rule
_HALVINGS = 40  # then bisection in log N: 2^-40 of the bracket


@dataclass(frozen=True)
class PilotPoint:
    """The pilot operating point to scale from.

    Attributes
    ----------
    vessel : Vessel; speed : [rev/s]; gas_flow : [mol/s], > 0;
    kla_measured : [1/s] or None (the run's measured kLa)
    label : str
    """

    vessel: Vessel
    speed: float
    gas_flow: float
    kla_measured: float | None = None
    label: str = "pilot"


@dataclass(frozen=True)
class Projection:
    """One rule's full-scale point (``evaluation`` is None when the rule has no solution)."""

    rule: str
    gas_rule: str
    speed: float
    gas_flow: float
    evaluation: Evaluation | None
    violations: tuple[str, ...]
    extrapolation: tuple[str, ...]
    note: str = ""


@dataclass(frozen=True)
class Comparison:
    """The pilot point and each rule's projection."""

    pilot: Evaluation
    pilot_point: PilotPoint
    target: Vessel
    projections: tuple[Projection, ...]
    kla_target: float
    kla_target_source: str
    otr_target: float
    scale_factor: float


def gas_flow_rule(gas_rule: str, pilot: Evaluation, pilot_vessel: Vessel, target: Vessel,
                  liquid: Liquid) -> Callable[[np.ndarray], np.ndarray]:
    """Full-scale gas flow [mol/s] as a function of the full-scale speed [rev/s].

    Parameters
    ----------
    gas_rule : str
        A key of :data:`GAS_RULES`.
    pilot : Evaluation
        The pilot point.
    pilot_vessel, target : Vessel
        Pilot and full-scale vessels.
    liquid : Liquid
        The broth (temperature and density set the gas pressures).

    Returns
    -------
    callable
        speed -> molar gas flow.
    """
    op = pilot.op
    T = liquid.temperature
    if gas_rule == "vvm":
        flow = float(op.gas_flow) * target.volume / pilot_vessel.volume
        return lambda n: np.full(np.shape(n), flow)
    if gas_rule == "superficial":
        p_mid = float(hydrostatic_pressure(target.head_pressure, liquid.density,
                                           target.liquid_height / 2.0))
        flow = float(op.superficial_gas_velocity) * target.cross_section * p_mid / (R * T)
        return lambda n: np.full(np.shape(n), flow)
    if gas_rule == "flow-number":
        bottom = target.impellers[0]
        p_imp = float(hydrostatic_pressure(target.head_pressure, liquid.density,
                                           target.liquid_height - bottom.clearance))
        fl = float(op.flow_number)
        return lambda n: fl * np.asarray(n, float) * bottom.diameter ** 3 * p_imp / (R * T)
    raise InputError(f"unknown gas rule {gas_rule!r}; use one of {', '.join(GAS_RULES)}",
                     "gas rule", gas_rule)


def _solve_increasing(f: Callable[[np.ndarray], np.ndarray], target: float, lo: float,
                      hi: float) -> float:
    """N in [lo, hi] with f(N) = target for f increasing in N; NaN when out of reach."""
    grid = np.geomspace(lo, hi, _GRID)
    values = np.asarray(f(grid), float)
    above = np.nonzero(values >= target)[0]
    if above.size == 0 or above[0] == 0 and values[0] > target:
        return float("nan")
    if above[0] == 0:
        return float(grid[0])
    a, b = np.log(grid[above[0] - 1]), np.log(grid[above[0]])
    for _ in range(_HALVINGS):
        mid = 0.5 * (a + b)
        if float(np.asarray(f(np.array([np.exp(mid)])))[0]) >= target:
            b = mid
        else:
            a = mid
    return float(np.exp(0.5 * (a + b)))


def compare_rules(pilot_point: PilotPoint, target: Vessel, liquid: Liquid, process: Process,
                  model: KlaModel, limits: Limits = NO_LIMITS, rules=tuple(RULES),
                  gas_rule: str = "vvm") -> Comparison:
    """Project a pilot point to a full-scale vessel under each speed rule and one gas rule.

    Parameters
    ----------
    pilot_point : PilotPoint
        Pilot vessel, speed and gas flow.
    target : Vessel
        The full-scale vessel (e.g. :func:`scaleup.hydro.geometry.scale_to_volume`).
    liquid : Liquid
        The broth, the same at both scales.
    process : Process
        DO set-point, optional OUR duty, gas composition, power conventions.
    model : KlaModel
        The kLa correlation.
    limits : Limits
        Full-scale limits to report against.
    rules : sequence of str
        Keys of :data:`RULES`.
    gas_rule : str
        A key of :data:`GAS_RULES`.

    Returns
    -------
    Comparison
    """
    unknown = [r for r in rules if r not in RULES]
    if unknown:
        raise InputError(f"unknown rule {unknown[0]!r}; use one of {', '.join(RULES)} or all",
                         "rule", unknown[0])
    if gas_rule not in GAS_RULES:
        raise InputError(f"unknown gas rule {gas_rule!r}; use one of {', '.join(GAS_RULES)}",
                         "gas rule", gas_rule)
    if not pilot_point.gas_flow > 0:
        raise InputError("the pilot point has no gas flow; an aerated scale-up needs one",
                         "gas flow", pilot_point.gas_flow)
    if not target.impellers:
        raise InputError("the full-scale vessel has no impeller", "impellers")
    pilot = evaluate(pilot_point.vessel, pilot_point.speed, pilot_point.gas_flow, liquid,
                     process, model)
    gas = gas_flow_rule(gas_rule, pilot, pilot_point.vessel, target, liquid)
    if pilot_point.kla_measured:
        kla_target, source = float(pilot_point.kla_measured), "measured"
    else:
        kla_target, source = float(pilot.kla), "correlation at the pilot point"
    args = (pilot.solubility, pilot.c_liquid, process.o2_fraction,
            process.respiratory_quotient, process.driving_force)
    otr_target = float(oxygen.otr_capacity(kla_target, pilot_point.vessel.volume,
                                           pilot_point.gas_flow, *args).otr)
    d_pilot = pilot_point.vessel.impellers[0].diameter
    d_target = target.impellers[0].diameter
    d_tip = max(i.diameter for i in target.impellers)
    lo, hi = 0.05 / (np.pi * d_tip), 60.0 / (np.pi * d_tip)  # tip speeds 0.05-60 m/s
    quiet = Process(**{**process.__dict__, "our": None})
    sol = vessel_solubility(target, liquid)

    def full(n):
        return evaluate(target, n, gas(n), liquid, quiet, model, solubility=sol)

    solvers = {
        "p-per-v": lambda: _solve_increasing(lambda n: full(n).op.power_per_volume,
                                             float(pilot.op.power_per_volume), lo, hi),
        "pg-per-v": lambda: _solve_increasing(lambda n: full(n).op.gassed_power_per_volume,
                                              float(pilot.op.gassed_power_per_volume), lo, hi),
        "tip-speed": lambda: float(pilot.op.tip_speed) / (np.pi * d_tip),
        "speed": lambda: float(pilot_point.speed),
        "reynolds": lambda: float(pilot.op.reynolds) * liquid.viscosity / (
            liquid.density * d_target ** 2),
        "kla": lambda: _solve_increasing(lambda n: full(n).kla, kla_target, lo, hi),
        "otr": lambda: _solve_increasing(lambda n: np.asarray(full(n).transfer.otr),
                                         otr_target, lo, hi),
    }
    projections = []
    for rule in rules:
        speed = solvers[rule]()
        if not np.isfinite(speed):
            projections.append(Projection(rule, gas_rule, float("nan"), float("nan"), None,
                                          (f"{RULES[rule]} cannot be reached at tip speeds "
                                           "of 0.05 to 60 m/s with this gas rule",), (),
                                          "no solution"))
            continue
        flow = float(np.asarray(gas(np.array([speed])))[0])
        ev = evaluate(target, speed, flow, liquid, process, model, limits, solubility=sol)
        messages = ev.extrapolation.messages()[0]
        projections.append(Projection(rule, gas_rule, speed, flow, ev, tuple(violations(ev)),
                                      tuple(messages)))
    return Comparison(pilot, pilot_point, target, tuple(projections), kla_target, source,
                      otr_target, d_target / d_pilot)
