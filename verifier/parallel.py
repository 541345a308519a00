"""Several processes: the items of a list decided in workers, results back in order.

Used for the claims of one document and for whole documents (``--jobs N``).  The work is
whatever function the caller passes, closures included: workers are *forked* after the
function is set, so nothing but an index goes to a worker and only the result comes back
(it must be picklable).  Forking also means no worker imports anything or builds the
grammar again; its start costs milliseconds.

How the work is split: items are handed out one at a time to whichever worker is free
(a heavy claim does not hold up the light ones queued behind it), but in *runs* of
neighbouring items, since neighbours in a manuscript tend to use the same forms and a
worker keeps its series cache between items.  Where fork is not available, or ``jobs``
is 1, or there is only one item, everything runs in this process, in order.  If a worker
dies, the runs it left undone are computed here.
"""

from __future__ import annotations

import multiprocessing
import os
from collections.abc import Callable, Sequence
from concurrent.futures import ProcessPoolExecutor
from concurrent.futures.process import BrokenProcessPool
from typing import Any, TypeVar

T = TypeVar("T")

_WORK: Callable[[int], Any] | None = None


def available_cores() -> int:
    """How many CPUs this process may run on."""
    try:
        return max(len(os.sched_getaffinity(0)), 1)
    except (AttributeError, OSError):
        return max(os.cpu_count() or 1, 1)


def can_fork() -> bool:
    """True where worker processes can be forked (POSIX)."""
    return "fork" in multiprocessing.get_all_start_methods()


def run_length(count: int, jobs: int) -> int:
    """How many neighbouring items a worker takes at a time: about four runs per worker."""
    return max(1, count // (4 * max(jobs, 1)))


def _run(span: tuple[int, int]) -> list[Any]:
    assert _WORK is not None
    return [_WORK(i) for i in range(*span)]


def map_in_order(work: Callable[[int], T], count: int, jobs: int) -> list[T]:
    """``[work(0), ..., work(count - 1)]``, computed in up to ``jobs`` forked processes.

    A run whose worker process dies (killed for its memory, say) is computed again in this
    process, so the result is always the one a single process gives.
    """
    global _WORK
    jobs = min(jobs, count)
    if jobs <= 1 or not can_fork():
        return [work(i) for i in range(count)]
    step = run_length(count, jobs)
    spans: Sequence[tuple[int, int]] = [(i, min(i + step, count)) for i in range(0, count, step)]
    previous, _WORK = _WORK, work
    parts: list[list[T] | None] = [None] * len(spans)
    try:
        with ProcessPoolExecutor(max_workers=jobs, mp_context=multiprocessing.get_context("fork")) as pool:
            futures = [pool.submit(_run, span) for span in spans]
            for k, future in enumerate(futures):
                try:
                    parts[k] = future.result()
                except BrokenProcessPool:
                    break
    finally:
        _WORK = previous
    out: list[T] = []
    for k, span in enumerate(spans):
        part = parts[k]
        out.extend(part if part is not None else [work(i) for i in range(*span)])
    return out
