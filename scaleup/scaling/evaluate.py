"""Everything the scale-up engine says about a vessel at a speed and gas flow, vectorised.

The rule comparison (:mod:`~scaleup.scaling.rules`) and the duty-driven design
(:mod:`~scaleup.scaling.design`) both call :func:`evaluate`: hydrodynamics from
:func:`scaleup.hydro.point.operating_point`, kLa with its prediction interval from the chosen
correlation, the O2 balance at the vessel's pressures, heat load and removal, compressor and
agitator power, and a margin per limit (>= 0 where the limit is kept).

Conventions: the motor is sized on the *ungassed* power (the gas can fail while the agitator
runs), the agitator's share of the total power on the *gassed* power; P/V limits apply to the
ungassed P/V (what the liquid sees if the gas fails). Drive and compressor efficiencies are
inputs with stated defaults.
"""

from __future__ import annotations

from dataclasses import dataclass, field

import numpy as np

from scaleup.errors import InputError
from scaleup.hydro.geometry import Vessel
from scaleup.hydro.point import OperatingPoint, operating_point
from scaleup.scaling import compression, heat, oxygen
from scaleup.scaling.correlation import KlaModel, kla_points
from scaleup.units import P_ATM

# Motor and gearbox efficiency of an agitator drive (common practice, no source).
DEFAULT_DRIVE_EFFICIENCY = 0.92


@dataclass(frozen=True)
class Liquid:
    """The broth: state and properties, SI.

    Attributes
    ----------
    temperature : [K]; density : [kg/m3]; viscosity : [Pa s];
    surface_tension : [N/m] or None; coalescence : "coalescing" | "non-coalescing" |
    "viscous"; salts : ((salt, mol/m3), ...) for C*; salinity : [kg/kg]
    """

    temperature: float
    density: float
    viscosity: float
    surface_tension: float | None = None
    coalescence: str = "coalescing"
    salts: tuple[tuple[str, float], ...] = ()
    salinity: float = 0.0


@dataclass(frozen=True)
class Process:
    """What the vessel must do and how its power is counted.

    Attributes
    ----------
    do_setpoint : float
        DO held [% of air saturation at the head pressure if ``do_percent``, else mol/m3].
    do_percent : bool
    our : float or None
        Oxygen uptake rate of the duty [mol/(m3 s)].
    o2_fraction : float
        Inlet O2 mole fraction [-] (enriched air or pure O2 above 0.2095).
    respiratory_quotient : float
        [-].
    driving_force : str
        "log-mean", "mid-depth", "arithmetic" or "backmixed" (see :mod:`.oxygen`).
    gassed_method : str or None
        Gassed-power method of the hydro layer.
    drive_efficiency, compressor_efficiency : float
        [-].
    line_loss : float
        Gas line losses [Pa].
    ambient_temperature, ambient_pressure : float
        Compressor inlet [K], [Pa].
    cooling : heat.Cooling or None
    confidence : float
        Probability with which a new vessel must reach the kLa used for the duty [-]:
        0.5 designs to the correlation's median.
    property_sd : float
        sd of ln(driving force) for the risk [-].
    """

    do_setpoint: float = 20.0
    do_percent: bool = True
    our: float | None = None
    o2_fraction: float = oxygen.AIR_O2_FRACTION
    respiratory_quotient: float = 1.0
    driving_force: str = "log-mean"
    gassed_method: str | None = None
    drive_efficiency: float = DEFAULT_DRIVE_EFFICIENCY
    compressor_efficiency: float = compression.DEFAULT_COMPRESSOR_EFFICIENCY
    line_loss: float = compression.DEFAULT_LINE_LOSS
    ambient_temperature: float = 293.15
    ambient_pressure: float = P_ATM
    cooling: heat.Cooling | None = None
    confidence: float = 0.5
    property_sd: float = 0.0

    def __post_init__(self) -> None:
        for name in ("drive_efficiency", "compressor_efficiency"):
            value = getattr(self, name)
            if not 0 < value <= 1:
                raise InputError(f"{value:g}: an efficiency lies between 0 and 1",
                                 name.replace("_", " "), value)
        if not 0 < self.confidence < 1:
            raise InputError(f"{self.confidence:g}: a confidence lies between 0 and 1",
                             "confidence", self.confidence)
        if self.our is not None and not self.our > 0:
            raise InputError("the OUR of a duty must be positive", "OUR", self.our)


@dataclass(frozen=True)
class Limits:
    """Limits of the full-scale vessel; None means not limited. SI units.

    Attributes
    ----------
    max_tip_speed : [m/s]; max_superficial_velocity : [m/s];
    min_flooding_margin : N/N_F - 1 [-]; motor_rating : [W];
    max_power_per_volume : ungassed [W/m3]; max_heat_removal : [W] (else from the cooling);
    critical_do : [mol/m3, or % of air saturation at the head pressure with
    ``critical_do_percent``]; max_speed : [rev/s]; max_vvm : [1/min]
    """

    max_tip_speed: float | None = None
    max_superficial_velocity: float | None = None
    min_flooding_margin: float | None = None
    motor_rating: float | None = None
    max_power_per_volume: float | None = None
    max_heat_removal: float | None = None
    critical_do: float | None = None
    max_speed: float | None = None
    max_vvm: float | None = None
    critical_do_percent: bool = False

    def to_dict(self) -> dict:
        return {"max_tip_speed_m_s": self.max_tip_speed,
                "max_superficial_velocity_m_s": self.max_superficial_velocity,
                "min_flooding_margin": self.min_flooding_margin,
                "motor_rating_w": self.motor_rating,
                "max_power_per_volume_w_m3": self.max_power_per_volume,
                "max_heat_removal_w": self.max_heat_removal,
                "critical_do": self.critical_do,
                "critical_do_unit": "%" if self.critical_do_percent else "mol/m3",
                "max_speed_rps": self.max_speed,
                "max_vvm": self.max_vvm}


NO_LIMITS = Limits()


@dataclass(frozen=True)
class Evaluation:
    """Results at one or many operating points (arrays broadcast over speed x gas flow)."""

    op: OperatingPoint
    solubility: oxygen.OxygenSolubility
    c_liquid: float
    kla: np.ndarray
    kla_low: np.ndarray
    kla_high: np.ndarray
    kla_design: np.ndarray
    transfer: oxygen.Transfer
    kla_required: np.ndarray
    heat_load: np.ndarray
    heat_removal: float | None
    compressor_power: np.ndarray
    agitator_power: np.ndarray
    total_power: np.ndarray
    motor_power: np.ndarray
    margins: dict[str, np.ndarray]
    extrapolation: object
    shape: tuple[int, ...]
    warnings: tuple[str, ...] = field(default_factory=tuple)

    def feasible(self) -> np.ndarray:
        out = np.ones(self.shape, dtype=bool)
        for margin in self.margins.values():
            out &= margin >= -1e-9
        return out


def evaluate(vessel: Vessel, speed, gas_flow, liquid: Liquid, process: Process,
             model: KlaModel, limits: Limits = NO_LIMITS, *,
             solubility: oxygen.OxygenSolubility | None = None) -> Evaluation:
    """Evaluate a vessel at speeds and gas flows (broadcast together).

    Parameters
    ----------
    vessel : Vessel
        The full-scale vessel.
    speed : float or array
        Agitator speed [rev/s].
    gas_flow : float or array
        Dry inlet gas flow [mol/s], > 0.
    liquid : Liquid
        The broth.
    process : Process
        Duty, gas and power conventions.
    model : KlaModel
        The kLa correlation.
    limits : Limits
        Limits to check.
    solubility : OxygenSolubility, optional
        The vessel's O2 solubility, when already known (saves the props calls).

    Returns
    -------
    Evaluation
    """
    n, g = np.broadcast_arrays(np.asarray(speed, float), np.asarray(gas_flow, float))
    if np.any(g <= 0):
        raise InputError("the full-scale gas flow must be positive (mol/s)", "gas flow", gas_flow)
    shape = n.shape
    op = hydro_point(vessel, n, g, liquid, process)
    sol = solubility or vessel_solubility(vessel, liquid)
    c_l = oxygen.do_setpoint(process.do_setpoint, sol, process.do_percent)
    points = kla_points(op, liquid.coalescence)
    median, low, high = (np.asarray(a, float).reshape(shape)
                         for a in model.prediction_interval(points))
    design_kla = median if process.confidence == 0.5 else np.asarray(
        model.quantile(points, process.confidence), float).reshape(shape)
    volume = vessel.volume
    args = (sol, c_l, process.o2_fraction, process.respiratory_quotient, process.driving_force)
    transfer = oxygen.otr_capacity(median, volume, g, *args)
    if process.our is not None:
        kla_req = np.asarray(oxygen.required_kla(process.our, volume, g, *args), float)
        our = process.our
    else:
        kla_req = np.full(shape, np.nan)
        our = np.asarray(transfer.otr)  # no duty given: the heat of the OTR capacity
    pg = np.asarray(op.gassed_power, float)
    load = np.asarray(heat.heat_load(our, volume, pg), float)
    removal = limits.max_heat_removal
    notes: list[str] = list(op.warnings) + list(sol.warnings)
    cooling = process.cooling
    if removal is None and cooling is not None and (cooling.jacket_u or cooling.coil_u):
        balance = heat.heat_balance(vessel, 0.0, 0.0, liquid.temperature, cooling)
        removal = balance.removal_w
        notes.extend(balance.notes)
    compressor = np.asarray(compression.gas_compression_power(
        vessel, g, liquid.density, ambient_temperature=process.ambient_temperature,
        ambient_pressure=process.ambient_pressure, line_loss=process.line_loss,
        efficiency=process.compressor_efficiency), float)
    agitator = pg / process.drive_efficiency
    motor = np.asarray(op.power, float) / process.drive_efficiency
    margins = _margins(op, limits, process, design_kla, kla_req, load, removal, motor, volume,
                       g, args, shape)
    if process.o2_fraction > oxygen.AIR_O2_FRACTION + 1e-6:
        notes.append(f"inlet gas with {process.o2_fraction:.3g} O2 (enriched): see the "
                     "oxygen caution")
    return Evaluation(op, sol, c_l, median, low, high, design_kla, transfer,
                      np.broadcast_to(kla_req, shape), np.broadcast_to(load, shape), removal,
                      np.broadcast_to(compressor, shape), np.broadcast_to(agitator, shape),
                      np.broadcast_to(agitator + compressor, shape),
                      np.broadcast_to(motor, shape), margins, model.extrapolation(points),
                      shape, tuple(dict.fromkeys(notes)))


def hydro_point(vessel: Vessel, speed, gas_flow, liquid: Liquid,
                process: Process) -> OperatingPoint:
    """The hydro layer's operating point for the broth and the process's gassed method."""
    return operating_point(vessel, speed, gas_flow, liquid.temperature, liquid.density,
                           liquid.viscosity, liquid.surface_tension,
                           gassed_method=process.gassed_method)


def vessel_solubility(vessel: Vessel, liquid: Liquid) -> oxygen.OxygenSolubility:
    """O2 solubility of the vessel for the broth (props layer)."""
    return oxygen.oxygen_solubility(vessel, liquid.temperature, liquid.density,
                                    dict(liquid.salts) or None, liquid.salinity)


def _margins(op, limits: Limits, process: Process, design_kla, kla_req, load, removal, motor,
             volume, gas, args, shape) -> dict[str, np.ndarray]:
    """Normalised margin per limit: >= 0 kept, < 0 broken (the fraction by which)."""
    out: dict[str, np.ndarray] = {}

    def upper(name, value, limit):
        if limit is not None:
            out[name] = np.broadcast_to(1.0 - np.asarray(value, float) / limit, shape)

    if process.our is not None:
        with np.errstate(divide="ignore", invalid="ignore"):
            out["duty"] = np.broadcast_to(np.where(np.isfinite(kla_req),
                                                   design_kla / kla_req - 1.0, -1.0), shape)
        if limits.critical_do is not None:
            sol, _, y_in, rq, method = args
            c_crit = oxygen.do_setpoint(limits.critical_do, sol, limits.critical_do_percent)
            crit = np.asarray(oxygen.required_kla(process.our, volume, gas, sol, c_crit, y_in,
                                                  rq, method))
            with np.errstate(divide="ignore", invalid="ignore"):
                out["critical DO"] = np.broadcast_to(np.where(np.isfinite(crit),
                                                              design_kla / crit - 1.0, -1.0),
                                                     shape)
    upper("tip speed", op.tip_speed, limits.max_tip_speed)
    upper("superficial velocity", op.superficial_gas_velocity, limits.max_superficial_velocity)
    upper("motor", motor, limits.motor_rating)
    upper("P/V", op.power_per_volume, limits.max_power_per_volume)
    upper("heat removal", load, removal)
    upper("speed", op.speed, limits.max_speed)
    upper("vvm", op.vvm, limits.max_vvm)
    if limits.min_flooding_margin is not None:
        out["flooding margin"] = np.broadcast_to(
            np.asarray(op.flooding_margin, float) - limits.min_flooding_margin, shape)
    return out


LIMIT_TEXT = {
    "duty": "OTR capacity below the duty (kLa {value:.3g} 1/s of {need:.3g} needed)",
    "critical DO": "cannot hold the critical DO at the duty",
    "tip speed": "tip speed {value:.3g} m/s above the limit",
    "superficial velocity": "superficial gas velocity {value:.3g} m/s above the limit",
    "motor": "motor power {value:.4g} W above the rating",
    "P/V": "P/V {value:.4g} W/m3 above the limit",
    "heat removal": "heat load {value:.4g} W above the heat removal",
    "speed": "speed {value:.4g} rev/s above the limit",
    "vvm": "{value:.3g} vvm above the limit",
    "flooding margin": "flooding margin {value:.3g} below the minimum",
}


def violations(ev: Evaluation, index=()) -> list[str]:
    """Sentences naming each limit broken at one point (``index`` into the arrays)."""
    values = {"tip speed": ev.op.tip_speed, "superficial velocity":
              ev.op.superficial_gas_velocity, "motor": ev.motor_power,
              "P/V": ev.op.power_per_volume, "heat removal": ev.heat_load, "speed": ev.op.speed,
              "vvm": ev.op.vvm, "flooding margin": ev.op.flooding_margin,
              "duty": ev.kla_design, "critical DO": ev.kla_design}
    out = []
    for name, margin in ev.margins.items():
        m = float(np.asarray(margin)[index])
        if m < -1e-9:
            value = float(np.broadcast_to(np.asarray(values[name], float), ev.shape)[index])
            need = float(np.asarray(ev.kla_required)[index])
            by = f"{abs(m):.3g}" if name == "flooding margin" else f"{abs(m):.1%}"
            out.append(LIMIT_TEXT[name].format(value=value, need=need) + f" (by {by})")
    return out
