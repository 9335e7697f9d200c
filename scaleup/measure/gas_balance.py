"""OTR, CER and RQ from inlet and exit gas analysis by the inert-gas balance; kLa from OTR.

Basis, stated once: the mole fractions are on a **dry** basis (the exit gas is dried before
the analyser) and the gas flow is the **dry inlet** flow. Nitrogen and argon (the "inert"
balance, everything that is not O2 or CO2) pass through unchanged, so

.. math::
    F_{out} = F_{in} \\frac{1 - y_{O_2,in} - y_{CO_2,in}}{1 - y_{O_2,out} - y_{CO_2,out}}

    OTR = \\frac{F_{in} y_{O_2,in} - F_{out} y_{O_2,out}}{V_L}, \\qquad
    CER = \\frac{F_{out} y_{CO_2,out} - F_{in} y_{CO_2,in}}{V_L}, \\qquad RQ = CER / OTR

This is exact algebra of the balance (no approximation); water vapour, argon and any
dissolved-CO2 accumulation are outside it. kLa then follows from the driving force,
:math:`k_La = OTR / (C^* - C)`, with C* in equilibrium with the exit gas for a well-mixed
liquid, or the log-mean of the driving forces at the bottom (inlet gas, hydrostatic
pressure) and top (exit gas) for a tall vessel where the gas is in plug flow.
"""

from __future__ import annotations

import math
from dataclasses import dataclass

import numpy as np

from scaleup.errors import InputError, check_range

BASIS = "dry-gas mole fractions, dry inlet gas flow, inert-gas (N2 + Ar) balance"
SMALL_DIFFERENCE = 0.002  # mol O2 per mol feed; below it analyser error dominates


@dataclass(frozen=True)
class GasBalance:
    """Result of the inert-gas balance. Rates per liquid volume [mol/(m3 s)], flows [mol/s]."""

    inlet_flow_mol_s: float
    outlet_flow_mol_s: float
    outlet_to_inlet: float
    o2_per_mol_feed: float
    co2_per_mol_feed: float
    otr_mol_m3_s: float
    cer_mol_m3_s: float
    rq: float
    warnings: tuple[str, ...]


def gas_balance_inert(gas_flow: float, y_o2_in: float, y_o2_out: float, y_co2_in: float,
                      y_co2_out: float, volume: float) -> GasBalance:
    """OTR, CER and RQ from the inert-gas balance on dry inlet and exit gas.

    .. math::
        OTR = \\frac{F_{in}}{V_L}\\left(y_{O_2,in} - y_{O_2,out}
              \\frac{1 - y_{O_2,in} - y_{CO_2,in}}{1 - y_{O_2,out} - y_{CO_2,out}}\\right)

    Parameters
    ----------
    gas_flow : float
        Dry inlet gas flow [mol/s].
    y_o2_in, y_o2_out : float
        O2 mole fraction of the dry inlet and exit gas [-].
    y_co2_in, y_co2_out : float
        CO2 mole fraction of the dry inlet and exit gas [-].
    volume : float
        Liquid volume [m3].

    Returns
    -------
    GasBalance
        Flows [mol/s], per-mol-feed transfers [-], OTR and CER [mol/(m3 s)], RQ [-].

    Notes
    -----
    Exact algebra of the balance, valid for any fractions with a positive inert remainder.
    When the O2 taken up is below 0.002 mol per mol of feed (common practice, no source), a
    typical analyser error of a few hundredths of a percent is a large part of the result.

    Examples
    --------
    Air in, 19.0 % O2 and 1.5 % CO2 out: the exit flow is 0.99384 of the inlet, 0.02067 mol O2
    are taken up per mol of feed, RQ about 0.70 (exact algebra of the inert balance):

    >>> b = gas_balance_inert(1.0, 0.2095, 0.19, 0.0004, 0.015, 1.0)
    >>> round(b.outlet_to_inlet, 5), round(b.o2_per_mol_feed, 5), round(b.rq, 2)
    (0.99384, 0.02067, 0.7)
    """
    check_range("gas_flow", gas_flow, 0.0, None, "mol/s", low_inclusive=False)
    check_range("volume", volume, 0.0, None, "m3", low_inclusive=False)
    for name, y in (("y_o2_in", y_o2_in), ("y_o2_out", y_o2_out), ("y_co2_in", y_co2_in),
                    ("y_co2_out", y_co2_out)):
        check_range(name, y, 0.0, 1.0, "(mole fraction)")
    inert_in = 1.0 - y_o2_in - y_co2_in
    inert_out = 1.0 - y_o2_out - y_co2_out
    if inert_in <= 0 or inert_out <= 0:
        raise InputError("O2 and CO2 fractions leave no inert gas (N2, Ar); the inert "
                         "balance needs some, e.g. air", "y_o2_in" if inert_in <= 0
                         else "y_o2_out")
    ratio = inert_in / inert_out
    o2 = y_o2_in - y_o2_out * ratio
    co2 = y_co2_out * ratio - y_co2_in
    warnings = []
    if o2 <= 0:
        warnings.append("no O2 is taken up (the exit gas has as much O2 as the feed once the "
                        "flow change is allowed for): check the analyser calibration")
    elif o2 < SMALL_DIFFERENCE:
        warnings.append(f"only {o2:.4f} mol O2 per mol of feed is taken up: analyser error is "
                        "a large part of this OTR; lower the gas flow or check the calibration")
    rq = co2 / o2 if o2 > 0 else math.nan
    if o2 > 0 and not 0.3 <= rq <= 3.0:
        warnings.append(f"RQ = {rq:.2f} is outside 0.3 to 3, unusual for aerobic growth: check "
                        "the CO2 analyser and the basis of the fractions")
    return GasBalance(inlet_flow_mol_s=gas_flow, outlet_flow_mol_s=gas_flow * ratio,
                      outlet_to_inlet=ratio, o2_per_mol_feed=o2, co2_per_mol_feed=co2,
                      otr_mol_m3_s=gas_flow * o2 / volume, cer_mol_m3_s=gas_flow * co2 / volume,
                      rq=rq, warnings=tuple(warnings))


def log_mean_driving_force(c_star_bottom: float, c_star_top: float, c_liquid: float) -> float:
    """Log-mean of the driving forces C* - C at the bottom and top of a tall vessel.

    .. math::
        \\Delta C_{lm} = \\frac{(C^*_b - C) - (C^*_t - C)}{\\ln[(C^*_b - C)/(C^*_t - C)]}

    Parameters
    ----------
    c_star_bottom : float
        Saturation with the inlet gas at the sparger pressure [mol/m3].
    c_star_top : float
        Saturation with the exit gas at the head-space pressure [mol/m3].
    c_liquid : float
        Dissolved O2 in the (well-mixed) liquid [mol/m3].

    Returns
    -------
    float
        Log-mean driving force [mol/m3].

    Notes
    -----
    For gas in plug flow through well-mixed liquid (tall vessels); equal driving forces give
    their common value.

    Examples
    --------
    Driving forces 0.35 and 0.20 mol/m3: 0.15 / ln(1.75):

    >>> round(log_mean_driving_force(0.40, 0.25, 0.05), 5)
    0.26804
    """
    top = c_star_top - c_liquid
    bottom = c_star_bottom - c_liquid
    if top <= 0 or bottom <= 0:
        raise InputError(f"no driving force: C* - C is {bottom:g} at the bottom and {top:g} at "
                         "the top [mol/m3]; both must be positive", "c_liquid", c_liquid)
    if math.isclose(top, bottom, rel_tol=1e-9):
        return top
    return (bottom - top) / math.log(bottom / top)


def kla_from_otr(otr: float | np.ndarray, c_star: float, c_liquid: float) -> float | np.ndarray:
    """kLa from a steady-state transfer rate and its driving force.

    .. math::
        k_La = \\frac{OTR}{C^* - C}

    Parameters
    ----------
    otr : float or array
        Oxygen transfer rate [mol/(m3 s)].
    c_star : float
        Saturation concentration (or a log-mean driving force plus ``c_liquid``) [mol/m3].
    c_liquid : float
        Dissolved O2 in the liquid [mol/m3].

    Returns
    -------
    float or array
        kLa [1/s].

    Examples
    --------
    >>> round(kla_from_otr(0.01, 0.25, 0.05), 6)
    0.05
    """
    driving = c_star - c_liquid
    if driving <= 0:
        raise InputError(f"C* ({c_star:g} mol/m3) must exceed the liquid DO ({c_liquid:g} "
                         "mol/m3) for a driving force", "c_liquid", c_liquid)
    return otr / driving
