"""Size limits for what a manuscript may ask, checked before any work is done.

A hostile or machine-made document must end in a clear per-claim error (``too-large``),
never in a hang, a crash of the interpreter or an ``internal`` error.  The limits here are
far above what a paper needs; each is checked while the claim is read (digits of a
literal, bits of a folded constant, nesting depth), so that nothing huge is ever built.
"""

from __future__ import annotations

import sys
from fractions import Fraction

MAX_LITERAL_DIGITS = 2_000  # digits of one number written in a claim
MAX_CONSTANT_BITS = 40_000  # bits of a constant folded from numbers (2^{40000} is the largest power)
MAX_NESTING = 200  # depth of the claim's tree after sums and products are flattened
MAX_PRINTED_DIGITS = 60  # digits of a number quoted back in a message before it is shortened
# Exact values (witnesses, p(n), tau(n)) may have up to this many digits when printed.
MAX_VALUE_DIGITS = 400_000
RECURSION_LIMIT = 6_000


class TooLarge(ValueError):
    """A number, constant or nesting beyond the limits above; the message says which."""


def check_bits(value: int, what: str) -> None:
    """Raise :class:`TooLarge` if ``value`` has more than :data:`MAX_CONSTANT_BITS` bits."""
    if value.bit_length() > MAX_CONSTANT_BITS:
        raise TooLarge(f"{what} has more than {MAX_CONSTANT_BITS} bits")


def power_bits(base_bits: int, exponent: int) -> int:
    """An upper bound on the bits of ``base ** exponent`` for a base of ``base_bits`` bits."""
    return abs(exponent) * max(base_bits, 1)


def shorten(text: str) -> str:
    """A long number quoted in a message: its first and last digits and how many there are."""
    digits = text.lstrip("-")
    if len(digits) <= MAX_PRINTED_DIGITS:
        return text
    sign = "-" if text.startswith("-") else ""
    return f"{sign}{digits[:12]}...{digits[-6:]} ({len(digits)} digits)"


def number_text(x: int | Fraction) -> str:
    """A number for a message: in full if short, else shortened (never the 4300-digit error)."""
    x = Fraction(x)
    if max(abs(x.numerator).bit_length(), x.denominator.bit_length()) > 4 * MAX_PRINTED_DIGITS:
        digits = int(max(abs(x.numerator).bit_length(), x.denominator.bit_length()) * 0.30103) + 1
        return f"a number of about {digits} digits"
    return shorten(str(x))


def allow_exact_values() -> None:
    """Let exact values up to :data:`MAX_VALUE_DIGITS` digits be printed, and deep-enough recursion.

    Python refuses to print integers of more than 4300 digits by default; an exact value
    such as p(10^9) (35,219 digits) is a legitimate witness.  Literals in claims are bounded
    separately (:data:`MAX_LITERAL_DIGITS`), so this does not open the slow-parsing hole the
    default guards against.
    """
    if hasattr(sys, "get_int_max_str_digits"):
        current = sys.get_int_max_str_digits()
        if current and current < MAX_VALUE_DIGITS:
            sys.set_int_max_str_digits(MAX_VALUE_DIGITS)
    if sys.getrecursionlimit() < RECURSION_LIMIT:
        sys.setrecursionlimit(RECURSION_LIMIT)
