"""kLa and OUR from one dynamic test during a culture: gas off, then gas back on.

With the gas off the dissolved oxygen falls at the uptake rate, :math:`dC/dt = -OUR`; with
the gas back on it recovers by

.. math::
    \\frac{dC}{dt} = k_La (C^* - C) - OUR

whose solution (OUR constant) is a first-order rise to :math:`C_{ss} = C^* - OUR/k_La`. So
the falling part gives OUR by a straight line, the rising part gives kLa and C_ss by the same
nonlinear fit as a gassing-out curve (probe lag included), and :math:`C^* = C_{ss} +
OUR/k_La` follows (Bandyopadhyay, Humphrey and Taguchi [1]_).

References
----------
.. [1] Bandyopadhyay, B.; Humphrey, A. E.; Taguchi, H. "Dynamic measurement of the
   volumetric oxygen transfer coefficient in fermentation systems." Biotechnol. Bioeng. 9
   (1967) 533-544.
"""

from __future__ import annotations

import math
from dataclasses import dataclass

import numpy as np

from scaleup.errors import InputError
from scaleup.measure.curve_start import noise_level
from scaleup.measure.curves import DEFAULT_WINDOW, CurveAnalysis, CurveRejected, analyse_curve

LINEAR_PART = 0.15  # fit OUR between 15 % and 85 % of the fall, clear of both corners


@dataclass(frozen=True, eq=False)
class DynamicFit:
    """kLa [1/s] and OUR [unit of the data per s] from one dynamic test.

    ``c_steady`` is the DO level reached with the gas back on; ``c_star`` is C_ss + OUR/kLa
    (its standard error neglects the covariance of C_ss and kLa). ``our_from_c_star`` is
    kLa (C* - C_ss) with a C* that was given, a check on the falling-part OUR.
    """

    kla_per_s: float
    kla_stderr_per_s: float
    kla_ci95_per_s: tuple[float, float]
    our_per_s: float
    our_stderr_per_s: float
    c_steady: float
    c_star: float
    c_star_stderr: float
    our_from_c_star_per_s: float | None
    gas_off_s: float
    gas_on_s: float
    n_points_off: int
    reoxygenation: CurveAnalysis
    warnings: tuple[str, ...]


def fit_dynamic(t_s, c, *, gas_off_s: float | None = None, gas_on_s: float | None = None,
                tau_p_s: float = 0.0, window: tuple[float, float] = DEFAULT_WINDOW,
                c_star: float | None = None) -> DynamicFit:
    """kLa and OUR from a dynamic gassing-out test in a respiring culture.

    Parameters
    ----------
    t_s : array
        Sample times [s], increasing.
    c : array
        DO readings [any unit: %, mg/L, mol/m3]; NaN is a gap.
    gas_off_s, gas_on_s : float, optional
        When the gas was switched off and back on [s]; found from the curve when not given
        (the start of the fall, and the minimum).
    tau_p_s : float
        Probe time constant [s] for the rising part.
    window : (float, float)
        Fractions of the rise [-] fitted in the rising part.
    c_star : float, optional
        Known saturation concentration [unit of ``c``], for a second OUR estimate.

    Returns
    -------
    DynamicFit
        kLa [1/s], OUR and C* in the unit of ``c`` (per s for OUR).

    Raises
    ------
    CurveRejected
        When there is no fall, no rise, or too few samples in either part.

    Notes
    -----
    OUR must stay constant through the test: keep the DO above the critical level while the
    gas is off, and keep the test short against changes of the culture.

    Examples
    --------
    A noise-free test with OUR = 0.5 %/s and kLa = 0.02 1/s, so C_ss = C* - OUR/kLa = 75 %
    for C* = 100 %: gas off at 100 s, back on at 200 s:

    >>> t = np.arange(0.0, 800.0, 0.5)
    >>> fall = 75.0 - 0.5 * np.clip(t - 100.0, 0.0, None)
    >>> rise = 75.0 - 50.0 * np.exp(-0.02 * (t - 200.0))
    >>> d = fit_dynamic(t, np.where(t < 200.0, fall, rise))
    >>> round(d.kla_per_s, 6), round(d.our_per_s, 6), round(d.c_star, 4), d.gas_on_s
    (0.02, 0.5, 100.0, 200.0)
    """
    t = np.asarray(t_s, dtype=float).ravel()
    y = np.asarray(c, dtype=float).ravel()
    if t.size != y.size:
        raise InputError(f"{t.size} times but {y.size} DO values", "curve")
    ok = np.isfinite(t) & np.isfinite(y)
    t, y = t[ok], y[ok]
    if t.size < 10:
        raise CurveRejected(f"too short: {t.size} usable samples for a fall and a rise",
                            "too_short")
    if (np.diff(t) <= 0).any():
        raise CurveRejected("time does not increase; sort the samples or fix the clock",
                            "time_not_increasing")
    width = max(1, min(25, t.size // 50)) | 1
    smooth = np.convolve(np.pad(y, width // 2, mode="edge"), np.ones(width) / width, "valid")
    if gas_on_s is None:
        # the smoothed minimum leans towards the gentler side of the V: settle on the raw one
        i = int(np.argmin(smooth))
        near = slice(max(0, i - width), i + width + 1)
        i_on = near.start + int(np.argmin(y[near]))
    else:
        i_on = int(np.searchsorted(t, gas_on_s))
    if not 0 < i_on < t.size - 5:
        raise CurveRejected("no fall followed by a rise: the lowest DO is at an end of the "
                            "record; record the plateau, the fall and the recovery",
                            "no_dynamic_test")
    q = max(3, i_on // 20)
    plateau = float(smooth[:q].mean())
    low = float(smooth[i_on])
    drop = plateau - low
    if drop <= 5 * noise_level(y):
        raise CurveRejected(f"the DO falls by only {drop:.3g} while the gas is off, no more "
                            "than the noise; switch it off for longer", "flat")
    if gas_off_s is None:
        high = np.flatnonzero(smooth[:i_on] >= plateau - max(0.02 * drop, 0.0))
        i_off = int(high[-1]) if high.size else 0
    else:
        i_off = int(np.searchsorted(t, gas_off_s))
    part = slice(i_off, i_on + 1)
    linear = ((y[part] >= low + LINEAR_PART * drop) & (y[part] <= plateau - LINEAR_PART * drop))
    tf, yf = t[part][linear], y[part][linear]
    if tf.size < 3:
        raise CurveRejected(f"only {tf.size} samples on the straight part of the fall; "
                            "record more often while the gas is off", "too_short")
    tm = tf - tf.mean()
    sxx = float(tm @ tm)
    slope = float(tm @ (yf - yf.mean())) / sxx
    resid = yf - yf.mean() - slope * tm
    our = -slope
    our_se = math.sqrt(float(resid @ resid) / max(tf.size - 2, 1) / sxx)
    if our <= 0:
        raise CurveRejected("the DO does not fall while the gas is off; OUR cannot be read",
                            "no_dynamic_test")
    rise = analyse_curve(t[i_on:], y[i_on:], tau_p_s=tau_p_s, window=window,
                         start_s=float(t[i_on]))
    fit = rise.primary
    k, c_ss = fit.kla_per_s, fit.c_inf
    c_star_fit = c_ss + our / k
    se = math.sqrt(fit.c_inf_stderr**2 + (our / k) ** 2 * ((our_se / our) ** 2
                                                          + (fit.kla_stderr_per_s / k) ** 2))
    warnings = list(rise.warnings)
    warnings.append("OUR is taken as constant through the test: keep the DO above the "
                    "critical level while the gas is off")
    if abs(c_ss - plateau) > 0.1 * drop:
        warnings.append(f"the DO before the gas was switched off ({plateau:.4g}) differs from "
                        f"the level it recovers to ({c_ss:.4g}): OUR or kLa changed during "
                        "the test")
    our_check = None
    if c_star is not None:
        our_check = k * (c_star - c_ss)
        if our > 0 and abs(our_check / our - 1) > 0.2:
            warnings.append(f"OUR from the fall ({our:.4g}/s) and from kLa (C* - C_ss) "
                            f"({our_check:.4g}/s) differ by more than 20 %")
    return DynamicFit(kla_per_s=k, kla_stderr_per_s=fit.kla_stderr_per_s,
                      kla_ci95_per_s=fit.kla_ci95_per_s, our_per_s=our, our_stderr_per_s=our_se,
                      c_steady=c_ss, c_star=c_star_fit, c_star_stderr=se,
                      our_from_c_star_per_s=our_check, gas_off_s=float(t[i_off]),
                      gas_on_s=float(t[i_on]), n_points_off=int(tf.size), reoxygenation=rise,
                      warnings=tuple(warnings))
