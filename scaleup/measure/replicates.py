"""One kLa for a run from its replicate curves."""

from __future__ import annotations

import math
from collections.abc import Sequence

import numpy as np


def combine_replicates(kla: Sequence[float], stderr: Sequence[float]) -> tuple[float, float]:
    """Inverse-variance weighted mean of replicate kLa values, with its standard error.

    .. math::
        \\bar k = \\frac{\\sum k_i / s_i^2}{\\sum 1 / s_i^2}, \\qquad
        s_{\\bar k} = \\sqrt{\\frac{1}{\\sum 1/s_i^2}} \\max(1, R_B), \\qquad
        R_B = \\sqrt{\\frac{\\sum (k_i - \\bar k)^2 / s_i^2}{n - 1}}

    Parameters
    ----------
    kla : sequence of float
        kLa of each curve [1/s].
    stderr : sequence of float
        Standard error of each [1/s]; when any is missing or zero the plain mean and its
        standard error (sample standard deviation / sqrt(n)) are used instead.

    Returns
    -------
    (float, float)
        kLa [1/s] and its standard error [1/s] (nan for a single curve without an error).

    Notes
    -----
    The Birge ratio R_B scales the error up when replicates scatter more than their own
    errors say (a day-to-day or probe-to-probe effect the single-curve fit cannot see);
    it is never used to scale it down (Birge 1932, from memory).

    Examples
    --------
    >>> k, s = combine_replicates([0.020, 0.022], [0.001, 0.001])
    >>> round(k, 6), round(s, 6)
    (0.021, 0.001)
    """
    k = np.asarray(kla, dtype=float)
    s = np.asarray(stderr, dtype=float)
    if k.size == 0:
        raise ValueError("no kLa values to combine")
    if k.size == 1:
        return float(k[0]), float(s[0]) if s.size else math.nan
    if not (np.isfinite(s).all() and (s > 0).all()):
        return float(k.mean()), float(k.std(ddof=1) / math.sqrt(k.size))
    w = 1.0 / s**2
    mean = float((w * k).sum() / w.sum())
    birge = math.sqrt(float((w * (k - mean) ** 2).sum()) / (k.size - 1))
    return mean, math.sqrt(1.0 / float(w.sum())) * max(1.0, birge)
