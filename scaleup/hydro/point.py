"""One operating point of a vessel, end to end: power, gassed power, regime, blend time,
dispersion. This is the function the scale-up engine, the service layer and the CLI call.

Conventions (stated once):

* The superficial gas velocity and the hold-up use the actual gas volume at the pressure of
  ``pressure_basis``: "mid-height" (default: head-space pressure plus half the hydrostatic
  head, the usual basis of kLa correlations for tall vessels), "sparger" or "head".
* The flow number, the gassed power and the flooding check of each impeller use the actual
  gas flow at that impeller's own height (hydrostatic pressure there), with the full gas flow
  passing every impeller (upper impellers of a real shaft lose a little less power, so Pg is
  slightly low: conservative for kLa).
* vvm is on the normal basis (0 degC, 101.325 kPa), like everywhere in the package.
* The gas is dry and at the liquid temperature.
"""

from __future__ import annotations

import math
from dataclasses import dataclass

import numpy as np

from scaleup.errors import InputError
from scaleup.hydro import dispersion as disp
from scaleup.hydro import mixing, power, regimes
from scaleup.hydro.geometry import Vessel
from scaleup.hydro.impellers import impeller_type

PRESSURE_BASES = ("mid-height", "sparger", "head")


def _out(x):
    a = np.asarray(x)
    return a if a.ndim else a.item()


@dataclass(frozen=True)
class OperatingPoint:
    """Everything the hydrodynamics say about one (or an array of) operating point(s).

    Values are floats for scalar inputs and numpy arrays (broadcast over speed and gas
    flow) otherwise. Per-impeller values refer to the bottom (sparged) impeller unless noted.

    Attributes
    ----------
    speed : [rev/s]; gas_flow : [mol/s]; temperature : [K]; density : [kg/m3];
    viscosity : [Pa s]; liquid_volume : [m3]
    power : ungassed shaft power, all impellers [W]
    gassed_power : gassed power, all impellers (measured when given) [W]
    power_per_volume, gassed_power_per_volume : [W/m3]
    gassed_power_ratio : Pg / P [-]
    power_number : P / (rho N^3 D^5) with D of the bottom impeller, all impellers [-]
    power_numbers : per impeller, including the spacing interaction, bottom first [-]
    reynolds, froude, flow_number : of the bottom impeller [-]
    regime : "flooded", "loaded" or "completely dispersed"
    flooding_speed, complete_dispersion_speed : N_F and N_CD of the bottom impeller [rev/s]
    flooding_margin : N / N_F - 1 [-]
    tip_speed : largest impeller tip speed [m/s]
    blend_time_95 : [s]
    superficial_gas_velocity : at ``pressure_basis`` [m/s]
    vvm : normal basis [1/min]
    gas_flow_at_impeller : actual gas flow at the bottom impeller [m3/s]
    sparger_pressure, impeller_pressure, gas_pressure : absolute [Pa]
    gas_holdup : [-]; sauter_diameter : [m]; interfacial_area : [1/m]
        (Calderbank 1958; NaN without a surface tension)
    energy_dissipation : mean, from the gassed power [W/kg]
    kolmogorov_length : [m]
    gassed_method, pressure_basis, blend_method : the methods used
    warnings : tuple of str
    """

    speed: object
    gas_flow: object
    temperature: float
    density: float
    viscosity: float
    liquid_volume: float
    power: object
    gassed_power: object
    power_per_volume: object
    gassed_power_per_volume: object
    gassed_power_ratio: object
    power_number: object
    power_numbers: tuple
    reynolds: object
    froude: object
    flow_number: object
    regime: object
    flooding_speed: object
    complete_dispersion_speed: object
    flooding_margin: object
    tip_speed: object
    blend_time_95: object
    superficial_gas_velocity: object
    vvm: object
    gas_flow_at_impeller: object
    sparger_pressure: float
    impeller_pressure: float
    gas_pressure: float
    gas_holdup: object
    sauter_diameter: object
    interfacial_area: object
    energy_dissipation: object
    kolmogorov_length: object
    gassed_method: str
    pressure_basis: str
    blend_method: str
    warnings: tuple

    def to_dict(self) -> dict:
        """SI values under keys that carry their unit (the ``--json`` contract)."""
        return {
            "speed_rps": self.speed, "gas_flow_mol_s": self.gas_flow,
            "temperature_k": self.temperature, "density_kg_m3": self.density,
            "viscosity_pa_s": self.viscosity, "liquid_volume_m3": self.liquid_volume,
            "power_w": self.power, "gassed_power_w": self.gassed_power,
            "power_per_volume_w_m3": self.power_per_volume,
            "gassed_power_per_volume_w_m3": self.gassed_power_per_volume,
            "gassed_power_ratio": self.gassed_power_ratio,
            "power_number": self.power_number,
            "power_numbers": list(self.power_numbers),
            "reynolds": self.reynolds, "froude": self.froude,
            "flow_number": self.flow_number, "regime": self.regime,
            "n_flood_rps": self.flooding_speed, "n_cd_rps": self.complete_dispersion_speed,
            "flooding_margin": self.flooding_margin, "tip_speed_m_s": self.tip_speed,
            "blend_time_95_s": self.blend_time_95,
            "superficial_gas_velocity_m_s": self.superficial_gas_velocity, "vvm": self.vvm,
            "gas_flow_at_impeller_m3_s": self.gas_flow_at_impeller,
            "sparger_pressure_pa": self.sparger_pressure,
            "impeller_pressure_pa": self.impeller_pressure,
            "gas_pressure_pa": self.gas_pressure, "pressure_basis": self.pressure_basis,
            "gas_holdup": self.gas_holdup, "sauter_diameter_m": self.sauter_diameter,
            "interfacial_area_per_m": self.interfacial_area,
            "energy_dissipation_w_kg": self.energy_dissipation,
            "kolmogorov_length_m": self.kolmogorov_length,
            "gassed_method": self.gassed_method, "blend_method": self.blend_method,
            "warnings": list(self.warnings),
        }


def operating_point(vessel: Vessel, speed, gas_flow, temperature: float, rho: float,
                    mu: float, sigma: float | None = None, *, gassed_method: str | None = None,
                    pressure_basis: str = "mid-height", measured_power=None,
                    measured_torque=None) -> OperatingPoint:
    """Evaluate a vessel at a speed and gas flow, end to end.

    Parameters
    ----------
    vessel : Vessel
        The vessel with at least one impeller.
    speed : float or array
        Agitator speed N [rev/s], > 0.
    gas_flow : float or array
        Molar gas flow [mol/s], >= 0.
    temperature : float
        Liquid (and gas) temperature [K].
    rho : float
        Liquid density [kg/m3].
    mu : float
        Liquid dynamic viscosity [Pa s].
    sigma : float, optional
        Surface tension [N/m]; needed for hold-up and bubble size.
    gassed_method : str, optional
        A key of :data:`scaleup.hydro.power.gassed_power_correlations`; default "type".
    pressure_basis : str
        Where the superficial velocity is evaluated: "mid-height", "sparger" or "head".
    measured_power : float or array, optional
        Measured (gassed, if gas flows) power drawn by the liquid in this run [W]; overrides
        the estimate of Pg (and of P without gas).
    measured_torque : float or array, optional
        Measured shaft torque [N m], net of the no-load friction torque; P = 2 pi N torque.

    Returns
    -------
    OperatingPoint
        All results and the warnings that apply.

    Examples
    --------
    Harriott (2003), Example 7.6: T = 4 m, H = 12 m, a disc turbine (Np 6) 2 m off the bottom
    and two pitched-blade turbines (Np 1.7; heights not given, placed 4 m apart here),
    D = 1.333 m, 120 rpm, 1.5 mPa s: 316 kW ungassed.

    >>> from scaleup.hydro.geometry import Impeller, Vessel
    >>> imps = (Impeller("disc-turbine", 1.333, 2.0, power_number=6.0),
    ...         Impeller("pitched-blade-6", 1.333, 6.0, power_number=1.7),
    ...         Impeller("pitched-blade-6", 1.333, 10.0, power_number=1.7))
    >>> op = operating_point(Vessel(4.0, 12.0, imps), 2.0, 0.0, 303.15, 1000.0, 1.5e-3)
    >>> round(op.power / 1000)
    316
    """
    if not vessel.impellers:
        raise InputError("the vessel has no impeller", "impellers")
    if pressure_basis not in PRESSURE_BASES:
        raise InputError(f"unknown pressure basis {pressure_basis!r}; use one of "
                         f"{', '.join(PRESSURE_BASES)}", "pressure basis", pressure_basis)
    for name, value, unit in (("temperature", temperature, "K"), ("density", rho, "kg/m3"),
                              ("viscosity", mu, "Pa s")):
        if not (math.isfinite(value) and value > 0):
            raise InputError(f"{value!r} {unit} must be a positive finite number", name, value)
    if sigma is not None and not (math.isfinite(sigma) and sigma > 0):
        raise InputError(f"{sigma!r} N/m must be a positive finite number", "surface tension",
                         sigma)
    n = np.asarray(speed, dtype=float)
    n_dot = np.asarray(gas_flow, dtype=float)
    if np.any(~np.isfinite(n)) or np.any(n <= 0):
        raise InputError("the speed must be a positive finite number of rev/s", "speed", speed)
    if np.any(~np.isfinite(n_dot)) or np.any(n_dot < 0):
        raise InputError("a gas flow must be zero or more (mol/s)", "gas flow", gas_flow)
    n, n_dot = np.broadcast_arrays(n, n_dot)
    method = power.DEFAULT_GASSED_METHOD if gassed_method is None else gassed_method
    if method not in power.gassed_power_correlations:
        raise InputError(f"unknown gassed-power method {method!r}; use one of "
                         f"{', '.join(power.gassed_power_correlations)}", "gassed method",
                         method)
    warnings: list[str] = []
    volume = vessel.volume
    H, T = vessel.liquid_height, vessel.tank_diameter
    imps = vessel.impellers
    bottom = imps[0]
    gassed_any = bool(np.any(n_dot > 0))

    # ungassed and gassed power, impeller by impeller
    factors = power.interaction_factors([s / below.diameter for s, below
                                         in zip(vessel.spacings, imps, strict=False)])
    p_total = np.zeros(n.shape)
    pg_total = np.zeros(n.shape)
    nps = []
    for imp, factor in zip(imps, factors, strict=True):
        spec = impeller_type(imp.type)
        re_i = np.asarray(disp.reynolds(n, imp.diameter, rho, mu))
        np_i = np.asarray(power.power_number_curve(re_i, spec, imp.power_number)) * factor
        nps.append(_out(np_i))
        p_i = np.asarray(power.power_ungassed(np_i, rho, n, imp.diameter))
        q_i = np.asarray(disp.actual_gas_flow(n_dot, temperature, disp.hydrostatic_pressure(
            vessel.head_pressure, rho, H - imp.clearance)))
        pg_i = np.asarray(power.gassed_power(p_i, n, imp.diameter, q_i, impeller=imp.type,
                                             method=method, liquid_volume=volume,
                                             blade_width=imp.blade_width))
        p_total += p_i
        pg_total += pg_i
        if gassed_any:
            valid = power.gassed_power_correlations[method][1]
            if valid is not None and imp.type not in valid:
                warnings.append(f"gassed power by {method} was established for "
                                f"{', '.join(valid)}, not {imp.type}")
            if spec.gassed == "none" and method == "type":
                warnings.append(f"no gassed-power data for {imp.type}: Pg = P assumed")
            fl_i = q_i / (n * imp.diameter ** 3)
            if (method == "Cui" or (method == "type" and spec.gassed == "Cui")) and np.any(
                    fl_i > power.CUI_FLOW_NUMBER_MAX):
                warnings.append(f"{imp.type}: Fl = {np.max(fl_i):.3g} is above the range of "
                                f"Cui et al. (1996), Fl <= {power.CUI_FLOW_NUMBER_MAX:g}: "
                                f"Pg/P held at {power.CUI_RATIO_FLOOR:.3g}")
        if np.any(re_i < spec.re_turbulent):
            zone = "laminar" if np.all(re_i <= spec.re_laminar) else "transitional"
            warnings.append(f"{imp.type}: Re = {np.min(re_i):.3g} is {zone}; power number "
                            "from the catalogue power curve (uncertain in the transition: "
                            "up to about 60 % where no published point is held)")
        if vessel.baffles == 0 and spec.flow != "close-clearance":
            warnings.append(f"unbaffled vessel: the power number of {imp.type} is for "
                            "baffled vessels; expect a vortex and lower power")
        if imp is imps[-1] and H - imp.clearance < imp.diameter / 2:
            warnings.append("the top impeller is within D/2 of the liquid surface: "
                            "surface aeration and power loss are likely")

    # a measured power or torque overrides the estimate
    measured = None
    if measured_torque is not None:
        measured = 2.0 * math.pi * n * np.asarray(measured_torque, float)
    elif measured_power is not None:
        measured = np.broadcast_to(np.asarray(measured_power, float), n.shape)
    if measured is not None:
        if np.any(~np.isfinite(measured)) or np.any(measured <= 0):
            raise InputError("a measured power or torque must be positive", "measured power",
                             measured_power if measured_torque is None else measured_torque)
        warnings.append("measured power used for Pg in place of the correlation estimate "
                        f"({np.mean(pg_total):.4g} W)")
        pg_total = measured.astype(float)
        if not gassed_any:
            p_total = pg_total.copy()

    # the sparged impeller: flow number, regime, flooding
    p_imp = float(disp.hydrostatic_pressure(vessel.head_pressure, rho, H - bottom.clearance))
    q_imp = np.asarray(disp.actual_gas_flow(n_dot, temperature, p_imp))
    fl = np.asarray(disp.flow_number(q_imp, n, bottom.diameter))
    fr = np.asarray(disp.froude(n, bottom.diameter))
    reg = np.asarray(regimes.regime(n, q_imp, bottom.diameter, T))
    n_f = np.asarray(regimes.flooding_speed(q_imp, bottom.diameter, T))
    n_cd = np.asarray(regimes.complete_dispersion_speed(q_imp, bottom.diameter, T))
    margin = np.asarray(regimes.flooding_margin(n, q_imp, bottom.diameter, T))
    if gassed_any:
        warnings.extend(regimes.regime_warnings(bottom.type, bottom.diameter / T,
                                                bottom.clearance / T))
        if np.any(reg == "flooded"):
            warnings.append("the bottom impeller is flooded at this gas flow: gas passes "
                            "up the shaft undispersed and gassed-power and kLa correlations "
                            "do not hold; raise the speed above N_F")

    # blend time
    re_b = np.asarray(disp.reynolds(n, bottom.diameter, rho, mu))
    np_ref = p_total / (rho * n ** 3 * bottom.diameter ** 5)
    if len(imps) > 1:
        blend_method = "Cooke"
        theta = mixing.blend_time(n, bottom.diameter, T, H, np_ref, re_b, impellers=len(imps))
        if not 1.0 <= H / T <= 3.5:
            warnings.append(f"H/T = {H / T:.3g}: the multiple-impeller blend time (Cooke et "
                            "al. 1988) was fitted for H/T about 1-3")
    else:
        np_single = np.asarray(nps[0])
        constant = re_b * np_single ** (1.0 / 3.0)
        blend_method = mixing.blend_time_methods(1, float(np.min(constant)))[0]
        theta = mixing.blend_time(n, bottom.diameter, T, H, np_single, re_b)
        if np.any(constant < mixing.TRANSITIONAL_REGIME_CONSTANT):
            warnings.append("Re Np^(1/3) < 183: laminar mixing; the blend-time correlations "
                            "do not apply (the value shown is extrapolated)")
        if not 0.5 <= H / T <= 1.5:
            warnings.append(f"H/T = {H / T:.3g} with a single impeller: blend-time "
                            "correlations were fitted for H/T about 1")

    # dispersion
    p_sparger = float(disp.hydrostatic_pressure(vessel.head_pressure, rho,
                                                H - vessel.sparger.height))
    p_gas = {"mid-height": float(disp.hydrostatic_pressure(vessel.head_pressure, rho, H / 2)),
             "sparger": p_sparger, "head": vessel.head_pressure}[pressure_basis]
    us = np.asarray(disp.superficial_gas_velocity(n_dot, temperature, p_gas, T))
    pgv = pg_total / volume
    if sigma is None:
        holdup = d32 = area = np.full(n.shape, np.nan)
    else:
        holdup = np.asarray(disp.gas_holdup_Calderbank(pgv, us, rho, sigma))
        with np.errstate(divide="ignore", invalid="ignore"):
            d32 = np.where(holdup > 0, disp.sauter_diameter_Calderbank(pgv, holdup, rho, sigma),
                           np.nan)
            area = np.where(holdup > 0, disp.interfacial_area(holdup, d32), 0.0)
    eps = np.asarray(disp.energy_dissipation(pg_total, rho, volume))

    with np.errstate(divide="ignore", invalid="ignore"):
        ratio = np.where(p_total > 0, pg_total / p_total, 1.0)
    return OperatingPoint(
        speed=_out(n), gas_flow=_out(n_dot), temperature=float(temperature),
        density=float(rho), viscosity=float(mu), liquid_volume=float(volume),
        power=_out(p_total), gassed_power=_out(pg_total),
        power_per_volume=_out(p_total / volume), gassed_power_per_volume=_out(pgv),
        gassed_power_ratio=_out(ratio), power_number=_out(np_ref),
        power_numbers=tuple(nps), reynolds=_out(re_b), froude=_out(fr), flow_number=_out(fl),
        regime=_out(reg), flooding_speed=_out(n_f), complete_dispersion_speed=_out(n_cd),
        flooding_margin=_out(margin),
        tip_speed=_out(np.max([disp.tip_speed(n, i.diameter) for i in imps], axis=0)),
        blend_time_95=_out(theta), superficial_gas_velocity=_out(us),
        vvm=_out(disp.vvm(n_dot, volume)), gas_flow_at_impeller=_out(q_imp),
        sparger_pressure=p_sparger, impeller_pressure=p_imp, gas_pressure=p_gas,
        gas_holdup=_out(holdup), sauter_diameter=_out(d32), interfacial_area=_out(area),
        energy_dissipation=_out(eps),
        kolmogorov_length=_out(disp.kolmogorov_length(mu, rho, eps)),
        gassed_method=method, pressure_basis=pressure_basis, blend_method=blend_method,
        warnings=tuple(dict.fromkeys(warnings)),
    )
