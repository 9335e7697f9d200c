"""Sea-salt water: density and viscosity by salinity (Sharqawy, Lienhard and Zubair 2010).

Public API: :func:`density_Sharqawy` ``(T, salinity, P)`` [kg/m3] and
:func:`viscosity_Sharqawy` ``(T, salinity, P)`` [Pa s], salinity in kg/kg. A whole medium
with measured overrides is :func:`scaleup.props.water.liquid_properties`.
"""

from __future__ import annotations

import numpy as np

from scaleup.props._common import as_array, check_range, is_scalar, out
from scaleup.props.water import density_IAPWS_IF97, viscosity_IAPWS_2008
from scaleup.units import P_ATM


def density_Sharqawy(T, salinity, P=P_ATM):
    r"""Density of seawater-like salt water by the Sharqawy et al. correlation [1]_.

    .. math::
        \rho_{sw} = \rho_w + S\,(b_1 + b_2 t + b_3 t^2 + b_4 t^3 + b_5 S t^2)

    with :math:`t` in degC, :math:`S` in kg/kg and the pure-water density :math:`\rho_w`
    from :func:`density_IAPWS_IF97` (the paper uses its own fit to IAPWS-95).

    Parameters
    ----------
    T : float or array
        Temperature [K], 273.15 to 373.15.
    salinity : float or array
        Salinity, mass of salts per mass of solution [kg/kg], 0 to 0.16.
    P : float or array
        Absolute pressure [Pa], default 101325.

    Returns
    -------
    float or array
        Density [kg/m3].

    Notes
    -----
    Fitted (after Isdale and Morris 1972) for 0 to 180 degC and 0 to 0.16 kg/kg with a
    stated accuracy of 0.1 %. It describes sea salt; a medium dominated by another salt is
    better given a measured density.

    Examples
    --------
    TEOS-10 gives 1023.3 kg/m3 for 35 g/kg at 25 degC, 1 atm (within 0.1 %):

    >>> round(density_Sharqawy(298.15, 0.035), 0)
    1024.0

    References
    ----------
    .. [1] Sharqawy, M. H., Lienhard, J. H., and Zubair, S. M. (2010). Thermophysical
       properties of seawater: a review of existing correlations and data. Desalination and
       Water Treatment 16, 354-380, Eq. 8.
    """
    scalar = is_scalar(T, salinity, P)
    S = check_range("salinity", salinity, 0.0, 0.16, "kg/kg", "the Sharqawy density")
    t = as_array(T, "temperature") - 273.15
    rho_w = np.asarray(density_IAPWS_IF97(T, P))
    b1, b2, b3, b4, b5 = 8.020e2, -2.001, 1.677e-2, -3.060e-5, -1.613e-5
    rho = rho_w + S * (b1 + b2 * t + b3 * t ** 2 + b4 * t ** 3 + b5 * S * t ** 2)
    return out(rho, scalar)


def viscosity_Sharqawy(T, salinity, P=P_ATM):
    r"""Dynamic viscosity of seawater-like salt water by Sharqawy et al. [1]_.

    .. math::
        \mu_{sw} = \mu_w\,(1 + A S + B S^2),\quad
        A = 1.541 + 1.998\times10^{-2} t - 9.52\times10^{-5} t^2,\quad
        B = 7.974 - 7.561\times10^{-2} t + 4.724\times10^{-4} t^2

    with :math:`t` in degC, :math:`S` in kg/kg and :math:`\mu_w` from
    :func:`viscosity_IAPWS_2008`.

    Parameters
    ----------
    T : float or array
        Temperature [K], 273.15 to 373.15.
    salinity : float or array
        Salinity [kg/kg], 0 to 0.15.
    P : float or array
        Absolute pressure [Pa], default 101325.

    Returns
    -------
    float or array
        Dynamic viscosity [Pa s].

    Notes
    -----
    Valid 0 to 180 degC, 0 to 0.15 kg/kg, stated accuracy 1.5 %.

    Examples
    --------
    For 35 g/kg at 25 degC seawater is about 8 % more viscous than fresh water:

    >>> round(viscosity_Sharqawy(298.15, 0.035) / viscosity_IAPWS_2008(298.15), 3)
    1.077

    References
    ----------
    .. [1] Sharqawy, M. H., Lienhard, J. H., and Zubair, S. M. (2010). Desalination and
       Water Treatment 16, 354-380, Eqs. 22-23.
    """
    scalar = is_scalar(T, salinity, P)
    S = check_range("salinity", salinity, 0.0, 0.15, "kg/kg", "the Sharqawy viscosity")
    t = as_array(T, "temperature") - 273.15
    mu_w = np.asarray(viscosity_IAPWS_2008(T, P))
    A = 1.541 + 1.998e-2 * t - 9.52e-5 * t ** 2
    B = 7.974 - 7.561e-2 * t + 4.724e-4 * t ** 2
    return out(mu_w * (1.0 + A * S + B * S ** 2), scalar)
