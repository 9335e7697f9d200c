"""Sums over back-to-back runs, and the moments of a moved window against fresh ones."""

import numpy as np
from hypothesis import given
from hypothesis import strategies as st

from scaleup.measure import taylorfit
from scaleup.measure.segments import segment_sums


@given(st.lists(st.integers(0, 4), min_size=1, max_size=12))
def test_segment_sums_match_a_loop_whatever_runs_are_empty(counts):
    counts = np.array(counts)
    values = np.arange(1.0, counts.sum() + 1.0)
    offsets = np.cumsum(counts) - counts
    expected = [values[o:o + n].sum() for o, n in zip(offsets, counts, strict=True)]
    np.testing.assert_array_equal(segment_sums(values, offsets, counts), expected)
    wide = np.column_stack([values, -values])
    np.testing.assert_array_equal(segment_sums(wide, offsets, counts)[:, 1],
                                  -np.array(expected))


def test_moved_windows_have_the_moments_of_a_fresh_expansion():
    # the last rows keep their stop (an empty segment at the end of the moved samples),
    # which once cut short the sum of the segment before it
    rng = np.random.default_rng(3)
    m, n = 6, 400
    t = np.tile(np.linspace(0.0, 400.0, n), (m, 1))
    c = 90.0 - 85.0 * np.exp(-0.02 * t) + rng.normal(0.0, 0.3, (m, n))
    tau, start = np.full(m, 5.0), np.zeros(m)
    first, stop = np.full(m, 40), np.full(m, 300)
    k = np.full(m, 0.02)
    source = taylorfit.Source(t, c, start)
    rows = np.arange(m)
    moved = taylorfit.Expansion(source, tau, first, stop)
    moved.expand(rows, k, fresh=True)
    new_first = first + np.array([3, -2, 5, 1, 2, 4])
    new_stop = stop + np.array([4, -3, 2, 0, 0, 0])
    moved.move(rows, new_first, new_stop)
    fresh = taylorfit.Expansion(source, tau, new_first, new_stop)
    fresh.expand(rows, k, fresh=True)
    # the sums at kLa = k (Sg, Sgg, Scg, Sv, Svv, Sgv, Scv) do not depend on the time
    # centring; those with the data C depend on the shift it is centred on, by the shift
    # difference times Sg or Sv
    a, b = moved.sums(rows, k), fresh.sums(rows, k)
    d = fresh.shift - moved.shift
    np.testing.assert_allclose(a[[0, 1, 3, 4, 5]], b[[0, 1, 3, 4, 5]], rtol=1e-9)
    np.testing.assert_allclose(a[2], b[2] + d * b[0], rtol=1e-9)
    np.testing.assert_allclose(a[6], b[6] + d * b[3], rtol=1e-9)
    np.testing.assert_allclose(moved.n, fresh.n)
