"""Sums over runs of entries laid back to back in one array (a batch's samples, row by row)."""

from __future__ import annotations

import numpy as np


def segment_sums(values: np.ndarray, offsets: np.ndarray, counts: np.ndarray) -> np.ndarray:
    """Sum along the first axis of each run of ``values``.

    Parameters
    ----------
    values : array (N, ...)
        The runs' entries back to back [any unit].
    offsets : int array (k,)
        Where each run starts [entry index]: the running sum of ``counts`` before it.
    counts : int array (k,)
        Entries in each run [-], 0 or more.

    Returns
    -------
    array (k, ...)
        The sum of each run [unit of ``values``]; 0 for an empty one.

    Notes
    -----
    Only the runs that hold something go to ``np.add.reduceat``, which gives the entry at an
    index equal to the next one (not 0), and whose last run before an index clipped to the
    end of the array would lose its last entry.

    Examples
    --------
    >>> segment_sums(np.array([1.0, 2.0, 3.0]), np.array([0, 1, 3]), np.array([1, 2, 0]))
    array([1., 5., 0.])
    """
    out = np.zeros((counts.size,) + values.shape[1:])
    held = counts > 0
    if held.any():
        out[held] = np.add.reduceat(values, offsets[held], axis=0)
    return out
