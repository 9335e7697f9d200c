"""Gas-dispersion regimes of a sparged impeller: flooded, loaded, completely dispersed.

The transitions of Nienow, Warmoeskerken, Smith & Konno (1985) for disc turbines, as flow
numbers at a given Froude number, and the minimum speeds they imply for a given gas flow.
The scale-up engine uses :func:`flooding_margin` as a constraint.
"""

from __future__ import annotations

import numpy as np

from scaleup.hydro.impellers import impeller_type
from scaleup.units import G

REGIMES = ("flooded", "loaded", "completely dispersed")

# geometry of the data behind the correlations (Nienow et al. 1985, as usually quoted)
NIENOW_D_OVER_T = (0.2, 0.5)
NIENOW_C_OVER_T = (0.15, 0.5)


def _out(x):
    return x if np.ndim(x) else x.item()


def flooding_flow_number_Nienow(froude, d_over_t):
    """Flow number at the flooding-loading transition of a disc turbine [1]_ [-].

    .. math::
        Fl_F = 30\\,Fr\\,(D/T)^{3.5}, \\quad Fr = N^2 D / g

    Parameters
    ----------
    froude : float or array
        Impeller Froude number [-].
    d_over_t : float
        Impeller to tank diameter ratio [-].

    Returns
    -------
    float or array
        Fl_F [-]: above it the impeller is flooded.

    Notes
    -----
    Six-blade disc turbines, D/T about 0.2-0.5, clearance about T/4, air-water. At D/T = 0.4
    this gives Fl_F = 1.21 Fr, consistent with Warmoeskerken & Smith (1984), about 1.2 Fr.

    Examples
    --------
    >>> round(flooding_flow_number_Nienow(1.0, 0.4), 3)
    1.214

    References
    ----------
    .. [1] Nienow, A. W., Warmoeskerken, M. M. C. G., Smith, J. M., Konno, M. (1985). On the
       flooding/loading transition and the complete dispersal condition in aerated vessels
       agitated by a Rushton turbine. Proc. 5th Eur. Conf. Mixing, Wurzburg, 143-154.
    """
    return _out(30.0 * np.asarray(froude, float) * d_over_t ** 3.5)


def complete_dispersion_flow_number_Nienow(froude, d_over_t):
    """Flow number at complete dispersion of a disc turbine [1]_ [-].

    .. math::
        Fl_{CD} = 0.2\\,Fr^{0.5}\\,(D/T)^{0.5}

    Parameters
    ----------
    froude : float or array
        Impeller Froude number [-].
    d_over_t : float
        Impeller to tank diameter ratio [-].

    Returns
    -------
    float or array
        Fl_CD [-]: below it the gas is completely dispersed.

    Notes
    -----
    As :func:`flooding_flow_number_Nienow`.

    Examples
    --------
    >>> round(complete_dispersion_flow_number_Nienow(1.0, 0.25), 3)
    0.1

    References
    ----------
    .. [1] Nienow, Warmoeskerken, Smith & Konno (1985), Proc. 5th Eur. Conf. Mixing, 143.
    """
    return _out(0.2 * np.sqrt(np.asarray(froude, float)) * d_over_t ** 0.5)


def flooding_speed(gas_flow_actual, diameter, tank_diameter):
    """Minimum speed that keeps a disc turbine out of flooding, from Nienow et al. [1]_
    [rev/s].

    Solving Q/(N D^3) = 30 (N^2 D / g)(D/T)^3.5 for N:

    .. math::
        N_F = \\left(\\frac{Q_g\\,g}{30\\,D^4\\,(D/T)^{3.5}}\\right)^{1/3}

    Parameters
    ----------
    gas_flow_actual : float or array
        Actual gas flow at the impeller [m3/s].
    diameter : float
        Impeller diameter [m].
    tank_diameter : float
        Tank diameter [m].

    Returns
    -------
    float or array
        N_F [rev/s].

    Examples
    --------
    >>> round(flooding_speed(0.002, 0.1, 0.3), 2)
    6.74

    References
    ----------
    .. [1] Nienow, Warmoeskerken, Smith & Konno (1985), Proc. 5th Eur. Conf. Mixing, 143.
    """
    q = np.asarray(gas_flow_actual, float)
    d_t = diameter / tank_diameter
    return _out(np.cbrt(q * G / (30.0 * diameter ** 4 * d_t ** 3.5)))


def complete_dispersion_speed(gas_flow_actual, diameter, tank_diameter):
    """Minimum speed for complete dispersion by a disc turbine, from Nienow et al. [1]_
    [rev/s].

    Solving Q/(N D^3) = 0.2 (N^2 D / g)^0.5 (D/T)^0.5 for N:

    .. math::
        N_{CD} = \\left(\\frac{5\\,Q_g\\,g^{0.5}\\,T^{0.5}}{D^4}\\right)^{1/2}
        \\approx 4\\,Q_g^{0.5}\\,T^{0.25} / D^2

    Parameters
    ----------
    gas_flow_actual : float or array
        Actual gas flow at the impeller [m3/s].
    diameter : float
        Impeller diameter [m].
    tank_diameter : float
        Tank diameter [m].

    Returns
    -------
    float or array
        N_CD [rev/s].

    Notes
    -----
    The rounded form 4 Qg^0.5 T^0.25 / D^2 is Nienow's (1977) rule for the same condition.

    Examples
    --------
    >>> round(complete_dispersion_speed(0.002, 0.1, 0.3), 2)
    13.1

    References
    ----------
    .. [1] Nienow, Warmoeskerken, Smith & Konno (1985), Proc. 5th Eur. Conf. Mixing, 143.
    """
    q = np.asarray(gas_flow_actual, float)
    return _out(np.sqrt(5.0 * q * np.sqrt(G * tank_diameter) / diameter ** 4))


def regime(speed, gas_flow_actual, diameter, tank_diameter):
    """Dispersion regime at a speed and gas flow: "flooded", "loaded" or "completely
    dispersed".

    The impeller is flooded when Fl > Fl_F, completely dispersed when Fl <= Fl_CD, loaded in
    between (Nienow et al. 1985). With no gas it is "completely dispersed" (nothing to
    disperse).

    Parameters
    ----------
    speed : float or array
        Speed [rev/s].
    gas_flow_actual : float or array
        Actual gas flow at the impeller [m3/s].
    diameter : float
        Impeller diameter [m].
    tank_diameter : float
        Tank diameter [m].

    Returns
    -------
    str or numpy.ndarray of str
        The regime.

    Examples
    --------
    >>> regime(10.0, 0.002, 0.1, 0.3)
    'loaded'
    """
    n = np.asarray(speed, float)
    q = np.asarray(gas_flow_actual, float)
    fl = q / (n * diameter ** 3)
    fr = n ** 2 * diameter / G
    d_t = diameter / tank_diameter
    fl_f = 30.0 * fr * d_t ** 3.5
    fl_cd = 0.2 * np.sqrt(fr) * d_t ** 0.5
    out = np.where(fl > fl_f, REGIMES[0], np.where(fl <= fl_cd, REGIMES[2], REGIMES[1]))
    return _out(out)


def flooding_margin(speed, gas_flow_actual, diameter, tank_diameter):
    """Relative margin of speed above the flooding speed [-].

    .. math::
        m = N / N_F - 1

    Positive when the impeller is not flooded; the scale-up engine asks for m >= a chosen
    margin (0.2 is common practice, no source). Infinite with no gas.

    Parameters
    ----------
    speed : float or array
        Speed [rev/s].
    gas_flow_actual : float or array
        Actual gas flow at the impeller [m3/s].
    diameter : float
        Impeller diameter [m].
    tank_diameter : float
        Tank diameter [m].

    Returns
    -------
    float or array
        Margin [-].

    Examples
    --------
    >>> round(flooding_margin(10.0, 0.002, 0.1, 0.3), 2)
    0.48
    """
    n_f = np.asarray(flooding_speed(gas_flow_actual, diameter, tank_diameter))
    with np.errstate(divide="ignore"):
        return _out(np.where(n_f > 0, np.asarray(speed, float) / n_f - 1.0, np.inf))


def regime_warnings(impeller: str, d_over_t: float, c_over_t: float) -> list[str]:
    """Say where the flooding correlation is used outside its stated geometry.

    Parameters
    ----------
    impeller : str
        Catalogue type id of the sparged (bottom) impeller.
    d_over_t : float
        D/T [-].
    c_over_t : float
        Clearance over T [-].

    Returns
    -------
    list of str
        Warnings (empty inside the range).

    Examples
    --------
    >>> regime_warnings("disc-turbine", 0.33, 0.33)
    []
    """
    out = []
    spec = impeller_type(impeller)
    if spec.flooding == "outside":
        out.append(f"flooding and complete-dispersion speeds use the disc-turbine correlation "
                   f"of Nienow et al. (1985), which was not established for {impeller}; "
                   "treat the regime as indicative")
    elif spec.flooding == "conservative":
        out.append(f"flooding speed from the flat-blade disc-turbine correlation; {impeller} "
                   "handles more gas, so the estimate is conservative")
    lo, hi = NIENOW_D_OVER_T
    if not lo <= d_over_t <= hi:
        out.append(f"D/T = {d_over_t:.3g} is outside {lo:g}-{hi:g}, the range of the "
                   "flooding correlation (Nienow et al. 1985)")
    lo, hi = NIENOW_C_OVER_T
    if not lo <= c_over_t <= hi:
        out.append(f"C/T = {c_over_t:.3g} is outside {lo:g}-{hi:g}, the range of the "
                   "flooding correlation (Nienow et al. 1985)")
    return out
