"""Gas compression: the power to push the sparged gas from ambient into the vessel.

The compressor takes gas at ambient pressure and temperature and delivers it at the
sparger's pressure: head-space pressure plus the hydrostatic head above the sparger plus the
losses of the line (sterile filters, piping, valves, sparger orifices). Compression is taken
as adiabatic (isentropic) with a stated efficiency; the ideal gas has a constant heat-capacity
ratio.
"""

from __future__ import annotations

import numpy as np

from scaleup.errors import InputError
from scaleup.hydro.geometry import Vessel
from scaleup.units import P_ATM, G, R

# Pressure lost between compressor and sparger outlet: sterile filter, piping, valves and
# sparger orifices, 0.3 bar (common practice, no source). The user can set it.
DEFAULT_LINE_LOSS = 0.3e5  # Pa
# Isentropic efficiency of an industrial air compressor (common practice, no source).
DEFAULT_COMPRESSOR_EFFICIENCY = 0.70
AIR_HEAT_CAPACITY_RATIO = 1.4  # cp/cv of dry air near room temperature


def _out(x):
    a = np.asarray(x, dtype=float)
    return a if a.ndim else float(a)


def compression_power_adiabatic(molar_flow, inlet_temperature: float, inlet_pressure: float,
                                outlet_pressure, efficiency: float = DEFAULT_COMPRESSOR_EFFICIENCY,
                                gamma: float = AIR_HEAT_CAPACITY_RATIO):
    r"""Shaft power of an adiabatic (isentropic) compressor with an efficiency [1]_.

    .. math::
        P_{comp} = \frac{\dot n R T_1}{\eta}\,\frac{\gamma}{\gamma - 1}
            \left[\left(\frac{p_2}{p_1}\right)^{(\gamma - 1)/\gamma} - 1\right]

    Parameters
    ----------
    molar_flow : float or array
        Gas molar flow [mol/s].
    inlet_temperature : float
        Gas temperature at the compressor inlet T1 [K].
    inlet_pressure : float
        Absolute inlet pressure p1 [Pa].
    outlet_pressure : float or array
        Absolute delivery pressure p2 [Pa], at least p1.
    efficiency : float
        Isentropic efficiency [-], 0 < eta <= 1.
    gamma : float
        Heat-capacity ratio cp/cv [-] (1.4 for air).

    Returns
    -------
    float or array
        Compressor shaft power [W].

    Notes
    -----
    Ideal gas, constant cp/cv, one stage, no intercooling: at the low pressure ratios of
    aeration (below about 4) a single stage is usual. The work per mole is the textbook
    isentropic result (e.g. Coulson & Richardson Vol. 1, Section 8.3).

    Examples
    --------
    1 mol/s from 1 bar, 300 K to 10 bar at 78 % efficiency, the example of the ``fluids``
    library's ``isentropic_work_compression`` (10416.877 J/mol):

    >>> round(compression_power_adiabatic(1.0, 300.0, 1e5, 1e6, 0.78), 3)
    10416.877

    References
    ----------
    .. [1] Coulson, J. M., Richardson, J. F. Chemical Engineering, Vol. 1, 6th ed.,
       Butterworth-Heinemann (1999), Chapter 8 (compression of gases).
    """
    if not 0 < efficiency <= 1:
        raise InputError(f"{efficiency:g}: a compressor efficiency lies between 0 and 1",
                         "compressor efficiency", efficiency)
    if not gamma > 1:
        raise InputError(f"{gamma:g}: cp/cv of a gas is above 1", "gamma", gamma)
    p2 = np.asarray(outlet_pressure, float)
    if np.any(p2 < inlet_pressure * (1 - 1e-12)):
        raise InputError("the delivery pressure is below the inlet pressure; nothing to "
                         "compress", "outlet pressure", outlet_pressure)
    n = np.asarray(molar_flow, float)
    if np.any(n < 0):
        raise InputError("a gas flow must be zero or more (mol/s)", "gas flow", molar_flow)
    ratio = np.maximum(p2 / inlet_pressure, 1.0)
    work = gamma / (gamma - 1.0) * R * inlet_temperature * (ratio ** ((gamma - 1.0) / gamma) - 1)
    return _out(n * work / efficiency)


def sparger_supply_pressure(vessel: Vessel, rho: float,
                            line_loss: float = DEFAULT_LINE_LOSS) -> float:
    """Pressure the compressor must deliver: head space + liquid above the sparger + line [Pa].

    Parameters
    ----------
    vessel : Vessel
        The vessel (head pressure, liquid height, sparger height).
    rho : float
        Liquid density [kg/m3] (the ungassed liquid: conservative, hold-up lowers the head).
    line_loss : float
        Pressure lost in filters, piping and sparger [Pa].

    Returns
    -------
    float
        Absolute delivery pressure [Pa].

    Examples
    --------
    >>> round(sparger_supply_pressure(Vessel(3.0, 6.0), 1000.0))
    190165
    """
    if line_loss < 0:
        raise InputError("a line pressure loss cannot be negative (Pa)", "line loss", line_loss)
    depth = vessel.liquid_height - vessel.sparger.height
    return vessel.head_pressure + rho * G * depth + line_loss


def gas_compression_power(vessel: Vessel, molar_flow, rho: float, *,
                          ambient_temperature: float = 293.15, ambient_pressure: float = P_ATM,
                          line_loss: float = DEFAULT_LINE_LOSS,
                          efficiency: float = DEFAULT_COMPRESSOR_EFFICIENCY,
                          gamma: float = AIR_HEAT_CAPACITY_RATIO):
    """Compressor power to sparge a gas flow into a vessel [W].

    Parameters
    ----------
    vessel : Vessel
        The vessel.
    molar_flow : float or array
        Gas flow [mol/s].
    rho : float
        Liquid density [kg/m3].
    ambient_temperature : float
        Compressor inlet temperature [K].
    ambient_pressure : float
        Compressor inlet pressure [Pa].
    line_loss : float
        Line losses [Pa].
    efficiency : float
        Isentropic efficiency [-].
    gamma : float
        cp/cv [-].

    Returns
    -------
    float or array
        Compressor shaft power [W].

    Examples
    --------
    >>> round(gas_compression_power(Vessel(3.0, 6.0), 10.0, 1000.0))
    24016
    """
    p2 = sparger_supply_pressure(vessel, rho, line_loss)
    return compression_power_adiabatic(molar_flow, ambient_temperature, ambient_pressure, p2,
                                       efficiency, gamma)
