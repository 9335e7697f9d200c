"""Gas solubility (saturation concentration C*) in water and aqueous media.

Public API (SI: K, Pa absolute, mol/m3; vectorised over temperature and pressure):

* :func:`c_star` ``(gas, T, pressure_pa=101325, mole_fraction=None, salts=None,
  salinity=0.0, method=None)`` -> C* [mol/m3]; range notes become :class:`RangeWarning`.
* :func:`saturation` (same arguments) -> :class:`Saturation` with C* in mol/m3 and mg/L,
  the method used, the partial pressure, the salting-out factor and the warnings as text.
* :func:`c_star_log_mean` / :func:`log_mean_saturation` ``(gas, T, head_pressure_pa,
  liquid_height_m, inlet_fraction, exit_fraction, ...)``: tall vessels, bottom to top.
* :func:`henry_constant` ``(gas, T, method="sander")`` -> Hcp [mol/(m3 Pa)].
* :func:`pressure_at_depth` ``(head_pressure_pa, depth_m, density)`` -> [Pa].
* Methods (re-exported here): :func:`c_star_O2_Benson_Krause`,
  :func:`c_star_O2_Garcia_Gordon` (:mod:`scaleup.props.oxygen`),
  :func:`henry_constant_Sander`, :func:`henry_constant_IAPWS`
  (:mod:`scaleup.props.henry`); salting-out in :mod:`scaleup.props.salting`. The registry
  is :data:`c_star_methods`, the lister :func:`solubility_methods`.

Mole fractions are of the gas in the *dry* gas (what a gas analyser reports); the water
vapour at the liquid temperature is subtracted from the total pressure.
"""

from __future__ import annotations

import math
import warnings
from collections.abc import Callable
from dataclasses import dataclass

import numpy as np

from scaleup.errors import InputError, OutOfRange
from scaleup.props import seawater, water
from scaleup.props._common import (
    RangeWarning,
    as_array,
    check_positive,
    check_range,
    gas_data,
    is_scalar,
    out,
    range_note,
)
from scaleup.props.data import GASES, IAPWS_HENRY, SCHUMPE_T_RANGE
from scaleup.props.henry import (
    henry_constant,
    henry_constant_IAPWS,
    henry_constant_Sander,
    partial_pressure,
)
from scaleup.props.oxygen import AIR_O2_FRACTION, c_star_O2_Benson_Krause, c_star_O2_Garcia_Gordon
from scaleup.props.salting import ions_from_salts, salting_out_Weisenberger_Schumpe
from scaleup.units import P_ATM, G

__all__ = [
    "AIR_O2_FRACTION", "LogMeanSaturation", "Saturation", "SolubilityMethod", "c_star",
    "c_star_O2_Benson_Krause", "c_star_O2_Garcia_Gordon", "c_star_log_mean", "c_star_methods",
    "henry_constant", "henry_constant_IAPWS", "henry_constant_Sander", "log_mean_saturation",
    "partial_pressure", "pressure_at_depth", "saturation", "solubility_methods",
]

P_WARN = 1.0e6  # Pa: above ~10 bar ideal-gas Henry's law loses accuracy (no fugacity terms)


def pressure_at_depth(head_pressure_pa, depth_m, density=None, T=298.15):
    """Absolute pressure below the liquid surface: P_head + rho g h.

    Parameters
    ----------
    head_pressure_pa : float or array
        Head-space absolute pressure [Pa].
    depth_m : float or array
        Depth below the surface [m].
    density : float, optional
        Liquid density [kg/m3]; default that of water at ``T`` (gas hold-up lowers the mean
        density of an aerated liquid: pass the dispersion density if known).
    T : float
        Liquid temperature [K], used only for the default density.

    Returns
    -------
    float or array
        Absolute pressure [Pa].

    Examples
    --------
    >>> round(pressure_at_depth(101325.0, 10.0, density=1000.0))
    199392
    """
    scalar = is_scalar(head_pressure_pa, depth_m, density if density is not None else 0.0)
    h = check_positive("depth", depth_m, "m", allow_zero=True)
    P = check_positive("head_pressure", head_pressure_pa, "Pa")
    rho = water.density(T) if density is None else check_positive("density", density, "kg/m3")
    return out(P + np.asarray(rho) * G * h, scalar)


@dataclass(frozen=True)
class SolubilityMethod:
    """One C* method: the gases it covers, its temperature ranges [K] and its source."""

    name: str
    gases: tuple[str, ...]
    valid: tuple[float, float]  # K: the fitted range, no warning inside
    limits: tuple[float, float]  # K: accepted; between valid and limits a warning is given
    salinity_max: float  # kg/kg; 0 means the method has no salinity term
    source: str
    compute: Callable  # (gas, T, salinity, P, y) -> mol/m3

    def valid_range(self, gas: str) -> tuple[float, float]:
        if self.name == "henry-iapws":
            return (max(self.valid[0], IAPWS_HENRY[gas][3]), self.valid[1])
        return self.valid


def _henry_sander(gas, T, S, P, y):
    return np.asarray(henry_constant_Sander(gas, T)) * np.asarray(partial_pressure(T, P, y))


def _henry_iapws(gas, T, S, P, y):
    x = np.asarray(partial_pressure(T, P, y)) / np.asarray(henry_constant_IAPWS(gas, T))
    return x * np.asarray(water.density(T)) / water.M_WATER  # dilute: c = x * c_water


c_star_methods: dict[str, SolubilityMethod] = {
    m.name: m for m in [
        SolubilityMethod("benson-krause", ("O2",), (273.15, 313.15), (273.15, 323.15), 0.040,
                         "Benson and Krause (1984), Standard Methods 4500-O",
                         lambda gas, T, S, P, y: c_star_O2_Benson_Krause(T, S, P, y)),
        SolubilityMethod("garcia-gordon", ("O2",), (273.15, 313.15), (273.15, 313.15), 0.042,
                         "Garcia and Gordon (1992)",
                         lambda gas, T, S, P, y: c_star_O2_Garcia_Gordon(T, S, P, y)),
        SolubilityMethod("henry", tuple(GASES), (273.15, 313.15), (273.15, 373.15), 0.0,
                         "Sander (2015), van 't Hoff", _henry_sander),
        SolubilityMethod("henry-iapws", tuple(GASES), (273.15, 373.15), (273.15, 373.15), 0.0,
                         "IAPWS G7-04 (2004)", _henry_iapws),
    ]
}


def _covers(span: tuple[float, float], T: np.ndarray) -> bool:
    return bool(np.all((T >= span[0]) & (T <= span[1])))


def solubility_methods(gas: str, T=None, salinity: float = 0.0,
                       check_ranges: bool = True) -> list[str]:
    """Names of the C* methods for ``gas``, in order of preference.

    Parameters
    ----------
    gas : str
        ``O2``, ``N2``, ``CO2``, ``H2`` or ``CH4`` [-].
    T : float or array, optional
        Temperature [K]; with ``check_ranges``, methods that refuse it are left out.
    salinity : float
        Salinity [kg/kg]; methods without a salinity term are left out when it is above 0.
    check_ranges : bool
        Filter by ``T`` and ``salinity`` [-].

    Returns
    -------
    list of str
        Method names, keys of :data:`c_star_methods` [-].

    Examples
    --------
    >>> solubility_methods("O2", 310.15)
    ['benson-krause', 'garcia-gordon', 'henry', 'henry-iapws']
    >>> solubility_methods("H2", 353.15)
    ['henry', 'henry-iapws']
    """
    gas_data(gas)
    names = [name for name, m in c_star_methods.items() if gas in m.gases]
    if not check_ranges:
        return names
    keep = []
    for name in names:
        m = c_star_methods[name]
        if T is not None and not _covers(m.limits, np.asarray(T, dtype=float)):
            continue
        if np.any(np.asarray(salinity) > m.salinity_max):
            continue
        keep.append(name)
    return keep


def _default_method(gas: str, T: np.ndarray, salinity) -> str:
    if np.any(np.asarray(salinity) > 0) and not solubility_methods(gas, None, salinity):
        raise InputError(f"a salinity applies to O2 only (benson-krause, garcia-gordon); for "
                         f'{gas} give the salts (e.g. "NaCl=0.6 mol/L")', "salinity", salinity)
    candidates = solubility_methods(gas, T, salinity)
    for name in candidates:
        if _covers(c_star_methods[name].valid_range(gas), T):
            return name
    if candidates:
        return candidates[0]
    spans = "; ".join(f"{n} {m.limits[0]:g}-{m.limits[1]:g} K" for n, m in
                      c_star_methods.items() if gas in m.gases)
    raise OutOfRange(f"no solubility method for {gas} covers these conditions ({spans}; "
                     "salinity only with benson-krause or garcia-gordon)", "temperature", T)


@dataclass(frozen=True)
class Saturation:
    """C* of one gas at one state, with how it was obtained."""

    gas: str
    method: str
    temperature_k: float | np.ndarray
    pressure_pa: float | np.ndarray
    mole_fraction: float | np.ndarray
    partial_pressure_pa: float | np.ndarray
    c_star_mol_m3: float | np.ndarray
    c_star_mg_l: float | np.ndarray
    salting_out_factor: float | np.ndarray
    warnings: tuple[str, ...] = ()


def saturation(gas: str, T, pressure_pa=P_ATM, mole_fraction=None,
               salts: dict[str, float] | None = None, salinity=0.0,
               method: str | None = None) -> Saturation:
    """C* of a gas in water or an aqueous medium, with the method and any range notes.

    Parameters
    ----------
    gas : str
        ``O2``, ``N2``, ``CO2``, ``H2`` or ``CH4`` [-].
    T : float or array
        Liquid temperature [K].
    pressure_pa : float or array
        Total absolute pressure of the gas in contact with the liquid [Pa].
    mole_fraction : float or array, optional
        Mole fraction of the gas in the dry gas [-]; default air (0.20946) for O2, pure
        gas (1) for the others.
    salts : dict, optional
        Salt or ion -> concentration [mol/m3]; salting-out by Weisenberger-Schumpe.
    salinity : float or array
        Sea-salt salinity [kg/kg], for ``benson-krause`` and ``garcia-gordon`` only.
    method : str, optional
        A key of :data:`c_star_methods` [-]; default: the first method for the gas whose fitted
        range covers ``T`` (O2: benson-krause; other gases: henry, then henry-iapws).

    Returns
    -------
    Saturation
        C* [mol/m3] and [mg/L], method, partial pressure [Pa], salting-out factor [-] and
        warnings (text).

    Examples
    --------
    >>> s = saturation("O2", 303.15)
    >>> s.method, round(s.c_star_mg_l, 2)
    ('benson-krause', 7.56)
    >>> s = saturation("H2", 353.15, 5e5)
    >>> s.method, round(s.c_star_mol_m3, 2)
    ('henry-iapws', 3.18)
    """
    g = gas_data(gas)
    scalar = is_scalar(T, pressure_pa, mole_fraction if mole_fraction is not None else 0.0,
                       salinity)
    T = as_array(T, "temperature")
    y = AIR_O2_FRACTION if (mole_fraction is None and gas == "O2") else (
        1.0 if mole_fraction is None else mole_fraction)
    name = _default_method(gas, T, salinity) if method is None else method
    if name not in c_star_methods:
        raise InputError(f"unknown solubility method {name!r}; choose from "
                         f"{', '.join(c_star_methods)}", "method", name)
    m = c_star_methods[name]
    if gas not in m.gases:
        raise InputError(f"{name} covers {', '.join(m.gases)} only; for {gas} use "
                         f"{' or '.join(solubility_methods(gas, check_ranges=False))}",
                         "method", name)
    check_range("temperature", T, *m.limits, "K", name)
    salinity = check_positive("salinity", salinity, "kg/kg", allow_zero=True)
    if np.any(salinity > m.salinity_max):
        raise InputError(f"salinity is outside what {name} covers (at most "
                         f"{m.salinity_max:g} kg/kg); for other methods give the salts "
                         '(e.g. "NaCl=0.6 mol/L")', "salinity", salinity)
    notes = [range_note("temperature", T, *m.valid_range(gas), "K", name)]
    c = np.asarray(m.compute(gas, T, salinity, pressure_pa, y))
    factor = np.ones_like(c)
    if salts:
        factor = np.asarray(salting_out_Weisenberger_Schumpe(gas, T, ions_from_salts(salts)))
        notes.append(range_note("temperature", T, *SCHUMPE_T_RANGE, "K",
                                "Weisenberger-Schumpe"))
        if np.any(salinity > 0):
            notes.append("both a salinity and salts were given: their effects are multiplied; "
                         "make sure the salts are not already counted in the salinity")
    if np.any(np.asarray(pressure_pa) > P_WARN):
        notes.append("above 10 bar Henry's law with ideal gas (no fugacity or Poynting "
                     "correction) underestimates the non-ideality; treat C* as approximate")
    c = c * factor
    p_gas = np.asarray(partial_pressure(T, pressure_pa, y))
    return Saturation(
        gas=gas, method=name, temperature_k=out(T, scalar),
        pressure_pa=out(np.asarray(pressure_pa, dtype=float), scalar),
        mole_fraction=out(np.asarray(y, dtype=float), scalar),
        partial_pressure_pa=out(p_gas, scalar), c_star_mol_m3=out(c, scalar),
        c_star_mg_l=out(c * g.molar_mass * 1000.0, scalar),  # mol/m3 * kg/mol = kg/m3
        salting_out_factor=out(factor, scalar),
        warnings=tuple(n for n in notes if n))


def _warn(notes: tuple[str, ...]) -> None:
    for note in notes:
        warnings.warn(note, RangeWarning, stacklevel=3)


def c_star(gas: str, T, pressure_pa=P_ATM, mole_fraction=None,
           salts: dict[str, float] | None = None, salinity=0.0, method: str | None = None):
    """Saturation concentration C* [mol/m3]; see :func:`saturation` for the arguments.

    Range notes are issued as :class:`scaleup.props._common.RangeWarning`.

    Parameters
    ----------
    gas : str
        ``O2``, ``N2``, ``CO2``, ``H2`` or ``CH4`` [-].
    T : float or array
        Liquid temperature [K].
    pressure_pa : float or array
        Total absolute pressure [Pa].
    mole_fraction : float or array, optional
        Mole fraction in the dry gas [-].
    salts : dict, optional
        Salt or ion -> concentration [mol/m3].
    salinity : float or array
        Salinity [kg/kg].
    method : str, optional
        A key of :data:`c_star_methods` [-].

    Returns
    -------
    float or array
        C* [mol/m3].

    Examples
    --------
    Pure O2 at 37 degC, 1 atm, in 0.15 mol/L NaCl (4.8 % salted out):

    >>> round(c_star("O2", 310.15, mole_fraction=1.0, salts={"NaCl": 150.0}), 3)
    0.957
    """
    result = saturation(gas, T, pressure_pa, mole_fraction, salts, salinity, method)
    _warn(result.warnings)
    return result.c_star_mol_m3


@dataclass(frozen=True)
class LogMeanSaturation:
    """C* at the bottom and top of a tall vessel and the log-mean driving force."""

    bottom: Saturation
    top: Saturation
    bottom_pressure_pa: float
    c_star_log_mean_mol_m3: float
    warnings: tuple[str, ...] = ()


def log_mean_saturation(gas: str, T: float, head_pressure_pa: float, liquid_height_m: float,
                        inlet_fraction: float | None = None,
                        exit_fraction: float | None = None,
                        salts: dict[str, float] | None = None, salinity: float = 0.0,
                        method: str | None = None, c_liquid: float = 0.0,
                        density: float | None = None) -> LogMeanSaturation:
    r"""Log-mean C* of a tall vessel: inlet gas at the bottom, exit gas at the head.

    .. math::
        C^*_{lm} = C_L + \frac{(C^*_b - C_L) - (C^*_t - C_L)}
            {\ln\left[(C^*_b - C_L)/(C^*_t - C_L)\right]}

    with :math:`C^*_b` at :math:`P_b = P_{head} + \rho g H` and the inlet mole fraction,
    :math:`C^*_t` at the head pressure and the exit mole fraction. With :math:`C_L = 0` this
    is the log mean of the two saturation values.

    Parameters
    ----------
    gas : str
        ``O2``, ``N2``, ``CO2``, ``H2`` or ``CH4`` [-].
    T : float
        Liquid temperature [K].
    head_pressure_pa : float
        Head-space absolute pressure [Pa].
    liquid_height_m : float
        Height of liquid above the sparger [m].
    inlet_fraction, exit_fraction : float, optional
        Dry-gas mole fractions at inlet and exit [-]; exit defaults to inlet (no depletion).
    salts : dict, optional
        Salt or ion -> concentration [mol/m3].
    salinity : float
        Salinity [kg/kg].
    method : str, optional
        A key of :data:`c_star_methods` [-] (the same method is used top and bottom).
    c_liquid : float
        Dissolved concentration [mol/m3], taken as uniform (well mixed).
    density : float, optional
        Liquid density [kg/m3]; default that of the medium at ``T``.

    Returns
    -------
    LogMeanSaturation
        Bottom and top :class:`Saturation`, the bottom pressure [Pa] and the effective C*
        [mol/m3] that gives the log-mean driving force.

    Examples
    --------
    A 10 m tall vessel with air in and 17 % O2 out at 1 atm head, 30 degC:

    >>> lm = log_mean_saturation("O2", 303.15, 101325.0, 10.0, exit_fraction=0.17)
    >>> round(lm.c_star_log_mean_mol_m3, 3)
    0.312
    """
    if density is None:
        density = float(seawater.density_Sharqawy(T, salinity) if salinity else water.density(T))
    check_positive("liquid_height", liquid_height_m, "m", allow_zero=True)
    p_bottom = float(pressure_at_depth(head_pressure_pa, liquid_height_m, density))
    inlet = inlet_fraction
    exit_ = inlet_fraction if exit_fraction is None else exit_fraction
    name = method or _default_method(gas, np.asarray(float(T)), salinity)
    bottom = saturation(gas, T, p_bottom, inlet, salts, salinity, name)
    top = saturation(gas, T, head_pressure_pa, exit_, salts, salinity, name)
    c_liquid = float(check_positive("c_liquid", c_liquid, "mol/m3", allow_zero=True))
    d_bottom = bottom.c_star_mol_m3 - c_liquid
    d_top = top.c_star_mol_m3 - c_liquid
    if d_bottom <= 0 or d_top <= 0:
        raise InputError(f"the liquid concentration {c_liquid:g} mol/m3 is at or above C* "
                         "at the top or bottom; there is no driving force to average",
                         "c_liquid", c_liquid)
    mean = d_bottom if math.isclose(d_bottom, d_top, rel_tol=1e-12) else (
        (d_bottom - d_top) / math.log(d_bottom / d_top))
    notes = tuple(dict.fromkeys(bottom.warnings + top.warnings))
    return LogMeanSaturation(bottom, top, p_bottom, c_liquid + mean, notes)


def c_star_log_mean(gas: str, T: float, head_pressure_pa: float, liquid_height_m: float,
                    inlet_fraction: float | None = None, exit_fraction: float | None = None,
                    salts: dict[str, float] | None = None, salinity: float = 0.0,
                    method: str | None = None, c_liquid: float = 0.0,
                    density: float | None = None) -> float:
    """Effective C* [mol/m3] of a tall vessel; see :func:`log_mean_saturation`.

    Parameters
    ----------
    gas : str
        Gas name [-].
    T : float
        Liquid temperature [K].
    head_pressure_pa : float
        Head-space absolute pressure [Pa].
    liquid_height_m : float
        Liquid height above the sparger [m].
    inlet_fraction, exit_fraction : float, optional
        Dry-gas mole fractions at inlet and exit [-].
    salts : dict, optional
        Salt or ion -> concentration [mol/m3].
    salinity : float
        Salinity [kg/kg].
    method : str, optional
        A key of :data:`c_star_methods` [-].
    c_liquid : float
        Dissolved concentration [mol/m3].
    density : float, optional
        Liquid density [kg/m3].

    Returns
    -------
    float
        C* giving the log-mean driving force [mol/m3].

    Examples
    --------
    >>> round(c_star_log_mean("O2", 303.15, 101325.0, 0.0), 4) == round(c_star("O2", 303.15), 4)
    True
    """
    result = log_mean_saturation(gas, T, head_pressure_pa, liquid_height_m, inlet_fraction,
                                 exit_fraction, salts, salinity, method, c_liquid, density)
    _warn(result.warnings)
    return result.c_star_log_mean_mol_m3
