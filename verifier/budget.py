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
from collections.abc import Iterator

from verifier.prove.outcome import Outcome

DEFAULT_MAX_SECONDS = 60.0


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


def internal_error(kind: str, exc: BaseException) -> Outcome:
    """The outcome of a claim whose decision crashed (never a verdict about the mathematics)."""
    return Outcome(
        "error",
        kind,
        f"internal error while deciding this claim ({type(exc).__name__}: {exc}); please report it",
        code="internal",
    )
