"""Re-check a congruence proved modulo p^e after lifting eta quotients by Frobenius.

The certificate's prime power carries ``frobenius`` with the lifted sides (``left_expr``,
``right_expr``) and the level of the lifted claim.  Independently of the engine:

1. the lifted sides have the author's shape: the same operators (sums, products, nonnegative
   powers, q d/dq, powers of q), the same constants, all p-integral, the same atoms except eta
   quotients, and the atoms kept are ones with p-integral coefficients (Delta, theta series, E_k
   with -2k/B_k p-integral);
2. each lifted eta quotient comes from the author's by moves
   eta(p d tau)^(p^(e-1) u) -> eta(d tau)^(p^e u): solved from the largest d down, the amount
   moved from d to d/p must be a multiple of p^(e-1), and nothing moves off a d prime to p.
   Each move keeps the coefficients modulo p^e because (1 - x)^p = 1 - x^p (mod p) and
   A = B (mod p^i) gives A^p = B^p (mod p^(i+1)) (common practice; Swinnerton-Dyer, LNM 350,
   1973, for Delta = eta(tau) eta(23 tau) mod 23); the congruence survives sums and products of
   p-integral series and q d/dq;
3. as a check of the arithmetic, both eta quotients are expanded modulo p^e through the bound of
   the proof, by schoolbook multiplication and division by the factors (1 - q^(d n)), and compared;
4. the lifted claim's level is recomputed and compared, and the congruence of the lifted sides
   modulo p^e is re-checked as any other (:func:`verifier.recheck.congruence.prime_power_of`).
"""

from __future__ import annotations

from fractions import Fraction
from typing import Any

from verifier.recheck import arith
from verifier.recheck.graded import Unsupported, _eta_pairs
from verifier.recheck.sexpr import parse

KEPT_ATOMS = ("Delta", "theta", "E")
SCAN = 30  # coefficients of each eta quotient and its lift compared, at least


def eta_mod(pairs: list[tuple[int, int]], stop: int, m: int) -> list[int]:
    """prod_d prod_n (1 - q^(d n))^r modulo m through q^(stop-1) (without the power q^(sum d r / 24))."""
    c = [1 % m] + [0] * (stop - 1)
    for d, r in pairs:
        for n in range(1, (stop - 1) // d + 1):
            j = d * n
            for _ in range(abs(r)):
                if r > 0:  # times (1 - q^j), from the top down
                    for i in range(stop - 1, j - 1, -1):
                        c[i] = (c[i] - c[i - j]) % m
                else:  # divided by (1 - q^j): times 1 + q^j + q^(2j) + ...
                    for i in range(j, stop):
                        c[i] = (c[i] + c[i - j]) % m
    return c


def moves(before: list[tuple[int, int]], after: list[tuple[int, int]], p: int, e: int) -> str | None:
    """Why ``after`` is not reached from ``before`` by Frobenius moves modulo p^e (None: it is)."""
    old, new = dict(before), dict(after)
    step = p ** (e - 1)
    deltas: set[int] = set()
    for d in set(old) | set(new):
        while True:
            deltas.add(d)
            if d % p:
                break
            d //= p
    out: dict[int, int] = {}  # the exponent moved from eta(d tau) to eta(d tau / p), before the factor p
    for d in sorted(deltas, reverse=True):
        moved = old.get(d, 0) + p * out.get(p * d, 0) - new.get(d, 0)
        if moved == 0:
            continue
        if d % p:
            return f"eta({d} tau) ends with exponent {new.get(d, 0)}, but nothing can move off it ({d} is prime to {p})"
        if moved % step:
            return f"eta({d} tau): the exponent moved, {moved}, is not a multiple of {p}^{e - 1}"
        out[d] = moved
    return None


def _integral(x: Fraction, p: int) -> bool:
    return x.denominator % p != 0


def _compare(orig: Any, lifted: Any, p: int, e: int, etas: list[tuple[Any, Any]]) -> str | None:
    """Step 1 (and the eta pairs for step 2): why ``lifted`` is not a lift of ``orig`` (None: it is)."""
    if isinstance(orig, list) and orig and orig[0] == "eta" and lifted == 1:
        etas.append((orig, ["eta"]))  # every factor moved away: the lifted quotient is 1
        return None
    if isinstance(orig, Fraction) or isinstance(lifted, Fraction):
        if orig != lifted:
            return f"the constant {orig} became {lifted}"
        return None if _integral(orig, p) else f"the constant {orig} has {p} in its denominator"
    if not isinstance(orig, list) or not isinstance(lifted, list) or not orig or not lifted:
        return "unreadable expressions"
    head = orig[0]
    if head == "eta":
        if lifted[0] != "eta":
            return "an eta quotient became another atom"
        etas.append((orig, lifted))
        return None
    if head in KEPT_ATOMS:
        if orig != lifted:
            return f"the atom {head} changed"
        if head == "E":
            k = int(orig[1])
            if not _integral(2 * k / arith.bernoulli(k), p):
                return f"E_{k} has coefficients with {p} in a denominator"
        return None
    if head in ("+", "-", "*", "D", "q", "^") and lifted[0] == head and len(orig) == len(lifted):
        if head == "q":
            return None if orig == lifted else "a power of q changed"
        if head == "^":
            if orig[2] != lifted[2] or orig[2] < 0:
                return "a power changed or is negative"
            return _compare(orig[1], lifted[1], p, e, etas)
        for a, b in zip(orig[1:], lifted[1:], strict=True):
            why = _compare(a, b, p, e, etas)
            if why:
                return why
        return None
    raise Unsupported(f"a Frobenius lift through the operator or atom {head}")


def recheck_lift(claim: Any, p: int, e: int, detail: dict[str, Any], reasons: list[str], notes: list[str]) -> int:
    """Re-check the prime power p^e proved after the lift (module docstring); the bound used."""
    from verifier.recheck.check import _Claim
    from verifier.recheck.congruence import prime_power_of

    q = p**e
    frob = detail["frobenius"]
    if "left_expr" not in frob or "right_expr" not in frob:
        raise Unsupported(f"mod {q}: the certificate does not spell out the sides lifted by Frobenius")
    lifted = [parse(str(frob["left_expr"])), parse(str(frob["right_expr"]))]
    etas: list[tuple[Any, Any]] = []
    for name, orig, new in zip(("left", "right"), claim.trees, lifted, strict=True):
        why = _compare(orig, new, p, e, etas)
        if why:
            reasons.append(f"mod {q}: the {name} side lifted by Frobenius is not the author's: {why}")
            return 0
    sub = {k: v for k, v in detail.items() if k != "frobenius"}
    stop = max(int(sub.get("bound") or 0) + 1, SCAN)
    for orig, new in etas:
        before, after = _eta_pairs(orig[1:]), _eta_pairs(new[1:])
        why = moves(before, after, p, e)
        if why:
            reasons.append(f"mod {q}: the lift of an eta quotient is no Frobenius move: {why}")
            return 0
        if eta_mod(before, stop, q) != eta_mod(after, stop, q):
            reasons.append(f"mod {q}: an eta quotient and its lift differ mod {q} through q^{stop - 1}")
            return 0
    if frob.get("same"):
        # Both sides lift to one form: the lifted difference is 0 and there is nothing to compare.
        if lifted[0] != lifted[1]:
            reasons.append(f"mod {q}: the certificate says both sides lift to the same form, but they differ")
            return 0
        notes.append(f"mod {q}: both sides lift by Frobenius to the same series, checked move by move")
        return 0
    new_claim = _Claim(trees=lifted)
    if int(frob.get("level", -1)) != new_claim.level:
        reasons.append(f"mod {q}: level after the lift: certificate {frob.get('level')}, recomputed {new_claim.level}")
        return 0
    bound = prime_power_of(new_claim, p, e, sub, reasons)
    notes.append(f"mod {q}: eta quotients lifted by Frobenius, checked move by move and through q^{stop - 1}")
    return bound
