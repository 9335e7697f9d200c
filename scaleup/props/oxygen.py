"""Saturation concentration of O2 in fresh and saline water from moist air or enriched gas.

Public API (mol/m3; T in K, salinity in kg/kg, pressure absolute in Pa):

* :func:`c_star_O2_Benson_Krause` ``(T, salinity, pressure, o2_fraction)``.
* :func:`c_star_O2_Garcia_Gordon` ``(T, salinity, pressure, o2_fraction)``.
"""

from __future__ import annotations

import numpy as np

from scaleup.props import seawater
from scaleup.props._common import check_fraction, check_gas_pressure, check_range, is_scalar, out
from scaleup.units import M_O2, P_ATM

AIR_O2_FRACTION = 0.20946  # mole fraction of O2 in dry air, the Benson-Krause reference


def _pressure_factor_Benson_Krause(T: np.ndarray, P: np.ndarray) -> np.ndarray:
    """Standard Methods 4500-O pressure correction of a 1 atm saturation value."""
    p_atm = P / P_ATM
    t = T - 273.15
    p_wv = np.exp(11.8571 - 3840.70 / T - 216961.0 / T ** 2)  # atm
    theta = 0.000975 - 1.426e-5 * t + 6.436e-8 * t ** 2
    return p_atm * (1.0 - p_wv / p_atm) * (1.0 - theta * p_atm) / ((1.0 - p_wv) * (1.0 - theta))


def c_star_O2_Benson_Krause(T, salinity=0.0, pressure=P_ATM, o2_fraction=AIR_O2_FRACTION):
    r"""Saturation concentration of O2 from moist gas, Benson and Krause [1]_ [2]_.

    .. math::
        \ln C^*_0 = -139.34411 + \frac{1.575701\times10^5}{T} - \frac{6.642308\times10^7}{T^2}
            + \frac{1.243800\times10^{10}}{T^3} - \frac{8.621949\times10^{11}}{T^4}
            - S\left(0.017674 - \frac{10.754}{T} + \frac{2140.7}{T^2}\right)

    in mg/L at 1 atm of water-saturated air (S in g/kg), then corrected to pressure P [atm]
    and O2 mole fraction y of the dry gas:

    .. math::
        C^* = C^*_0\,\frac{y}{0.20946}\,P\,
            \frac{(1 - p_{wv}/P)(1 - \theta P)}{(1 - p_{wv})(1 - \theta)},\quad
        \ln p_{wv} = 11.8571 - \frac{3840.70}{T} - \frac{216961}{T^2},\quad
        \theta = 0.000975 - 1.426\times10^{-5} t + 6.436\times10^{-8} t^2

    Parameters
    ----------
    T : float or array
        Temperature [K], 273.15 to 323.15 (fitted 0 to 40 degC; Standard Methods tabulates
        to 50 degC).
    salinity : float or array
        Salinity [kg/kg], 0 to 0.040.
    pressure : float or array
        Total absolute pressure of the moist gas [Pa].
    o2_fraction : float or array
        O2 mole fraction in the dry gas [-], default that of air.

    Returns
    -------
    float or array
        C* [mol/m3].

    Notes
    -----
    Fitted by Benson and Krause to their high-precision measurements at 0 to 40 degC and 0
    to 40 g/kg; Standard Methods 4500-O and ISO 5814 tabulate it (to 0.01 mg/L). The
    pressure term is the Standard Methods correction for barometric pressure; it stays
    close to Henry's law at a few bar.

    Examples
    --------
    Standard Methods 4500-O Table 4500-O:I gives 8.26 mg/L at 25 degC, 1 atm, fresh water:

    >>> round(c_star_O2_Benson_Krause(298.15) * M_O2 * 1000, 2)
    8.26

    References
    ----------
    .. [1] Benson, B. B., and Krause, D. (1984). The concentration and isotopic
       fractionation of oxygen dissolved in freshwater and seawater in equilibrium with the
       atmosphere. Limnol. Oceanogr. 29, 620-632.
    .. [2] APHA, Standard Methods for the Examination of Water and Wastewater, 4500-O.
    """
    scalar = is_scalar(T, salinity, pressure, o2_fraction)
    T = check_range("temperature", T, 273.15, 323.15, "K", "Benson-Krause")
    S = check_range("salinity", salinity, 0.0, 0.040, "kg/kg", "Benson-Krause") * 1000.0
    P = check_gas_pressure(T, pressure)
    y = check_fraction(o2_fraction)
    ln_c0 = (-139.34411 + 1.575701e5 / T - 6.642308e7 / T ** 2 + 1.243800e10 / T ** 3
             - 8.621949e11 / T ** 4 - S * (1.7674e-2 - 1.0754e1 / T + 2.1407e3 / T ** 2))
    mg_per_l = np.exp(ln_c0) * (y / AIR_O2_FRACTION) * _pressure_factor_Benson_Krause(T, P)
    return out(mg_per_l / (M_O2 * 1000.0), scalar)  # mg/L = g/m3; / (g/mol) -> mol/m3


_GG_A = (5.80871, 3.20291, 4.17887, 5.10006, -9.86643e-2, 3.80369)
_GG_B = (-7.01577e-3, -7.70028e-3, -1.13864e-2, -9.51519e-3)
_GG_C0 = -2.75915e-7


def c_star_O2_Garcia_Gordon(T, salinity=0.0, pressure=P_ATM, o2_fraction=AIR_O2_FRACTION):
    r"""Saturation concentration of O2 by the Garcia and Gordon fit of Benson-Krause data [1]_.

    .. math::
        \ln C^*_0 = \sum_{i=0}^{5} A_i T_s^i + S\sum_{i=0}^{3} B_i T_s^i + C_0 S^2,\qquad
        T_s = \ln\frac{298.15 - t}{273.15 + t}

    in umol/kg at 1 atm of moist air, with t in degC (IPTS-68) and S in g/kg; converted to
    mol/m3 with the solution density, and to pressure and O2 fraction with the same
    correction as :func:`c_star_O2_Benson_Krause`.

    Parameters
    ----------
    T : float or array
        Temperature [K], 273.15 to 313.15.
    salinity : float or array
        Salinity [kg/kg], 0 to 0.042.
    pressure : float or array
        Total absolute pressure of the moist gas [Pa].
    o2_fraction : float or array
        O2 mole fraction in the dry gas [-].

    Returns
    -------
    float or array
        C* [mol/m3].

    Notes
    -----
    The "Benson and Krause" coefficient set of the paper (Table 1), valid from the freezing
    point to 40 degC and 0 to 42 g/kg, fit standard error 0.0034 % (their Table 1). The
    density is that of :func:`scaleup.props.seawater.density_Sharqawy`.

    Examples
    --------
    >>> round(c_star_O2_Garcia_Gordon(298.15) * M_O2 * 1000, 2)
    8.26

    References
    ----------
    .. [1] Garcia, H. E., and Gordon, L. I. (1992). Oxygen solubility in seawater: better
       fitting equations. Limnol. Oceanogr. 37, 1307-1312.
    """
    scalar = is_scalar(T, salinity, pressure, o2_fraction)
    T = check_range("temperature", T, 273.15, 313.15, "K", "Garcia-Gordon")
    salinity = check_range("salinity", salinity, 0.0, 0.042, "kg/kg", "Garcia-Gordon")
    P = check_gas_pressure(T, pressure)
    y = check_fraction(o2_fraction)
    S = salinity * 1000.0
    t68 = (T - 273.15) * 1.00024  # ITS-90 to IPTS-68, the scale of the fit
    Ts = np.log((298.15 - t68) / (273.15 + t68))
    ln_c0 = (sum(a * Ts ** i for i, a in enumerate(_GG_A))
             + S * sum(b * Ts ** i for i, b in enumerate(_GG_B)) + _GG_C0 * S ** 2)
    rho = np.asarray(seawater.density_Sharqawy(T, salinity))
    umol_per_kg = np.exp(ln_c0) * (y / AIR_O2_FRACTION) * _pressure_factor_Benson_Krause(T, P)
    return out(umol_per_kg * 1e-6 * rho, scalar)
