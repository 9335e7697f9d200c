"""Small helpers the property modules share: array handling, range checks, warnings.

Every property function accepts a float or an array and returns the same shape back: a
plain ``float`` for scalar input, a numpy array otherwise. Range checks name the field, the
offending value and the accepted range with its unit, as :mod:`scaleup.errors` asks.
"""

from __future__ import annotations

import numpy as np

from scaleup.errors import InputError, OutOfRange
from scaleup.props.data import GASES

T_MIN_WATER = 273.15  # K, 0 degC: liquid water at 1 atm
T_MAX_WATER = 373.15  # K, 100 degC


class RangeWarning(UserWarning):
    """A result was computed outside the range its source was fitted on."""


def as_array(value, field: str) -> np.ndarray:
    """``value`` as a float array; refuse NaN so a missing input never passes silently."""
    array = np.asarray(value, dtype=float)
    if np.any(np.isnan(array)):
        raise InputError("value is missing or not a number", field, value)
    return array


def out(array: np.ndarray, scalar: bool):
    """Return a plain float for scalar input, else the array."""
    return float(array) if scalar else array


def is_scalar(*values) -> bool:
    return all(np.ndim(v) == 0 for v in values)


def _worst(array: np.ndarray, low: float | None, high: float | None) -> float:
    """The entry of ``array`` farthest outside [low, high] (for the error message)."""
    flat = np.ravel(array)
    below = flat[flat < low] if low is not None else flat[:0]
    above = flat[flat > high] if high is not None else flat[:0]
    if above.size:
        return float(above.max())
    return float(below.min())


def check_range(field: str, value, low: float | None, high: float | None, unit: str,
                what: str = "") -> np.ndarray:
    """Raise :class:`OutOfRange` if any entry of ``value`` lies outside [low, high].

    ``what`` names the method whose range it is, so the message says why the range exists.
    """
    array = as_array(value, field)
    bad = np.zeros(array.shape, dtype=bool)
    if low is not None:
        bad |= array < low
    if high is not None:
        bad |= array > high
    if np.any(bad):
        worst = _worst(array, low, high)
        span = _span(low, high, unit)
        source = f" of {what}" if what else ""
        raise OutOfRange(f"{worst:g} {unit} is outside the range{source}: {span}", field,
                         worst)
    return array


def check_positive(field: str, value, unit: str, allow_zero: bool = False) -> np.ndarray:
    """Refuse negative (and, unless allowed, zero) values with a message naming the value."""
    array = as_array(value, field)
    bad = array < 0 if allow_zero else array <= 0
    if np.any(bad):
        worst = float(np.ravel(array)[np.ravel(bad)][0])
        need = "zero or more" if allow_zero else "more than zero"
        raise OutOfRange(f"{worst:g} {unit} must be {need}", field, worst)
    return array


def range_note(field: str, value, low: float, high: float, unit: str, what: str) -> str | None:
    """A warning text if any entry of ``value`` is outside [low, high], else None."""
    array = np.asarray(value, dtype=float)
    if np.all((array >= low) & (array <= high)):
        return None
    worst = _worst(array, low, high)
    return (f"{field} {worst:g} {unit} is outside the fitted range of {what} "
            f"({_span(low, high, unit)}); the result is extrapolated")


def _span(low: float | None, high: float | None, unit: str) -> str:
    if low is not None and high is not None:
        return f"{low:g} to {high:g} {unit}"
    if low is not None:
        return f"at least {low:g} {unit}"
    return f"at most {high:g} {unit}"


def check_water_temperature(T, what: str = "liquid water properties") -> np.ndarray:
    """Temperatures of liquid water, 0 to 100 degC (273.15 to 373.15 K)."""
    return check_range("temperature", T, T_MIN_WATER, T_MAX_WATER, "K", what)


def check_gas_pressure(T: np.ndarray, P) -> np.ndarray:
    """Total pressure over the liquid [Pa]: 1 kPa to 10 MPa and above the vapour pressure."""
    from scaleup.props import water  # water imports this module

    P = check_range("pressure", P, 1.0e3, 1.0e7, "Pa", "the solubility methods")
    if np.any(P <= np.asarray(water.vapour_pressure(T))):
        raise OutOfRange("the total pressure is at or below the vapour pressure of water at "
                         "this temperature (the liquid boils)", "pressure", P)
    return P


def check_fraction(y) -> np.ndarray:
    """A mole fraction, 0 to 1."""
    return check_range("mole_fraction", y, 0.0, 1.0, "-", "a mole fraction")


def gas_data(gas: str):
    """The :class:`scaleup.props.data.Gas` record of ``gas``, or a clear error."""
    if gas not in GASES:
        raise InputError(f"unknown gas {gas!r}; known: {', '.join(GASES)}", "gas", gas)
    return GASES[gas]
