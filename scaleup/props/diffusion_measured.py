"""Measured diffusivities: published values in water, and the diaphragm-cell reduction.

Public API:

* :func:`diffusivity_measured` ``(solute, T)`` -> D [m2/s] from the table of published
  values (each with its source, :func:`measured_source`).
* :func:`diaphragm_cell_constant` ``(D_reference, time, dc_start, dc_end)`` -> beta [1/m2]
  from a calibration run; :func:`diffusivity_diaphragm_cell` ``(beta, time, dc_start,
  dc_end)`` -> D [m2/s]; :func:`diaphragm_cell_constant_geometry` for a first guess.
"""

from __future__ import annotations

import numpy as np

from scaleup.errors import InputError
from scaleup.props._common import check_positive, check_range, is_scalar, out
from scaleup.props.data import MEASURED


def _series(solute: str):
    if solute not in MEASURED:
        raise InputError(f"no measured diffusivity of {solute!r} in water in the table; "
                         f"tabulated: {', '.join(MEASURED)}", "solute", solute)
    return MEASURED[solute]


def measured_span(solute: str) -> tuple[float, float]:
    """Temperatures the table covers for ``solute``; a single value counts within +-0.5 K.

    Parameters
    ----------
    solute : str
        Gas name [-].

    Returns
    -------
    tuple of float
        Lowest and highest temperature [K].

    Examples
    --------
    >>> measured_span("N2")
    (297.65, 298.65)
    """
    temps = _series(solute).temperatures
    return (temps[0] - 0.5, temps[0] + 0.5) if len(temps) == 1 else (temps[0], temps[-1])


def measured_source(solute: str) -> str:
    """Author and year of the measured values for ``solute`` in water.

    Parameters
    ----------
    solute : str
        Gas name [-].

    Returns
    -------
    str
        The citation [-].

    Examples
    --------
    >>> measured_source("CO2")[:24]
    'Jahne, Heinz and Dietric'
    """
    return _series(solute).source


def diffusivity_measured(solute: str, T=298.15):
    """Published diffusivity of a gas in water, interpolated in ln D against 1/T.

    Parameters
    ----------
    solute : str
        ``O2``, ``N2``, ``CO2``, ``H2`` or ``CH4`` [-].
    T : float or array
        Temperature [K], within the measured range (see :func:`measured_source`).

    Returns
    -------
    float or array
        Diffusivity [m2/s].

    Notes
    -----
    O2: Han and Bartels (1996), Taylor dispersion, -0.5 to 95 degC, their interpolation
    formula. CO2, H2, CH4: Jahne, Heinz and Dietrich (1987), 10 to 35 degC, as tabulated in
    the CRC Handbook. N2: Himmelblau (1964), 25 degC only. No extrapolation: outside the
    range use ``method="stokes-einstein"`` of :func:`diffusivity`.

    Examples
    --------
    The CRC Handbook (Jahne et al. 1987) lists CO2 at 25 degC as 1.91e-5 cm2/s:

    >>> diffusivity_measured("CO2", 298.15)
    1.91e-09
    """
    series = _series(solute)
    scalar = is_scalar(T)
    T = check_range("temperature", T, *measured_span(solute), "K",
                    f"the measured {solute} data ({series.source})")
    if series.formula is not None:
        return out(np.asarray(series.formula(T), dtype=float), scalar)
    if len(series.temperatures) == 1:
        return out(np.full(T.shape, series.values[0]), scalar)
    inverse = 1.0 / np.asarray(series.temperatures)[::-1]  # increasing for np.interp
    log_d = np.log(np.asarray(series.values))[::-1]
    return out(np.exp(np.interp(1.0 / T, inverse, log_d)), scalar)


def diaphragm_cell_constant(D_reference: float, time: float, dc_start: float,
                            dc_end: float) -> float:
    r"""Cell constant of a diaphragm cell from a calibration run with a known solute [1]_.

    .. math:: \beta = \frac{\ln(\Delta C_0 / \Delta C)}{D_{ref}\,t}

    Parameters
    ----------
    D_reference : float
        Diffusivity of the calibration solute [m2/s].
    time : float
        Duration of the calibration run [s].
    dc_start : float
        Concentration difference across the diaphragm at the start [mol/m3].
    dc_end : float
        Concentration difference at the end [mol/m3] (any consistent unit).

    Returns
    -------
    float
        Cell constant beta [1/m2].

    Notes
    -----
    For two well-stirred compartments of volumes V1, V2 joined by a diaphragm of area A,
    thickness L, porosity and tortuosity, beta = (A eps / L tau)(1/V1 + 1/V2) (see
    :func:`diaphragm_cell_constant_geometry`); calibration measures it directly.

    Examples
    --------
    >>> round(diaphragm_cell_constant(1.87e-9, 86400.0, 100.0, 60.0))
    3162

    References
    ----------
    .. [1] Stokes, R. H. (1950). An improved diaphragm-cell for diffusion studies, and some
       tests of the method. J. Am. Chem. Soc. 72, 763-767; Cussler, E. L. (2009). Diffusion:
       Mass Transfer in Fluid Systems, 3rd ed., Sect. 5.5.
    """
    D = float(check_positive("reference diffusivity", D_reference, "m2/s"))
    return _log_ratio(time, dc_start, dc_end) / (D * float(time))


def diffusivity_diaphragm_cell(beta: float, time: float, dc_start: float,
                               dc_end: float) -> float:
    r"""Diffusivity from a diaphragm-cell run with a calibrated cell constant [1]_.

    .. math:: D = \frac{\ln(\Delta C_0 / \Delta C)}{\beta\,t}

    Parameters
    ----------
    beta : float
        Cell constant from :func:`diaphragm_cell_constant` [1/m2].
    time : float
        Duration of the run [s].
    dc_start : float
        Concentration difference at the start [mol/m3].
    dc_end : float
        Concentration difference at the end [mol/m3].

    Returns
    -------
    float
        Diffusivity [m2/s].

    Examples
    --------
    >>> beta = diaphragm_cell_constant(1.87e-9, 86400.0, 100.0, 60.0)
    >>> round(diffusivity_diaphragm_cell(beta, 86400.0, 100.0, 60.0) * 1e9, 2)
    1.87

    References
    ----------
    .. [1] Stokes, R. H. (1950). J. Am. Chem. Soc. 72, 763-767.
    """
    beta = float(check_positive("cell constant", beta, "1/m2"))
    return _log_ratio(time, dc_start, dc_end) / (beta * float(time))


def _log_ratio(time: float, dc_start: float, dc_end: float) -> float:
    check_positive("time", time, "s")
    start = float(check_positive("dc_start", dc_start, "mol/m3"))
    end = float(check_positive("dc_end", dc_end, "mol/m3"))
    if end >= start:
        raise InputError(f"the concentration difference must fall during the run; got "
                         f"{start:g} at the start and {end:g} at the end", "dc_end", end)
    return float(np.log(start / end))


def diaphragm_cell_constant_geometry(area: float, thickness: float, volume_1: float,
                                     volume_2: float, porosity: float = 1.0,
                                     tortuosity: float = 1.0) -> float:
    r"""Cell constant from the geometry of the cell (for a first guess, not a measurement).

    .. math:: \beta = \frac{A\,\varepsilon}{L\,\tau}\left(\frac{1}{V_1} + \frac{1}{V_2}\right)

    Parameters
    ----------
    area : float
        Diaphragm area [m2].
    thickness : float
        Diaphragm thickness [m].
    volume_1, volume_2 : float
        Compartment volumes [m3].
    porosity : float
        Open fraction of the diaphragm [-].
    tortuosity : float
        Path-length factor of the pores [-].

    Returns
    -------
    float
        Cell constant [1/m2].

    Examples
    --------
    >>> diaphragm_cell_constant_geometry(1e-3, 2e-3, 50e-6, 50e-6, porosity=0.3)
    6000.000000000001
    """
    for name, value, unit in (("area", area, "m2"), ("thickness", thickness, "m"),
                              ("volume_1", volume_1, "m3"), ("volume_2", volume_2, "m3"),
                              ("porosity", porosity, "-"), ("tortuosity", tortuosity, "-")):
        check_positive(name, value, unit)
    return area * porosity / (thickness * tortuosity) * (1.0 / volume_1 + 1.0 / volume_2)
