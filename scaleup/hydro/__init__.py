"""Vessel hydrodynamics: geometry, impeller catalogue, power, regimes, blend time, dispersion.

Pure and SI. The one-call entry point is :func:`operating_point`; the pieces live in
:mod:`~scaleup.hydro.geometry`, :mod:`~scaleup.hydro.impellers`, :mod:`~scaleup.hydro.power`,
:mod:`~scaleup.hydro.regimes`, :mod:`~scaleup.hydro.mixing` and
:mod:`~scaleup.hydro.dispersion`.
"""

from scaleup.hydro.geometry import (
    Impeller,
    Sparger,
    Vessel,
    liquid_height_for_volume,
    liquid_volume,
    scale_by_factor,
    scale_to_volume,
    standard_vessel,
)
from scaleup.hydro.impellers import CATALOGUE, impeller_type, impeller_types
from scaleup.hydro.point import OperatingPoint, operating_point

__all__ = [
    "CATALOGUE", "Impeller", "OperatingPoint", "Sparger", "Vessel", "impeller_type",
    "impeller_types", "liquid_height_for_volume", "liquid_volume", "operating_point",
    "scale_by_factor", "scale_to_volume", "standard_vessel",
]
