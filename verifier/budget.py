"""Running claims within budgets: a time limit per claim, and several processes.

The coefficient budget (``--max-terms``) is checked before any work by the prover.  The
time budget is a safety net on top of it: an interval timer interrupts a claim that runs
longer than allowed (between two FLINT calls; each call is bounded by the coefficient
budget), and the claim becomes an ``error`` that says how far it got.  Several processes
(``--jobs``) are :mod:`verifier.parallel`'s business.
"""

from __future__ import annotations

import contextlib
import signal
import threading
import time
from collections.abc import Iterator
from fractions import Fraction

from verifier.elaborate import ir
from verifier.prove.prover import Outcome, Prover

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
    # The alarm repeats every 50 ms until the block ends: an exception raised where Python
    # cannot propagate it (inside a garbage-collector callback, say) is lost, and a single
    # alarm would then never stop the claim.
    signal.setitimer(signal.ITIMER_REAL, float(seconds or 0), 0.05)
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
