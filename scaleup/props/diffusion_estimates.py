"""Estimates of diffusivity from physical properties (liquid and gas phase).

Public API (SI: K, Pa, Pa s, kg/mol, m3/mol -> m2/s; vectorised over T and viscosity):
:func:`diffusivity_Wilke_Chang`, :func:`diffusivity_Hayduk_Laudie`,
:func:`diffusivity_Hayduk_Minhas_aqueous`, :func:`diffusivity_Hayduk_Minhas_paraffin`,
:func:`diffusivity_Stokes_Einstein_scaling`, :func:`diffusivity_gas_Fuller`. The registry,
the dispatcher and the measured values are in :mod:`scaleup.props.diffusivity`.
"""

from __future__ import annotations

import math

from scaleup.props._common import check_positive, is_scalar, out


def diffusivity_Wilke_Chang(T, mu, M_solvent, V_solute, phi=2.6):
    r"""Infinite-dilution diffusivity of a solute in a liquid by Wilke and Chang [1]_.

    .. math::
        D_{AB} = 7.4\times10^{-8}\,\frac{(\phi M_B)^{1/2}\,T}{\mu_B\,V_A^{0.6}}
        \quad [\mathrm{cm^2/s};\ M_B\ \mathrm{g/mol},\ \mu_B\ \mathrm{cP},\
        V_A\ \mathrm{cm^3/mol}]

    Parameters
    ----------
    T : float or array
        Temperature [K].
    mu : float or array
        Solvent viscosity [Pa s].
    M_solvent : float
        Solvent molar mass [kg/mol].
    V_solute : float
        Solute molar volume at its normal boiling point [m3/mol].
    phi : float
        Association factor of the solvent [-]: 2.6 for water in the original paper, 2.26 in
        the Hayduk and Laudie (1974) revision; methanol 1.9, ethanol 1.5, unassociated 1.0.

    Returns
    -------
    float or array
        Diffusivity [m2/s].

    Notes
    -----
    Built on data for small solutes in dilute solution near room temperature; errors of
    10 to 20 % are typical for gases in water.

    Examples
    --------
    O2 in water at 20 degC with phi = 2.26 and V_A = 25.6 cm3/mol: 1.97e-9 m2/s (worked
    value, e.g. the soil-aeration literature):

    >>> round(diffusivity_Wilke_Chang(293.15, 1.0016e-3, 18.015e-3, 25.6e-6, 2.26) * 1e9, 2)
    1.97

    References
    ----------
    .. [1] Wilke, C. R., and Chang, P. (1955). Correlation of diffusion coefficients in
       dilute solutions. AIChE J. 1, 264-270.
    """
    scalar = is_scalar(T, mu)
    T = check_positive("temperature", T, "K")
    mu = check_positive("viscosity", mu, "Pa s") * 1000.0  # Pa s to cP
    M = float(check_positive("solvent molar mass", M_solvent, "kg/mol")) * 1000.0  # g/mol
    V = float(check_positive("molar volume", V_solute, "m3/mol")) * 1e6  # cm3/mol
    phi = float(check_positive("association factor", phi, "-"))
    D = 7.4e-8 * math.sqrt(phi * M) * T / (mu * V ** 0.6)  # cm2/s
    return out(D * 1e-4, scalar)


def diffusivity_Hayduk_Laudie(mu, V_solute):
    r"""Diffusivity of a non-electrolyte in water by Hayduk and Laudie [1]_.

    .. math::
        D_{AW} = \frac{13.26\times10^{-5}}{\mu_W^{1.14}\,V_A^{0.589}}
        \quad [\mathrm{cm^2/s};\ \mu_W\ \mathrm{cP},\ V_A\ \mathrm{cm^3/mol}]

    Parameters
    ----------
    mu : float or array
        Viscosity of water at the temperature of interest [Pa s].
    V_solute : float
        Solute molar volume at its normal boiling point [m3/mol].

    Returns
    -------
    float or array
        Diffusivity [m2/s].

    Notes
    -----
    A revision of Othmer and Thakar fitted to 87 solutes in water measured since 1950;
    average absolute error 5.8 % as reported by the authors. Temperature enters only through
    the viscosity of water.

    Examples
    --------
    CO2 in water at 25 degC (V_A = 34.0 cm3/mol): 1.90e-9 m2/s, where Jahne et al. (1987)
    measured 1.91e-9:

    >>> round(diffusivity_Hayduk_Laudie(0.8900e-3, 34.0e-6) * 1e9, 2)
    1.9

    References
    ----------
    .. [1] Hayduk, W., and Laudie, H. (1974). Prediction of diffusion coefficients for
       nonelectrolytes in dilute aqueous solutions. AIChE J. 20, 611-615.
    """
    scalar = is_scalar(mu)
    mu = check_positive("viscosity", mu, "Pa s") * 1000.0  # Pa s to cP
    V = float(check_positive("molar volume", V_solute, "m3/mol")) * 1e6  # cm3/mol
    return out(13.26e-5 / (mu ** 1.14 * V ** 0.589) * 1e-4, scalar)


def diffusivity_Hayduk_Minhas_aqueous(T, mu, V_solute):
    r"""Diffusivity of a solute in water by the aqueous form of Hayduk and Minhas [1]_.

    .. math::
        D_{AW} = 1.25\times10^{-8}\,(V_A^{-0.19} - 0.292)\,T^{1.52}\,\mu_W^{\varepsilon^*},
        \qquad \varepsilon^* = 9.58/V_A - 1.12
        \quad [\mathrm{cm^2/s};\ \mu\ \mathrm{cP},\ V_A\ \mathrm{cm^3/mol}]

    Parameters
    ----------
    T : float or array
        Temperature [K].
    mu : float or array
        Viscosity of water [Pa s].
    V_solute : float
        Solute molar volume at its normal boiling point [m3/mol].

    Returns
    -------
    float or array
        Diffusivity [m2/s].

    Notes
    -----
    Fitted to aqueous non-electrolyte data; the authors report an average error of about
    10 %. The paraffin form is :func:`diffusivity_Hayduk_Minhas_paraffin`.

    Examples
    --------
    O2 in water at 25 degC (V_A = 25.6 cm3/mol); Han and Bartels (1996) measured 2.00e-9:

    >>> round(diffusivity_Hayduk_Minhas_aqueous(298.15, 0.8900e-3, 25.6e-6) * 1e9, 2)
    1.95

    References
    ----------
    .. [1] Hayduk, W., and Minhas, B. S. (1982). Correlations for prediction of molecular
       diffusivities in liquids. Can. J. Chem. Eng. 60, 295-299, Eq. 18; as given in Reid,
       Prausnitz and Poling (1987), The Properties of Gases and Liquids, 4th ed., p. 602.
    """
    scalar = is_scalar(T, mu)
    T = check_positive("temperature", T, "K")
    mu = check_positive("viscosity", mu, "Pa s") * 1000.0  # Pa s to cP
    V = float(check_positive("molar volume", V_solute, "m3/mol")) * 1e6  # cm3/mol
    epsilon = 9.58 / V - 1.12
    D = 1.25e-8 * (V ** -0.19 - 0.292) * T ** 1.52 * mu ** epsilon  # cm2/s
    return out(D * 1e-4, scalar)


def diffusivity_Hayduk_Minhas_paraffin(T, mu, V_solute):
    r"""Diffusivity of a solute in an n-paraffin solvent by Hayduk and Minhas [1]_.

    .. math::
        D_{AB} = 13.3\times10^{-8}\,\frac{T^{1.47}\,\mu_B^{\varepsilon}}{V_A^{0.71}},
        \qquad \varepsilon = 10.2/V_A - 0.791
        \quad [\mathrm{cm^2/s};\ \mu\ \mathrm{cP},\ V_A\ \mathrm{cm^3/mol}]

    Parameters
    ----------
    T : float or array
        Temperature [K].
    mu : float or array
        Solvent viscosity [Pa s].
    V_solute : float
        Solute molar volume at its normal boiling point [m3/mol].

    Returns
    -------
    float or array
        Diffusivity [m2/s].

    Notes
    -----
    For normal-paraffin solutions (C5 to C32 solvents); reported average error about 3 %.

    Examples
    --------
    H2 in n-heptane at 25 degC (mu = 0.387 cP):

    >>> round(diffusivity_Hayduk_Minhas_paraffin(298.15, 0.387e-3, 14.3e-6) * 1e9, 1)
    9.4

    References
    ----------
    .. [1] Hayduk, W., and Minhas, B. S. (1982). Can. J. Chem. Eng. 60, 295-299, Eq. 16; as
       given in Reid, Prausnitz and Poling (1987), 4th ed., p. 602.
    """
    scalar = is_scalar(T, mu)
    T = check_positive("temperature", T, "K")
    mu = check_positive("viscosity", mu, "Pa s") * 1000.0  # Pa s to cP
    V = float(check_positive("molar volume", V_solute, "m3/mol")) * 1e6  # cm3/mol
    epsilon = 10.2 / V - 0.791
    D = 13.3e-8 * T ** 1.47 * mu ** epsilon / V ** 0.71  # cm2/s
    return out(D * 1e-4, scalar)


def diffusivity_Stokes_Einstein_scaling(D_ref, T_ref, mu_ref, T, mu):
    r"""Carry a known diffusivity to another temperature or viscosity (Stokes-Einstein) [1]_.

    .. math:: D_2 = D_1\,\frac{T_2}{T_1}\,\frac{\mu_1}{\mu_2}

    Parameters
    ----------
    D_ref : float
        Known diffusivity [m2/s].
    T_ref : float
        Temperature of the known value [K].
    mu_ref : float
        Solvent viscosity at the known value [Pa s].
    T : float or array
        Target temperature [K].
    mu : float or array
        Solvent (or medium) viscosity at the target [Pa s].

    Returns
    -------
    float or array
        Diffusivity [m2/s].

    Notes
    -----
    D mu / T is constant for a sphere much larger than the solvent molecules. Small gas
    molecules deviate by several % over tens of kelvin (Han and Bartels 1996); use it over
    modest steps or for a viscous medium at one temperature.

    Examples
    --------
    CO2 measured at 25 degC (1.91e-9 m2/s) carried to 35 degC, where Jahne et al. measured
    2.47e-9:

    >>> round(diffusivity_Stokes_Einstein_scaling(1.91e-9, 298.15, 0.8900e-3,
    ...                                           308.15, 0.7195e-3) * 1e9, 2)
    2.44

    References
    ----------
    .. [1] Einstein, A. (1905). Ann. Phys. 17, 549-560; Poling, Prausnitz and O'Connell
       (2001), The Properties of Gases and Liquids, 5th ed., Sect. 11-9.
    """
    scalar = is_scalar(T, mu)
    D_ref = float(check_positive("reference diffusivity", D_ref, "m2/s"))
    T_ref = float(check_positive("reference temperature", T_ref, "K"))
    mu_ref = float(check_positive("reference viscosity", mu_ref, "Pa s"))
    T = check_positive("temperature", T, "K")
    mu = check_positive("viscosity", mu, "Pa s")
    return out(D_ref * (T / T_ref) * (mu_ref / mu), scalar)


def diffusivity_gas_Fuller(T, P, M_A, M_B, V_A, V_B):
    r"""Binary diffusivity in a low-pressure gas by Fuller, Schettler and Giddings [1]_.

    .. math::
        D_{AB} = \frac{0.00143\,T^{1.75}}{P\,M_{AB}^{1/2}\,
            \left[(\Sigma_v)_A^{1/3} + (\Sigma_v)_B^{1/3}\right]^2},\qquad
        M_{AB} = \frac{2}{1/M_A + 1/M_B}
        \quad [\mathrm{cm^2/s};\ P\ \mathrm{bar},\ M\ \mathrm{g/mol}]

    Parameters
    ----------
    T : float or array
        Temperature [K].
    P : float or array
        Absolute pressure [Pa].
    M_A, M_B : float
        Molar masses [kg/mol].
    V_A, V_B : float
        Diffusion volumes of Poling et al. Table 11-1 [-] (cm3 basis, as tabulated).

    Returns
    -------
    float or array
        Diffusivity [m2/s].

    Notes
    -----
    Poling et al. (2001) Table 11-2 find it the most accurate of the simple methods for
    non-polar gases at low pressure, with errors mostly within 5 to 10 %.

    Examples
    --------
    CO2 in air at 293.15 K, 1 atm, where Marrero and Mason (1972) give 0.160 cm2/s:

    >>> round(diffusivity_gas_Fuller(293.15, 101325.0, 44.009e-3, 28.965e-3, 26.9, 19.7)
    ...       * 1e4, 3)
    0.153

    References
    ----------
    .. [1] Fuller, E. N., Schettler, P. D., and Giddings, J. C. (1966). A new method for
       prediction of binary gas-phase diffusion coefficients. Ind. Eng. Chem. 58(5), 18-27;
       in Poling, Prausnitz and O'Connell (2001), 5th ed., Eq. 11-4.4.
    """
    scalar = is_scalar(T, P)
    T = check_positive("temperature", T, "K")
    P = check_positive("pressure", P, "Pa") / 1e5  # Pa to bar
    M_AB = 2.0 / (1.0 / (M_A * 1000.0) + 1.0 / (M_B * 1000.0))  # g/mol
    D = 0.00143 * T ** 1.75 / (P * math.sqrt(M_AB) * (V_A ** (1 / 3) + V_B ** (1 / 3)) ** 2)
    return out(D * 1e-4, scalar)  # cm2/s to m2/s
