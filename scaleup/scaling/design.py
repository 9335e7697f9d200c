"""Duty-driven design: the speed and gas rate that meet an oxygen duty at least total power.

Total power = gassed agitator shaft power / drive efficiency + gas compression power
(adiabatic, ambient to the sparger supply pressure, :mod:`~scaleup.scaling.compression`).

The solve uses the structure of the problem rather than a black-box optimiser. At a fixed gas
rate the duty needs a kLa that depends on the gas rate only (exit-gas depletion), kLa rises
with speed, the flooding limit sets a least speed, and every other limit (tip speed, P/V,
motor, heat removal) and the total power grow with speed. So at each gas rate the best speed
is the least speed that meets the duty and the flooding margin; if that speed breaks another
limit, no speed works at that gas rate. The optimum is then a one-dimensional search over the
gas rate (fine grid, then refined about the best), all vectorised. The operating window (a
speed x gas-rate grid with feasibility, total power and the probability of meeting the duty)
is evaluated in one call for plotting, and the continuous optimum is never worse than the
best feasible grid point.
"""

from __future__ import annotations

from dataclasses import dataclass

import numpy as np

from scaleup.errors import InputError
from scaleup.hydro.geometry import Vessel
from scaleup.scaling import risk
from scaleup.scaling.correlation import KlaModel, kla_points
from scaleup.scaling.evaluate import (
    NO_LIMITS,
    Evaluation,
    Limits,
    Liquid,
    Process,
    evaluate,
    hydro_point,
    vessel_solubility,
)
from scaleup.units import MOL_PER_NORMAL_M3, R

DEFAULT_GRID = (40, 40)
_HALVINGS = 40
_GAS_SEARCH = 120  # gas rates on the first pass of the one-dimensional search
_BINDING = 1e-3  # a limit with a margin this small at the optimum is binding
# Default search ranges when no limit bounds them (common practice, no source):
# tip speeds 0.5-10 m/s and 0.02-2 vvm.
TIP_RANGE = (0.5, 10.0)
VVM_RANGE = (0.02, 2.0)


@dataclass(frozen=True)
class Window:
    """The operating window on a speed x gas-rate grid (arrays of shape (ns, ng))."""

    speeds: np.ndarray
    gas_flows: np.ndarray
    feasible: np.ndarray
    total_power: np.ndarray
    kla: np.ndarray
    kla_required: np.ndarray
    margins: dict[str, np.ndarray]
    probability: np.ndarray | None

    def to_dict(self, liquid_volume: float) -> dict:
        return {"speeds_rps": self.speeds, "gas_flows_mol_s": self.gas_flows,
                "gas_flows_nl_min": self.gas_flows / MOL_PER_NORMAL_M3 * 60e3,
                "vvm": self.gas_flows / MOL_PER_NORMAL_M3 * 60.0 / liquid_volume,
                "feasible": self.feasible, "total_power_w": self.total_power,
                "kla_per_s": self.kla, "kla_required_per_s": self.kla_required,
                "probability_meets_duty": self.probability,
                "margins": dict(self.margins)}


@dataclass(frozen=True)
class Design:
    """The optimum (or, when none is feasible, why not) and the operating window."""

    feasible: bool
    speed: float
    gas_flow: float
    evaluation: Evaluation | None
    binding: tuple[str, ...]
    infeasibility: tuple[str, ...]
    window: Window
    risk: risk.PointRisk | None


def _ranges(vessel: Vessel, liquid: Liquid, limits: Limits) -> tuple[tuple[float, float],
                                                                     tuple[float, float]]:
    d_tip = max(i.diameter for i in vessel.impellers)
    n_hi = (limits.max_tip_speed or TIP_RANGE[1]) / (np.pi * d_tip)
    if limits.max_speed is not None:
        n_hi = min(n_hi, limits.max_speed)
    n_lo = min(TIP_RANGE[0] / (np.pi * d_tip), n_hi / 4.0)
    volume = vessel.volume
    per_vvm = volume / 60.0 * MOL_PER_NORMAL_M3  # mol/s per vvm
    g_hi = (limits.max_vvm or VVM_RANGE[1]) * per_vvm
    if limits.max_superficial_velocity is not None:
        p_mid = vessel.head_pressure + liquid.density * 9.80665 * vessel.liquid_height / 2.0
        g_hi = min(g_hi, limits.max_superficial_velocity * vessel.cross_section * p_mid
                   / (R * liquid.temperature))
    g_lo = min(VVM_RANGE[0] * per_vvm, g_hi / 10.0)
    return (n_lo, n_hi), (g_lo, g_hi)


def _least_speed(vessel: Vessel, gas, liquid: Liquid, process: Process, model: KlaModel,
                 kla_required, n_range) -> np.ndarray:
    """Least speed at each gas rate whose design kLa reaches the requirement (NaN: none)."""
    lo = np.full(gas.shape, np.log(n_range[0]))
    hi = np.full(gas.shape, np.log(n_range[1]))

    def design_kla(log_n):
        op = hydro_point(vessel, np.exp(log_n), gas, liquid, process)
        points = kla_points(op, liquid.coalescence)
        if process.confidence == 0.5:
            return model.median(points)
        return np.asarray(model.quantile(points, process.confidence), float)

    reachable = design_kla(hi) >= kla_required
    at_floor = design_kla(lo) >= kla_required
    for _ in range(_HALVINGS):
        mid = 0.5 * (lo + hi)
        ok = design_kla(mid) >= kla_required
        lo, hi = np.where(ok, lo, mid), np.where(ok, mid, hi)
    out = np.where(at_floor, np.exp(lo), np.exp(hi))
    return np.where(reachable, out, np.nan)


def _curve(vessel, gas, liquid, process, model, limits, n_range, sol):
    """Best speed and its evaluation at each gas rate of ``gas`` (1-D)."""
    req_ev = evaluate(vessel, n_range[1], gas, liquid, process, model, limits, solubility=sol)
    kla_required = np.asarray(req_ev.kla_required, float)
    speed = _least_speed(vessel, gas, liquid, process, model, kla_required, n_range)
    if limits.min_flooding_margin is not None:
        n_flood = np.asarray(req_ev.op.flooding_speed, float) * (1.0 + limits.min_flooding_margin)
        speed = np.where(np.isfinite(speed), np.maximum(speed, n_flood), speed)
    known = np.isfinite(speed)
    ev = evaluate(vessel, np.where(known, speed, n_range[1]), gas, liquid, process, model,
                  limits, solubility=sol)
    ok = known & ev.feasible()
    power = np.where(ok, ev.total_power, np.inf)
    return speed, ev, ok, power


def design(vessel: Vessel, liquid: Liquid, process: Process, model: KlaModel,
           limits: Limits = NO_LIMITS, *, grid: tuple[int, int] = DEFAULT_GRID,
           speed_range: tuple[float, float] | None = None,
           gas_range: tuple[float, float] | None = None, risk_draws: int = risk.DEFAULT_DRAWS,
           map_draws: int = 2000, seed: int | None = 0) -> Design:
    """Find the speed and gas rate that meet the duty at least total power.

    Parameters
    ----------
    vessel : Vessel
        The full-scale vessel.
    liquid : Liquid
        The broth.
    process : Process
        The duty (``our`` required) at the DO set-point, gas, efficiencies, confidence.
    model : KlaModel
        The kLa correlation.
    limits : Limits
        The limits.
    grid : (int, int)
        Speeds x gas rates of the operating window.
    speed_range, gas_range : (float, float), optional
        [rev/s] and [mol/s]; from the limits and common ranges when omitted.
    risk_draws : int
        Monte Carlo draws for the probability at the optimum (0: skip).
    map_draws : int
        Draws per window point for the probability map (0: skip).
    seed : int or None
        Seed of the Monte Carlo.

    Returns
    -------
    Design
    """
    if process.our is None:
        raise InputError("a design needs the duty: give the OUR", "OUR")
    if not vessel.impellers:
        raise InputError("the vessel has no impeller", "impellers")
    n_default, g_default = _ranges(vessel, liquid, limits)
    n_range = speed_range or n_default
    g_range = gas_range or g_default
    for name, (a, b) in (("speed range", n_range), ("gas range", g_range)):
        if not 0 < a < b:
            raise InputError(f"{name} {a:g} to {b:g} must be positive and increasing", name)
    sol = vessel_solubility(vessel, liquid)

    # the operating window, in one call
    speeds = np.geomspace(*n_range, grid[0])
    flows = np.geomspace(*g_range, grid[1])
    ev_grid = evaluate(vessel, speeds[:, None], flows[None, :], liquid, process, model, limits,
                       solubility=sol)
    feasible_grid = ev_grid.feasible()
    probability = None
    if map_draws:
        draws = risk.draw(model, map_draws, seed, process.property_sd)
        p, _ = risk.probability_meets(model, kla_points(ev_grid.op, liquid.coalescence),
                                      np.asarray(ev_grid.kla_required).ravel(), draws)
        probability = p.reshape(ev_grid.shape)
    window = Window(speeds, flows, feasible_grid, np.asarray(ev_grid.total_power),
                    np.asarray(ev_grid.kla_design), np.asarray(ev_grid.kla_required),
                    {k: np.asarray(v) for k, v in ev_grid.margins.items()}, probability)

    # the continuous optimum: least feasible speed per gas rate, then the best gas rate
    gas = np.geomspace(*g_range, _GAS_SEARCH)
    gas = np.union1d(gas, flows)
    speed, ev, ok, power = _curve(vessel, gas, liquid, process, model, limits, n_range, sol)
    if not ok.any():
        return Design(False, float("nan"), float("nan"), None, (),
                      tuple(_explain(window, ev_grid)), window, None)
    best = int(np.argmin(power))
    lo_g = gas[max(best - 1, 0)]
    hi_g = gas[min(best + 1, gas.size - 1)]
    fine = np.geomspace(lo_g, hi_g, 41) if hi_g > lo_g else np.array([gas[best]])
    speed_f, ev_f, ok_f, power_f = _curve(vessel, fine, liquid, process, model, limits,
                                          n_range, sol)
    if ok_f.any() and power_f.min() <= power[best]:
        i = int(np.argmin(power_f))
        n_opt, g_opt = float(speed_f[i]), float(fine[i])
    else:
        n_opt, g_opt = float(speed[best]), float(gas[best])
    opt = evaluate(vessel, n_opt, g_opt, liquid, process, model, limits, solubility=sol)
    binding = [name for name, m in opt.margins.items() if abs(float(m)) < _BINDING]
    if np.isclose(g_opt, g_range[1], rtol=1e-9):
        binding.append("gas range (upper end)")
    if np.isclose(g_opt, g_range[0], rtol=1e-9):
        binding.append("gas range (lower end)")
    point_risk = None
    if risk_draws:
        point_risk = risk.point_risk(
            model, kla_points(opt.op, liquid.coalescence), float(opt.kla_required), risk_draws,
            seed, process.property_sd,
            otr_of_kla=lambda k: _otr(k, vessel, g_opt, opt, process))
    return Design(True, n_opt, g_opt, opt, tuple(binding), (), window, point_risk)


def _otr(kla, vessel: Vessel, gas: float, ev: Evaluation, process: Process):
    from scaleup.scaling.oxygen import otr_capacity

    return otr_capacity(kla, vessel.volume, gas, ev.solubility, ev.c_liquid,
                        process.o2_fraction, process.respiratory_quotient,
                        process.driving_force).otr


def _explain(window: Window, ev: Evaluation) -> list[str]:
    """Which limit makes the design infeasible, and by how much (on the window grid)."""
    margins = window.margins
    names = list(margins)
    out = []
    for name in names:
        others = np.ones(ev.shape, dtype=bool)
        for other in names:
            if other != name:
                others &= margins[other] >= -1e-9
        if others.any():
            shortfall = float(np.max(margins[name][others]))
            out.append(f"{name}: no point of the window keeps it while keeping the other "
                       f"limits; the best misses it by {abs(shortfall):.1%}"
                       if name != "flooding margin" else
                       f"{name}: the best point within the other limits misses it by "
                       f"{abs(shortfall):.3g}")
    if not out:
        worst = np.min(np.stack([np.asarray(m) for m in margins.values()]), axis=0)
        idx = np.unravel_index(int(np.argmax(worst)), ev.shape)
        broken = [f"{n} (by {abs(float(margins[n][idx])):.1%})" for n in names
                  if margins[n][idx] < -1e-9]
        out.append("no single limit is to blame: even the least bad point of the window "
                   f"breaks {', '.join(broken)}")
    return out
