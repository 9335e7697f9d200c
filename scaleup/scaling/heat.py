"""Heat at scale: the load a culture and its agitator put into the liquid, and what a jacket
and coils can take out.

Load: metabolic heat (a fixed heat per mole of O2 consumed) times OUR times volume, plus the
gassed agitator power, which ends up as heat in the liquid. Removal: ``Q = U A dT_lm`` with the
liquid well mixed at one temperature and the coolant warming from its inlet to its outlet
temperature. For geometrically similar vessels the wall area grows as T^2 and the load as
T^3, so above a crossover volume a jacket alone can no longer hold the temperature.

All values SI: W, m2, K, kg/s, W/(m2 K).
"""

from __future__ import annotations

import math
from dataclasses import dataclass

import numpy as np

from scaleup.errors import InputError
from scaleup.hydro.geometry import Vessel, _torispherical_parts, head_depth

# Heat released by aerobic growth per mole of O2 consumed [J/mol] (Doran 1995, Section 5.9.2;
# the value and section from memory). Calorimetry of many strains and substrates gave
# 440 kJ/mol O2 (Birou, Marison & von Stockar 1987, Biotechnol. Bioeng. 30, 650).
METABOLIC_HEAT_PER_MOL_O2 = 460.0e3

# Typical overall heat-transfer coefficients [W/(m2 K)] for water-like broths with cooling
# water (common practice, no source): shown to the user as a guide, never used as a default.
TYPICAL_U = {
    "jacket": (300.0, 700.0),
    "half-pipe jacket": (500.0, 1000.0),
    "internal coil": (500.0, 1500.0),
}

WATER_HEAT_CAPACITY = 4180.0  # J/(kg K), liquid water near 20-40 degC (IAPWS-IF97 4179-4182)


def _out(x):
    a = np.asarray(x, dtype=float)
    return a if a.ndim else float(a)


def metabolic_heat_Doran(our, volume, heat_per_mol_o2: float = METABOLIC_HEAT_PER_MOL_O2):
    r"""Metabolic heat of an aerobic culture from its oxygen uptake, after Doran [1]_.

    .. math::
        Q_{met} = \Delta H_{O_2}\,\mathrm{OUR}\,V, \qquad \Delta H_{O_2} = 460\ \mathrm{kJ/mol}

    Parameters
    ----------
    our : float or array
        Oxygen uptake rate [mol/(m3 s)].
    volume : float or array
        Liquid volume [m3].
    heat_per_mol_o2 : float
        Heat released per mole of O2 consumed [J/mol].

    Returns
    -------
    float or array
        Heat released by the culture [W].

    Notes
    -----
    Holds for aerobic growth where O2 is the final electron acceptor (Thornton's rule);
    calorimetric measurements cluster at 440-460 kJ/mol O2. Not for anaerobic or
    product-forming steps that release heat without O2.

    Examples
    --------
    OUR 100 mol/(m3 h) gives 12.8 kW/m3 (460 kJ/mol x 100/3600 mol/(m3 s)):

    >>> round(metabolic_heat_Doran(100.0 / 3600.0, 1.0))
    12778

    References
    ----------
    .. [1] Doran, P. M. Bioprocess Engineering Principles. Academic Press, London (1995),
       Section 5.9.2 (heat of reaction with oxygen as electron acceptor).
    """
    q = np.asarray(our, float)
    if np.any(~np.isfinite(q)) or np.any(q < 0):
        raise InputError("an oxygen uptake rate must be zero or more (mol/(m3 s))", "OUR", our)
    return _out(heat_per_mol_o2 * q * np.asarray(volume, float))


def heat_load(our, volume, gassed_power, heat_per_mol_o2: float = METABOLIC_HEAT_PER_MOL_O2):
    """Heat to remove from the liquid: metabolic heat plus gassed agitator power [W].

    Parameters
    ----------
    our : float or array
        Oxygen uptake rate [mol/(m3 s)].
    volume : float
        Liquid volume [m3].
    gassed_power : float or array
        Gassed shaft power drawn by the liquid [W].
    heat_per_mol_o2 : float
        Heat per mole of O2 consumed [J/mol].

    Returns
    -------
    float or array
        Heat load [W]. Evaporation into the exhaust gas and losses to the room, which
        help a little, are left out (conservative).

    Examples
    --------
    >>> round(heat_load(100.0 / 3600.0, 40.0, 80e3) / 1e3, 1)
    591.1
    """
    return _out(np.asarray(metabolic_heat_Doran(our, volume, heat_per_mol_o2))
                + np.asarray(gassed_power, float))


def log_mean_temperature_difference(liquid_temperature, coolant_in, coolant_out):
    r"""Log-mean temperature difference between a well-mixed liquid and its coolant [K].

    .. math::
        \Delta T_{lm} = \frac{(T - t_{in}) - (T - t_{out})}{\ln[(T - t_{in})/(T - t_{out})]}

    Parameters
    ----------
    liquid_temperature : float or array
        Liquid temperature T [K].
    coolant_in, coolant_out : float or array
        Coolant inlet and outlet temperatures [K], both below T.

    Returns
    -------
    float or array
        dT_lm [K].

    Notes
    -----
    The standard result for one fluid at constant temperature (e.g. Incropera & DeWitt,
    Fundamentals of Heat and Mass Transfer, Eq. 11.15).

    Examples
    --------
    Broth at 37 degC, water 15 -> 25 degC:

    >>> round(log_mean_temperature_difference(310.15, 288.15, 298.15), 3)
    16.498
    """
    t = np.asarray(liquid_temperature, float)
    d_in = t - np.asarray(coolant_in, float)
    d_out = t - np.asarray(coolant_out, float)
    if np.any(d_in <= 0) or np.any(d_out <= 0):
        raise InputError("the coolant must stay colder than the liquid at inlet and outlet "
                         "(T_coolant < T_liquid)", "coolant temperature", (coolant_in, coolant_out))
    if np.any(d_out > d_in):
        raise InputError("the coolant outlet must not be colder than its inlet",
                         "coolant outlet temperature", coolant_out)
    with np.errstate(divide="ignore", invalid="ignore"):
        lm = np.where(np.isclose(d_in, d_out, rtol=1e-9), d_in,
                      (d_in - d_out) / np.log(d_in / d_out))
    return _out(lm)


def heat_removal(U, area, liquid_temperature, coolant_in, coolant_out):
    """Heat a surface removes, Q = U A dT_lm [W].

    Parameters
    ----------
    U : float or array
        Overall heat-transfer coefficient [W/(m2 K)].
    area : float or array
        Heat-transfer area wetted by the liquid [m2].
    liquid_temperature : float
        Liquid temperature [K].
    coolant_in, coolant_out : float
        Coolant inlet and outlet temperatures [K].

    Returns
    -------
    float or array
        Heat removed [W].

    Examples
    --------
    >>> round(heat_removal(500.0, 30.0, 310.15, 288.15, 298.15))
    247469
    """
    U = np.asarray(U, float)
    if np.any(U <= 0):
        raise InputError("U must be positive (W/(m2 K))", "U", U)
    dt = np.asarray(log_mean_temperature_difference(liquid_temperature, coolant_in, coolant_out))
    return _out(U * np.asarray(area, float) * dt)


def coolant_flow(duty, coolant_in, coolant_out, heat_capacity: float = WATER_HEAT_CAPACITY):
    """Coolant mass flow that carries a duty away, from q = W cp (t_out - t_in) [kg/s].

    Parameters
    ----------
    duty : float or array
        Heat to carry away [W].
    coolant_in, coolant_out : float
        Coolant inlet and outlet temperatures [K].
    heat_capacity : float
        Coolant heat capacity [J/(kg K)].

    Returns
    -------
    float or array
        Coolant mass flow [kg/s].

    Examples
    --------
    500 kW with water warming 10 K:

    >>> round(coolant_flow(500e3, 288.15, 298.15), 2)
    11.96
    """
    rise = float(coolant_out) - float(coolant_in)
    if not rise > 0:
        raise InputError(f"the coolant must warm up (outlet {coolant_out:g} K, inlet "
                         f"{coolant_in:g} K)", "coolant outlet temperature", coolant_out)
    return _out(np.asarray(duty, float) / (heat_capacity * rise))


def head_area(tank_diameter: float, bottom: str = "flat", crown_ratio: float = 1.0,
              knuckle_ratio: float = 0.1) -> float:
    """Inside surface area of a bottom head [m2].

    Parameters
    ----------
    tank_diameter : float
        T [m].
    bottom : str
        "flat", "elliptical" (2:1) or "torispherical".
    crown_ratio, knuckle_ratio : float
        Torispherical crown and knuckle radius over T [-].

    Returns
    -------
    float
        Area [m2]: pi T^2 / 4 flat, 1.084 T^2 for the 2:1 elliptical head (half an oblate
        spheroid), crown cap plus knuckle torus for the torispherical head.

    Examples
    --------
    >>> round(head_area(1.0, "elliptical"), 3)
    1.084
    """
    T = tank_diameter
    if bottom == "flat":
        return math.pi * T ** 2 / 4.0
    if bottom == "elliptical":
        a, c = T / 2.0, T / 4.0
        e = math.sqrt(1.0 - (c / a) ** 2)
        return math.pi * a ** 2 + math.pi * c ** 2 / (2.0 * e) * math.log((1 + e) / (1 - e))
    R, r, x_c, _, a1, _ = _torispherical_parts(T, crown_ratio, knuckle_ratio)
    theta1 = math.asin(x_c / (R - r))  # where the knuckle meets the crown
    crown = 2.0 * math.pi * R * a1
    knuckle = 2.0 * math.pi * r * (x_c * (math.pi / 2.0 - theta1) + r * math.cos(theta1))
    return crown + knuckle


def wall_area(vessel: Vessel, liquid_height: float | None = None,
              include_bottom: bool = True) -> float:
    """Wall area wetted by the liquid: cylinder up to the surface, plus the bottom head [m2].

    Parameters
    ----------
    vessel : Vessel
        The vessel.
    liquid_height : float, optional
        Liquid depth [m]; the vessel's own when omitted.
    include_bottom : bool
        Count the bottom head (jacketed bottoms are usual on fermenters).

    Returns
    -------
    float
        Area [m2].

    Examples
    --------
    >>> round(wall_area(Vessel(1.0, 1.0)), 4)  # pi T H + pi T^2 / 4
    3.927
    """
    H = vessel.liquid_height if liquid_height is None else liquid_height
    depth = head_depth(vessel.tank_diameter, vessel.bottom, vessel.crown_ratio,
                       vessel.knuckle_ratio)
    side = math.pi * vessel.tank_diameter * max(H - depth, 0.0)
    bottom = head_area(vessel.tank_diameter, vessel.bottom, vessel.crown_ratio,
                       vessel.knuckle_ratio) if include_bottom else 0.0
    return side + bottom


def crossover_volume(volumetric_load, U, dt_lm, area_coefficient: float,
                     volume_coefficient: float):
    r"""Volume above which a jacket of geometrically similar vessels cannot remove the load.

    With wall area :math:`A = a T^2` and volume :math:`V = b T^3`, a load per volume
    :math:`q` is removed while :math:`U a T^2 \Delta T_{lm} \ge q b T^3`, i.e. up to

    .. math::
        T_c = \frac{U a \Delta T_{lm}}{q b}, \qquad V_c = b T_c^3

    Parameters
    ----------
    volumetric_load : float or array
        Heat load per liquid volume [W/m3].
    U : float
        Overall heat-transfer coefficient [W/(m2 K)].
    dt_lm : float
        Log-mean temperature difference [K].
    area_coefficient : float
        a = A / T^2 of the vessel family [-].
    volume_coefficient : float
        b = V / T^3 of the vessel family [-].

    Returns
    -------
    float or array
        Crossover liquid volume [m3].

    Examples
    --------
    Flat-bottomed H/T = 2 (a = 2.25 pi, b = pi/2), 15 kW/m3, U = 500, dT_lm = 15 K:

    >>> round(crossover_volume(15e3, 500.0, 15.0, 2.25 * math.pi, math.pi / 2), 1)
    17.9
    """
    q = np.asarray(volumetric_load, float)
    if np.any(q <= 0):
        raise InputError("a heat load per volume must be positive (W/m3)", "heat load", q)
    t_c = U * area_coefficient * dt_lm / (q * volume_coefficient)
    return _out(volume_coefficient * t_c ** 3)


@dataclass(frozen=True)
class Cooling:
    """The cooling a vessel has: U of jacket and coils and the coolant temperatures.

    Attributes
    ----------
    jacket_u : float or None
        U of the jacket [W/(m2 K)] (None: no jacket cooling).
    coil_u : float or None
        U of the coils [W/(m2 K)].
    coolant_in, coolant_out : float
        Coolant inlet and outlet temperatures [K].
    coolant_heat_capacity : float
        [J/(kg K)].
    jacket_area : float or None
        Jacket area [m2]; the vessel's wetted jacket, else its wetted wall (cylinder and
        bottom head) when None.
    """

    jacket_u: float | None = None
    coil_u: float | None = None
    coolant_in: float = 288.15
    coolant_out: float = 298.15
    coolant_heat_capacity: float = WATER_HEAT_CAPACITY
    jacket_area: float | None = None


@dataclass(frozen=True)
class HeatBalance:
    """Heat load against removal for one vessel (arrays broadcast over operating points)."""

    metabolic_w: object
    agitation_w: object
    load_w: object
    jacket_area_m2: float
    coil_area_m2: float
    jacket_removal_w: float
    coil_removal_w: float
    removal_w: float
    margin: object  # removal / load - 1 [-]
    coolant_flow_kg_s: object  # for the load (or the capacity, whichever is smaller)
    dt_lm_k: float
    crossover_volume_m3: object
    notes: tuple[str, ...]

    def to_dict(self) -> dict:
        return {"metabolic_heat_w": self.metabolic_w, "agitation_heat_w": self.agitation_w,
                "heat_load_w": self.load_w, "jacket_area_m2": self.jacket_area_m2,
                "coil_area_m2": self.coil_area_m2, "jacket_removal_w": self.jacket_removal_w,
                "coil_removal_w": self.coil_removal_w, "heat_removal_w": self.removal_w,
                "heat_margin": self.margin, "coolant_flow_kg_s": self.coolant_flow_kg_s,
                "dt_lm_k": self.dt_lm_k, "jacket_crossover_volume_m3": self.crossover_volume_m3,
                "typical_u_w_m2_k": {k: list(v) for k, v in TYPICAL_U.items()},
                "notes": list(self.notes)}


def heat_balance(vessel: Vessel, our, gassed_power, liquid_temperature: float,
                 cooling: Cooling,
                 heat_per_mol_o2: float = METABOLIC_HEAT_PER_MOL_O2) -> HeatBalance:
    """Heat load of a vessel against what its jacket and coils remove.

    Parameters
    ----------
    vessel : Vessel
        The vessel (its jacket and coil areas; the wetted wall when no jacket is given).
    our : float or array
        Oxygen uptake rate [mol/(m3 s)].
    gassed_power : float or array
        Gassed agitator power [W].
    liquid_temperature : float
        [K].
    cooling : Cooling
        U values and coolant temperatures.
    heat_per_mol_o2 : float
        [J/mol].

    Returns
    -------
    HeatBalance
        Load, removal, margin, coolant flow and the jacket crossover volume of the vessel
        family (geometric similarity, same load per volume).

    Examples
    --------
    >>> v = Vessel(2.5, 5.0)
    >>> hb = heat_balance(v, 50 / 3600, 60e3, 310.15, Cooling(jacket_u=500.0))
    >>> round(hb.load_w / 1e3), round(hb.jacket_area_m2, 1), round(hb.margin, 2)
    (217, 44.2, 0.68)
    """
    notes = []
    volume = vessel.volume
    metabolic = metabolic_heat_Doran(our, volume, heat_per_mol_o2)
    load = np.asarray(metabolic) + np.asarray(gassed_power, float)
    dt = float(log_mean_temperature_difference(liquid_temperature, cooling.coolant_in,
                                               cooling.coolant_out))
    if cooling.jacket_area is not None:
        a_jacket = cooling.jacket_area
    elif vessel.jacket_area > 0:
        a_jacket = vessel.wetted_jacket_area()
    else:
        a_jacket = wall_area(vessel)
        notes.append("jacket area taken as the wetted wall (cylinder and bottom head): "
                     f"{a_jacket:.3g} m2")
    a_coil = vessel.wetted_coil_area()
    q_jacket = 0.0 if cooling.jacket_u is None else float(
        heat_removal(cooling.jacket_u, a_jacket, liquid_temperature, cooling.coolant_in,
                     cooling.coolant_out))
    q_coil = 0.0 if (cooling.coil_u is None or a_coil <= 0) else float(
        heat_removal(cooling.coil_u, a_coil, liquid_temperature, cooling.coolant_in,
                     cooling.coolant_out))
    if cooling.coil_u is not None and a_coil <= 0:
        notes.append("a coil U was given but the vessel has no coil area")
    removal = q_jacket + q_coil
    with np.errstate(divide="ignore"):
        margin = np.where(load > 0, removal / load - 1.0, np.inf) if removal > 0 \
            else np.full(np.shape(load), np.nan)
    flow = coolant_flow(np.minimum(load, removal) if removal > 0 else load, cooling.coolant_in,
                        cooling.coolant_out, cooling.coolant_heat_capacity)
    crossover = np.full(np.shape(load), np.nan)
    if cooling.jacket_u is not None:
        T = vessel.tank_diameter
        a_coeff = a_jacket / T ** 2
        b_coeff = volume / T ** 3
        crossover = crossover_volume(np.maximum(load / volume, 1e-12), cooling.jacket_u, dt,
                                     a_coeff, b_coeff)
    if removal == 0:
        notes.append("no cooling U given: heat removal not checked; typical U (common "
                     "practice, no source): " + ", ".join(f"{k} {lo:g}-{hi:g} W/(m2 K)"
                                                         for k, (lo, hi) in TYPICAL_U.items()))
    return HeatBalance(_out(metabolic), _out(gassed_power), _out(load), float(a_jacket),
                       float(a_coil), q_jacket, q_coil, removal, _out(margin), _out(flow), dt,
                       _out(crossover), tuple(notes))
