"""Work shared between this thread and one helper thread of a pool.

Large NumPy operations release the GIL, so a second thread on a second core can take some of
a batch's chunks while this one takes the others. Both pull the next chunk from one queue, so
the split follows whichever thread is free: when the pool's thread is busy with other work,
this thread does all of it.
"""

from __future__ import annotations

import threading
from collections.abc import Callable, Iterable
from concurrent.futures import Executor

import numpy as np


def share(pool: Executor | None, jobs: Iterable[Callable[[], None]]) -> None:
    """Run every job once, here and on ``pool`` (when given) side by side; return when all are
    done, raising the first error. Jobs must touch disjoint data. The helper runs with this
    thread's floating-point error settings."""
    jobs = list(jobs)
    if pool is None or len(jobs) < 2:
        for job in jobs:
            job()
        return
    queue = iter(jobs)
    lock = threading.Lock()
    settings = np.geterr()
    failed = threading.Event()

    def drain() -> None:
        with np.errstate(**settings):
            while not failed.is_set():
                with lock:
                    job = next(queue, None)
                if job is None:
                    return
                try:
                    job()
                except BaseException:
                    failed.set()
                    raise

    helper = pool.submit(drain)
    try:
        drain()
    finally:
        helper.result()
