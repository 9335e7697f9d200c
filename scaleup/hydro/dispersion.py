"""Gas dispersion and turbulence: superficial velocity, vvm, hold-up, bubble size, shear.

Gas flows enter as molar flows [mol/s]. The actual volumetric flow at a point of the vessel
follows from the ideal-gas law at the liquid temperature and the local absolute pressure,
which is the head-space pressure plus the hydrostatic head of ungassed liquid above that
point (:func:`hydrostatic_pressure`). Water vapour picked up by the gas is not added.
"""

from __future__ import annotations

import math

import numpy as np

from scaleup.units import MOL_PER_NORMAL_M3, G, R


def _out(x):
    return x if np.ndim(x) else float(x)


def hydrostatic_pressure(head_pressure, rho, depth):
    """Absolute pressure at a depth below the liquid surface [Pa].

    .. math::
        p = p_{head} + \\rho g z

    Parameters
    ----------
    head_pressure : float
        Absolute head-space pressure [Pa].
    rho : float
        Liquid density [kg/m3].
    depth : float or array
        Depth below the ungassed liquid surface [m].

    Returns
    -------
    float or array
        Absolute pressure [Pa].

    Examples
    --------
    >>> round(hydrostatic_pressure(101325.0, 1000.0, 10.0))  # 10 m of water: ~1.97 atm
    199392
    """
    return _out(np.asarray(head_pressure, float) + np.asarray(rho, float) * G
                * np.asarray(depth, float))


def actual_gas_flow(gas_flow, temperature, pressure):
    """Actual volumetric gas flow from a molar flow, ideal gas [m3/s].

    .. math::
        Q_g = \\dot n R T / p

    Parameters
    ----------
    gas_flow : float or array
        Molar gas flow [mol/s].
    temperature : float
        Gas temperature (taken as the liquid temperature) [K].
    pressure : float or array
        Absolute pressure [Pa].

    Returns
    -------
    float or array
        Actual volumetric flow [m3/s].

    Examples
    --------
    >>> round(actual_gas_flow(1.0, 273.15, 101325.0) * 1000, 3)  # molar volume, L/s
    22.414
    """
    return _out(np.asarray(gas_flow, float) * R * np.asarray(temperature, float)
                / np.asarray(pressure, float))


def superficial_gas_velocity(gas_flow, temperature, pressure, tank_diameter):
    """Superficial gas velocity at actual conditions [m/s].

    .. math::
        u_s = \\frac{\\dot n R T / p}{\\pi T_{tank}^2 / 4}

    Parameters
    ----------
    gas_flow : float or array
        Molar gas flow [mol/s].
    temperature : float
        Gas temperature [K].
    pressure : float or array
        Absolute pressure where the velocity is wanted (sparger or mid-height) [Pa].
    tank_diameter : float
        Tank diameter [m].

    Returns
    -------
    float or array
        Superficial velocity [m/s].

    Examples
    --------
    >>> round(superficial_gas_velocity(1.0, 273.15, 101325.0, 1.0), 5)
    0.02854
    """
    return _out(np.asarray(actual_gas_flow(gas_flow, temperature, pressure))
                / (math.pi * tank_diameter ** 2 / 4.0))


def vvm(gas_flow, liquid_volume):
    """Gas flow as normal volumes per liquid volume per minute (0 degC, 101.325 kPa) [1/min].

    Parameters
    ----------
    gas_flow : float or array
        Molar gas flow [mol/s].
    liquid_volume : float
        Liquid volume [m3].

    Returns
    -------
    float or array
        vvm [1/min].

    Examples
    --------
    >>> round(vvm(0.2230759, 0.3), 4)
    1.0
    """
    return _out(np.asarray(gas_flow, float) / MOL_PER_NORMAL_M3 * 60.0 / liquid_volume)


def reynolds(speed, diameter, rho, mu):
    """Impeller Reynolds number [-].

    .. math::
        Re = \\rho N D^2 / \\mu

    Parameters
    ----------
    speed : float or array
        Impeller speed N [rev/s].
    diameter : float
        Impeller diameter D [m].
    rho : float
        Liquid density [kg/m3].
    mu : float
        Dynamic viscosity [Pa s].

    Returns
    -------
    float or array
        Re [-].

    Examples
    --------
    >>> reynolds(10.0, 0.1, 1000.0, 0.001)
    100000.0
    """
    return _out(rho * np.asarray(speed, float) * diameter ** 2 / mu)


def froude(speed, diameter):
    """Impeller Froude number [-].

    .. math::
        Fr = N^2 D / g

    Parameters
    ----------
    speed : float or array
        Impeller speed [rev/s].
    diameter : float
        Impeller diameter [m].

    Returns
    -------
    float or array
        Fr [-].

    Examples
    --------
    >>> round(froude(10.0, 0.1), 4)
    1.0197
    """
    return _out(np.asarray(speed, float) ** 2 * diameter / G)


def flow_number(actual_flow, speed, diameter):
    """Gas flow number [-].

    .. math::
        Fl = Q_g / (N D^3)

    Parameters
    ----------
    actual_flow : float or array
        Actual volumetric gas flow at the impeller [m3/s].
    speed : float or array
        Impeller speed [rev/s].
    diameter : float
        Impeller diameter [m].

    Returns
    -------
    float or array
        Fl [-].

    Examples
    --------
    >>> flow_number(0.001, 10.0, 0.1)
    0.1
    """
    return _out(np.asarray(actual_flow, float) / (np.asarray(speed, float) * diameter ** 3))


def tip_speed(speed, diameter):
    """Impeller tip speed [m/s].

    .. math::
        u_{tip} = \\pi N D

    Parameters
    ----------
    speed : float or array
        Impeller speed [rev/s].
    diameter : float
        Impeller diameter [m].

    Returns
    -------
    float or array
        Tip speed [m/s].

    Examples
    --------
    >>> round(tip_speed(10.0, 0.1), 4)
    3.1416
    """
    return _out(math.pi * np.asarray(speed, float) * diameter)


def energy_dissipation(power, rho, liquid_volume):
    """Mean specific energy dissipation rate [W/kg].

    .. math::
        \\bar\\varepsilon = P / (\\rho V)

    Parameters
    ----------
    power : float or array
        Power dissipated in the liquid [W].
    rho : float
        Liquid density [kg/m3].
    liquid_volume : float
        Liquid volume [m3].

    Returns
    -------
    float or array
        Mean dissipation [W/kg].

    Examples
    --------
    >>> energy_dissipation(1000.0, 1000.0, 1.0)
    1.0
    """
    return _out(np.asarray(power, float) / (rho * liquid_volume))


def kolmogorov_length(mu, rho, dissipation):
    """Kolmogorov length scale of the turbulence [m].

    .. math::
        \\eta = (\\nu^3 / \\varepsilon)^{1/4}

    Parameters
    ----------
    mu : float
        Dynamic viscosity [Pa s].
    rho : float
        Liquid density [kg/m3].
    dissipation : float or array
        Specific energy dissipation rate [W/kg].

    Returns
    -------
    float or array
        Length scale [m].

    Examples
    --------
    >>> round(kolmogorov_length(0.001, 1000.0, 1.0) * 1e6, 2)  # water at 1 W/kg: 31.6 um
    31.62
    """
    nu = mu / rho
    return _out((nu ** 3 / np.asarray(dissipation, float)) ** 0.25)


CALDERBANK_RISE_VELOCITY = 0.265  # m/s, bubble rise velocity used by Calderbank (1958)


def _calderbank_group(power_per_volume, rho, sigma):
    return np.asarray(power_per_volume, float) ** 0.4 * rho ** 0.2 / sigma ** 0.6


def gas_holdup_Calderbank(power_per_volume, superficial_velocity, rho, sigma):
    """Gas hold-up of a turbine-agitated dispersion in pure liquids, Calderbank [1]_ [-].

    .. math::
        \\varepsilon = \\left(\\frac{\\varepsilon u_s}{u_t}\\right)^{1/2}
        + 2.16\\times10^{-4}\\,\\frac{(P_g/V)^{0.4}\\rho^{0.2}}{\\sigma^{0.6}}
        \\left(\\frac{u_s}{u_t}\\right)^{1/2}, \\quad u_t = 0.265\\ \\mathrm{m/s}

    solved exactly as a quadratic in the square root of the hold-up.

    Parameters
    ----------
    power_per_volume : float or array
        Gassed power per liquid volume [W/m3].
    superficial_velocity : float or array
        Superficial gas velocity [m/s].
    rho : float
        Liquid density [kg/m3].
    sigma : float
        Surface tension [N/m].

    Returns
    -------
    float or array
        Volume fraction of gas in the dispersion [-].

    Notes
    -----
    Disc turbines in pure (coalescing) liquids, gas hold-up up to about 0.25. From memory:
    the paper was not found in the sources searched. The SI constants (2.16e-4 here, 4.15
    and 9e-4 m for d32, 1.44 for a, u_t = 0.265 m/s) are the cgs constants as usually quoted
    (0.0216, 4.15, 0.09 cm, 1.44, 26.5 cm/s; also from memory) converted factor by factor;
    open-source code seen uses the same SI numbers without citing a page. Electrolytes and
    media with surfactants give smaller bubbles and more hold-up.

    Examples
    --------
    >>> round(gas_holdup_Calderbank(1000.0, 0.01, 1000.0, 0.072), 3)
    0.061

    References
    ----------
    .. [1] Calderbank, P. H. (1958). Physical rate processes in industrial fermentation.
       Part I: The interfacial area in gas-liquid contacting with mechanical agitation.
       Trans. Inst. Chem. Eng. 36, 443-463.
    """
    s = np.sqrt(np.asarray(superficial_velocity, float) / CALDERBANK_RISE_VELOCITY)
    b = 2.16e-4 * _calderbank_group(power_per_volume, rho, sigma) * s
    root = 0.5 * (s + np.sqrt(s ** 2 + 4.0 * b))
    return _out(root ** 2)


def sauter_diameter_Calderbank(power_per_volume, holdup, rho, sigma):
    """Sauter mean bubble diameter in a turbine-agitated dispersion, Calderbank [1]_ [m].

    .. math::
        d_{32} = 4.15\\,\\frac{\\sigma^{0.6}}{(P_g/V)^{0.4}\\rho^{0.2}}\\,\\varepsilon^{1/2}
        + 9\\times10^{-4}\\ \\mathrm{m}

    Parameters
    ----------
    power_per_volume : float or array
        Gassed power per liquid volume [W/m3].
    holdup : float or array
        Gas hold-up [-].
    rho : float
        Liquid density [kg/m3].
    sigma : float
        Surface tension [N/m].

    Returns
    -------
    float or array
        Sauter diameter [m].

    Notes
    -----
    Pure liquids; constants from memory, as for :func:`gas_holdup_Calderbank`.

    Examples
    --------
    >>> round(sauter_diameter_Calderbank(1000.0, 0.0606, 1000.0, 0.072) * 1000, 2)
    4.23

    References
    ----------
    .. [1] Calderbank, P. H. (1958). Trans. Inst. Chem. Eng. 36, 443-463.
    """
    group = _calderbank_group(power_per_volume, rho, sigma)
    return _out(4.15 / group * np.sqrt(np.asarray(holdup, float)) + 9.0e-4)


def interfacial_area_Calderbank(power_per_volume, superficial_velocity, rho, sigma):
    """Specific interfacial area by Calderbank's direct correlation [1]_ [1/m].

    .. math::
        a = 1.44\\,\\frac{(P_g/V)^{0.4}\\rho^{0.2}}{\\sigma^{0.6}}
        \\left(\\frac{u_s}{u_t}\\right)^{1/2}

    Parameters
    ----------
    power_per_volume : float or array
        Gassed power per liquid volume [W/m3].
    superficial_velocity : float or array
        Superficial gas velocity [m/s].
    rho : float
        Liquid density [kg/m3].
    sigma : float
        Surface tension [N/m].

    Returns
    -------
    float or array
        Interfacial area per dispersion volume [1/m].

    Notes
    -----
    Kept as a consistency check on a = 6 eps / d32 from the other two correlations of the
    same set; constants from memory, as for :func:`gas_holdup_Calderbank`.

    Examples
    --------
    >>> round(interfacial_area_Calderbank(1000.0, 0.01, 1000.0, 0.072))
    86

    References
    ----------
    .. [1] Calderbank, P. H. (1958). Trans. Inst. Chem. Eng. 36, 443-463.
    """
    s = np.sqrt(np.asarray(superficial_velocity, float) / CALDERBANK_RISE_VELOCITY)
    return _out(1.44 * _calderbank_group(power_per_volume, rho, sigma) * s)


def interfacial_area(holdup, sauter_diameter):
    """Specific interfacial area of a dispersion of spheres [1/m].

    .. math::
        a = 6 \\varepsilon / d_{32}

    Parameters
    ----------
    holdup : float or array
        Gas hold-up [-].
    sauter_diameter : float or array
        Sauter mean diameter [m].

    Returns
    -------
    float or array
        Interfacial area per dispersion volume [1/m].

    Examples
    --------
    >>> interfacial_area(0.05, 0.003)
    100.0
    """
    return _out(6.0 * np.asarray(holdup, float) / np.asarray(sauter_diameter, float))
