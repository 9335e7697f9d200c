"""Time operating_point over a speed x gas-flow grid, vectorised vs. one call per point.

Run: python tests/benchmarks/bench_hydro.py
"""

from __future__ import annotations

import time

import numpy as np

from scaleup.hydro.geometry import standard_vessel
from scaleup.hydro.point import operating_point

WATER = (303.15, 995.6, 0.797e-3, 0.0712)


def main() -> None:
    vessel = standard_vessel(3.0, count=3, bottom="torispherical")
    speeds = np.linspace(0.5, 3.0, 100)
    flows = np.linspace(0.0, 5.0, 100)
    start = time.perf_counter()
    grid = operating_point(vessel, speeds[:, None], flows[None, :], *WATER)
    vectorised = time.perf_counter() - start
    start = time.perf_counter()
    loop = np.array([[operating_point(vessel, float(n), float(q), *WATER).gassed_power
                      for q in flows] for n in speeds])
    looped = time.perf_counter() - start
    assert np.allclose(grid.gassed_power, loop, rtol=1e-12)
    print(f"{speeds.size * flows.size} points: vectorised {vectorised * 1e3:.1f} ms, "
          f"one call per point {looped * 1e3:.0f} ms, ratio {looped / vectorised:.0f}x")


if __name__ == "__main__":
    main()
