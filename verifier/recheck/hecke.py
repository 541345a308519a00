"""Re-check ``f is a normalised eigenform`` (certificate method ``hecke``; docs/method.md#recheck).

From the certificate's form f, independently of the engine:

1. the level N (lcm of the atoms' levels), the weight k (an integer >= 1) and the quadratic
   character (kernel D) of f, recomputed from the atoms; f must be one piece of that weight and
   character, without E_2, quotients or derivatives, and holomorphic at every cusp (orders of
   the atoms at the cusps c/d, d | N), so that f lies in M_k(Gamma_0(N), chi);
2. B = floor(k [SL_2(Z) : Gamma_0(N)] / 12) (Sturm) and R = floor(k [SL_2(Z) : Gamma_0(2N)] / 12);
   the dimension of M_k(Gamma_0(N)) (trivial character) when the certificate states it;
3. the coefficients of f through q^(pB), from the re-checker's own series; a_1 = 1;
4. for every prime p <= R (and no other listed): lambda_p = a_p(f) and, straight from the
   definition, a_n(T_p f) = a(pn) + chi(p) p^(k-1) a(n/p) (the second term only when p | n;
   chi(p) = 0 when p | N, so T_p = U_p there) equals lambda_p a_n(f) for n = 0 .. B.

Why this suffices (T_p f - a_p f lies in the same space, so Sturm's theorem applies to it, and
the T_p, p <= R, generate the Hecke algebra) is docs/method.md#claim-eigenform; J.-P. Serre,
*A Course in Arithmetic*, Ch. VII, Section 5, for the operators.
"""

from __future__ import annotations

import math
from fractions import Fraction
from typing import Any

from verifier.recheck import arith
from verifier.recheck.graded import Unsupported


def _primes_up_to(r: int) -> list[int]:
    """The primes p <= r, by the sieve of Eratosthenes."""
    if r < 2:
        return []
    sieve = [True] * (r + 1)
    sieve[0] = sieve[1] = False
    for i in range(2, math.isqrt(r) + 1):
        if sieve[i]:
            sieve[i * i :: i] = [False] * len(sieve[i * i :: i])
    return [i for i, ok in enumerate(sieve) if ok]


def hecke_image(a: list[Fraction], p: int, k: int, chi_p: int, count: int) -> list[Fraction]:
    """a_0 .. a_(count-1) of T_p f from the coefficients ``a`` of f (at least p (count - 1) + 1 of them)."""
    if len(a) < p * (count - 1) + 1:
        raise ValueError(f"T_{p} through q^{count - 1} needs a_0 .. a_{p * (count - 1)} of f")
    scale = chi_p * p ** (k - 1)
    return [a[p * n] + (scale * a[n // p] if n % p == 0 else 0) for n in range(count)]


def recheck_eigenform(cert: dict[str, Any], reasons: list[str], notes: list[str]) -> None:
    """Append to ``reasons`` what does not hold up."""
    from verifier.recheck.check import _Claim, _frac
    from verifier.recheck.membership import dimension

    claim = _Claim(trees=[_by_constants(_parse(cert["form"]["expr"]))])
    tree, atoms, level = claim.trees[0], claim.atoms, claim.level
    if "(q " in str(cert["form"]["expr"]):
        raise Unsupported("an eigenform claim with a power of q in the form")
    if atoms.has_e2 or atoms.has_deriv:
        raise Unsupported("an eigenform claim with E_2 or a derivative")
    space = cert.get("space") or {}
    if int(space.get("level", -1)) != level:
        reasons.append(f"level: certificate {space.get('level')}, recomputed {level}")
    ev = claim.evaluate(2)
    num, den = ev.side(tree)
    if den is not None:
        raise Unsupported("an eigenform claim about a quotient")
    keys = [key for key, s in num.items() if not s.is_zero()]
    if len(keys) != 1 or keys[0][1] != 0 or keys[0][0].denominator != 1 or keys[0][0] < 1:
        reasons.append(f"the form is not one piece of one integral weight >= 1 (pieces {sorted(num)})")
        return
    w, _, kernel = keys[0]
    k = int(w)
    if str(space.get("weight")) != str(k):
        reasons.append(f"weight: certificate {space.get('weight')}, recomputed {k}")
    if int(space.get("character", 0)) != kernel:
        reasons.append(f"character: certificate {space.get('character')}, recomputed {kernel}")
    for atom in claim.atom_list:
        for c in arith.divisors(level):
            if atoms.order_at(atom, level, c) < 0:
                reasons.append(f"the form may have a pole at the cusps a/{c}: it is not shown to be in M_{k}")
    bound = arith.sturm_bound(Fraction(k), level)
    if int(cert.get("bound", -1)) != bound:
        reasons.append(f"bound: certificate {cert.get('bound')}, recomputed {bound} = floor({k} m_0({level}) / 12)")
    r = arith.sturm_bound(Fraction(k), 2 * level)
    if int(cert.get("prime_bound", -1)) != r:
        reasons.append(
            f"prime bound: certificate {cert.get('prime_bound')}, recomputed {r} = floor({k} m_0({2 * level}) / 12)"
        )
    used = cert.get("space_used") or {}
    if "dimension" in used and kernel == 1:
        d = dimension(k, level, False)
        if int(used["dimension"]) != d:
            reasons.append(f"dim M_{k}(Gamma_0({level})): certificate {used['dimension']}, recomputed {d}")
    primes = _primes_up_to(r)
    stated = {int(p): Fraction(str(v)) for p, v in cert.get("eigenvalues", [])}
    if sorted(stated) != primes:
        reasons.append(f"primes checked: certificate {sorted(stated)}, recomputed the primes <= {r}: {primes}")
    top = max(primes, default=1)
    stop = max(top * bound + 1, top + 1, 2)
    from verifier.recheck.check import side_series

    f = side_series(tree, stop)
    if f.lo < 0:
        reasons.append(f"the form has a term q^{f.lo} with a negative exponent")
        return
    a = [f[n] for n in range(stop)]
    if a[1] != 1:
        reasons.append(f"a_1 = {_frac(a[1])}, not 1: the form is not normalised")
    for p in primes:
        lam = a[p]
        if p in stated and stated[p] != lam:
            reasons.append(f"eigenvalue of T_{p}: certificate {_frac(stated[p])}, recomputed a_{p} = {_frac(lam)}")
        image = hecke_image(a, p, k, arith.character_value(kernel, p, level), bound + 1)
        bad = next((n for n in range(bound + 1) if image[n] != lam * a[n]), None)
        if bad is not None:
            reasons.append(f"T_{p} f and a_{p} f differ at q^{bad}: {_frac(image[bad])} against {_frac(lam * a[bad])}")
    notes.append(f"T_p f = a_p f on a_0 .. a_{bound} for the primes p <= {r}")


def _by_constants(tree: Any) -> Any:
    """The tree with every quotient by a nonzero constant written as a product by its inverse."""
    if not isinstance(tree, list):
        return tree
    if tree[0] == "/" and len(tree) == 3 and isinstance(tree[2], Fraction) and tree[2] != 0:
        return ["*", _by_constants(tree[1]), 1 / tree[2]]
    return [tree[0], *(_by_constants(x) for x in tree[1:])]


def _parse(text: str) -> Any:
    from verifier.recheck.sexpr import parse

    return parse(str(text))
