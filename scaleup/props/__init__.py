"""Physical properties and transport basics, pure functions in SI.

* :mod:`~scaleup.props.water`: liquid water 0-100 degC (IAPWS) and media with measured
  overrides; :mod:`~scaleup.props.seawater`: salt water by salinity.
* :mod:`~scaleup.props.solubility`: C* of O2, N2, CO2, H2, CH4 (with
  :mod:`~scaleup.props.oxygen`, :mod:`~scaleup.props.henry`, :mod:`~scaleup.props.salting`).
* :mod:`~scaleup.props.diffusivity`: D measured, from the lab and estimated (with
  :mod:`~scaleup.props.diffusion_measured`, :mod:`~scaleup.props.diffusion_estimates`).
* :mod:`~scaleup.props.transport`: fluxes, Fick's law, film, penetration and renewal models.
"""

from scaleup.props._common import RangeWarning

__all__ = ["RangeWarning"]
