"""Work shared with a helper thread: every job once, errors raised, results as without it."""

from concurrent.futures import ThreadPoolExecutor

import numpy as np
import pytest

from scaleup.measure import lanes
from scaleup.measure.curves import analyse_curves


def _jobs(done: list, count: int):
    return [lambda i=i: done.append(i) for i in range(count)]


@pytest.mark.parametrize("count", [0, 1, 2, 37])
def test_every_job_runs_once_with_or_without_a_pool(count):
    for pool in (None, ThreadPoolExecutor(max_workers=1)):
        done: list = []
        lanes.share(pool, _jobs(done, count))
        assert sorted(done) == list(range(count))
        if pool is not None:
            pool.shutdown()


def test_an_error_in_a_job_is_raised_and_the_queue_stops():
    ran: list = []

    def boom():
        raise ValueError("chunk 3 failed")

    jobs = [lambda i=i: ran.append(i) for i in range(3)] + [boom]
    jobs += [lambda i=i: ran.append(i) for i in range(3, 200)]
    with ThreadPoolExecutor(max_workers=1) as pool, pytest.raises(ValueError, match="chunk 3"):
        lanes.share(pool, jobs)
    assert len(ran) < 200  # the other jobs stop once one has failed


def test_the_helper_runs_with_the_callers_floating_point_settings():
    seen = []

    def job():
        seen.append(np.geterr()["divide"])

    with ThreadPoolExecutor(max_workers=1) as pool, np.errstate(divide="raise"):
        lanes.share(pool, [job] * 50)
    assert set(seen) == {"raise"}


def test_a_large_batch_gives_the_same_results_with_the_second_thread_as_without(monkeypatch):
    # the batch is above the size from which a helper thread is used; forcing the size up
    # runs the same curves on one thread, and every estimate must agree exactly
    from scaleup.measure import curves as module

    rng = np.random.default_rng(5)
    t = np.linspace(0.0, 600.0, 1500)
    taus = rng.uniform(2.0, 15.0, 200)
    curves = []
    for k, tau in zip(rng.uniform(0.005, 0.05, 200), taus, strict=True):
        g = (np.exp(-k * t) - k * tau * np.exp(-t / tau)) / (1.0 - k * tau)
        curves.append((t, 95.0 - 90.0 * g + rng.normal(0.0, 0.5, t.size)))
    assert sum(len(x) for x, _ in curves) > module._THREAD_SAMPLES
    shared = analyse_curves(curves, tau_p_s=taus)
    monkeypatch.setattr(module, "_THREAD_SAMPLES", 10**12)
    alone = analyse_curves(curves, tau_p_s=taus)
    for a, b in zip(shared, alone, strict=True):
        assert a.summary() == b.summary()
        np.testing.assert_array_equal(a.primary.residuals, b.primary.residuals)
