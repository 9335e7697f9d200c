"""Published correlations for kLa, Sherwood numbers and kL, with their sources and ranges.

The catalogue is data: each entry names its function, the source, the equation, the
validity range the authors stated (as a :class:`~scaleup.correlate.domain.Domain`) and a
note. The TUI's pick-lists and the CLI's ``--published`` choices come from the registries
:data:`kla_correlations`, :data:`sherwood_correlations` and :data:`kl_correlations`.

Constants marked *from memory* were written down from the literature as recalled, not
re-read from the original paper: check them before relying on them.
"""

from __future__ import annotations

from collections.abc import Callable, Mapping
from dataclasses import dataclass

import numpy as np

from scaleup.correlate.domain import Domain, stated_domain
from scaleup.correlate.film import (
    kl_Calderbank_Moo_Young_large,
    kl_Calderbank_Moo_Young_small,
    kl_Lamont_Scott,
    sherwood_Frossling,
    sherwood_Ranz_Marshall,
)
from scaleup.correlate.models import (
    GAS_VELOCITY,
    GASSED_PV,
    REYNOLDS,
    SCHMIDT,
    VESSEL_VOLUME,
)
from scaleup.errors import InputError


def kla_vant_Riet(power_per_volume, superficial_velocity, coalescing: bool = True):
    r"""kLa of water-like liquids in stirred vessels, van't Riet (1979) [1]_.

    .. math::
        k_La = 0.026\,(P_g/V)^{0.4}\,u_s^{0.5} \quad\text{(coalescing)},\qquad
        k_La = 0.002\,(P_g/V)^{0.7}\,u_s^{0.2} \quad\text{(non-coalescing)}

    Parameters
    ----------
    power_per_volume : float or array_like
        Gassed power per liquid volume Pg/V [W/m3].
    superficial_velocity : float or array_like
        Superficial gas velocity us [m/s].
    coalescing : bool
        True for pure water (coalescing), False for electrolyte solutions
        (non-coalescing) [-].

    Returns
    -------
    float or numpy.ndarray
        Volumetric mass-transfer coefficient kLa [1/s].

    Notes
    -----
    A review of data on air-water and air-electrolyte systems in turbine-stirred vessels.
    Stated ranges: coalescing V < 2.6 m3, non-coalescing 0.002 < V < 4.4 m3, both
    500 < Pg/V < 10 000 W/m3; stated accuracy 20-40 %. Independent of impeller type. The
    constants are those of [1]_; the ranges were written down from memory and not found again
    in the public sources searched.

    Examples
    --------
    Pg/V = 1000 W/m3, us = 0.01 m/s (the equations of [1]_):

    >>> round(float(kla_vant_Riet(1000.0, 0.01)), 4)
    0.0412
    >>> round(float(kla_vant_Riet(1000.0, 0.01, coalescing=False)), 3)
    0.1

    References
    ----------
    .. [1] van't Riet, K. Review of measuring methods and results in nonviscous gas-liquid
       mass transfer in stirred vessels. Ind. Eng. Chem. Process Des. Dev. 18 (1979) 357-364.
    """
    pv = np.asarray(power_per_volume, dtype=float)
    us = np.asarray(superficial_velocity, dtype=float)
    if coalescing:
        return 0.026 * pv**0.4 * us**0.5
    return 0.002 * pv**0.7 * us**0.2


def kla_Smith(power_per_volume, superficial_velocity):
    r"""kLa of coalescing air-water dispersions, Smith, Middleton and van't Riet (1977) [1]_.

    .. math:: k_La = 0.01\,(P_g/V)^{0.475}\,u_s^{0.4}

    Parameters
    ----------
    power_per_volume : float or array_like
        Gassed power per liquid volume Pg/V [W/m3].
    superficial_velocity : float or array_like
        Superficial gas velocity us [m/s].

    Returns
    -------
    float or numpy.ndarray
        kLa [1/s].

    Notes
    -----
    Disc turbines in vessels of about 0.6 to 1.8 m diameter, coalescing water. Constant and
    exponents from memory; range approximate (from memory). Not found again in the public
    sources searched (papers, review tables, course notes): unconfirmed.

    Examples
    --------
    As the equation states, at Pg/V = 1000 W/m3 and us = 0.01 m/s:

    >>> round(float(kla_Smith(1000.0, 0.01)), 4)
    0.0422

    References
    ----------
    .. [1] Smith, J.M., Middleton, J.C., van't Riet, K. Gas-liquid mass transfer and hold-up
       in stirred vessels. Proc. 2nd European Conference on Mixing, Cambridge (1977) F4.
    """
    return 0.01 * np.asarray(power_per_volume, float)**0.475 * np.asarray(
        superficial_velocity, float)**0.4


def kla_Linek(power_per_volume, superficial_velocity):
    r"""kLa of coalescing water in a disc-turbine vessel, Linek, Vacek and Benes (1987) [1]_.

    .. math:: k_La = 4.95\times10^{-3}\,(P_g/V)^{0.593}\,u_s^{0.4}

    Parameters
    ----------
    power_per_volume : float or array_like
        Gassed power per liquid volume Pg/V [W/m3].
    superficial_velocity : float or array_like
        Superficial gas velocity us [m/s].

    Returns
    -------
    float or numpy.ndarray
        kLa [1/s].

    Notes
    -----
    Measured by a corrected dynamic method in laboratory vessels (about 20 L), water.
    Constant and exponents from memory; range approximate (from memory). Not found again in
    the public sources searched: unconfirmed.

    Examples
    --------
    As the equation states, at Pg/V = 1000 W/m3 and us = 0.01 m/s:

    >>> round(float(kla_Linek(1000.0, 0.01)), 4)
    0.0472

    References
    ----------
    .. [1] Linek, V., Vacek, V., Benes, P. A critical review and experimental verification
       of correct use of dynamic method for the determination of oxygen transfer in aerated
       agitated vessels to water, electrolyte solutions and viscous liquids. Chem. Eng. J. 34
       (1987) 11-34.
    """
    return 4.95e-3 * np.asarray(power_per_volume, float)**0.593 * np.asarray(
        superficial_velocity, float)**0.4


def kla_Nocentini(power_per_volume, superficial_velocity):
    r"""kLa of water with multiple disc turbines, Nocentini et al. (1993) [1]_.

    .. math:: k_La = 0.015\,(P_g/V)^{0.59}\,u_s^{0.55}

    Parameters
    ----------
    power_per_volume : float or array_like
        Gassed power per liquid volume Pg/V [W/m3].
    superficial_velocity : float or array_like
        Superficial gas velocity us [m/s].

    Returns
    -------
    float or numpy.ndarray
        kLa [1/s].

    Notes
    -----
    Tall vessel (H = 4T) with four disc turbines, water. Constant and exponents from memory;
    range approximate (from memory). Not found again in the public sources searched:
    unconfirmed.

    Examples
    --------
    As the equation states, at Pg/V = 1000 W/m3 and us = 0.01 m/s:

    >>> round(float(kla_Nocentini(1000.0, 0.01)), 4)
    0.0702

    References
    ----------
    .. [1] Nocentini, M., Fajner, D., Pasquali, G., Magelli, F. Gas-liquid mass transfer and
       holdup in vessels stirred with multiple Rushton turbines: water and water-glycerol
       solutions. Ind. Eng. Chem. Res. 32 (1993) 19-26.
    """
    return 0.015 * np.asarray(power_per_volume, float)**0.59 * np.asarray(
        superficial_velocity, float)**0.55


def kla_Zhu(power_per_volume, superficial_velocity):
    r"""kLa of coalescing water with a disc turbine, Zhu, Bandopadhayay and Wu (2001) [1]_.

    .. math:: k_La = 0.031\,(P_g/V)^{0.4}\,u_s^{0.5}

    Parameters
    ----------
    power_per_volume : float or array_like
        Gassed power per liquid volume Pg/V [W/m3].
    superficial_velocity : float or array_like
        Superficial gas velocity us [m/s].

    Returns
    -------
    float or numpy.ndarray
        kLa [1/s].

    Notes
    -----
    Laboratory vessel, tap water, comparison of impeller types; the disc-turbine line.
    Constant and exponents from memory; range approximate (from memory). Not found again in
    the public sources searched: unconfirmed.

    Examples
    --------
    As the equation states, at Pg/V = 1000 W/m3 and us = 0.01 m/s:

    >>> round(float(kla_Zhu(1000.0, 0.01)), 4)
    0.0491

    References
    ----------
    .. [1] Zhu, Y., Bandopadhayay, P.C., Wu, J. Measurement of gas-liquid mass transfer in an
       agitated vessel: a comparison between different impellers. J. Chem. Eng. Japan 34
       (2001) 579-584.
    """
    return 0.031 * np.asarray(power_per_volume, float)**0.4 * np.asarray(
        superficial_velocity, float)**0.5


@dataclass(frozen=True)
class PublishedCorrelation:
    """One catalogue entry: a published correlation with its source and validity range."""

    key: str
    function: Callable
    equation: str
    source: str
    domain: Domain
    variables: tuple[str, ...]
    coalescence: str | None = None
    note: str = ""
    from_memory: bool = False

    def predict(self, points: Mapping[str, np.ndarray]) -> np.ndarray:
        """Evaluate at points given by SI variable names (as fitted forms take them)."""
        missing = [v for v in self.variables if v not in points]
        if missing:
            raise InputError(f"{self.key} needs {', '.join(missing)}", missing[0])
        return np.atleast_1d(np.asarray(self.function(*(points[v] for v in self.variables)),
                                        dtype=float))

    def describe(self) -> dict:
        """Plain-dict summary for listings and JSON."""
        return {"key": self.key, "equation": self.equation, "source": self.source,
                "coalescence": self.coalescence, "note": self.note,
                "from_memory": self.from_memory, "domain": self.domain.to_dict()}


_PV_RANGE = (500.0, 10000.0)
_KLA_ARGS = (GASSED_PV, GAS_VELOCITY)

kla_correlations: dict[str, PublishedCorrelation] = {
    c.key: c for c in [
        PublishedCorrelation(
            "vant-riet-coalescing", lambda pv, us: kla_vant_Riet(pv, us, True),
            "kLa = 0.026 (Pg/V)^0.4 us^0.5", "van't Riet (1979), Ind. Eng. Chem. Process Des. "
            "Dev. 18, 357", stated_domain(**{GASSED_PV: _PV_RANGE, VESSEL_VOLUME: (None, 2.6)}),
            _KLA_ARGS, "coalescing", "stated accuracy 20-40 %; ranges from memory"),
        PublishedCorrelation(
            "vant-riet-noncoalescing", lambda pv, us: kla_vant_Riet(pv, us, False),
            "kLa = 0.002 (Pg/V)^0.7 us^0.2", "van't Riet (1979), Ind. Eng. Chem. Process Des. "
            "Dev. 18, 357",
            stated_domain(**{GASSED_PV: _PV_RANGE, VESSEL_VOLUME: (0.002, 4.4)}),
            _KLA_ARGS, "non-coalescing",
            "electrolyte solutions; stated accuracy 20-40 %; ranges from memory"),
        PublishedCorrelation(
            "smith-1977", kla_Smith, "kLa = 0.01 (Pg/V)^0.475 us^0.4",
            "Smith, Middleton, van't Riet (1977), 2nd Eur. Conf. Mixing, F4",
            stated_domain(**{GASSED_PV: (100.0, 5000.0), GAS_VELOCITY: (0.002, 0.05)}),
            _KLA_ARGS, "coalescing", "constants and range from memory, not found again", True),
        PublishedCorrelation(
            "linek-1987", kla_Linek, "kLa = 4.95e-3 (Pg/V)^0.593 us^0.4",
            "Linek, Vacek, Benes (1987), Chem. Eng. J. 34, 11",
            stated_domain(**{GASSED_PV: (100.0, 5000.0), GAS_VELOCITY: (0.002, 0.02),
                             VESSEL_VOLUME: (None, 0.05)}),
            _KLA_ARGS, "coalescing", "constants and range from memory, not found again", True),
        PublishedCorrelation(
            "nocentini-1993", kla_Nocentini, "kLa = 0.015 (Pg/V)^0.59 us^0.55",
            "Nocentini, Fajner, Pasquali, Magelli (1993), Ind. Eng. Chem. Res. 32, 19",
            stated_domain(**{GASSED_PV: (100.0, 5000.0), GAS_VELOCITY: (0.001, 0.02),
                             VESSEL_VOLUME: (None, 0.05)}),
            _KLA_ARGS, "coalescing",
            "multiple disc turbines; constants and range from memory, not found again", True),
        PublishedCorrelation(
            "zhu-2001", kla_Zhu, "kLa = 0.031 (Pg/V)^0.4 us^0.5",
            "Zhu, Bandopadhayay, Wu (2001), J. Chem. Eng. Japan 34, 579",
            stated_domain(**{GASSED_PV: (100.0, 3000.0), GAS_VELOCITY: (0.002, 0.02),
                             VESSEL_VOLUME: (None, 0.1)}),
            _KLA_ARGS, "coalescing",
            "disc turbine; constants and range from memory, not found again", True),
    ]
}

sherwood_correlations: dict[str, PublishedCorrelation] = {
    c.key: c for c in [
        PublishedCorrelation(
            "frossling", sherwood_Frossling, "Sh = 2 + 0.552 Re^0.5 Sc^(1/3)",
            "Frossling (1938), Gerlands Beitr. Geophys. 52, 170; coefficient 2 x 0.276 and "
            "Sc 0.7-2.7 as reported by Fuchs (1959), Evaporation and Droplet Growth",
            stated_domain(**{REYNOLDS: (2.0, 800.0), SCHMIDT: (0.7, 2.7)}),
            (REYNOLDS, SCHMIDT),
            note="rigid spheres in air (gas-phase Sc); Re range from memory"),
        PublishedCorrelation(
            "ranz-marshall", sherwood_Ranz_Marshall, "Sh = 2 + 0.6 Re^0.5 Sc^(1/3)",
            "Ranz, Marshall (1952), Chem. Eng. Prog. 48, 141 and 173",
            stated_domain(**{REYNOLDS: (None, 200.0)}), (REYNOLDS, SCHMIDT),
            note="drops evaporating in air, 0 < Re < 200 measured (extrapolated by the authors "
                 "to about 1000); no Sc range stated, liquids are beyond its data"),
    ]
}

KL_DISSIPATION = "dissipation_w_kg"
KL_VISCOSITY = "viscosity_pa_s"
KL_DENSITY = "density_kg_m3"
KL_KINEMATIC = "kinematic_viscosity_m2_s"
KL_DIFFUSIVITY = "diffusivity_m2_s"

kl_correlations: dict[str, PublishedCorrelation] = {
    c.key: c for c in [
        PublishedCorrelation(
            "calderbank-moo-young-small", kl_Calderbank_Moo_Young_small,
            "kL Sc^(2/3) = 0.31 (drho mu g / rho^2)^(1/3)",
            "Calderbank, Moo-Young (1961), Chem. Eng. Sci. 16, 39",
            stated_domain(bubble_diameter_m=(None, 2.5e-3)),
            (KL_VISCOSITY, KL_DENSITY, KL_DIFFUSIVITY),
            note="rigid bubbles below 2.5 mm (boundary from memory)"),
        PublishedCorrelation(
            "calderbank-moo-young-large", kl_Calderbank_Moo_Young_large,
            "kL Sc^(1/2) = 0.42 (drho mu g / rho^2)^(1/3)",
            "Calderbank, Moo-Young (1961), Chem. Eng. Sci. 16, 39",
            stated_domain(bubble_diameter_m=(2.5e-3, None)),
            (KL_VISCOSITY, KL_DENSITY, KL_DIFFUSIVITY),
            note="mobile bubbles above 2.5 mm (boundary from memory)"),
        PublishedCorrelation(
            "lamont-scott", kl_Lamont_Scott, "kL = 0.4 (eps nu)^(1/4) Sc^(-1/2)",
            "Lamont, Scott (1970), AIChE J. 16, 513", stated_domain(),
            (KL_DISSIPATION, KL_KINEMATIC, KL_DIFFUSIVITY),
            note="eddy-cell model; K = 0.4 from memory; Linek et al. (2004), Chem. Eng. "
                 "Process. 43, 1511, fitted 0.523 with two disc turbines"),
    ]
}

_REGISTRIES = {"kla": kla_correlations, "sherwood": sherwood_correlations,
               "kl": kl_correlations}


def published_correlation(key: str) -> PublishedCorrelation:
    """The catalogue entry ``key`` from any registry (kLa, Sherwood, kL).

    Examples
    --------
    >>> published_correlation("vant-riet-coalescing").equation
    'kLa = 0.026 (Pg/V)^0.4 us^0.5'
    """
    for registry in _REGISTRIES.values():
        if key in registry:
            return registry[key]
    known = ", ".join(k for r in _REGISTRIES.values() for k in r)
    raise InputError(f"unknown published correlation {key!r}; known: {known}", "published", key)


def kla_methods(power_per_volume: float | None = None, superficial_velocity: float | None = None,
                vessel_volume: float | None = None, coalescence: str | None = None,
                check_ranges: bool = True) -> list[str]:
    """Keys of the published kLa correlations valid for the given conditions.

    Parameters
    ----------
    power_per_volume : float, optional
        Gassed power per volume [W/m3].
    superficial_velocity : float, optional
        Superficial gas velocity [m/s].
    vessel_volume : float, optional
        Liquid volume [m3].
    coalescence : str, optional
        ``coalescing`` or ``non-coalescing``: keep only correlations for that class.
    check_ranges : bool
        Drop correlations whose stated range excludes the given values.

    Returns
    -------
    list of str

    Examples
    --------
    >>> kla_methods(2000.0, 0.01, 20.0, "coalescing")
    ['smith-1977']
    """
    points = {k: [v] for k, v in ((GASSED_PV, power_per_volume),
                                  (GAS_VELOCITY, superficial_velocity),
                                  (VESSEL_VOLUME, vessel_volume)) if v is not None}
    out = []
    for key, entry in kla_correlations.items():
        if coalescence is not None and entry.coalescence != coalescence:
            continue
        if check_ranges and points and bool(entry.domain.check(points).extrapolated[0]):
            continue
        out.append(key)
    return out


def kla(power_per_volume, superficial_velocity, method: str | None = None,
        coalescing: bool = True):
    """kLa [1/s] from a published correlation (default: van't Riet for the class).

    Parameters
    ----------
    power_per_volume : float or array_like
        Gassed power per volume [W/m3].
    superficial_velocity : float or array_like
        Superficial gas velocity [m/s].
    method : str, optional
        A key of :data:`kla_correlations`; default ``vant-riet-coalescing`` or
        ``vant-riet-noncoalescing`` by ``coalescing``.
    coalescing : bool
        Chooses the default method.

    Returns
    -------
    float or numpy.ndarray
        kLa [1/s].

    Examples
    --------
    >>> round(float(kla(1000.0, 0.01)), 4)
    0.0412
    """
    if method is None:
        method = "vant-riet-coalescing" if coalescing else "vant-riet-noncoalescing"
    if method not in kla_correlations:
        raise ValueError(f"unknown kLa method {method!r}; known: {', '.join(kla_correlations)}")
    return kla_correlations[method].function(power_per_volume, superficial_velocity)


def sherwood(Re, Sc, method: str | None = None):
    """Sherwood number [-] from a published correlation (default Ranz-Marshall).

    Parameters
    ----------
    Re : float or array_like
        Reynolds number [-].
    Sc : float or array_like
        Schmidt number [-].
    method : str, optional
        A key of :data:`sherwood_correlations`.

    Returns
    -------
    float or numpy.ndarray
        Sherwood number [-].

    Examples
    --------
    >>> round(float(sherwood(100.0, 500.0)), 2)
    49.62
    """
    method = method or "ranz-marshall"
    if method not in sherwood_correlations:
        raise ValueError(f"unknown Sherwood method {method!r}; known: "
                         f"{', '.join(sherwood_correlations)}")
    return sherwood_correlations[method].function(Re, Sc)
