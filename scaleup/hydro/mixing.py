"""Blend time: single impellers (turbulent and transitional) and several impellers in tall
vessels, at any degree of homogeneity."""

from __future__ import annotations

import math

import numpy as np

# Re Np^(1/3) above which the turbulent branch applies (Grenville 1992)
TURBULENT_REGIME_CONSTANT = 6370.0
# below this the transitional fit has no data (Grenville 1992, as quoted in the Handbook)
TRANSITIONAL_REGIME_CONSTANT = 183.0


def _out(x):
    return x if np.ndim(x) else float(x)


def homogeneity_factor(homogeneity):
    """Multiplier from a 95 % blend time to another degree of homogeneity [-].

    .. math::
        \\theta_x / \\theta_{95} = \\ln(1 - x) / \\ln(0.05)

    First-order decay of the concentration variance (common to the turbulent correlations).

    Parameters
    ----------
    homogeneity : float or array
        Degree of homogeneity x, between 0 and 1 [-].

    Returns
    -------
    float or array
        theta_x / theta_95 [-].

    Examples
    --------
    >>> round(homogeneity_factor(0.99), 4)
    1.5372
    """
    x = np.asarray(homogeneity, float)
    if np.any((x <= 0) | (x >= 1)):
        raise ValueError("homogeneity must lie strictly between 0 and 1")
    return _out(np.log(1.0 - x) / math.log(0.05))


def blend_time_Ruszkowski(speed, diameter, tank_diameter, liquid_height, power_number):
    """95 % blend time of a single impeller in the turbulent regime, Ruszkowski [1]_ with
    Grenville's height term [2]_ [s].

    .. math::
        N\\theta_{95} = 5.20\\,(T/D)^2\\,(H/T)^{0.5}\\,N_p^{-1/3}

    Parameters
    ----------
    speed : float or array
        Speed [rev/s].
    diameter : float
        Impeller diameter [m].
    tank_diameter : float
        Tank diameter [m].
    liquid_height : float
        Liquid height [m].
    power_number : float
        Turbulent power number [-].

    Returns
    -------
    float or array
        theta_95 [s].

    Notes
    -----
    Any single impeller in a baffled vessel with H/T about 1, Re Np^(1/3) > 6370; about
    +-10 % on the data.

    Examples
    --------
    >>> round(blend_time_Ruszkowski(1.0, 1.0/3, 1.0, 1.0, 5.0), 2)  # 5.2 * 9 / 5^(1/3)
    27.37

    References
    ----------
    .. [1] Ruszkowski, S. (1994). A rational method for measuring blending performance and
       comparison of different impeller types. Proc. 8th Eur. Conf. Mixing, 283-291.
    .. [2] Grenville, R. K., Nienow, A. W. (2004). Blending of miscible liquids. In Handbook
       of Industrial Mixing (Paul, Atiemo-Obeng, Kresta, eds.), Wiley, ch. 9.
    """
    n = np.asarray(speed, float)
    return _out(5.20 * (tank_diameter / diameter) ** 2 * (liquid_height / tank_diameter) ** 0.5
                / power_number ** (1.0 / 3.0) / n)


def blend_time_Grenville_transitional(speed, diameter, tank_diameter, liquid_height,
                                      power_number, reynolds):
    """95 % blend time of a single impeller in the transitional regime, Grenville [1]_ [s].

    .. math::
        N\\theta_{95} = 33\\,500\\,\\frac{(T/D)^2 (H/T)^{0.5}}{N_p^{2/3}\\,Re}

    (33 500 = 183^2). It meets the turbulent branch at Re Np^(1/3) = 6370.

    Parameters
    ----------
    speed : float or array
        Speed [rev/s].
    diameter : float
        Impeller diameter [m].
    tank_diameter : float
        Tank diameter [m].
    liquid_height : float
        Liquid height [m].
    power_number : float or array
        Power number [-].
    reynolds : float or array
        Impeller Reynolds number [-].

    Returns
    -------
    float or array
        theta_95 [s].

    Notes
    -----
    183 < Re Np^(1/3) < 6370; baffled vessels, H/T about 1.

    Examples
    --------
    >>> round(blend_time_Grenville_transitional(1.0, 0.5, 1.0, 1.0, 1.0, 1000.0), 1)
    134.0

    References
    ----------
    .. [1] Grenville, R. K. (1992). Blending of viscous Newtonian and pseudo-plastic
       fluids. PhD thesis, Cranfield Institute of Technology.
    """
    n = np.asarray(speed, float)
    return _out(183.0 ** 2 * (tank_diameter / diameter) ** 2
                * (liquid_height / tank_diameter) ** 0.5
                / (np.asarray(power_number, float) ** (2.0 / 3.0) * np.asarray(reynolds, float))
                / n)


def blend_time_Cooke(speed, diameter, tank_diameter, liquid_height, power_number_total):
    """95 % blend time with several impellers in a tall vessel, Cooke, Middleton & Bush [1]_
    [s].

    .. math::
        N\\theta_{95} = 3.3\\,N_p^{-1/3}\\,(T/D)^{2}\\,(H/T)^{2.43}

    with Np the power number of all impellers together.

    Parameters
    ----------
    speed : float or array
        Speed [rev/s].
    diameter : float
        Impeller diameter [m].
    tank_diameter : float
        Tank diameter [m].
    liquid_height : float
        Liquid height [m].
    power_number_total : float
        Sum of the impellers' power numbers [-].

    Returns
    -------
    float or array
        theta_95 [s].

    Notes
    -----
    Multiple disc turbines, H/T about 1-3, turbulent. The constants 3.3 and 2.43 are from
    memory: neither the paper nor a text quoting it was found in the sources searched
    (handbooks, course notes, open-source code), so treat this branch as unchecked. The
    strong H/T exponent reflects the zoning between impellers.

    Examples
    --------
    >>> round(blend_time_Cooke(2.0, 4.0/3, 4.0, 12.0, 9.4), 1)
    101.6

    References
    ----------
    .. [1] Cooke, M., Middleton, J. C., Bush, J. R. (1988). Mixing and mass transfer in
       filamentous fermentations. Proc. 2nd Int. Conf. Bioreactor Fluid Dynamics, BHRA,
       Cambridge, 37-64.
    """
    n = np.asarray(speed, float)
    return _out(3.3 * power_number_total ** (-1.0 / 3.0) * (tank_diameter / diameter) ** 2
                * (liquid_height / tank_diameter) ** 2.43 / n)


blend_time_correlations = {
    "Ruszkowski": "single impeller, turbulent (Re Np^(1/3) >= 6370)",
    "Grenville_transitional": "single impeller, transitional (183 < Re Np^(1/3) < 6370)",
    "Cooke": "several impellers in a tall vessel, turbulent",
}


def blend_time_methods(impellers: int, regime_constant: float) -> list[str]:
    """The blend-time methods that apply, best first.

    Parameters
    ----------
    impellers : int
        Number of impellers on the shaft.
    regime_constant : float
        Re Np^(1/3) [-].

    Returns
    -------
    list of str
        Method names.

    Examples
    --------
    >>> blend_time_methods(1, 1.0e5)
    ['Ruszkowski']
    """
    if impellers > 1:
        return ["Cooke"]
    if regime_constant >= TURBULENT_REGIME_CONSTANT:
        return ["Ruszkowski"]
    return ["Grenville_transitional"]


def blend_time(speed, diameter, tank_diameter, liquid_height, power_number, reynolds, *,
               impellers: int = 1, homogeneity: float = 0.95, method: str | None = None):
    """Blend time to a degree of homogeneity, choosing the branch by regime [s].

    Parameters
    ----------
    speed : float or array
        Speed [rev/s].
    diameter : float
        Impeller diameter [m].
    tank_diameter : float
        Tank diameter [m].
    liquid_height : float
        Liquid height [m].
    power_number : float or array
        Power number of one impeller (single) or of all together (several) [-].
    reynolds : float or array
        Impeller Reynolds number [-].
    impellers : int
        Number of impellers.
    homogeneity : float
        Degree of homogeneity, 0.95 for theta_95 [-].
    method : str, optional
        Force a method of :data:`blend_time_correlations`; by default Cooke for several
        impellers, else Ruszkowski or Grenville_transitional by Re Np^(1/3).

    Returns
    -------
    float or array
        Blend time [s].

    Examples
    --------
    >>> round(blend_time(1.0, 1.0/3, 1.0, 1.0, 5.0, 1.0e5), 2)
    27.37
    """
    factor = homogeneity_factor(homogeneity)
    if method is not None and method not in blend_time_correlations:
        raise ValueError(f"unknown blend-time method {method!r}; use one of "
                         f"{', '.join(blend_time_correlations)}")
    if method == "Cooke" or (method is None and impellers > 1):
        return _out(np.asarray(blend_time_Cooke(speed, diameter, tank_diameter,
                                                liquid_height, power_number)) * factor)
    turb = np.asarray(blend_time_Ruszkowski(speed, diameter, tank_diameter, liquid_height,
                                            power_number))
    trans = np.asarray(blend_time_Grenville_transitional(speed, diameter, tank_diameter,
                                                         liquid_height, power_number, reynolds))
    if method == "Ruszkowski":
        return _out(turb * factor)
    if method == "Grenville_transitional":
        return _out(trans * factor)
    constant = np.asarray(reynolds, float) * np.asarray(power_number, float) ** (1.0 / 3.0)
    return _out(np.where(constant >= TURBULENT_REGIME_CONSTANT, turb, trans) * factor)
