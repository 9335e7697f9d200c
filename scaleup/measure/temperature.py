"""kLa corrected to 20 degC, and the standard oxygen transfer rate.

ASCE/EWRI 2-06 [1]_ corrects a kLa measured at temperature T to the standard 20 degC with

.. math::
    k_La_{20} = k_La(T)\\, \\theta^{(20 - T)}, \\qquad \\theta = 1.024

(T in degC) and defines the standard oxygen transfer rate at standard conditions (clean water,
20 degC, 1 atm = 101.325 kPa, zero dissolved oxygen) as

.. math::
    SOTR = k_La_{20}\\, C^*_{20}\\, V

References
----------
.. [1] ASCE/EWRI 2-06, Measurement of Oxygen Transfer in Clean Water. American Society of
   Civil Engineers, Reston VA, 2007.
"""

from __future__ import annotations

import numpy as np

from scaleup.errors import check_range

THETA_ASCE = 1.024
T_STANDARD_K = 293.15  # 20 degC
STANDARD_CONDITIONS = ("clean water, 20 degC, 1 atm (101.325 kPa) and zero dissolved oxygen "
                       "(ASCE/EWRI 2-06)")


def temperature_factor_ASCE(T: float | np.ndarray, theta: float = THETA_ASCE
                            ) -> float | np.ndarray:
    """Factor that turns kLa at T into kLa at 20 degC, theta^(20 - T) [1]_.

    .. math::
        f = \\theta^{(293.15 - T)}

    Parameters
    ----------
    T : float or array
        Liquid temperature [K].
    theta : float
        Temperature coefficient [-]; 1.024 in ASCE/EWRI 2-06.

    Returns
    -------
    float or array
        kLa20 / kLa(T) [-].

    Notes
    -----
    The standard applies the correction to clean-water tests between about 10 and 30 degC
    (from memory); outside that range the factor is refused.

    Examples
    --------
    >>> round(temperature_factor_ASCE(298.15), 4)  # 25 degC
    0.8882
    >>> round(temperature_factor_ASCE(288.15), 4)  # 15 degC
    1.1259

    References
    ----------
    .. [1] ASCE/EWRI 2-06, Measurement of Oxygen Transfer in Clean Water. ASCE, 2007.
    """
    for value in np.atleast_1d(T):
        check_range("temperature", float(value), 273.15, 323.15, "K")
    check_range("theta", theta, 1.0, 1.1, "")
    factor = theta ** (T_STANDARD_K - np.asarray(T, dtype=float))
    return float(factor) if np.ndim(factor) == 0 else factor


def kla_20_ASCE(kla: float | np.ndarray, T: float | np.ndarray, theta: float = THETA_ASCE
                ) -> float | np.ndarray:
    """kLa corrected to 20 degC by the ASCE/EWRI 2-06 theta rule [1]_.

    .. math::
        k_La_{20} = k_La\\, \\theta^{(293.15 - T)}

    Parameters
    ----------
    kla : float or array
        kLa measured at T [1/s].
    T : float or array
        Liquid temperature [K].
    theta : float
        Temperature coefficient [-].

    Returns
    -------
    float or array
        kLa at 20 degC [1/s].

    Examples
    --------
    >>> round(kla_20_ASCE(0.02, 298.15), 6)
    0.017764

    References
    ----------
    .. [1] ASCE/EWRI 2-06, Measurement of Oxygen Transfer in Clean Water. ASCE, 2007.
    """
    return kla * temperature_factor_ASCE(T, theta)


def sotr_ASCE(kla_20: float, c_star_20: float, volume: float) -> float:
    """Standard oxygen transfer rate, kLa20 C*20 V, at standard conditions [1]_.

    .. math::
        SOTR = k_La_{20}\\, C^*_{20}\\, V

    Parameters
    ----------
    kla_20 : float
        kLa at 20 degC [1/s].
    c_star_20 : float
        Saturation concentration at 20 degC and 1 atm for the vessel [mol/m3] (the standard
        uses the steady-state value C_inf,20 of the test, which includes the depth effect).
    volume : float
        Liquid volume [m3].

    Returns
    -------
    float
        SOTR [mol/s] of O2.

    Examples
    --------
    kLa20 = 0.01 1/s, C*20 = 9.09 mg/L = 0.2841 mol/m3, 1 m3:

    >>> round(sotr_ASCE(0.01, 9.09e-3 / 31.998e-3, 1.0), 6)
    0.002841

    References
    ----------
    .. [1] ASCE/EWRI 2-06, Measurement of Oxygen Transfer in Clean Water. ASCE, 2007.
    """
    check_range("kla_20", kla_20, 0.0, None, "1/s")
    check_range("c_star_20", c_star_20, 0.0, None, "mol/m3")
    check_range("volume", volume, 0.0, None, "m3", low_inclusive=False)
    return kla_20 * c_star_20 * volume
