"""Factorisations with bounded effort, for values of multiplicative functions at large n.

Numbers up to :data:`FULL_BITS` bits are factored completely by FLINT.  Larger ones are
split by trial division and ECM up to :data:`SMOOTH_BITS`-bit primes; if what remains is
a proven prime (or a factorable small number) the factorisation is complete, otherwise
the value cannot be computed within the budget and :func:`factorisation` returns None.
"""

from __future__ import annotations

from flint import fmpz

FULL_BITS = 128
SMOOTH_BITS = 32
MAX_DIVISORS = 200_000  # most divisors a sum over d | n may enumerate


def factorisation(n: int) -> list[tuple[int, int]] | None:
    """The prime factorisation of ``n >= 1`` as (p, e) pairs in increasing order, or None."""
    assert n >= 1
    if n == 1:
        return []
    if n.bit_length() <= FULL_BITS:
        return sorted((int(p), int(e)) for p, e in fmpz(n).factor())
    out: dict[int, int] = {}
    for p, e in fmpz(n).factor_smooth(SMOOTH_BITS):
        q = int(p)
        if q.bit_length() <= SMOOTH_BITS or fmpz(q).is_prime():
            out[q] = out.get(q, 0) + int(e)
        elif q.bit_length() <= FULL_BITS:
            for r, f in fmpz(q).factor():
                out[int(r)] = out.get(int(r), 0) + int(f) * int(e)
        else:
            return None
    return sorted(out.items())


def divisors(n: int) -> list[int] | None:
    """The divisors of ``n >= 1`` in increasing order, or None if they cannot be listed."""
    factors = factorisation(n)
    if factors is None:
        return None
    count = 1
    for _, e in factors:
        count *= e + 1
    if count > MAX_DIVISORS:
        return None
    out = [1]
    for p, e in factors:
        out = [d * p**k for d in out for k in range(e + 1)]
    return sorted(out)
