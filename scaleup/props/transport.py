"""Transport basics: convective fluxes, Fick's first law, mass-transfer coefficients.

Public API (SI; vectorised):

* :func:`mass_flux_convective` ``(rho, v)`` -> W/A [kg/(m2 s)];
  :func:`molar_flux_convective` ``(c, v)`` -> N [mol/(m2 s)];
  :func:`heat_flux_convective` ``(mass_flux, cp, T, T_ref)`` -> q [W/m2].
* :func:`flux_Fick` ``(D, gradient)``, :func:`flux_Fick_film` ``(D, c_0, c_delta,
  thickness)``, :func:`flux_Fick_profile` ``(D, z, c)`` -> J [mol/(m2 s)].
* :func:`mass_transfer_coefficient` ``(flux, delta_c)`` -> k [m/s].
* Models of kL: :func:`kl_film_Lewis_Whitman` ``(D, thickness)`` with its inverse
  :func:`film_thickness`; :func:`kl_penetration_Higbie` ``(D, contact_time)`` with
  :func:`contact_time_Higbie`; :func:`kl_renewal_Danckwerts` ``(D, renewal_rate)`` with
  :func:`renewal_rate_Danckwerts`.
* :func:`convert_kl` ``(kl, D_from, D_to)`` -> :class:`KlConversion`: carry a kL (or kLa)
  measured for one solute to another, with the film and penetration bounds.
"""

from __future__ import annotations

from dataclasses import dataclass

import numpy as np

from scaleup.errors import InputError
from scaleup.props._common import as_array, check_positive, is_scalar, out


def mass_flux_convective(rho, v):
    r"""Convective mass flux of a fluid moving at velocity v.

    .. math:: \frac{W}{A} = \rho\,v

    Parameters
    ----------
    rho : float or array
        Density [kg/m3].
    v : float or array
        Velocity normal to the area [m/s] (sign gives the direction).

    Returns
    -------
    float or array
        Mass flux [kg/(m2 s)].

    Examples
    --------
    Water at 0.5 m/s carries 498.5 kg/(m2 s):

    >>> mass_flux_convective(997.0, 0.5)
    498.5
    """
    scalar = is_scalar(rho, v)
    return out(check_positive("density", rho, "kg/m3") * as_array(v, "velocity"), scalar)


def molar_flux_convective(c, v):
    r"""Convective molar flux of a species at concentration c carried at velocity v.

    .. math:: N = c\,v

    Parameters
    ----------
    c : float or array
        Concentration [mol/m3].
    v : float or array
        Velocity [m/s].

    Returns
    -------
    float or array
        Molar flux [mol/(m2 s)].

    Examples
    --------
    >>> molar_flux_convective(0.25, 0.02)
    0.005
    """
    scalar = is_scalar(c, v)
    c = check_positive("concentration", c, "mol/m3", allow_zero=True)
    return out(c * as_array(v, "velocity"), scalar)


def heat_flux_convective(mass_flux, cp, T, T_ref):
    r"""Enthalpy flux carried by a mass flux, relative to a reference temperature.

    .. math:: q = \frac{W}{A}\,c_p\,(T - T_{ref})

    Parameters
    ----------
    mass_flux : float or array
        Mass flux [kg/(m2 s)].
    cp : float or array
        Specific heat capacity, taken constant between the temperatures [J/(kg K)].
    T : float or array
        Temperature of the stream [K].
    T_ref : float or array
        Reference temperature of the enthalpy [K].

    Returns
    -------
    float or array
        Heat (enthalpy) flux [W/m2].

    Examples
    --------
    >>> heat_flux_convective(498.5, 4180.0, 310.15, 298.15)
    25004760.0
    """
    scalar = is_scalar(mass_flux, cp, T, T_ref)
    cp = check_positive("heat capacity", cp, "J/(kg K)")
    T = check_positive("temperature", T, "K")
    T_ref = check_positive("reference temperature", T_ref, "K")
    return out(as_array(mass_flux, "mass flux") * cp * (T - T_ref), scalar)


def flux_Fick(D, gradient):
    r"""Diffusive flux by Fick's first law [1]_.

    .. math:: J = -D\,\frac{dc}{dz}

    Parameters
    ----------
    D : float or array
        Diffusivity [m2/s].
    gradient : float or array
        Concentration gradient dc/dz [mol/m4].

    Returns
    -------
    float or array
        Flux in +z [mol/(m2 s)].

    Examples
    --------
    >>> flux_Fick(2e-9, -1e4)
    2e-05

    References
    ----------
    .. [1] Fick, A. (1855). Ueber Diffusion. Ann. Phys. 170, 59-86.
    """
    scalar = is_scalar(D, gradient)
    return out(-check_positive("diffusivity", D, "m2/s") * as_array(gradient, "gradient"),
               scalar)


def flux_Fick_film(D, c_0, c_delta, thickness):
    r"""Steady flux across a stagnant film with a linear profile (Fick's first law).

    .. math:: J = D\,\frac{c_0 - c_\delta}{\delta}

    Parameters
    ----------
    D : float or array
        Diffusivity [m2/s].
    c_0 : float or array
        Concentration at z = 0, e.g. the interface [mol/m3].
    c_delta : float or array
        Concentration at z = delta, e.g. the bulk [mol/m3].
    thickness : float or array
        Film thickness delta [m].

    Returns
    -------
    float or array
        Flux from z = 0 towards z = delta [mol/(m2 s)].

    Examples
    --------
    O2 through a 20 um film from saturation (0.24 mol/m3) to zero:

    >>> round(flux_Fick_film(2.1e-9, 0.24, 0.0, 20e-6), 9)
    2.52e-05
    """
    scalar = is_scalar(D, c_0, c_delta, thickness)
    D = check_positive("diffusivity", D, "m2/s")
    c_0 = check_positive("c_0", c_0, "mol/m3", allow_zero=True)
    c_delta = check_positive("c_delta", c_delta, "mol/m3", allow_zero=True)
    delta = check_positive("thickness", thickness, "m")
    return out(D * (c_0 - c_delta) / delta, scalar)


def flux_Fick_profile(D, z, c):
    r"""Local diffusive flux along a sampled concentration profile (Fick's first law).

    .. math:: J(z_i) = -D \left.\frac{dc}{dz}\right|_{z_i}

    with the gradient from second-order finite differences (one-sided at the ends), on
    possibly uneven spacing.

    Parameters
    ----------
    D : float or array
        Diffusivity [m2/s], constant or one value per point.
    z : array
        Positions, strictly increasing [m], at least 3 points.
    c : array
        Concentrations at those positions [mol/m3].

    Returns
    -------
    array
        Flux in +z at each position [mol/(m2 s)].

    Examples
    --------
    >>> flux_Fick_profile(2e-9, [0.0, 1e-5, 2e-5], [0.2, 0.1, 0.0])
    array([2.e-05, 2.e-05, 2.e-05])
    """
    z = as_array(z, "z")
    c = check_positive("concentration", c, "mol/m3", allow_zero=True)
    if z.ndim != 1 or z.shape != c.shape or z.size < 3:
        raise InputError("z and c must be 1-D arrays of the same length, at least 3 points",
                         "z", z.shape)
    if np.any(np.diff(z) <= 0):
        raise InputError("positions z must be strictly increasing", "z", z)
    gradient = np.gradient(c, z, edge_order=2)
    return -check_positive("diffusivity", D, "m2/s") * gradient


def mass_transfer_coefficient(flux, delta_c):
    r"""Mass-transfer coefficient from a measured flux and its driving force.

    .. math:: k = \frac{N}{\Delta C}

    Parameters
    ----------
    flux : float or array
        Molar flux [mol/(m2 s)].
    delta_c : float or array
        Concentration driving force, e.g. C* - C [mol/m3], not zero.

    Returns
    -------
    float or array
        k [m/s].

    Examples
    --------
    >>> mass_transfer_coefficient(2.52e-5, 0.24)
    0.000105
    """
    scalar = is_scalar(flux, delta_c)
    dc = as_array(delta_c, "delta_c")
    if np.any(dc == 0):
        raise InputError("the driving force is zero; k is undefined", "delta_c", delta_c)
    return out(as_array(flux, "flux") / dc, scalar)


def kl_film_Lewis_Whitman(D, thickness):
    r"""Liquid-side mass-transfer coefficient of film theory [1]_.

    .. math:: k_L = \frac{D}{\delta}

    Parameters
    ----------
    D : float or array
        Diffusivity [m2/s].
    thickness : float or array
        Stagnant film thickness delta [m].

    Returns
    -------
    float or array
        kL [m/s].

    Notes
    -----
    Steady diffusion through a stagnant film; kL proportional to D. The film thickness is a
    fitted parameter, typically 10 to 100 um in stirred vessels.

    Examples
    --------
    >>> kl_film_Lewis_Whitman(2e-9, 2e-5)
    0.0001

    References
    ----------
    .. [1] Lewis, W. K., and Whitman, W. G. (1924). Principles of gas absorption. Ind. Eng.
       Chem. 16, 1215-1220.
    """
    scalar = is_scalar(D, thickness)
    return out(check_positive("diffusivity", D, "m2/s")
               / check_positive("thickness", thickness, "m"), scalar)


def film_thickness(D, kl):
    """Film thickness that gives a kL in film theory, delta = D / kL.

    Parameters
    ----------
    D : float or array
        Diffusivity [m2/s].
    kl : float or array
        Liquid-side mass-transfer coefficient [m/s].

    Returns
    -------
    float or array
        Film thickness [m].

    Examples
    --------
    >>> film_thickness(2e-9, 1e-4)
    2e-05
    """
    scalar = is_scalar(D, kl)
    return out(check_positive("diffusivity", D, "m2/s") / check_positive("kl", kl, "m/s"),
               scalar)


def kl_penetration_Higbie(D, contact_time):
    r"""Mean kL over an exposure time by Higbie's penetration theory [1]_.

    .. math:: k_L = 2\sqrt{\frac{D}{\pi\,t_c}}

    Parameters
    ----------
    D : float or array
        Diffusivity [m2/s].
    contact_time : float or array
        Exposure time of a surface element, e.g. bubble diameter / slip velocity [s].

    Returns
    -------
    float or array
        kL [m/s].

    Notes
    -----
    Unsteady diffusion into a semi-infinite liquid during the contact time, averaged over
    it; kL proportional to D**0.5. Valid while the penetration depth sqrt(D t_c) stays
    small against the eddy or bubble size.

    Examples
    --------
    >>> round(kl_penetration_Higbie(2e-9, 0.01), 7)
    0.0005046

    References
    ----------
    .. [1] Higbie, R. (1935). The rate of absorption of a pure gas into a still liquid during
       short periods of exposure. Trans. AIChE 31, 365-389.
    """
    scalar = is_scalar(D, contact_time)
    D = check_positive("diffusivity", D, "m2/s")
    t = check_positive("contact_time", contact_time, "s")
    return out(2.0 * np.sqrt(D / (np.pi * t)), scalar)


def contact_time_Higbie(D, kl):
    """Contact time that gives a kL in penetration theory, t_c = 4 D / (pi kL**2).

    Parameters
    ----------
    D : float or array
        Diffusivity [m2/s].
    kl : float or array
        Liquid-side mass-transfer coefficient [m/s].

    Returns
    -------
    float or array
        Contact time [s].

    Examples
    --------
    >>> round(contact_time_Higbie(2e-9, 0.0005046), 4)
    0.01
    """
    scalar = is_scalar(D, kl)
    D = check_positive("diffusivity", D, "m2/s")
    kl = check_positive("kl", kl, "m/s")
    return out(4.0 * D / (np.pi * kl ** 2), scalar)


def kl_renewal_Danckwerts(D, renewal_rate):
    r"""kL of Danckwerts' surface-renewal theory [1]_.

    .. math:: k_L = \sqrt{D\,s}

    Parameters
    ----------
    D : float or array
        Diffusivity [m2/s].
    renewal_rate : float or array
        Fractional rate of surface renewal s [1/s].

    Returns
    -------
    float or array
        kL [m/s].

    Notes
    -----
    Surface elements are replaced at random with an exponential age distribution; kL is
    proportional to D**0.5 like penetration theory.

    Examples
    --------
    >>> kl_renewal_Danckwerts(2e-9, 5.0)
    0.0001

    References
    ----------
    .. [1] Danckwerts, P. V. (1951). Significance of liquid-film coefficients in gas
       absorption. Ind. Eng. Chem. 43, 1460-1467.
    """
    scalar = is_scalar(D, renewal_rate)
    return out(np.sqrt(check_positive("diffusivity", D, "m2/s")
                       * check_positive("renewal_rate", renewal_rate, "1/s")), scalar)


def renewal_rate_Danckwerts(D, kl):
    """Surface-renewal rate that gives a kL, s = kL**2 / D.

    Parameters
    ----------
    D : float or array
        Diffusivity [m2/s].
    kl : float or array
        Liquid-side mass-transfer coefficient [m/s].

    Returns
    -------
    float or array
        Renewal rate [1/s].

    Examples
    --------
    >>> renewal_rate_Danckwerts(2e-9, 1e-4)
    5.0
    """
    scalar = is_scalar(D, kl)
    return out(check_positive("kl", kl, "m/s") ** 2 / check_positive("diffusivity", D, "m2/s"),
               scalar)


@dataclass(frozen=True)
class KlConversion:
    """A kL (or kLa) carried from one solute to another by the film and penetration models.

    ``film`` uses exponent 1, ``penetration`` exponent 1/2 (penetration and surface
    renewal agree); ``estimate`` uses the chosen exponent; ``low`` and ``high`` bound the
    range between the two models, which is the uncertainty of the conversion.
    """

    diffusivity_ratio: float | np.ndarray
    exponent: float
    estimate: float | np.ndarray
    film: float | np.ndarray
    penetration: float | np.ndarray
    low: float | np.ndarray
    high: float | np.ndarray


def convert_kl(kl, D_from, D_to, exponent: float = 0.5) -> KlConversion:
    r"""Carry a kL or kLa measured with one solute to another solute [1]_ [2]_.

    .. math::
        k_{L,2} = k_{L,1}\left(\frac{D_2}{D_1}\right)^{n},\qquad
        n = 1\ \text{(film)},\quad n = \tfrac{1}{2}\ \text{(penetration, renewal)}

    The interfacial area is the same for both solutes in one dispersion, so the same ratio
    applies to kLa.

    Parameters
    ----------
    kl : float or array
        kL [m/s] (or kLa [1/s]) measured with the first solute.
    D_from : float or array
        Diffusivity of the measured solute [m2/s].
    D_to : float or array
        Diffusivity of the target solute [m2/s].
    exponent : float
        Exponent n of the central estimate [-], between 0.5 and 1; default 0.5 (mobile
        bubble surfaces in turbulent liquid, where renewal models describe the data).

    Returns
    -------
    KlConversion
        The central estimate, both model values and the range between them [m/s, or 1/s
        for a kLa], and the diffusivity ratio [-].

    Examples
    --------
    kLa of 0.05 1/s measured with O2 (2.0e-9 m2/s) carried to H2 (4.5e-9 m2/s):

    >>> r = convert_kl(0.05, 2.0e-9, 4.5e-9)
    >>> round(r.estimate, 4), round(r.low, 4), round(r.high, 4)
    (0.075, 0.075, 0.1125)

    References
    ----------
    .. [1] Higbie, R. (1935). Trans. AIChE 31, 365-389; Danckwerts, P. V. (1951). Ind. Eng.
       Chem. 43, 1460-1467.
    .. [2] Lewis, W. K., and Whitman, W. G. (1924). Ind. Eng. Chem. 16, 1215-1220.
    """
    if not 0.5 <= exponent <= 1.0:
        raise InputError(f"exponent {exponent:g} is outside the range of the film (1) and "
                         "penetration (0.5) models", "exponent", exponent)
    scalar = is_scalar(kl, D_from, D_to)
    kl = check_positive("kl", kl, "m/s or 1/s")
    ratio = check_positive("D_to", D_to, "m2/s") / check_positive("D_from", D_from, "m2/s")
    film = kl * ratio
    penetration = kl * np.sqrt(ratio)
    return KlConversion(
        diffusivity_ratio=out(ratio, scalar), exponent=float(exponent),
        estimate=out(kl * ratio ** exponent, scalar), film=out(film, scalar),
        penetration=out(penetration, scalar), low=out(np.minimum(film, penetration), scalar),
        high=out(np.maximum(film, penetration), scalar))
