"""OTR by sulfite oxidation: 2 SO3(2-) + O2 -> 2 SO4(2-).

The sulfite method (Cooper, Fernstrom and Miller [1]_) takes the oxygen uptake from the rate
at which sulfite disappears: one mole of O2 per two moles of sulfite,

.. math::
    OTR = -\\frac{1}{2} \\frac{d[SO_3^{2-}]}{dt}

and, with the catalysed reaction fast enough to hold the dissolved O2 near zero,
:math:`k_La = OTR / C^*`. Its caveats (Linek and Vacek [2]_) go with every result.

References
----------
.. [1] Cooper, C. M.; Fernstrom, G. A.; Miller, S. A. "Performance of agitated gas-liquid
   contactors." Ind. Eng. Chem. 36 (1944) 504-509.
.. [2] Linek, V.; Vacek, V. "Chemical engineering use of catalyzed sulfite oxidation kinetics
   for the determination of mass transfer characteristics of gas-liquid contactors."
   Chem. Eng. Sci. 36 (1981) 1747-1768.
"""

from __future__ import annotations

import math
from dataclasses import dataclass

import numpy as np

from scaleup.errors import InputError, check_range

O2_PER_SULFITE = 0.5  # mol O2 per mol SO3(2-), from 2 SO3(2-) + O2 -> 2 SO4(2-)
CAVEATS = (
    "The catalyst (cobalt or copper ions) can make the reaction fast enough to run inside the "
    "liquid film and enhance absorption: the OTR then overstates physical kLa (Linek and "
    "Vacek 1981).",
    "The sulfite solution is ionic and therefore non-coalescing: bubbles stay small and kLa "
    "reads higher than in water or a coalescing broth.",
    "This is not a broth value: use it to compare equipment, not to predict a fermentation.",
    "C* must be the O2 solubility in the sulfite solution itself, which is lower than in "
    "water (salting-out).",
)


@dataclass(frozen=True)
class SulfiteResult:
    """OTR from a sulfite test [mol/(m3 s)], kLa [1/s] when C* was given."""

    sulfite_rate_mol_m3_s: float
    sulfite_rate_stderr_mol_m3_s: float
    otr_mol_m3_s: float
    otr_stderr_mol_m3_s: float
    kla_per_s: float | None
    n_samples: int
    caveats: tuple[str, ...] = CAVEATS
    warnings: tuple[str, ...] = ()


def otr_sulfite(sulfite_rate: float | np.ndarray) -> float | np.ndarray:
    """OTR from the sulfite consumption rate, by the stoichiometry of the oxidation [1]_.

    .. math::
        OTR = \\tfrac{1}{2}\\, r_{SO_3^{2-}}

    Parameters
    ----------
    sulfite_rate : float or array
        Rate at which sulfite is consumed [mol/(m3 s)], positive.

    Returns
    -------
    float or array
        OTR [mol/(m3 s)].

    Examples
    --------
    0.2 mol/L of sulfite used up in one hour (0.0556 mol/(m3 s)) is 0.0278 mol O2/(m3 s):

    >>> round(otr_sulfite(200.0 / 3600.0), 5)
    0.02778

    References
    ----------
    .. [1] Cooper, C. M.; Fernstrom, G. A.; Miller, S. A. Ind. Eng. Chem. 36 (1944) 504-509.
    """
    return O2_PER_SULFITE * sulfite_rate


def sulfite_rate_from_samples(t_s: np.ndarray, sulfite: np.ndarray) -> tuple[float, float, int]:
    """Sulfite consumption rate from titrated samples: minus the least-squares slope.

    Parameters
    ----------
    t_s : array
        Sample times [s].
    sulfite : array
        Sulfite concentrations [mol/m3]; NaN rows are skipped.

    Returns
    -------
    (float, float, int)
        Rate [mol/(m3 s)], its standard error [mol/(m3 s)] (nan for two samples), and the
        number of samples used.

    Examples
    --------
    >>> rate, se, n = sulfite_rate_from_samples([0, 600, 1200], [500.0, 440.0, 380.0])
    >>> round(rate, 6), n
    (0.1, 3)
    """
    t = np.asarray(t_s, dtype=float)
    y = np.asarray(sulfite, dtype=float)
    ok = np.isfinite(t) & np.isfinite(y)
    t, y = t[ok], y[ok]
    if t.size < 2:
        raise InputError(f"{t.size} usable sample(s); a rate needs at least two", "sulfite")
    if np.ptp(t) <= 0:
        raise InputError("all samples have the same time; a rate needs a time span", "time")
    tm = t - t.mean()
    sxx = float(tm @ tm)
    slope = float(tm @ (y - y.mean())) / sxx
    if t.size > 2:
        resid = y - y.mean() - slope * tm
        se = math.sqrt(float(resid @ resid) / (t.size - 2) / sxx)
    else:
        se = math.nan
    return -slope, se, int(t.size)


def sulfite_oxidation(*, sulfite_rate: float | None = None,
                      t_s: np.ndarray | None = None, sulfite: np.ndarray | None = None,
                      c_star: float | None = None) -> SulfiteResult:
    """OTR (and kLa) from a sulfite test: a known consumption rate, or titrated samples.

    Parameters
    ----------
    sulfite_rate : float, optional
        Sulfite consumption rate [mol/(m3 s)].
    t_s : array, optional
        Sample times [s], with ``sulfite``.
    sulfite : array, optional
        Sulfite concentrations of the samples [mol/m3].
    c_star : float, optional
        O2 solubility in the sulfite solution [mol/m3]; gives kLa = OTR / C*.

    Returns
    -------
    SulfiteResult
        Rates [mol/(m3 s)], kLa [1/s] or None, with the caveats of the method.

    Examples
    --------
    >>> r = sulfite_oxidation(sulfite_rate=0.1, c_star=0.2)
    >>> r.otr_mol_m3_s, r.kla_per_s
    (0.05, 0.25)
    """
    if (sulfite_rate is None) == (t_s is None or sulfite is None):
        raise InputError("give either the sulfite consumption rate or the sampled "
                         "concentrations with their times", "sulfite")
    warnings = []
    if sulfite_rate is not None:
        rate, se, n = float(sulfite_rate), math.nan, 0
    else:
        rate, se, n = sulfite_rate_from_samples(t_s, sulfite)
        if n == 2:
            warnings.append("two samples give a rate but no error estimate; titrate at least "
                            "four over the run")
    if rate <= 0:
        raise InputError(f"sulfite consumption {rate:g} mol/(m3 s) is not positive: sulfite "
                         "must fall during the test", "sulfite_rate", rate)
    kla = None
    if c_star is not None:
        check_range("c_star", c_star, 0.0, None, "mol/m3", low_inclusive=False)
        kla = otr_sulfite(rate) / c_star
    return SulfiteResult(sulfite_rate_mol_m3_s=rate, sulfite_rate_stderr_mol_m3_s=se,
                         otr_mol_m3_s=otr_sulfite(rate), otr_stderr_mol_m3_s=otr_sulfite(se),
                         kla_per_s=kla, n_samples=n, warnings=tuple(warnings))
