"""Running claims within budgets: a time limit per claim, and several processes.

The coefficient budget (``--max-terms``) is checked before any work by the prover.  The
time budget is a safety net on top of it: an interval timer interrupts a claim that runs
longer than allowed (between two FLINT calls; each call is bounded by the coefficient
budget), and the claim becomes an ``error`` that says how far it got.  With ``jobs > 1``
claims are decided in worker processes, each with its own atom table; results come back
in document order, so the report is the same as with one process.
"""

from __future__ import annotations

import contextlib
import signal
import threading
import time
from collections.abc import Iterator
from concurrent.futures import ProcessPoolExecutor
from fractions import Fraction

from verifier.elaborate import ir
from verifier.prove.evaluate import AtomTable
from verifier.prove.prover import DEFAULT_MAX_TERMS, Outcome, Prover

DEFAULT_MAX_SECONDS = 60.0

Job = tuple[ir.Side, ir.Side, str, Fraction]


class TimeExceeded(Exception):
    """A claim ran past its time budget."""


@contextlib.contextmanager
def time_limit(seconds: float | None) -> Iterator[None]:
    """Raise :class:`TimeExceeded` in this thread after ``seconds`` (main thread, POSIX only)."""
    usable = (
        seconds is not None
        and seconds > 0
        and hasattr(signal, "setitimer")
        and threading.current_thread() is threading.main_thread()
    )
    if not usable:
        yield
        return

    def _alarm(signum: int, frame: object) -> None:
        raise TimeExceeded()

    previous = signal.signal(signal.SIGALRM, _alarm)
    signal.setitimer(signal.ITIMER_REAL, float(seconds or 0))
    try:
        yield
    finally:
        signal.setitimer(signal.ITIMER_REAL, 0)
        signal.signal(signal.SIGALRM, previous)


def decide_timed(prover: Prover, job: Job, max_seconds: float | None) -> tuple[Outcome, float]:
    """Decide one claim within the time budget; returns the outcome and the seconds spent."""
    left, right, rel, unit = job
    start = time.perf_counter()
    try:
        with time_limit(max_seconds):
            outcome = prover.decide(left, right, rel, unit)
    except TimeExceeded:
        kind = "prefix" if (left.printed or right.printed) else ("equality" if rel == "=" else "inequality")
        need = prover.precision_needed(left, right)
        outcome = Outcome(
            "error",
            kind,
            f"stopped after {max_seconds:g} s (the time budget); deciding it needs about {need} coefficients",
            code="time-budget",
            hint="raise --max-seconds if this is intended",
        )
    except Exception as exc:  # a bug in qreferee: this claim gets an error, the others are still checked
        outcome = internal_error("equality" if rel == "=" else "inequality", exc)
    return outcome, time.perf_counter() - start


def internal_error(kind: str, exc: BaseException) -> Outcome:
    """The outcome of a claim whose decision crashed (never a verdict about the mathematics)."""
    return Outcome(
        "error",
        kind,
        f"internal error while deciding this claim ({type(exc).__name__}: {exc}); please report it",
        code="internal",
    )


_WORKER: Prover | None = None
_WORKER_SECONDS: float | None = None


def _init_worker(max_terms: int, plan: int, max_seconds: float | None) -> None:
    global _WORKER, _WORKER_SECONDS
    _WORKER = Prover(AtomTable(), max_terms=max_terms)
    _WORKER.table.plan(plan)
    _WORKER_SECONDS = max_seconds


def _work(job: Job) -> tuple[Outcome, float]:
    assert _WORKER is not None
    return decide_timed(_WORKER, job, _WORKER_SECONDS)


def decide_all(
    jobs_list: list[Job],
    jobs: int = 1,
    max_terms: int = DEFAULT_MAX_TERMS,
    max_seconds: float | None = DEFAULT_MAX_SECONDS,
    prover: Prover | None = None,
) -> list[tuple[Outcome, float]]:
    """Decide every claim, in order; ``jobs > 1`` uses that many worker processes."""
    prover = prover or Prover(AtomTable(), max_terms=max_terms)
    plan = 0
    for left, right, _, _ in jobs_list:
        plan = max(plan, min(prover.precision_needed(left, right), max_terms))
    if jobs <= 1 or len(jobs_list) < 2:
        prover.table.plan(plan)
        return [decide_timed(prover, job, max_seconds) for job in jobs_list]
    with ProcessPoolExecutor(
        max_workers=jobs, initializer=_init_worker, initargs=(max_terms, plan, max_seconds)
    ) as pool:
        return list(pool.map(_work, jobs_list))
