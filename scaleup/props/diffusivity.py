"""Diffusivity of dissolved gases three ways: measured values, a lab measurement, estimates.

Public API (SI: K, Pa, Pa s, m3/mol -> m2/s):

* :func:`diffusivity` ``(solute, solvent="water", T=298.15, method=None, *, viscosity=None,
  molar_volume=None, pressure=101325)`` -> D [m2/s] by one method (default: the first
  applicable in :data:`diffusivity_correlations`).
* :func:`estimate` (same arguments) -> :class:`Estimate` with the method, source and notes.
* :func:`compare` ``(solute, solvent, T, ...)`` -> :class:`Comparison`: every applicable
  method side by side, with the mean and the spread.
* :func:`diffusivity_methods` ``(solute, solvent, T)`` -> applicable method names.
* :func:`diffusivity_measured` ``(solute, T)``: the table of published values in water.
* :func:`diaphragm_cell_constant`, :func:`diffusivity_diaphragm_cell`,
  :func:`diaphragm_cell_constant_geometry`: reduce a diaphragm-cell run.
* :func:`schmidt_number` ``(mu, rho, D)``.
* Estimators (re-exported from :mod:`scaleup.props.diffusion_estimates`):
  ``diffusivity_Wilke_Chang``, ``diffusivity_Hayduk_Laudie``,
  ``diffusivity_Hayduk_Minhas_aqueous``, ``diffusivity_Hayduk_Minhas_paraffin``,
  ``diffusivity_Stokes_Einstein_scaling``, ``diffusivity_gas_Fuller``.
"""

from __future__ import annotations

from collections.abc import Callable
from dataclasses import dataclass

import numpy as np

from scaleup.errors import InputError
from scaleup.props import water
from scaleup.props._common import (
    as_array,
    check_positive,
    check_water_temperature,
    is_scalar,
    out,
    range_note,
)
from scaleup.props.data import (
    GAS_SOLVENTS,
    GASES,
    MEASURED,
    SOLVENTS,
    WILKE_CHANG_WATER_REVISED,
)
from scaleup.props.diffusion_estimates import (
    diffusivity_gas_Fuller,
    diffusivity_Hayduk_Laudie,
    diffusivity_Hayduk_Minhas_aqueous,
    diffusivity_Hayduk_Minhas_paraffin,
    diffusivity_Stokes_Einstein_scaling,
    diffusivity_Wilke_Chang,
)
from scaleup.props.diffusion_measured import (
    diaphragm_cell_constant,
    diaphragm_cell_constant_geometry,
    diffusivity_diaphragm_cell,
    diffusivity_measured,
    measured_source,
    measured_span,
)
from scaleup.units import P_ATM

__all__ = [
    "Comparison", "Estimate", "compare", "diaphragm_cell_constant",
    "diaphragm_cell_constant_geometry", "diffusivity", "diffusivity_Hayduk_Laudie",
    "diffusivity_Hayduk_Minhas_aqueous", "diffusivity_Hayduk_Minhas_paraffin",
    "diffusivity_Stokes_Einstein_scaling", "diffusivity_Wilke_Chang",
    "diffusivity_correlations", "diffusivity_diaphragm_cell", "diffusivity_gas_Fuller",
    "diffusivity_measured", "diffusivity_methods", "estimate", "measured_source",
    "schmidt_number",
]


def schmidt_number(mu, rho, D):
    """Schmidt number Sc = mu / (rho D).

    Parameters
    ----------
    mu : float or array
        Dynamic viscosity [Pa s].
    rho : float or array
        Density [kg/m3].
    D : float or array
        Diffusivity [m2/s].

    Returns
    -------
    float or array
        Sc [-].

    Examples
    --------
    >>> round(schmidt_number(0.890e-3, 997.0, 2.0e-9))
    446
    """
    scalar = is_scalar(mu, rho, D)
    return out(check_positive("viscosity", mu, "Pa s") / (
        check_positive("density", rho, "kg/m3") * check_positive("diffusivity", D, "m2/s")),
        scalar)


@dataclass(frozen=True)
class Case:
    """A solute in a solvent at one state, with what the methods need to know."""

    solute: str
    solvent: str
    phase: str  # "liquid" or "gas"
    T: np.ndarray
    pressure: np.ndarray
    viscosity: np.ndarray | None  # Pa s, of the solvent or medium
    viscosity_given: bool
    molar_volume: float | None  # m3/mol, solute at its normal boiling point


def _case(solute: str, solvent: str, T, viscosity, molar_volume, pressure) -> Case:
    if solvent in SOLVENTS:
        phase = "liquid"
        T = check_water_temperature(T) if solvent == "water" else check_positive(
            "temperature", T, "K")
    elif solvent in GAS_SOLVENTS:
        phase = "gas"
        T = check_positive("temperature", T, "K")
    else:
        raise InputError(f"unknown solvent {solvent!r}; liquids: {', '.join(SOLVENTS)}; "
                         f"gases: {', '.join(GAS_SOLVENTS)}", "solvent", solvent)
    if viscosity is not None:
        mu = check_positive("viscosity", viscosity, "Pa s")
    elif solvent == "water":
        mu = np.asarray(water.viscosity(T))
    else:
        mu = None
    if molar_volume is not None:
        volume = float(check_positive("molar_volume", molar_volume, "m3/mol"))
    else:
        volume = GASES[solute].molar_volume_nbp if solute in GASES else None
    return Case(solute, solvent, phase, as_array(T, "temperature"),
                check_positive("pressure", pressure, "Pa"), mu, viscosity is not None, volume)


def _liquid_needs(case: Case, *, water_only: bool = False) -> str | None:
    if case.phase != "liquid":
        return "is for liquids"
    if water_only and case.solvent != "water":
        return "is for water as the solvent"
    if case.viscosity is None:
        return f"needs the viscosity of {case.solvent} (give it)"
    if case.molar_volume is None:
        return f"needs the molar volume of {case.solute} at its normal boiling point"
    return None


def _not_measured(case: Case) -> str | None:
    if case.phase != "liquid" or case.solvent != "water" or case.solute not in MEASURED:
        return "has values for O2, N2, CO2, H2, CH4 in water only"
    if case.viscosity_given:
        return "is for pure water; with a medium viscosity use stokes-einstein"
    lo, hi = measured_span(case.solute)
    if np.any((case.T < lo) | (case.T > hi)):
        return f"covers {lo:g} to {hi:g} K for {case.solute}"
    return None


def _not_scaled(case: Case) -> str | None:
    if case.phase != "liquid" or case.solvent != "water" or case.solute not in MEASURED:
        return "scales measured values of O2, N2, CO2, H2, CH4 in water only"
    return None


def _not_hayduk_minhas(case: Case) -> str | None:
    if case.phase == "liquid" and SOLVENTS[case.solvent].kind not in ("aqueous", "paraffin"):
        return "is for water and n-paraffin solvents"
    return _liquid_needs(case)


def _fuller_volume(name: str) -> tuple[float, float] | None:
    if name in GASES:
        return GASES[name].diffusion_volume, GASES[name].molar_mass
    return GAS_SOLVENTS.get(name)


def _not_fuller(case: Case) -> str | None:
    if case.phase != "gas":
        return "is for gas mixtures"
    if _fuller_volume(case.solute) is None or case.solute == case.solvent:
        return f"has no diffusion volume for {case.solute} in {case.solvent}"
    return None


def _measured(case: Case):
    return diffusivity_measured(case.solute, case.T), ()


def _scaled(case: Case):
    lo, hi = measured_span(case.solute)
    T_ref = np.clip(case.T, lo, hi)
    D_ref = np.asarray(diffusivity_measured(case.solute, T_ref))
    D = D_ref * (case.T / T_ref) * np.asarray(water.viscosity(T_ref)) / case.viscosity
    note = range_note("temperature", case.T, lo, hi, "K", f"the measured {case.solute} data")
    if note:
        note = (f"{case.solute}: scaled by Stokes-Einstein from the measured value at the "
                f"nearest measured temperature ({lo:g} to {hi:g} K)")
    return D, (note,) if note else ()


def _wilke_chang(phi: float | None):
    def compute(case: Case):
        factor = SOLVENTS[case.solvent].association if phi is None else phi
        return diffusivity_Wilke_Chang(case.T, case.viscosity, SOLVENTS[case.solvent].molar_mass,
                                       case.molar_volume, factor), ()
    return compute


def _hayduk_minhas(case: Case):
    if SOLVENTS[case.solvent].kind == "paraffin":
        return diffusivity_Hayduk_Minhas_paraffin(case.T, case.viscosity, case.molar_volume), ()
    return diffusivity_Hayduk_Minhas_aqueous(case.T, case.viscosity, case.molar_volume), ()


def _fuller(case: Case):
    v_a, m_a = _fuller_volume(case.solute)
    v_b, m_b = GAS_SOLVENTS[case.solvent]
    return diffusivity_gas_Fuller(case.T, case.pressure, m_a, m_b, v_a, v_b), ()


@dataclass(frozen=True)
class DiffusivityMethod:
    """One way of getting D: why it may not apply, how it computes, where it comes from."""

    name: str
    label: str
    not_applicable: Callable[[Case], str | None]
    compute: Callable[[Case], tuple]
    source: str


diffusivity_correlations: dict[str, DiffusivityMethod] = {
    m.name: m for m in [
        DiffusivityMethod("measured", "measured", _not_measured, _measured,
                          "table of measured values (see measured_source)"),
        DiffusivityMethod("stokes-einstein", "measured, Stokes-Einstein scaled",
                          _not_scaled, _scaled, "Einstein (1905) scaling of measured values"),
        DiffusivityMethod("wilke-chang", "Wilke-Chang (phi of the solvent, 2.6 for water)",
                          _liquid_needs, _wilke_chang(None), "Wilke and Chang (1955)"),
        DiffusivityMethod("wilke-chang-2.26", "Wilke-Chang (phi = 2.26, Hayduk-Laudie)",
                          lambda c: _liquid_needs(c, water_only=True),
                          _wilke_chang(WILKE_CHANG_WATER_REVISED),
                          "Wilke and Chang (1955), phi of Hayduk and Laudie (1974)"),
        DiffusivityMethod("hayduk-laudie", "Hayduk-Laudie",
                          lambda c: _liquid_needs(c, water_only=True),
                          lambda c: (diffusivity_Hayduk_Laudie(c.viscosity, c.molar_volume), ()),
                          "Hayduk and Laudie (1974)"),
        DiffusivityMethod("hayduk-minhas", "Hayduk-Minhas", _not_hayduk_minhas, _hayduk_minhas,
                          "Hayduk and Minhas (1982)"),
        DiffusivityMethod("fuller", "Fuller-Schettler-Giddings (gas)", _not_fuller, _fuller,
                          "Fuller, Schettler and Giddings (1966)"),
    ]
}


def diffusivity_methods(solute: str, solvent: str = "water", T=298.15, *, viscosity=None,
                        molar_volume=None, pressure=P_ATM, check_ranges: bool = True
                        ) -> list[str]:
    """Names of the methods that apply to ``solute`` in ``solvent`` at ``T``.

    Parameters
    ----------
    solute : str
        Gas name, e.g. ``O2`` [-].
    solvent : str
        A liquid of :data:`scaleup.props.data.SOLVENTS` or a gas of ``GAS_SOLVENTS`` [-].
    T : float or array
        Temperature [K].
    viscosity : float, optional
        Viscosity of the solvent or medium [Pa s] (water: computed if not given).
    molar_volume : float, optional
        Solute molar volume at its normal boiling point [m3/mol].
    pressure : float
        Absolute pressure [Pa] (gas phase).
    check_ranges : bool
        If false, list every method in the registry [-].

    Returns
    -------
    list of str
        Method names in registry order [-].

    Examples
    --------
    >>> diffusivity_methods("O2", "water", 310.15)
    ['measured', 'stokes-einstein', 'wilke-chang', 'wilke-chang-2.26', 'hayduk-laudie', 'hayduk-minhas']
    >>> diffusivity_methods("CO2", "air", 293.15)
    ['fuller']
    """
    if not check_ranges:
        return list(diffusivity_correlations)
    case = _case(solute, solvent, T, viscosity, molar_volume, pressure)
    return [name for name, m in diffusivity_correlations.items() if m.not_applicable(case) is None]


@dataclass(frozen=True)
class Estimate:
    """One method's diffusivity with its source and notes."""

    method: str
    label: str
    diffusivity_m2_s: float | np.ndarray
    source: str
    warnings: tuple[str, ...] = ()


def estimate(solute: str, solvent: str = "water", T=298.15, method: str | None = None, *,
             viscosity=None, molar_volume=None, pressure=P_ATM) -> Estimate:
    """Diffusivity by one method, with its source and any notes.

    Parameters
    ----------
    solute : str
        Gas name [-].
    solvent : str
        Liquid or gas solvent [-].
    T : float or array
        Temperature [K].
    method : str, optional
        A key of :data:`diffusivity_correlations` [-]; default the first that applies (measured,
        then Stokes-Einstein from measured values, then Wilke-Chang; Fuller for gases).
    viscosity : float, optional
        Viscosity of the solvent or medium [Pa s].
    molar_volume : float, optional
        Solute molar volume at its normal boiling point [m3/mol].
    pressure : float
        Absolute pressure [Pa].

    Returns
    -------
    Estimate
        Method, diffusivity [m2/s], source and warnings.

    Examples
    --------
    >>> e = estimate("H2", "water", 310.15)
    >>> e.method, round(e.diffusivity_m2_s * 1e9, 2)
    ('stokes-einstein', 6.61)
    """
    scalar = is_scalar(T)
    case = _case(solute, solvent, T, viscosity, molar_volume, pressure)
    if method is None:
        names = [n for n, m in diffusivity_correlations.items() if m.not_applicable(case) is None]
        if not names:
            raise InputError(f"no diffusivity method applies to {solute} in {solvent}; give "
                             "the viscosity and molar volume, or a method", "solute", solute)
        method = names[0]
    if method not in diffusivity_correlations:
        raise InputError(f"unknown diffusivity method {method!r}; choose from "
                         f"{', '.join(diffusivity_correlations)}", "method", method)
    m = diffusivity_correlations[method]
    reason = m.not_applicable(case)
    if reason:
        raise InputError(f"{method} {reason}", "method", method)
    value, notes = m.compute(case)
    source = measured_source(solute) if method in ("measured", "stokes-einstein") else m.source
    return Estimate(method, m.label, out(np.asarray(value), scalar), source, tuple(notes))


def diffusivity(solute: str, solvent: str = "water", T=298.15, method: str | None = None, *,
                viscosity=None, molar_volume=None, pressure=P_ATM):
    """Diffusivity of a solute in a solvent [m2/s]; see :func:`estimate` for the arguments.

    Parameters
    ----------
    solute : str
        Gas name [-].
    solvent : str
        Liquid or gas solvent [-].
    T : float or array
        Temperature [K].
    method : str, optional
        A key of :data:`diffusivity_correlations` [-].
    viscosity : float, optional
        Viscosity of the solvent or medium [Pa s].
    molar_volume : float, optional
        Solute molar volume at its normal boiling point [m3/mol].
    pressure : float
        Absolute pressure [Pa].

    Returns
    -------
    float or array
        Diffusivity [m2/s].

    Examples
    --------
    >>> round(diffusivity("O2", "water", 298.15) * 1e9, 2)
    2.0
    """
    return estimate(solute, solvent, T, method, viscosity=viscosity, molar_volume=molar_volume,
                    pressure=pressure).diffusivity_m2_s


@dataclass(frozen=True)
class Comparison:
    """Every applicable method's diffusivity for one case, side by side."""

    solute: str
    solvent: str
    estimates: tuple[Estimate, ...]
    mean_m2_s: float | np.ndarray
    minimum_m2_s: float | np.ndarray
    maximum_m2_s: float | np.ndarray
    spread_fraction: float | np.ndarray  # (max - min) / mean


def compare(solute: str, solvent: str = "water", T=298.15, *, viscosity=None,
            molar_volume=None, pressure=P_ATM) -> Comparison:
    """All applicable methods for one solute, solvent and temperature, with the spread.

    Parameters
    ----------
    solute : str
        Gas name [-].
    solvent : str
        Liquid or gas solvent [-].
    T : float or array
        Temperature [K].
    viscosity : float, optional
        Viscosity of the solvent or medium [Pa s].
    molar_volume : float, optional
        Solute molar volume at its normal boiling point [m3/mol].
    pressure : float
        Absolute pressure [Pa].

    Returns
    -------
    Comparison
        The estimates, their mean, minimum, maximum [m2/s] and spread (max - min) / mean [-].

    Notes
    -----
    Where a measured value exists at ``T``, the Stokes-Einstein scaling of it (the same
    number) is left out so it is not counted twice.

    Examples
    --------
    >>> c = compare("O2", "water", 298.15)
    >>> [e.method for e in c.estimates][:2], round(c.spread_fraction, 2)
    (['measured', 'wilke-chang'], 0.22)
    """
    scalar = is_scalar(T)
    names = diffusivity_methods(solute, solvent, T, viscosity=viscosity,
                                molar_volume=molar_volume, pressure=pressure)
    if not names:
        raise InputError(f"no diffusivity method applies to {solute} in {solvent}", "solute",
                         solute)
    if "measured" in names:  # Stokes-Einstein scaling to the same state repeats the value
        names.remove("stokes-einstein")
    found = tuple(estimate(solute, solvent, T, n, viscosity=viscosity,
                           molar_volume=molar_volume, pressure=pressure) for n in names)
    values = np.array([np.asarray(e.diffusivity_m2_s) for e in found])
    mean = values.mean(axis=0)
    low, high = values.min(axis=0), values.max(axis=0)
    return Comparison(solute, solvent, found, out(mean, scalar), out(low, scalar),
                      out(high, scalar), out((high - low) / mean, scalar))
