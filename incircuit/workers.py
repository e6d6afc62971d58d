"""Spread many independent simulations over the CPU cores.

A Monte Carlo band needs hundreds of identification runs on boards that
differ only in part values, and a diagnosis fits dozens of hypotheses.
:func:`map_all` forks worker processes that inherit the function and the
items (nothing is pickled on the way in; results must pickle on the way
out). Forking is used only where it is safe: with the analytic engine
(pure Python and numpy, no simulator threads), on a system that forks,
from a process without other threads, never from inside a worker, and
for lists long enough to repay the start-up (about 20 ms per worker).

``INCIRCUIT_WORKERS`` sets the number of processes (1: run in this process).

>>> from incircuit.model import Reading
>>> read_all(lambda b: Reading("resistor", float(b)), [1, 2, 3], workers=1)[2].value
3.0
>>> map_all(lambda x: x * x, list(range(60)), workers=2, min_per_worker=10)[-1]
3481
"""

from __future__ import annotations

import math
import multiprocessing
import os
import threading
from concurrent.futures import ProcessPoolExecutor
from typing import Any, Callable, Sequence, TypeVar

from .model import Reading

__all__ = ["map_all", "read_all", "default_workers", "MIN_PER_WORKER"]

#: Fewest identification runs per worker that make forking worth it.
MIN_PER_WORKER = 25

T = TypeVar("T")
_TASK: tuple[Callable[[Any], Any], Sequence[Any]] | None = None
_IN_WORKER = False


def default_workers(engine: str) -> int:
    """Processes to use: ``INCIRCUIT_WORKERS`` if set, else one per core for
    the analytic engine and 1 for any other (and inside a worker)."""
    if _IN_WORKER:
        return 1
    env = os.environ.get("INCIRCUIT_WORKERS", "").strip()
    if env.isdigit() and int(env) > 0:
        return int(env)
    if engine != "analytic" or "fork" not in multiprocessing.get_all_start_methods():
        return 1
    if threading.active_count() > 1:  # forking a threaded process is unsafe
        return 1
    return max(1, len(os.sched_getaffinity(0)) if hasattr(os, "sched_getaffinity") else os.cpu_count() or 1)


def _call(index: int) -> Any:
    global _IN_WORKER
    _IN_WORKER = True
    assert _TASK is not None
    func, items = _TASK
    return func(items[index])


def map_all(func: Callable[[Any], T], items: Sequence[Any], workers: int = 1,
            min_per_worker: int = MIN_PER_WORKER) -> list[T]:
    """``[func(item) for item in items]``, in order, over ``workers`` processes."""
    global _TASK
    workers = min(workers, len(items) // max(min_per_worker, 1))
    if workers <= 1 or _IN_WORKER:
        return [func(item) for item in items]
    # the first item here, before forking, so that lazy imports and caches
    # are made once and inherited rather than repeated in every worker
    first = func(items[0])
    _TASK = (func, items)
    try:
        context = multiprocessing.get_context("fork")
        with ProcessPoolExecutor(max_workers=workers, mp_context=context) as pool:
            chunk = max(1, math.ceil((len(items) - 1) / (4 * workers)))
            rest = list(pool.map(_call, range(1, len(items)), chunksize=chunk))
    finally:
        _TASK = None
    return [first, *rest]


def _as_row(r: Reading | None) -> tuple | None:
    return None if r is None else (r.kind, r.value, r.unit, dict(r.extra))


def read_all(reader: Callable[[Any], Reading | None], items: Sequence[Any],
             workers: int = 1) -> list[Reading | None]:
    """``[reader(item) for item in items]``, in order, over ``workers`` processes."""
    rows = map_all(lambda item: _as_row(reader(item)), items, workers)
    return [None if row is None else Reading(*row) for row in rows]
