"""Film and particle mass-transfer correlations: Sherwood numbers and liquid-side kL.

Pure functions in SI, each one published method (registered with sources and ranges in
:mod:`scaleup.correlate.published`).
"""

from __future__ import annotations

import numpy as np

from scaleup.units import G


def sherwood_Frossling(Re, Sc):
    r"""Sherwood number of a sphere in a flowing fluid, Frossling (1938) [1]_.

    .. math:: Sh = 2 + 0.552\,Re^{1/2}\,Sc^{1/3}

    Parameters
    ----------
    Re : float or array_like
        Particle Reynolds number ``rho u d / mu`` [-].
    Sc : float or array_like
        Schmidt number ``nu / D`` [-].

    Returns
    -------
    float or numpy.ndarray
        Sherwood number ``kL d / D`` [-].

    Notes
    -----
    Evaporation of drops (and naphthalene spheres) into air; laminar boundary layer on a rigid
    sphere. Fuchs (1959) [2]_ reports Frossling's experimental coefficient as 0.276 in
    :math:`Sh = 2(1 + 0.276\,Re^{1/2} Sc^{1/3})`, i.e. the 0.552 used here, with Sc varied
    from 0.7 to 2.7 (gas phase): use in liquids (Sc of several hundred) extrapolates in Sc.
    The Reynolds range, about 2 < Re < 800, is from memory (not found again).

    Examples
    --------
    As the equation states, Re = 100, Sc = 500:

    >>> round(float(sherwood_Frossling(100.0, 500.0)), 2)
    45.81

    References
    ----------
    .. [1] Frossling, N. Uber die Verdunstung fallender Tropfen. Gerlands Beitr. Geophys. 52
       (1938) 170-216.
    .. [2] Fuchs, N.A. Evaporation and Droplet Growth in Gaseous Media. Pergamon, London
       (1959).
    """
    return 2.0 + 0.552 * np.sqrt(np.asarray(Re, float)) * np.cbrt(np.asarray(Sc, float))


def sherwood_Ranz_Marshall(Re, Sc):
    r"""Sherwood number of a sphere in a flowing fluid, Ranz and Marshall (1952) [1]_.

    .. math:: Sh = 2 + 0.6\,Re^{1/2}\,Sc^{1/3}

    Parameters
    ----------
    Re : float or array_like
        Particle Reynolds number ``rho u d / mu`` [-].
    Sc : float or array_like
        Schmidt number ``nu / D`` [-].

    Returns
    -------
    float or numpy.ndarray
        Sherwood number ``kL d / D`` [-].

    Notes
    -----
    Pure-liquid drops 0.06-0.11 cm across evaporating into air up to 220 degC; the study was
    restricted to 0 < Re < 200; a correlation of existing sphere data showed the results
    could be extrapolated five times beyond that range, to about Re = 1000 (abstract of
    [1]_). The data are gas-phase (Sc of order 1): no Schmidt range is stated, so use in
    liquids is an extrapolation the source does not cover.

    Examples
    --------
    As the equation states, Re = 100, Sc = 500:

    >>> round(float(sherwood_Ranz_Marshall(100.0, 500.0)), 2)
    49.62

    References
    ----------
    .. [1] Ranz, W.E., Marshall, W.R. Evaporation from drops. Chem. Eng. Prog. 48 (1952)
       141-146 and 173-180.
    """
    return 2.0 + 0.6 * np.sqrt(np.asarray(Re, float)) * np.cbrt(np.asarray(Sc, float))


def _buoyancy_velocity(mu, rho, delta_rho, g):
    return np.cbrt(np.asarray(delta_rho, float) * np.asarray(mu, float) * g
                   / np.asarray(rho, float)**2)


def kl_Calderbank_Moo_Young_small(mu, rho, D, delta_rho=None, g: float = G):
    r"""Liquid-side kL of small (rigid) bubbles, Calderbank and Moo-Young (1961) [1]_.

    .. math:: k_L\,Sc^{2/3} = 0.31\,\left(\frac{\Delta\rho\,\mu\,g}{\rho^2}\right)^{1/3}

    Parameters
    ----------
    mu : float or array_like
        Liquid dynamic viscosity [Pa s].
    rho : float or array_like
        Liquid density [kg/m3].
    D : float or array_like
        Diffusivity of the gas in the liquid [m2/s].
    delta_rho : float or array_like, optional
        Density difference liquid - gas [kg/m3] (default: ``rho``, gas density neglected).
    g : float
        Gravitational acceleration [m/s2].

    Returns
    -------
    float or numpy.ndarray
        Liquid-side mass-transfer coefficient kL [m/s].

    Notes
    -----
    Bubbles and particles smaller than about 2.5 mm behave as rigid spheres (the 2.5 mm
    boundary is from memory, not found again).

    Examples
    --------
    As the equation states, water-like liquid (mu = 1 mPa s, rho = 1000 kg/m3,
    D = 2e-9 m2/s):

    >>> f"{float(kl_Calderbank_Moo_Young_small(1e-3, 1000.0, 2e-9)):.3e}"
    '1.053e-04'

    References
    ----------
    .. [1] Calderbank, P.H., Moo-Young, M.B. The continuous phase heat and mass-transfer
       properties of dispersions. Chem. Eng. Sci. 16 (1961) 39-54.
    """
    rho = np.asarray(rho, float)
    sc = np.asarray(mu, float) / (rho * np.asarray(D, float))
    velocity = _buoyancy_velocity(mu, rho, rho if delta_rho is None else delta_rho, g)
    return 0.31 * velocity * sc**(-2.0 / 3.0)


def kl_Calderbank_Moo_Young_large(mu, rho, D, delta_rho=None, g: float = G):
    r"""Liquid-side kL of large (mobile-surface) bubbles, Calderbank and Moo-Young (1961) [1]_.

    .. math:: k_L\,Sc^{1/2} = 0.42\,\left(\frac{\Delta\rho\,\mu\,g}{\rho^2}\right)^{1/3}

    Parameters
    ----------
    mu : float or array_like
        Liquid dynamic viscosity [Pa s].
    rho : float or array_like
        Liquid density [kg/m3].
    D : float or array_like
        Diffusivity of the gas in the liquid [m2/s].
    delta_rho : float or array_like, optional
        Density difference liquid - gas [kg/m3] (default: ``rho``).
    g : float
        Gravitational acceleration [m/s2].

    Returns
    -------
    float or numpy.ndarray
        Liquid-side mass-transfer coefficient kL [m/s].

    Notes
    -----
    Bubbles larger than about 2.5 mm with mobile surfaces (boundary from memory, as for the
    small-bubble form).

    Examples
    --------
    As the equation states, for the same liquid as the small-bubble example:

    >>> f"{float(kl_Calderbank_Moo_Young_large(1e-3, 1000.0, 2e-9)):.3e}"
    '4.020e-04'

    References
    ----------
    .. [1] Calderbank, P.H., Moo-Young, M.B. The continuous phase heat and mass-transfer
       properties of dispersions. Chem. Eng. Sci. 16 (1961) 39-54.
    """
    rho = np.asarray(rho, float)
    sc = np.asarray(mu, float) / (rho * np.asarray(D, float))
    velocity = _buoyancy_velocity(mu, rho, rho if delta_rho is None else delta_rho, g)
    return 0.42 * velocity * sc**-0.5


def kl_Lamont_Scott(epsilon, nu, D, K: float = 0.4):
    r"""Liquid-side kL from the eddy-cell model, Lamont and Scott (1970) [1]_.

    .. math:: k_L = K\,(\varepsilon\,\nu)^{1/4}\,Sc^{-1/2}

    Parameters
    ----------
    epsilon : float or array_like
        Turbulent energy dissipation rate per unit mass [W/kg].
    nu : float or array_like
        Liquid kinematic viscosity [m2/s].
    D : float or array_like
        Diffusivity of the gas in the liquid [m2/s].
    K : float
        Model constant [-]; 0.4 as recalled for [1]_ (from memory, not re-read). Linek et
        al. (2004) [2]_ fitted 0.523 to kL in water and 0.5 M sodium sulphate stirred by two
        disc turbines (mean deviation 4.7 %).

    Returns
    -------
    float or numpy.ndarray
        Liquid-side mass-transfer coefficient kL [m/s].

    Notes
    -----
    Surface renewal by the smallest (Kolmogorov-scale) eddies; for turbulent liquids with
    mobile interfaces. The form :math:`k_L = K (\varepsilon\nu)^{1/4} Sc^{-1/2}` is the one
    Linek et al. (2004) [2]_ fit in an aerated stirred tank, with epsilon the power dissipated
    in the liquid per unit mass.

    Examples
    --------
    As the equation states, epsilon = 1 W/kg, nu = 1e-6 m2/s, D = 2e-9 m2/s:

    >>> f"{float(kl_Lamont_Scott(1.0, 1e-6, 2e-9)):.3e}"
    '5.657e-04'

    References
    ----------
    .. [1] Lamont, J.C., Scott, D.S. An eddy cell model of mass transfer into the surface of
       a turbulent liquid. AIChE J. 16 (1970) 513-519.
    .. [2] Linek, V., Kordac, M., Fujasova, M., Moucha, T. Gas-liquid mass transfer
       coefficient in stirred tanks interpreted through models of idealized eddy structure of
       turbulence in the bubble vicinity. Chem. Eng. Process. 43 (2004) 1511-1517.
    """
    nu = np.asarray(nu, float)
    sc = nu / np.asarray(D, float)
    return K * (np.asarray(epsilon, float) * nu)**0.25 * sc**-0.5
