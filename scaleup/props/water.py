"""Liquid water and dilute aqueous media, 0 to 100 degC, from the IAPWS formulations.

Public API (SI in, SI out; floats or numpy arrays of temperature):

* :func:`density` ``(T, P=101325)`` [kg/m3]: IAPWS-IF97 region 1.
* :func:`viscosity` ``(T, P=101325)`` [Pa s]: IAPWS 2008 (R12-08) at the IF97 density.
* :func:`surface_tension` ``(T)`` [N/m]: IAPWS R1-76(2014).
* :func:`vapour_pressure` ``(T)`` [Pa]: Wagner and Pruss (1993), the IAPWS-95 auxiliary.
* :func:`heat_capacity` ``(T, P=101325)`` [J/(kg K)]: IAPWS-IF97 region 1.
* :func:`kinematic_viscosity` ``(T, P=101325)`` [m2/s].
* :func:`liquid_properties` ``(T, P, salinity, overrides)``: all of them at once for a
  medium, with a measured value overriding any property, as a :class:`LiquidProperties`
  record; salt water by :mod:`scaleup.props.seawater`.

The published equations are implemented here rather than called from a library: they are
short, explicit (no iteration), vectorise over arrays, and keep the runtime free of another
dependency. The test suite checks them against the IAPWS verification tables and against
``iapws``. Each property has one method, so there is no registry here.
"""

from __future__ import annotations

from dataclasses import dataclass, field

import numpy as np

from scaleup.props._common import check_range, check_water_temperature, is_scalar, out
from scaleup.units import P_ATM

T_CRITICAL = 647.096  # K, IAPWS R2-83(1992) as used by all releases below
P_CRITICAL = 22.064e6  # Pa
RHO_CRITICAL = 322.0  # kg/m3
R_WATER = 461.526  # J/(kg K), specific gas constant of IF97
M_WATER = 18.015268e-3  # kg/mol, IAPWS-95

# IAPWS-IF97 region 1, Table 2 of IAPWS R7-97(2012): exponents I, J and coefficients n.
_I1 = np.array([0, 0, 0, 0, 0, 0, 0, 0, 1, 1, 1, 1, 1, 1, 2, 2, 2, 2, 2, 3, 3, 3, 4, 4, 4,
                5, 8, 8, 21, 23, 29, 30, 31, 32], dtype=float)
_J1 = np.array([-2, -1, 0, 1, 2, 3, 4, 5, -9, -7, -1, 0, 1, 3, -3, 0, 1, 3, 17, -4, 0, 6,
                -5, -2, 10, -8, -11, -6, -29, -31, -38, -39, -40, -41], dtype=float)
_N1 = np.array([
    0.14632971213167, -0.84548187169114, -0.37563603672040e1, 0.33855169168385e1,
    -0.95791963387872, 0.15772038513228, -0.16616417199501e-1, 0.81214629983568e-3,
    0.28319080123804e-3, -0.60706301565874e-3, -0.18990068218419e-1, -0.32529748770505e-1,
    -0.21841717175414e-1, -0.52838357969930e-4, -0.47184321073267e-3, -0.30001780793026e-3,
    0.47661393906987e-4, -0.44141845330846e-5, -0.72694996297594e-15, -0.31679644845054e-4,
    -0.28270797985312e-5, -0.85205128120103e-9, -0.22425281908000e-5, -0.65171222895601e-6,
    -0.14341729937924e-12, -0.40516996860117e-6, -0.12734301741641e-8, -0.17424871230634e-9,
    -0.68762131295531e-18, 0.14478307828521e-19, 0.26335781662795e-22, -0.11947622640071e-22,
    0.18228094581404e-23, -0.93537087292458e-25])

# IAPWS R12-08, Tables 1 and 2 (viscosity): H_i and the nonzero H_ij.
_H0 = np.array([1.67752, 2.20462, 0.6366564, -0.241605])
_HI = np.array([0, 1, 2, 3, 0, 1, 2, 3, 5, 0, 1, 2, 3, 4, 0, 1, 0, 3, 4, 3, 5], dtype=float)
_HJ = np.array([0, 0, 0, 0, 1, 1, 1, 1, 1, 2, 2, 2, 2, 2, 3, 3, 4, 4, 5, 6, 6], dtype=float)
_HIJ = np.array([0.520094, 0.850895e-1, -0.108374e1, -0.289555, 0.222531, 0.999115,
                 0.188797e1, 0.126613e1, 0.120573, -0.281378, -0.906851, -0.772479,
                 -0.489837, -0.257040, 0.161913, 0.257399, -0.325372e-1, 0.698452e-1,
                 0.872102e-2, -0.435673e-2, -0.593264e-3])

# Wagner and Pruss (1993), saturation pressure coefficients a1..a6 and their exponents.
_A_SAT = np.array([-7.85951783, 1.84408259, -11.7866497, 22.6807411, -15.9618719, 1.80122502])
_B_SAT = np.array([1.0, 1.5, 3.0, 3.5, 4.0, 7.5])


def _region1(T: np.ndarray, P: np.ndarray) -> tuple[np.ndarray, np.ndarray]:
    """Specific volume [m3/kg] and isobaric heat capacity [J/(kg K)] from IF97 region 1.

    Valid 273.15 K <= T <= 623.15 K, saturation pressure <= P <= 100 MPa.
    """
    pi = (P / 16.53e6)[..., None]
    tau = (1386.0 / T)[..., None]
    a = 7.1 - pi
    b = tau - 1.222
    gamma_pi = -np.sum(_N1 * _I1 * a ** (_I1 - 1) * b ** _J1, axis=-1)
    gamma_tautau = np.sum(_N1 * _J1 * (_J1 - 1) * a ** _I1 * b ** (_J1 - 2), axis=-1)
    volume = R_WATER * T / P * (P / 16.53e6) * gamma_pi
    cp = -R_WATER * (1386.0 / T) ** 2 * gamma_tautau
    return volume, cp


def _check_pressure(P) -> np.ndarray:
    return check_range("pressure", P, 1.0e3, 100.0e6, "Pa", "IAPWS-IF97 region 1")


def density_IAPWS_IF97(T, P=P_ATM):
    r"""Density of liquid water from the IAPWS-IF97 region 1 Gibbs equation [1]_.

    .. math::
        \frac{1}{\rho} = \frac{R T}{p}\,\pi\,\gamma_\pi(\pi, \tau),\qquad
        \pi = \frac{p}{16.53\ \mathrm{MPa}},\quad \tau = \frac{1386\ \mathrm{K}}{T}

    Parameters
    ----------
    T : float or array
        Temperature [K], 273.15 to 373.15.
    P : float or array
        Absolute pressure [Pa], default 101325.

    Returns
    -------
    float or array
        Density [kg/m3].

    Notes
    -----
    IF97 region 1 reproduces IAPWS-95 to within 0.01 % in density over 0 to 100 degC. At
    100 degC and 1 atm the state is a hair past the boiling point (99.97 degC); the equation
    is smooth there and the value is that of the liquid.

    Examples
    --------
    IAPWS-95 gives 997.047 kg/m3 at 25 degC and 0.101325 MPa:

    >>> round(density_IAPWS_IF97(298.15), 2)
    997.05

    References
    ----------
    .. [1] IAPWS R7-97(2012), Revised Release on the IAPWS Industrial Formulation 1997 for
       the Thermodynamic Properties of Water and Steam, Eq. 7 and Table 2.
    """
    scalar = is_scalar(T, P)
    T = check_water_temperature(T, "IAPWS-IF97 liquid water")
    P = _check_pressure(P)
    T, P = np.broadcast_arrays(T, P)
    volume, _ = _region1(T, P)
    return out(1.0 / volume, scalar)


def heat_capacity_IAPWS_IF97(T, P=P_ATM):
    r"""Isobaric specific heat capacity of liquid water from IAPWS-IF97 region 1 [1]_.

    .. math:: c_p = -R\,\tau^2\,\gamma_{\tau\tau}(\pi, \tau)

    Parameters
    ----------
    T : float or array
        Temperature [K], 273.15 to 373.15.
    P : float or array
        Absolute pressure [Pa], default 101325.

    Returns
    -------
    float or array
        Heat capacity [J/(kg K)].

    Notes
    -----
    Same range and accuracy as :func:`density_IAPWS_IF97`.

    Examples
    --------
    IAPWS-95 gives 4.1813 kJ/(kg K) at 25 degC and 1 atm; IF97 is within 0.02 %:

    >>> round(heat_capacity_IAPWS_IF97(298.15) / 1000, 3)
    4.182

    References
    ----------
    .. [1] IAPWS R7-97(2012), Table 3 (derivative relations) and Table 2.
    """
    scalar = is_scalar(T, P)
    T = check_water_temperature(T, "IAPWS-IF97 liquid water")
    P = _check_pressure(P)
    T, P = np.broadcast_arrays(T, P)
    _, cp = _region1(T, P)
    return out(cp, scalar)


def _viscosity_from_density(T: np.ndarray, rho: np.ndarray) -> np.ndarray:
    """IAPWS 2008 viscosity [Pa s] at temperature [K] and density [kg/m3], mu2 = 1."""
    t = T / T_CRITICAL
    d = rho / RHO_CRITICAL
    mu0 = 100.0 * np.sqrt(t) / np.sum(_H0 / t[..., None] ** np.arange(4), axis=-1)
    inner = np.sum(_HIJ * (1.0 / t[..., None] - 1.0) ** _HI * (d[..., None] - 1.0) ** _HJ,
                   axis=-1)
    mu1 = np.exp(d * inner)
    return mu0 * mu1 * 1.0e-6


def viscosity_IAPWS_2008(T, P=P_ATM):
    r"""Dynamic viscosity of liquid water from the IAPWS 2008 formulation [1]_.

    .. math::
        \bar\mu = \bar\mu_0(\bar T)\,\bar\mu_1(\bar T, \bar\rho),\qquad
        \bar\mu_0 = \frac{100\sqrt{\bar T}}{\sum_{i=0}^{3} H_i/\bar T^{i}},\qquad
        \bar\mu_1 = \exp\Big[\bar\rho \sum_i\sum_j H_{ij}
            \big(\tfrac{1}{\bar T} - 1\big)^i (\bar\rho - 1)^j\Big]

    with :math:`\bar T = T/647.096` K, :math:`\bar\rho = \rho/322` kg/m3, :math:`\mu^* = 1`
    uPa s, and the density from :func:`density_IAPWS_IF97`.

    Parameters
    ----------
    T : float or array
        Temperature [K], 273.15 to 373.15.
    P : float or array
        Absolute pressure [Pa], default 101325.

    Returns
    -------
    float or array
        Dynamic viscosity [Pa s].

    Notes
    -----
    The critical enhancement :math:`\bar\mu_2` is 1 to better than 0.1 % away from the
    critical point and is left out, as the release allows for industrial use. Stated
    uncertainty in the liquid at 0.1 MPa: 1 %.

    Examples
    --------
    R12-08 Table 4 check value, 298.15 K and 998 kg/m3: 889.735100 uPa s; at 1 atm the
    density is 997.05 kg/m3 and the viscosity 890.0 uPa s:

    >>> round(viscosity_IAPWS_2008(298.15) * 1e6, 1)
    890.0

    References
    ----------
    .. [1] IAPWS R12-08, Release on the IAPWS Formulation 2008 for the Viscosity of Ordinary
       Water Substance, Eqs. 10-12, Tables 1, 2 and 4.
    """
    scalar = is_scalar(T, P)
    T = check_water_temperature(T, "IAPWS 2008 viscosity")
    P = _check_pressure(P)
    T, P = np.broadcast_arrays(T, P)
    volume, _ = _region1(T, P)
    return out(_viscosity_from_density(T, 1.0 / volume), scalar)


def surface_tension_IAPWS(T):
    r"""Surface tension of water against its vapour (or air) from IAPWS R1-76 [1]_.

    .. math::
        \sigma = B\,\tau^{\mu}(1 + b\,\tau),\qquad \tau = 1 - T/T_c,\quad
        B = 235.8\ \mathrm{mN/m},\ b = -0.625,\ \mu = 1.256

    Parameters
    ----------
    T : float or array
        Temperature [K], 273.15 to 373.15.

    Returns
    -------
    float or array
        Surface tension [N/m].

    Notes
    -----
    Valid from the triple point to the critical point; the stated uncertainty is 0.5 % at
    0.01 to 100 degC. Against air, values agree within that uncertainty.

    Examples
    --------
    The IAPWS table gives 71.97 mN/m at 25 degC:

    >>> round(surface_tension_IAPWS(298.15) * 1000, 2)
    71.97

    References
    ----------
    .. [1] IAPWS R1-76(2014), Revised Release on Surface Tension of Ordinary Water Substance.
    """
    scalar = is_scalar(T)
    T = check_water_temperature(T, "IAPWS surface tension")
    tau = 1.0 - T / T_CRITICAL
    return out(235.8e-3 * tau ** 1.256 * (1.0 - 0.625 * tau), scalar)


def vapour_pressure_Wagner_Pruss(T):
    r"""Saturation (vapour) pressure of water from Wagner and Pruss [1]_.

    .. math::
        \ln\frac{p_\sigma}{p_c} = \frac{T_c}{T}\left(a_1\vartheta + a_2\vartheta^{1.5}
        + a_3\vartheta^{3} + a_4\vartheta^{3.5} + a_5\vartheta^{4} + a_6\vartheta^{7.5}\right),
        \qquad \vartheta = 1 - T/T_c

    Parameters
    ----------
    T : float or array
        Temperature [K], 273.15 to 373.15.

    Returns
    -------
    float or array
        Vapour pressure [Pa].

    Notes
    -----
    The auxiliary equation of the IAPWS-95 formulation; it agrees with IAPWS-95 to within
    its uncertainty (0.025 % below 373 K) from the triple point to the critical point.

    Examples
    --------
    IAPWS-95 gives 3.1699 kPa at 25 degC:

    >>> round(vapour_pressure_Wagner_Pruss(298.15), 0)
    3170.0

    References
    ----------
    .. [1] Wagner, W., and Pruss, A. (1993). International equations for the saturation
       properties of ordinary water substance. Revised according to the international
       temperature scale of 1990. J. Phys. Chem. Ref. Data 22, 783-787, Eq. 1.
    """
    scalar = is_scalar(T)
    T = check_water_temperature(T, "the Wagner-Pruss vapour pressure")
    theta = 1.0 - T / T_CRITICAL
    series = np.sum(_A_SAT * theta[..., None] ** _B_SAT, axis=-1)
    return out(P_CRITICAL * np.exp(T_CRITICAL / T * series), scalar)


# The plain names other modules call.
density = density_IAPWS_IF97
viscosity = viscosity_IAPWS_2008
surface_tension = surface_tension_IAPWS
vapour_pressure = vapour_pressure_Wagner_Pruss
heat_capacity = heat_capacity_IAPWS_IF97


def kinematic_viscosity(T, P=P_ATM):
    """Kinematic viscosity of liquid water, mu / rho.

    Parameters
    ----------
    T : float or array
        Temperature [K], 273.15 to 373.15.
    P : float or array
        Absolute pressure [Pa], default 101325.

    Returns
    -------
    float or array
        Kinematic viscosity [m2/s].

    Examples
    --------
    >>> round(kinematic_viscosity(298.15) * 1e6, 4)
    0.8927
    """
    scalar = is_scalar(T, P)
    return out(np.asarray(viscosity(T, P)) / np.asarray(density(T, P)), scalar)


@dataclass(frozen=True)
class LiquidProperties:
    """Properties of a liquid medium at one state, each with where it came from."""

    temperature_k: float
    pressure_pa: float
    salinity_kg_kg: float
    density_kg_m3: float
    viscosity_pa_s: float
    surface_tension_n_m: float
    vapour_pressure_pa: float
    heat_capacity_j_kg_k: float
    sources: dict[str, str] = field(default_factory=dict)

    @property
    def kinematic_viscosity_m2_s(self) -> float:
        return self.viscosity_pa_s / self.density_kg_m3


OVERRIDABLE = ("density", "viscosity", "surface_tension", "vapour_pressure", "heat_capacity")


def liquid_properties(T: float, P: float = P_ATM, salinity: float = 0.0,
                      overrides: dict[str, float] | None = None) -> LiquidProperties:
    """All properties of a water-based medium at one state, measured values taking precedence.

    Parameters
    ----------
    T : float
        Temperature [K], 273.15 to 373.15.
    P : float
        Absolute pressure [Pa], default 101325.
    salinity : float
        Salinity [kg/kg]; above zero, density and viscosity come from Sharqawy et al. (2010).
    overrides : dict, optional
        Measured values in SI by property name (``density`` [kg/m3], ``viscosity`` [Pa s],
        ``surface_tension`` [N/m], ``vapour_pressure`` [Pa], ``heat_capacity`` [J/(kg K)]).

    Returns
    -------
    LiquidProperties
        The values [SI, unit in each field name] and, in ``sources``, the method or
        ``"measured"`` for each.

    Examples
    --------
    >>> props = liquid_properties(310.15, overrides={"viscosity": 0.8e-3})
    >>> props.viscosity_pa_s, props.sources["viscosity"]
    (0.0008, 'measured')
    >>> round(props.density_kg_m3, 2)
    993.34
    """
    overrides = dict(overrides or {})
    unknown = sorted(set(overrides) - set(OVERRIDABLE))
    if unknown:
        raise ValueError(f"cannot override {', '.join(unknown)}; choose from "
                         f"{', '.join(OVERRIDABLE)}")
    from scaleup.props.seawater import density_Sharqawy, viscosity_Sharqawy  # imports us

    salty = float(salinity) > 0.0
    computed = {
        "density": (lambda: density_Sharqawy(T, salinity, P), "Sharqawy et al. (2010)")
        if salty else (lambda: density(T, P), "IAPWS-IF97"),
        "viscosity": (lambda: viscosity_Sharqawy(T, salinity, P), "Sharqawy et al. (2010)")
        if salty else (lambda: viscosity(T, P), "IAPWS 2008"),
        "surface_tension": (lambda: surface_tension(T), "IAPWS R1-76(2014)"),
        "vapour_pressure": (lambda: vapour_pressure(T), "Wagner and Pruss (1993)"),
        "heat_capacity": (lambda: heat_capacity(T, P), "IAPWS-IF97"),
    }
    values: dict[str, float] = {}
    sources: dict[str, str] = {}
    check_water_temperature(T)
    for name, (compute, source) in computed.items():
        if name in overrides:
            values[name] = float(check_range(name, overrides[name], 0.0, None, "SI"))
            sources[name] = "measured"
        else:
            values[name] = float(compute())
            sources[name] = source
    return LiquidProperties(
        temperature_k=float(T), pressure_pa=float(P), salinity_kg_kg=float(salinity),
        density_kg_m3=values["density"], viscosity_pa_s=values["viscosity"],
        surface_tension_n_m=values["surface_tension"],
        vapour_pressure_pa=values["vapour_pressure"],
        heat_capacity_j_kg_k=values["heat_capacity"], sources=sources)
