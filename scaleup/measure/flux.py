"""kL from a measured flux, the film thickness, and the dimensionless groups of the measurement.

A flux N measured through a known interface (a flat surface, a wetted wall, a single bubble
or drop) gives the liquid-side coefficient and, by Whitman's film theory [1]_, an equivalent
film thickness:

.. math::
    k_L = \\frac{N}{C_i - C_b}, \\qquad \\delta = \\frac{D}{k_L}

The measurement's Sherwood, Reynolds and Schmidt numbers, from its characteristic length and
velocity, are what a Sherwood correlation Sh = a Re^b Sc^c is fitted to.

References
----------
.. [1] Whitman, W. G. "The two-film theory of gas absorption." Chem. Metall. Eng. 29 (1923)
   146-148.
"""

from __future__ import annotations

from dataclasses import dataclass

from scaleup.errors import InputError, check_range


@dataclass(frozen=True)
class FluxResult:
    """kL [m/s], film thickness [m] and the groups Sh, Re, Sc [-] of one flux measurement."""

    flux_mol_m2_s: float
    kl_m_s: float
    film_thickness_m: float
    sherwood: float | None
    reynolds: float | None
    schmidt: float | None


def kl_from_flux(flux: float, c_interface: float, c_bulk: float) -> float:
    """Liquid-side mass-transfer coefficient from a flux and its driving force.

    .. math::
        k_L = \\frac{N}{C_i - C_b}

    Parameters
    ----------
    flux : float
        Molar flux into the liquid [mol/(m2 s)].
    c_interface : float
        Concentration at the interface (saturation) [mol/m3].
    c_bulk : float
        Concentration in the bulk liquid [mol/m3].

    Returns
    -------
    float
        kL [m/s].

    Examples
    --------
    >>> kl_from_flux(2e-5, 0.25, 0.05)
    0.0001
    """
    driving = c_interface - c_bulk
    if driving == 0:
        raise InputError("interface and bulk concentrations are equal: no driving force",
                         "c_bulk", c_bulk)
    kl = flux / driving
    if kl <= 0:
        raise InputError(f"flux {flux:g} mol/(m2 s) runs against the driving force "
                         f"{driving:g} mol/m3; check the signs", "flux", flux)
    return kl


def film_thickness_Whitman(D: float, kl: float) -> float:
    """Equivalent film thickness of Whitman's film theory [1]_.

    .. math::
        \\delta = \\frac{D}{k_L}

    Parameters
    ----------
    D : float
        Diffusivity of the solute in the liquid [m2/s].
    kl : float
        Liquid-side mass-transfer coefficient [m/s].

    Returns
    -------
    float
        Film thickness [m].

    Notes
    -----
    A model length, not a physical one: typical values for stirred liquids are 10 to 100 um
    (from memory).

    Examples
    --------
    >>> round(film_thickness_Whitman(2.1e-9, 1e-4), 9)
    2.1e-05

    References
    ----------
    .. [1] Whitman, W. G. Chem. Metall. Eng. 29 (1923) 146-148.
    """
    check_range("diffusivity", D, 0.0, None, "m2/s", low_inclusive=False)
    check_range("kl", kl, 0.0, None, "m/s", low_inclusive=False)
    return D / kl


def sherwood(kl: float, L: float, D: float) -> float:
    """Sherwood number, Sh = kL L / D.

    Parameters
    ----------
    kl : float
        Mass-transfer coefficient [m/s].
    L : float
        Characteristic length [m].
    D : float
        Diffusivity [m2/s].

    Returns
    -------
    float
        Sh [-].

    Examples
    --------
    >>> round(sherwood(1e-4, 0.003, 2e-9), 6)
    150.0
    """
    return kl * L / D


def reynolds(V: float, L: float, rho: float, mu: float) -> float:
    """Reynolds number, Re = rho V L / mu.

    Parameters
    ----------
    V : float
        Characteristic velocity [m/s].
    L : float
        Characteristic length [m].
    rho : float
        Liquid density [kg/m3].
    mu : float
        Liquid dynamic viscosity [Pa s].

    Returns
    -------
    float
        Re [-].

    Examples
    --------
    >>> round(reynolds(0.2, 0.003, 998.0, 1.0e-3), 6)
    598.8
    """
    return rho * V * L / mu


def schmidt(mu: float, rho: float, D: float) -> float:
    """Schmidt number, Sc = mu / (rho D).

    Parameters
    ----------
    mu : float
        Liquid dynamic viscosity [Pa s].
    rho : float
        Liquid density [kg/m3].
    D : float
        Diffusivity [m2/s].

    Returns
    -------
    float
        Sc [-].

    Examples
    --------
    >>> round(schmidt(1.0e-3, 998.0, 2.0e-9), 3)
    501.002
    """
    return mu / (rho * D)


def analyse_flux(*, c_interface: float, c_bulk: float, D: float, flux: float | None = None,
                 rate: float | None = None, area: float | None = None, L: float | None = None,
                 V: float | None = None, rho: float | None = None,
                 mu: float | None = None) -> FluxResult:
    """kL, film thickness and (when the geometry and properties are given) Sh, Re, Sc.

    Parameters
    ----------
    c_interface : float
        Interface (saturation) concentration [mol/m3].
    c_bulk : float
        Bulk concentration [mol/m3].
    D : float
        Diffusivity [m2/s].
    flux : float, optional
        Measured flux [mol/(m2 s)]; or give ``rate`` and ``area``.
    rate : float, optional
        Transfer rate through the interface [mol/s].
    area : float, optional
        Interface area [m2].
    L : float, optional
        Characteristic length [m] (bubble diameter, plate length).
    V : float, optional
        Characteristic velocity [m/s] (slip velocity, film velocity).
    rho : float, optional
        Liquid density [kg/m3].
    mu : float, optional
        Liquid viscosity [Pa s].

    Returns
    -------
    FluxResult
        kL [m/s], film thickness [m], and Sh, Re, Sc [-] where their inputs were given.

    Examples
    --------
    >>> r = analyse_flux(rate=2e-9, area=1e-4, c_interface=0.25, c_bulk=0.05, D=2e-9, L=0.003)
    >>> round(r.kl_m_s, 9), round(r.sherwood, 6)
    (0.0001, 150.0)
    """
    if flux is None:
        if rate is None or area is None:
            raise InputError("give the flux, or the transfer rate and the interface area",
                             "flux")
        check_range("area", area, 0.0, None, "m2", low_inclusive=False)
        flux = rate / area
    kl = kl_from_flux(flux, c_interface, c_bulk)
    delta = film_thickness_Whitman(D, kl)
    sh = sherwood(kl, L, D) if L is not None else None
    sc = schmidt(mu, rho, D) if mu is not None and rho is not None else None
    re = (reynolds(V, L, rho, mu) if None not in (V, L, rho, mu) else None)
    return FluxResult(flux_mol_m2_s=flux, kl_m_s=kl, film_thickness_m=delta, sherwood=sh,
                      reynolds=re, schmidt=sc)
