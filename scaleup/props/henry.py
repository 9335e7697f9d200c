"""Henry's-law constants of O2, N2, CO2, H2 and CH4 in water, and gas partial pressures.

Public API:

* :func:`henry_constant` ``(gas, T, method="sander"|"iapws")`` -> Hcp [mol/(m3 Pa)].
* :func:`henry_constant_Sander` ``(gas, T)`` -> Hcp [mol/(m3 Pa)], van 't Hoff form.
* :func:`henry_constant_IAPWS` ``(gas, T)`` -> kH [Pa], mole-fraction basis, IAPWS G7-04.
* :func:`partial_pressure` ``(T, pressure, mole_fraction)`` -> [Pa] over water.
"""

from __future__ import annotations

import numpy as np

from scaleup.errors import InputError
from scaleup.props import water
from scaleup.props._common import (
    as_array,
    check_fraction,
    check_gas_pressure,
    check_range,
    gas_data,
    is_scalar,
    out,
)
from scaleup.props.data import IAPWS_HENRY


def henry_constant_Sander(gas: str, T):
    r"""Henry solubility constant with a van 't Hoff temperature term, from Sander [1]_.

    .. math::
        H^{cp}(T) = H^{cp}_\ominus \exp\left[\frac{d\ln H^{cp}}{d(1/T)}
            \left(\frac{1}{T} - \frac{1}{298.15\ \mathrm{K}}\right)\right]

    Parameters
    ----------
    gas : str
        ``O2``, ``N2``, ``CO2``, ``H2`` or ``CH4`` [-].
    T : float or array
        Temperature [K], 273.15 to 373.15.

    Returns
    -------
    float or array
        :math:`H^{cp}` = c/p [mol/(m3 Pa)].

    Notes
    -----
    Values at 298.15 K and the temperature term are the compilation's entries from the
    review of Wilhelm, Battino and Wilcock (1977), given to two significant figures. A
    constant solution enthalpy stays within 10 % of IAPWS G7-04 at 0 to 40 degC and drifts
    beyond (-11 % for CH4 at 50 degC, -32 % at 80 degC); use :func:`henry_constant_IAPWS`
    for hot media.

    Examples
    --------
    >>> henry_constant_Sander("O2", 298.15)
    1.3e-05

    References
    ----------
    .. [1] Sander, R. (2015). Compilation of Henry's law constants (version 4.0) for water as
       solvent. Atmos. Chem. Phys. 15, 4399-4981.
    """
    g = gas_data(gas)
    scalar = is_scalar(T)
    T = check_range("temperature", T, 273.15, 373.15, "K", "the Sander constants")
    return out(g.henry_hcp_298 * np.exp(g.henry_slope * (1.0 / T - 1.0 / 298.15)), scalar)


def henry_constant_IAPWS(gas: str, T):
    r"""Henry constant (mole-fraction basis) from the IAPWS G7-04 guideline [1]_.

    .. math::
        \ln\frac{k_H}{p_1^*} = \frac{A}{T_R} + \frac{B\,\tau^{0.355}}{T_R}
            + C\,T_R^{-0.41} e^{\tau},\qquad T_R = T/T_c,\ \tau = 1 - T_R

    with :math:`p_1^*` the vapour pressure of water (:func:`water.vapour_pressure`).

    Parameters
    ----------
    gas : str
        ``O2``, ``N2``, ``CO2``, ``H2`` or ``CH4`` [-].
    T : float or array
        Temperature [K], 273.15 to 373.15.

    Returns
    -------
    float or array
        :math:`k_H = \lim p_2/x_2` [Pa].

    Notes
    -----
    Fitted (Fernandez-Prini, Alvarez and Harvey 2003) from near 0 degC to close to the
    critical point of water; the lower data limits are O2 274.15 K, N2 278.12 K, CO2
    274.19 K, H2 273.15 K, CH4 275.46 K.

    Examples
    --------
    At 25 degC kH(O2) is 4.36 GPa, i.e. Hcp = c_water / kH = 1.27e-5 mol/(m3 Pa), where
    Sander (2015) lists 1.2e-5 to 1.3e-5:

    >>> round(henry_constant_IAPWS("O2", 298.15) / 1e9, 2)
    4.36

    References
    ----------
    .. [1] IAPWS G7-04 (2004), Guideline on the Henry's constant and vapor-liquid
       distribution constant for gases in H2O and D2O at high temperatures, Eq. 3, Table 2.
    """
    gas_data(gas)
    scalar = is_scalar(T)
    T = check_range("temperature", T, 273.15, 373.15, "K", "IAPWS G7-04 in liquid water")
    A, B, C, _, _ = IAPWS_HENRY[gas]
    Tr = T / water.T_CRITICAL
    tau = 1.0 - Tr
    ln_ratio = A / Tr + B * tau ** 0.355 / Tr + C * Tr ** -0.41 * np.exp(tau)
    return out(np.asarray(water.vapour_pressure(T)) * np.exp(ln_ratio), scalar)


def henry_constant(gas: str, T, method: str = "sander"):
    """Henry solubility constant c/p of a gas in water, by either source.

    Parameters
    ----------
    gas : str
        ``O2``, ``N2``, ``CO2``, ``H2`` or ``CH4`` [-].
    T : float or array
        Temperature [K], 273.15 to 373.15.
    method : str
        ``"sander"`` (default) or ``"iapws"`` [-].

    Returns
    -------
    float or array
        :math:`H^{cp}` [mol/(m3 Pa)].

    Examples
    --------
    >>> round(henry_constant("O2", 298.15, "iapws") * 1e5, 3)
    1.268
    """
    if method == "sander":
        return henry_constant_Sander(gas, T)
    if method == "iapws":
        scalar = is_scalar(T)
        molar_water = np.asarray(water.density(T)) / water.M_WATER  # mol/m3 of water
        return out(molar_water / np.asarray(henry_constant_IAPWS(gas, T)), scalar)
    raise InputError(f"unknown Henry-constant method {method!r}; use sander or iapws",
                     "method", method)


def partial_pressure(T, pressure, mole_fraction):
    """Partial pressure of a gas over water: dry-gas mole fraction times (P - p_water).

    Parameters
    ----------
    T : float or array
        Temperature of the liquid [K].
    pressure : float or array
        Total absolute pressure [Pa].
    mole_fraction : float or array
        Mole fraction in the dry gas [-].

    Returns
    -------
    float or array
        Partial pressure [Pa].

    Examples
    --------
    >>> round(partial_pressure(298.15, 101325.0, 0.20946), 0)
    20560.0
    """
    scalar = is_scalar(T, pressure, mole_fraction)
    T = as_array(T, "temperature")
    P = check_gas_pressure(T, pressure)
    y = check_fraction(mole_fraction)
    return out(y * (P - np.asarray(water.vapour_pressure(T))), scalar)
