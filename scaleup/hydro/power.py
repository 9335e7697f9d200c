"""Agitator power: the power curve, several impellers on a shaft, and gassed power.

Ungassed power P = Np rho N^3 D^5 with Np from the impeller's power curve over the whole
Reynolds range. Gassed power Pg by Michel & Miller (1962), Hughmark (1980), Cui, van der Lans
& Luyben (1996), or the per-type ratio of the catalogue. Every function is vectorised over
speed and gas-flow arrays (numpy broadcasting).
"""

from __future__ import annotations

import numpy as np

from scaleup.hydro.impellers import ImpellerType, impeller_type
from scaleup.units import G


def _out(x):
    return x if np.ndim(x) else float(x)


# -- the power curve -----------------------------------------------------------------------
def power_number_curve(re, spec: ImpellerType | str, np_turbulent: float | None = None):
    """Power number over the full Reynolds range for a catalogue impeller type [-].

    .. math::
        N_p = \\begin{cases} K_p / Re & Re \\le Re_L \\\\
        \\text{straight lines in } (\\ln Re, \\ln N_p) \\text{ through the nodes}
        & Re_L < Re < Re_T \\\\
        N_{p,t} & Re \\ge Re_T \\end{cases}

    with the nodes :math:`(Re_L, K_p/Re_L)`, the published transitional point of the type
    where the catalogue has one, and :math:`(Re_T, N_{p,t})`.

    Parameters
    ----------
    re : float or array
        Impeller Reynolds number [-].
    spec : ImpellerType or str
        Catalogue entry or its id.
    np_turbulent : float, optional
        Turbulent power number [-] (a measured value overrides the catalogue's).

    Returns
    -------
    float or array
        Power number [-].

    Notes
    -----
    The laminar line (Kp / Re) and the turbulent plateau are the catalogue's values. Joining
    them by straight lines on log-log axes is common practice, no source. Where a published
    point inside the transition was found (disc turbine and marine propeller: Rushton,
    Costich & Everett 1950, Np at Re = 200) the line passes through it; the single straight
    line would overestimate those two published points by about 60 %, so for the other
    types, which have no such point, expect errors of that order near Re = 50-500. Baffled
    radial turbines dip in the transition and rise again to their plateau, so with a
    published point the curve is not monotonic.

    Examples
    --------
    >>> power_number_curve(1.0, "disc-turbine")  # laminar: Kp = 70
    70.0
    >>> round(power_number_curve(200.0, "disc-turbine"), 2)  # Rushton et al. (1950): 3.7
    3.7
    >>> power_number_curve(1.0e5, "disc-turbine")
    5.0
    """
    spec = impeller_type(spec) if isinstance(spec, str) else spec
    npt = spec.power_number if np_turbulent is None else np_turbulent
    re = np.asarray(re, dtype=float)
    with np.errstate(divide="ignore"):
        laminar = spec.kp / re
    nodes = [(spec.re_laminar, spec.kp / spec.re_laminar)]
    if spec.np_transitional is not None:
        nodes.append(spec.np_transitional)
    nodes.append((spec.re_turbulent, npt))
    log_re, log_np = np.log(np.array(nodes)).T
    transitional = np.exp(np.interp(np.log(np.maximum(re, 1e-300)), log_re, log_np))
    out = np.where(re <= spec.re_laminar, laminar,
                   np.where(re >= spec.re_turbulent, npt, transitional))
    return _out(out)


def power_ungassed(power_number, rho, speed, diameter):
    """Ungassed impeller power from the power number [W].

    .. math::
        P = N_p \\rho N^3 D^5

    Parameters
    ----------
    power_number : float or array
        Np [-].
    rho : float
        Liquid density [kg/m3].
    speed : float or array
        Speed [rev/s].
    diameter : float
        Impeller diameter [m].

    Returns
    -------
    float or array
        Power [W].

    Examples
    --------
    >>> power_ungassed(5.0, 1000.0, 10.0, 0.1)
    50.0
    """
    return _out(np.asarray(power_number, float) * rho * np.asarray(speed, float) ** 3
                * diameter ** 5)


def power_laminar(kp, mu, speed, diameter):
    """Laminar impeller power [W].

    .. math::
        P = K_p \\mu N^2 D^3

    Parameters
    ----------
    kp : float
        Laminar constant Np Re [-].
    mu : float
        Viscosity [Pa s].
    speed : float or array
        Speed [rev/s].
    diameter : float
        Impeller diameter [m].

    Returns
    -------
    float or array
        Power [W].

    Examples
    --------
    >>> power_laminar(70.0, 10.0, 1.0, 0.1)
    0.7
    """
    return _out(kp * mu * np.asarray(speed, float) ** 2 * diameter ** 3)


def kp_helical_ribbon_Rieger(D: float, T: float, height: float, pitch: float, width: float,
                             ribbons: int) -> float:
    """Laminar constant of a helical ribbon, Rieger, Novak & Havelkova [1]_ [-].

    .. math::
        K_p = 82.8 \\frac{h}{D}\\left(\\frac{c}{D}\\right)^{-0.38}
        \\left(\\frac{s}{D}\\right)^{-0.35}\\left(\\frac{w}{D}\\right)^{0.20} n_b^{0.78},
        \\quad c = (T - D)/2

    Parameters
    ----------
    D : float
        Ribbon diameter [m].
    T : float
        Tank diameter [m].
    height : float
        Ribbon height h [m].
    pitch : float
        Pitch s (height of one turn) [m].
    width : float
        Ribbon width w [m].
    ribbons : int
        Number of ribbons [-].

    Returns
    -------
    float
        Kp [-].

    Notes
    -----
    Newtonian liquids, laminar regime (Re < about 30).

    Examples
    --------
    >>> round(kp_helical_ribbon_Rieger(1.9, 2.0, 1.9, 1.9, 0.19, 2), 1)  # HIM Ex. 9-6: 357
    357.4

    References
    ----------
    .. [1] Rieger, F., Novak, V., Havelkova, D. (1988). The influence of the geometrical
       shape on the power requirements of ribbon impellers. Int. Chem. Eng. 28, 376-383.
    """
    c = 0.5 * (T - D)
    return (82.8 * height / D * (c / D) ** -0.38 * (pitch / D) ** -0.35
            * (width / D) ** 0.20 * ribbons ** 0.78)


# -- several impellers on one shaft ----------------------------------------------------------
def interaction_factors(spacings_over_d) -> np.ndarray:
    """Share of its single-impeller power each impeller draws on a multiple shaft [-].

    The bottom impeller draws its full power. An impeller at least about one impeller
    diameter above the one below draws its full power too, so the powers add (Hudcova, Machon
    & Nienow 1989, dual disc turbines, from memory: the paper was not found again). Closer
    than that the impeller streams merge and the upper impeller draws less; we reduce its
    share linearly from 1 at s = D to 0.4 at s = 0.5 D and hold 0.4 below that (common
    practice, no source: no published factor was found in the sources searched). Harriott
    (2003), Ex. 7.6, adds the powers of its three impellers (D = 1.333 m, 12 m of liquid).

    Parameters
    ----------
    spacings_over_d : sequence of float
        Spacing to the impeller below, over the lower impeller's diameter, bottom first [-].

    Returns
    -------
    numpy.ndarray
        One factor per impeller, bottom first (1.0 for the bottom one) [-].

    Examples
    --------
    >>> interaction_factors([1.5, 0.75]).tolist()
    [1.0, 1.0, 0.7]

    References
    ----------
    .. [1] Hudcova, V., Machon, V., Nienow, A. W. (1989). Gas-liquid dispersion with dual
       Rushton impellers. Biotechnol. Bioeng. 34, 617-628.
    """
    s = np.asarray(spacings_over_d, dtype=float).reshape(-1)
    return np.concatenate([[1.0], np.clip(0.4 + 1.2 * (s - 0.5), 0.4, 1.0)])


# -- gassed power ---------------------------------------------------------------------------
def gassed_power_Michel_Miller(power, speed, diameter, gas_flow_actual):
    """Gassed power of a disc turbine, Michel & Miller [1]_ [W].

    .. math::
        P_g = C \\left(\\frac{P^2 N D^3}{Q_g^{0.56}}\\right)^{0.45}

    with C = 0.08 in the original units (hp, rpm, ft, ft3/min), which is C = 0.706 in SI
    (W, rev/s, m, m3/s). The conversion is done factor by factor below. The result is
    capped at the ungassed power.

    Parameters
    ----------
    power : float or array
        Ungassed power [W].
    speed : float or array
        Speed [rev/s].
    diameter : float
        Impeller diameter [m].
    gas_flow_actual : float or array
        Actual gas flow at the impeller [m3/s].

    Returns
    -------
    float or array
        Gassed power [W].

    Notes
    -----
    Six-blade disc turbines, water and non-Newtonian media, T = 0.15-0.6 m. The
    correlation is dimensional and tends to over-predict Pg at large scale and low gas rates.

    Examples
    --------
    >>> round(gassed_power_Michel_Miller(1000.0, 5.0, 0.2, 0.002))
    398

    References
    ----------
    .. [1] Michel, B. J., Miller, S. A. (1962). Power requirements of gas-liquid agitated
       systems. AIChE J. 8, 262-266.
    """
    p_hp = np.asarray(power, float) / 745.69987  # W to hp
    n_rpm = np.asarray(speed, float) * 60.0  # rev/s to rpm
    d_ft = diameter / 0.3048  # m to ft
    q_cfm = np.asarray(gas_flow_actual, float) * 35.3146667 * 60.0  # m3/s to ft3/min
    with np.errstate(divide="ignore"):
        pg_hp = 0.08 * (p_hp ** 2 * n_rpm * d_ft ** 3 / q_cfm ** 0.56) ** 0.45
    pg = pg_hp * 745.69987  # hp to W
    return _out(np.minimum(pg, np.asarray(power, float)))


def gassed_power_ratio_Hughmark(speed, diameter, gas_flow_actual, liquid_volume, blade_width):
    """Gassed-to-ungassed power ratio of a disc turbine, Hughmark [1]_ [-].

    .. math::
        \\frac{P_g}{P} = 0.10 \\left(\\frac{Q_g}{N V}\\right)^{-1/4}
        \\left(\\frac{N^2 D^4}{g W V^{2/3}}\\right)^{-1/5}

    Parameters
    ----------
    speed : float or array
        Speed [rev/s].
    diameter : float
        Impeller diameter [m].
    gas_flow_actual : float or array
        Actual gas flow [m3/s].
    liquid_volume : float
        Liquid volume [m3].
    blade_width : float
        Blade height W [m].

    Returns
    -------
    float or array
        Pg/P [-], capped at 1.

    Notes
    -----
    Fitted to 391 points for disc turbines and flat-blade turbines of many sizes; about
    +-12 % on the data.

    Examples
    --------
    >>> round(gassed_power_ratio_Hughmark(5.0, 0.2, 0.002, 0.2, 0.04), 3)
    0.602

    References
    ----------
    .. [1] Hughmark, G. A. (1980). Power requirements and interfacial area in gas-liquid
       turbine agitated systems. Ind. Eng. Chem. Process Des. Dev. 19, 638-641.
    """
    n = np.asarray(speed, float)
    q = np.asarray(gas_flow_actual, float)
    with np.errstate(divide="ignore"):
        ratio = (0.10 * (q / (n * liquid_volume)) ** -0.25
                 * (n ** 2 * diameter ** 4 / (G * blade_width * liquid_volume ** (2.0 / 3.0)))
                 ** -0.2)
    return _out(np.minimum(ratio, 1.0))


# Cui et al. (1996) beyond their data: the lower branch reaches zero at Fl = 0.335, so it is
# applied up to CUI_FLOW_NUMBER_MAX and held at its value there above.
CUI_FLOW_NUMBER_MAX = 0.1
CUI_RATIO_FLOOR = 0.62 - 1.85 * CUI_FLOW_NUMBER_MAX  # 0.435


def gassed_power_ratio_Cui(flow_number):
    """Gassed-to-ungassed power ratio of a disc turbine, Cui, van der Lans & Luyben [1]_ [-].

    .. math::
        \\frac{P_g}{P} = \\begin{cases} 1 - 12.6\\,Fl & Fl < 0.035 \\\\
        0.62 - 1.85\\,Fl & 0.035 \\le Fl \\le 0.1 \\\\
        0.435 & Fl > 0.1 \\end{cases}

    Parameters
    ----------
    flow_number : float or array
        Gas flow number Fl = Qg / (N D^3) [-].

    Returns
    -------
    float or array
        Pg/P [-], at least :data:`CUI_RATIO_FLOOR` (0.435).

    Notes
    -----
    Disc turbines, single and multiple, pilot to production scale. The two branches meet
    at Fl = 0.035 within 0.005. Read on, the lower branch would fall to zero at Fl = 0.335
    and below it after, which no impeller does: a flooded disc turbine still draws a good
    part of its ungassed power. The correlation is applied up to Fl = 0.1
    (:data:`CUI_FLOW_NUMBER_MAX`; the upper end of the data behind it, from memory: the
    paper's stated range was not found again) and held at its value there, 0.435, above; a
    flooded disc turbine keeps a Pg/P of about 0.3-0.5 (from memory). Callers warn when Fl
    is above 0.1 (:func:`scaleup.hydro.point.operating_point` does).

    Examples
    --------
    >>> round(gassed_power_ratio_Cui(0.02), 3)
    0.748
    >>> round(gassed_power_ratio_Cui(0.5), 3)  # beyond the data: held at the Fl = 0.1 value
    0.435

    References
    ----------
    .. [1] Cui, Y. Q., van der Lans, R. G. J. M., Luyben, K. C. A. M. (1996). Local power
       uptake in gas-liquid systems with single and multiple Rushton turbines. Chem. Eng.
       Sci. 51, 2631-2636.
    """
    fl = np.asarray(flow_number, float)
    return _out(np.where(fl < 0.035, 1.0 - 12.6 * fl,
                         np.maximum(0.62 - 1.85 * fl, CUI_RATIO_FLOOR)))


def gassed_power_ratio_linear(flow_number, spec: ImpellerType | str):
    """Per-type gassed power ratio from the catalogue [-].

    .. math::
        \\frac{P_g}{P} = \\max(f, 1 - s\\,Fl)

    with slope s and floor f of the impeller type (see the catalogue's sources; the
    disc turbine uses :func:`gassed_power_ratio_Cui`).

    Parameters
    ----------
    flow_number : float or array
        Gas flow number [-].
    spec : ImpellerType or str
        Catalogue entry or its id.

    Returns
    -------
    float or array
        Pg/P [-].

    Examples
    --------
    >>> gassed_power_ratio_linear(0.02, "pitched-blade-4")
    0.84
    """
    spec = impeller_type(spec) if isinstance(spec, str) else spec
    if spec.gassed == "Cui":
        return gassed_power_ratio_Cui(flow_number)
    fl = np.asarray(flow_number, float)
    return _out(np.maximum(spec.gassed_floor, 1.0 - spec.gassed_slope * fl))


# name -> (description, valid impeller types or None for any)
gassed_power_correlations = {
    "Cui": ("Cui, van der Lans & Luyben (1996), Pg/P vs Fl; disc turbines",
            ("disc-turbine",)),
    "Hughmark": ("Hughmark (1980), Pg/P vs Qg/(NV) and N^2 D^4/(g W V^(2/3)); disc turbines",
                 ("disc-turbine",)),
    "Michel_Miller": ("Michel & Miller (1962), Pg = 0.706 (P^2 N D^3 / Qg^0.56)^0.45 (SI); "
                      "disc turbines", ("disc-turbine",)),
    "type": ("per-type ratio of the impeller catalogue (Cui for disc turbines)", None),
}


def gassed_power_methods(impeller: str | None = None) -> list[str]:
    """Gassed-power methods, those established for ``impeller`` first.

    Examples
    --------
    >>> gassed_power_methods("pitched-blade-4")
    ['type']
    """
    if impeller is None:
        return list(gassed_power_correlations)
    return [name for name, (_, types) in gassed_power_correlations.items()
            if types is None or impeller in types]


DEFAULT_GASSED_METHOD = "type"


def gassed_power(power, speed, diameter, gas_flow_actual, *, impeller: str,
                 method: str | None = None, liquid_volume: float | None = None,
                 blade_width: float | None = None):
    """Gassed power of one impeller by a named method [W].

    Parameters
    ----------
    power : float or array
        Ungassed power of the impeller [W].
    speed : float or array
        Speed [rev/s].
    diameter : float
        Impeller diameter [m].
    gas_flow_actual : float or array
        Actual gas flow at the impeller [m3/s].
    impeller : str
        Catalogue type id.
    method : str, optional
        A key of :data:`gassed_power_correlations`; default "type" (Cui for disc turbines,
        the catalogue's ratio otherwise).
    liquid_volume : float, optional
        Liquid volume [m3], needed by Hughmark.
    blade_width : float, optional
        Blade height [m], needed by Hughmark.

    Returns
    -------
    float or array
        Gassed power [W]; equal to ``power`` where the gas flow is zero.

    Examples
    --------
    >>> round(gassed_power(1000.0, 5.0, 0.2, 0.0008, impeller="disc-turbine"))  # Cui: Fl = 0.02
    748
    """
    method = DEFAULT_GASSED_METHOD if method is None else method
    if method not in gassed_power_correlations:
        raise ValueError(f"unknown gassed-power method {method!r}; use one of "
                         f"{', '.join(gassed_power_correlations)}")
    p = np.asarray(power, float)
    n = np.asarray(speed, float)
    q = np.asarray(gas_flow_actual, float)
    if method == "Michel_Miller":
        pg = gassed_power_Michel_Miller(p, n, diameter, q)
    elif method == "Hughmark":
        if liquid_volume is None or blade_width is None:
            raise ValueError("Hughmark needs the liquid volume and the blade width")
        pg = p * gassed_power_ratio_Hughmark(n, diameter, q, liquid_volume, blade_width)
    else:
        fl = q / (n * diameter ** 3)
        ratio = (gassed_power_ratio_Cui(fl) if method == "Cui"
                 else gassed_power_ratio_linear(fl, impeller))
        pg = p * np.asarray(ratio)
    return _out(np.where(q > 0, pg, p))
