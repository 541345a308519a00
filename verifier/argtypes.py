"""Argument types for the command line: numbers that must be positive, with a clear message.

argparse calls each with the text given; a bad value exits with status 2 and the message
``argument --jobs: ... must be a whole number of at least 1, not '0'``.
"""

from __future__ import annotations

import argparse
import math

# The largest value accepted for any count or size option: far above any sensible use, and
# small enough that nothing downstream overflows (an index-sized integer, a timer).
MAX_COUNT = 10**9
MAX_SECONDS = 10.0**6


def positive_int(text: str) -> int:
    """A whole number >= 1 (``--jobs``, ``--max-terms``, ``--max-files``, ``--max-size``)."""
    try:
        value = int(text.strip())
    except ValueError:
        raise argparse.ArgumentTypeError(f"must be a whole number of at least 1, not {text!r}") from None
    if value < 1:
        raise argparse.ArgumentTypeError(f"must be a whole number of at least 1, not {text!r}")
    if value > MAX_COUNT:
        raise argparse.ArgumentTypeError(f"must be at most {MAX_COUNT}, not {text!r}")
    return value


def _finite(text: str) -> float:
    try:
        value = float(text.strip())
    except ValueError:
        raise argparse.ArgumentTypeError(f"must be a number, not {text!r}") from None
    if not math.isfinite(value):
        raise argparse.ArgumentTypeError(f"must be a finite number, not {text!r}")
    return value


def positive_seconds(text: str) -> float:
    """A time budget in seconds: > 0 and finite (``--max-seconds``)."""
    value = _finite(text)
    if value <= 0:
        raise argparse.ArgumentTypeError(f"must be more than 0 seconds, not {text!r}")
    if value > MAX_SECONDS:
        raise argparse.ArgumentTypeError(f"must be at most {MAX_SECONDS:g} seconds, not {text!r}")
    return value


def non_negative_seconds(text: str) -> float:
    """A delay in seconds: >= 0 and finite (``--debounce``)."""
    value = _finite(text)
    if value < 0 or value > MAX_SECONDS:
        raise argparse.ArgumentTypeError(f"must be between 0 and {MAX_SECONDS:g} seconds, not {text!r}")
    return value


def ratio(text: str) -> float:
    """A compression ratio R (for R:1): at least 1 and finite (``--max-ratio``)."""
    value = _finite(text)
    if value < 1:
        raise argparse.ArgumentTypeError(f"must be at least 1, not {text!r}")
    return value
