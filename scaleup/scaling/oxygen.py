"""Oxygen at scale: saturation at the vessel's pressures, the gas-phase O2 balance, the
driving force, the OTR capacity and the kLa a duty needs.

Conventions (stated once):

* Gas enters at the sparger with the inlet O2 fraction and leaves at the head space with the
  exit fraction; C* is proportional to the O2 mole fraction of the dry gas (Henry's law), so
  the solubility of a vessel is carried as C* per unit mole fraction at the sparger,
  mid-height and head pressures (:class:`OxygenSolubility`), from the props layer.
* Exit gas from the O2 balance: ``F_out = F_in - N + RQ N`` (CO2 produced at the respiratory
  quotient RQ replaces the O2 taken up; water vapour excluded, dry basis) and
  ``y_out = (F_in y_in - N) / F_out``, N the O2 transferred [mol/s].
* Driving force (``method``): "log-mean" (default) between the bottom (sparger pressure, inlet
  gas) and the top (head pressure, exit gas), the plug-flow gas result for a well-mixed
  liquid; "mid-depth": C* at mid-height pressure with the mean of inlet and exit fractions;
  "arithmetic": the mean of the two end driving forces; "backmixed": C* at mid-height
  pressure with the exit-gas fraction throughout (a well-mixed gas phase, the conservative
  reading for a large stirred vessel; Harriott 2003, Ex. 7.6). Where an end has no driving
  force left (gas depleted to equilibrium) the log mean is taken as zero.
* OTR capacity: the transfer the vessel sustains with the liquid held at ``c_liquid`` (the DO
  set-point), ``N = kLa V dC(N)``, solved for N because the exit gas depends on N.
* The duty is met exactly when ``kLa >= OUR / dC(OUR V)`` (:func:`required_kla`): the
  capacity rises with kLa, so this is the same test as OTR capacity >= OUR.
"""

from __future__ import annotations

from dataclasses import dataclass

import numpy as np

from scaleup.errors import InputError
from scaleup.hydro.geometry import Vessel
from scaleup.units import G

AIR_O2_FRACTION = 0.20946  # dry air (the Benson-Krause reference)
DRIVING_FORCES = ("log-mean", "mid-depth", "arithmetic", "backmixed")
_ITERATIONS = 60  # bisection halvings: 2^-60 of the bracket, far below any stated accuracy


def _out(x):
    a = np.asarray(x, dtype=float)
    return a if a.ndim else float(a)


@dataclass(frozen=True)
class OxygenSolubility:
    """C* per unit O2 mole fraction of the dry gas at three heights of a vessel [mol/m3].

    Attributes
    ----------
    bottom, middle, top : float
        At the sparger, at mid-height and at the head-space pressure [mol/m3 per unit
        mole fraction].
    bottom_pressure, middle_pressure, top_pressure : float
        The pressures [Pa].
    air_reference : float
        C* of air at the head-space pressure [mol/m3]: 100 % DO saturation.
    method : str
        The props method used.
    warnings : tuple of str
    """

    bottom: float
    middle: float
    top: float
    bottom_pressure: float
    middle_pressure: float
    top_pressure: float
    air_reference: float
    method: str = ""
    warnings: tuple[str, ...] = ()


def oxygen_solubility(vessel: Vessel, temperature: float, rho: float,
                      salts: dict[str, float] | None = None, salinity: float = 0.0,
                      method: str | None = None) -> OxygenSolubility:
    """O2 solubility of a vessel at its sparger, mid-height and head pressures.

    Parameters
    ----------
    vessel : Vessel
        The vessel (head pressure, liquid height, sparger height).
    temperature : float
        Liquid temperature [K].
    rho : float
        Liquid density [kg/m3] (hydrostatic head; gas hold-up neglected).
    salts : dict, optional
        Salt or ion -> concentration [mol/m3] for salting-out.
    salinity : float
        Salinity [kg/kg].
    method : str, optional
        A C* method of :mod:`scaleup.props.solubility`.

    Returns
    -------
    OxygenSolubility

    Examples
    --------
    >>> sol = oxygen_solubility(Vessel(2.0, 6.0), 303.15, 1000.0)
    >>> round(sol.air_reference * 32.0, 2), round(sol.bottom / sol.top, 3)  # mg/L; ratio
    (7.56, 1.606)
    """
    from scaleup.props.solubility import saturation

    head = vessel.head_pressure
    depth = vessel.liquid_height - vessel.sparger.height
    pressures = (head + rho * G * depth, head + rho * G * vessel.liquid_height / 2.0, head)
    results = [saturation("O2", temperature, p, 1.0, salts, salinity, method) for p in pressures]
    air = saturation("O2", temperature, head, AIR_O2_FRACTION, salts, salinity, method)
    notes = tuple(dict.fromkeys(w for r in results + [air] for w in r.warnings))
    return OxygenSolubility(*(float(r.c_star_mol_m3) for r in results), *pressures,
                            float(air.c_star_mol_m3), str(results[0].method), notes)


def _check_fraction(y_in) -> np.ndarray:
    y = np.asarray(y_in, float)
    if np.any(~(y > 0)) or np.any(y > 1):
        raise InputError("the inlet O2 fraction lies between 0 and 1 (0.2095 for air)",
                         "O2 fraction", y_in)
    return y


def exit_o2_fraction(gas_flow, inlet_fraction, transfer, respiratory_quotient: float = 1.0):
    """O2 mole fraction of the dry exit gas from the gas-phase O2 balance [-].

    .. math::
        y_{out} = \\frac{F y_{in} - N}{F - N + RQ\\,N}

    Parameters
    ----------
    gas_flow : float or array
        Dry inlet gas flow F [mol/s].
    inlet_fraction : float or array
        Inlet O2 mole fraction [-].
    transfer : float or array
        O2 transferred to the liquid N [mol/s], at most F y_in.
    respiratory_quotient : float
        CO2 released per O2 taken up [-] (0: CO2 stays in the liquid).

    Returns
    -------
    float or array
        Exit O2 fraction [-].

    Examples
    --------
    Air, 40 % of its O2 taken up, RQ 1:

    >>> round(exit_o2_fraction(10.0, 0.20946, 0.4 * 2.0946), 5)
    0.12568
    """
    F = np.asarray(gas_flow, float)
    y = np.asarray(inlet_fraction, float)
    n = np.asarray(transfer, float)
    with np.errstate(divide="ignore", invalid="ignore"):
        out = (F * y - n) / (F - n + respiratory_quotient * n)
    return _out(np.clip(np.nan_to_num(out, nan=0.0), 0.0, 1.0))


def driving_force(solubility: OxygenSolubility, inlet_fraction, exit_fraction, c_liquid,
                  method: str = "log-mean"):
    """Mean O2 driving force C* - C_L over the liquid height [mol/m3].

    Parameters
    ----------
    solubility : OxygenSolubility
        The vessel's solubility.
    inlet_fraction, exit_fraction : float or array
        Dry-gas O2 fractions at the sparger and in the head space [-].
    c_liquid : float or array
        Dissolved O2 of the (well-mixed) liquid [mol/m3].
    method : str
        "log-mean", "mid-depth", "arithmetic" or "backmixed".

    Returns
    -------
    float or array
        Driving force [mol/m3] (zero or less where there is none).

    Examples
    --------
    >>> sol = OxygenSolubility(1.6, 1.3, 1.0, 2e5, 1.5e5, 1e5, 0.21)
    >>> round(driving_force(sol, 0.21, 0.15, 0.05), 4)
    0.177
    """
    y_in = np.asarray(inlet_fraction, float)
    y_out = np.asarray(exit_fraction, float)
    c = np.asarray(c_liquid, float)
    if method == "mid-depth":
        return _out(solubility.middle * (y_in + y_out) / 2.0 - c)
    if method == "backmixed":
        return _out(solubility.middle * y_out - c)
    d_bottom = solubility.bottom * y_in - c
    d_top = solubility.top * y_out - c
    if method == "arithmetic":
        return _out((d_bottom + d_top) / 2.0)
    if method != "log-mean":
        raise InputError(f"unknown driving force {method!r}; use one of "
                         f"{', '.join(DRIVING_FORCES)}", "driving force", method)
    positive = (d_bottom > 0) & (d_top > 0)
    safe_b = np.where(positive, d_bottom, 1.0)
    safe_t = np.where(positive, d_top, 1.0)
    close = np.isclose(safe_b, safe_t, rtol=1e-10)
    with np.errstate(divide="ignore", invalid="ignore"):
        lm = np.where(close, safe_b, (safe_b - safe_t) / np.log(safe_b / np.where(close, 1.0,
                                                                                  safe_t)))
    return _out(np.where(positive, lm, 0.0))


def required_kla(our, volume: float, gas_flow, solubility: OxygenSolubility, c_liquid,
                 inlet_fraction=AIR_O2_FRACTION, respiratory_quotient: float = 1.0,
                 method: str = "log-mean"):
    """kLa a vessel needs to transfer the OUR with the liquid held at ``c_liquid`` [1/s].

    .. math::
        k_La_{req} = \\frac{\\mathrm{OUR}}{\\Delta C(y_{out}(\\mathrm{OUR}\\,V))}

    Parameters
    ----------
    our : float or array
        Oxygen uptake rate [mol/(m3 s)].
    volume : float
        Liquid volume [m3].
    gas_flow : float or array
        Dry inlet gas flow [mol/s].
    solubility : OxygenSolubility
        The vessel's solubility.
    c_liquid : float or array
        DO set-point [mol/m3].
    inlet_fraction : float or array
        Inlet O2 fraction [-].
    respiratory_quotient : float
        [-].
    method : str
        Driving-force method.

    Returns
    -------
    float or array
        Required kLa [1/s]; ``inf`` where the gas brings less O2 than the duty or leaves no
        driving force.

    Examples
    --------
    >>> sol = OxygenSolubility(1.6, 1.3, 1.0, 2e5, 1.5e5, 1e5, 0.21)
    >>> round(required_kla(0.01, 40.0, 10.0, sol, 0.05), 5)
    0.05251
    """
    y_in = _check_fraction(inlet_fraction)
    n = np.asarray(our, float) * volume
    F = np.asarray(gas_flow, float)
    supplied = F * y_in
    y_out = exit_o2_fraction(F, y_in, np.minimum(n, supplied), respiratory_quotient)
    dc = np.asarray(driving_force(solubility, y_in, y_out, c_liquid, method))
    with np.errstate(divide="ignore", invalid="ignore"):
        out = np.where((n < supplied) & (dc > 0), np.asarray(our, float) / dc, np.inf)
    return _out(out)


@dataclass(frozen=True)
class Transfer:
    """O2 transfer of a vessel at its capacity (arrays over operating points).

    Attributes
    ----------
    otr : OTR capacity [mol/(m3 s)]; transfer : [mol/s]; exit_fraction : [-];
    fraction_used : O2 taken up / O2 supplied [-]; driving_force : [mol/m3]
    """

    otr: object
    transfer: object
    exit_fraction: object
    fraction_used: object
    driving_force: object


def otr_capacity(kla, volume: float, gas_flow, solubility: OxygenSolubility, c_liquid,
                 inlet_fraction=AIR_O2_FRACTION, respiratory_quotient: float = 1.0,
                 method: str = "log-mean") -> Transfer:
    """OTR capacity with the liquid held at ``c_liquid``, exit gas consistent with the OTR.

    Solves ``N = kLa V dC(y_out(N))`` for the O2 transfer N (bisection, vectorised): the
    right-hand side falls as N rises, so the root is unique.

    Parameters
    ----------
    kla : float or array
        kLa [1/s].
    volume : float
        Liquid volume [m3].
    gas_flow : float or array
        Dry inlet gas flow [mol/s].
    solubility : OxygenSolubility
        The vessel's solubility.
    c_liquid : float or array
        DO held [mol/m3].
    inlet_fraction : float or array
        Inlet O2 fraction [-].
    respiratory_quotient : float
        [-].
    method : str
        Driving-force method.

    Returns
    -------
    Transfer

    Examples
    --------
    >>> sol = OxygenSolubility(1.6, 1.3, 1.0, 2e5, 1.5e5, 1e5, 0.21)
    >>> t = otr_capacity(0.05, 40.0, 10.0, sol, 0.05)
    >>> round(t.otr * 3600, 2), round(t.fraction_used, 3)  # mmol/(L h); -
    (34.48, 0.183)
    """
    y_in = _check_fraction(inlet_fraction)
    k = np.asarray(kla, float)
    F = np.asarray(gas_flow, float)
    c = np.asarray(c_liquid, float)
    k, F, y_in, c = np.broadcast_arrays(k, F, y_in, c)
    lo = np.zeros(k.shape)
    hi = F * y_in
    for _ in range(_ITERATIONS):
        mid = 0.5 * (lo + hi)
        y_out = exit_o2_fraction(F, y_in, mid, respiratory_quotient)
        excess = k * volume * np.asarray(driving_force(solubility, y_in, y_out, c, method)) - mid
        lo, hi = np.where(excess > 0, mid, lo), np.where(excess > 0, hi, mid)
    n = 0.5 * (lo + hi)
    y_out = np.asarray(exit_o2_fraction(F, y_in, n, respiratory_quotient))
    dc = np.asarray(driving_force(solubility, y_in, y_out, c, method))
    with np.errstate(divide="ignore", invalid="ignore"):
        used = np.where(F > 0, n / (F * y_in), 0.0)
    return Transfer(_out(n / volume), _out(n), _out(y_out), _out(used), _out(dc))


def dissolved_oxygen_at_uptake(kla, our, volume: float, gas_flow,
                               solubility: OxygenSolubility, inlet_fraction=AIR_O2_FRACTION,
                               respiratory_quotient: float = 1.0, method: str = "log-mean"):
    """Dissolved O2 the liquid settles at while the culture takes up ``our`` [mol/m3].

    Solves ``kLa dC(C_L) = OUR`` for C_L with the exit gas fixed by the uptake.

    Parameters
    ----------
    kla : float or array
        kLa [1/s].
    our : float or array
        Oxygen uptake rate [mol/(m3 s)].
    volume : float
        Liquid volume [m3].
    gas_flow : float or array
        Dry inlet gas flow [mol/s].
    solubility : OxygenSolubility
        The vessel's solubility.
    inlet_fraction : float or array
        Inlet O2 fraction [-].
    respiratory_quotient : float
        [-].
    method : str
        Driving-force method.

    Returns
    -------
    float or array
        Mean dissolved O2 [mol/m3]; 0 where the vessel cannot transfer the OUR at all
        (oxygen-limited culture).

    Examples
    --------
    >>> sol = OxygenSolubility(1.6, 1.3, 1.0, 2e5, 1.5e5, 1e5, 0.21)
    >>> round(dissolved_oxygen_at_uptake(0.05, 0.01, 40.0, 10.0, sol), 4)
    0.041
    """
    y_in = _check_fraction(inlet_fraction)
    k = np.asarray(kla, float)
    q = np.asarray(our, float)
    F = np.asarray(gas_flow, float)
    k, q, F, y_in = np.broadcast_arrays(k, q, F, y_in)
    n = np.minimum(q * volume, F * y_in)
    y_out = np.asarray(exit_o2_fraction(F, y_in, n, respiratory_quotient))
    lo = np.zeros(k.shape)
    hi = solubility.bottom * y_in
    for _ in range(_ITERATIONS):
        mid = 0.5 * (lo + hi)
        excess = k * np.asarray(driving_force(solubility, y_in, y_out, mid, method)) - q
        lo, hi = np.where(excess > 0, mid, lo), np.where(excess > 0, hi, mid)
    return _out(0.5 * (lo + hi))


def do_setpoint(value: float, solubility: OxygenSolubility, percent: bool) -> float:
    """A DO set-point in mol/m3 from % of air saturation (at the head pressure) or mol/m3.

    Parameters
    ----------
    value : float
        The set-point [% or mol/m3].
    solubility : OxygenSolubility
        The vessel's solubility (its air reference is 100 %).
    percent : bool
        True when ``value`` is in % of air saturation.

    Returns
    -------
    float
        DO [mol/m3].

    Examples
    --------
    >>> sol = OxygenSolubility(1.6, 1.3, 1.0, 2e5, 1.5e5, 1e5, 0.21)
    >>> do_setpoint(20.0, sol, True)
    0.042
    """
    out = value / 100.0 * solubility.air_reference if percent else value
    if not 0 <= out < solubility.bottom:
        raise InputError(f"a DO set-point of {out:.4g} mol/m3 is outside 0 to the saturation "
                         f"with pure O2 at the sparger ({solubility.bottom:.4g} mol/m3)",
                         "DO set-point", value)
    return float(out)
