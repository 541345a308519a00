"""Re-check ``f in M_k(Gamma_0(N), chi)`` or ``S_k`` (method ``cusp-orders``) and
``dim M_k(Gamma_0(N)) = d`` (method ``dimension-formula``).

Membership: the form's atoms have levels dividing N (Newman's conditions for eta quotients,
checked again at N with their characters: M. Newman, Proc. London Math. Soc. 1959;
B. Gordon and K. Hughes 1981); every piece that is nonzero through its Sturm bound has the
stated weight and character and no E_2 (E_2 only in sums sum c_d E_2(d tau) whose E_2 part
vanishes, which are holomorphic forms of weight 2); the orders at the cusps c/d (d | N, d < N) are at
least the sums and minima of the atoms' orders (Ligozat's formula for eta quotients, G.
Ligozat, "Courbes modulaires de genre 1", 1975; Eisenstein series and thetas are holomorphic
at every cusp), and the order at infinity is read off the q-expansion.  A cusp form needs
every order > 0.

Dimensions (F. Diamond and J. Shurman, A First Course in Modular Forms, Thm. 3.5.1 and
Fig. 3.4; Cor. 3.7.2 for the elliptic points): e_2 and e_3 are counted as the solutions of
u^2 + 1 = 0 and u^2 + u + 1 = 0 modulo N, the cusps as sum_{d | N} phi(gcd(d, N/d)), the
genus as g = 1 + m/12 - e_2/4 - e_3/3 - e_inf/2, and for even k >= 2
dim M_k = (k - 1)(g - 1) + floor(k/4) e_2 + floor(k/3) e_3 + (k/2) e_inf (and g + e_inf - 1 for
k = 2), dim S_k = dim M_k - e_inf (g for k = 2); dim M_0 = 1, dim S_0 = 0, and odd weights
give 0 because -I lies in Gamma_0(N).
"""

from __future__ import annotations

import math
from fractions import Fraction
from typing import Any

from verifier.recheck import arith
from verifier.recheck.graded import Atoms, Evaluator, Unsupported, plain
from verifier.recheck.sexpr import parse

MAX_LEVEL_COUNT = 200_000  # the largest N for which e_2, e_3 are counted by brute force


def _e2_combination(tree: Any) -> dict[int, Fraction] | None:
    """``{d: c}`` when the tree is sum c_d E_2(d tau) (constants times E_2 atoms, sums, differences)."""
    if not isinstance(tree, list):
        return None
    head, args = tree[0], tree[1:]
    if head == "E" and args[0] == 2:
        return {int(args[1]): Fraction(1)}
    if head == "*" and len(args) == 2:
        for c, rest in (args, args[::-1]):
            inner = _e2_combination(rest)
            if isinstance(c, Fraction) and inner is not None:
                return {d: c * x for d, x in inner.items()}
        return None
    if head in ("+", "-"):
        a, b = _e2_combination(args[0]), _e2_combination(args[1])
        if a is None or b is None:
            return None
        sign = 1 if head == "+" else -1
        return {d: a.get(d, Fraction(0)) + sign * b.get(d, Fraction(0)) for d in set(a) | set(b)}
    return None


def _plain_tree(tree: Any) -> None:
    """Only sums, products, constants and nonnegative powers of atoms (no quotients, D, T, U, q); E_2
    only in sums c_d E_2(d tau): their E_2 part (sum c_d / d) E_2 is a graded piece checked to vanish,
    and then the sum is -sum (c_d / d)(E_2(tau) - d E_2(d tau)), a holomorphic form of weight 2 on
    Gamma_0(lcm d) (Diamond-Shurman, Section 1.2), of order >= 0 at every cusp."""
    if isinstance(tree, Fraction) or _e2_combination(tree) is not None:
        return
    head, args = tree[0], tree[1:]
    if head in ("+", "-", "*"):
        for a in args:
            _plain_tree(a)
        return
    if head == "^":
        if int(args[1]) < 0:
            raise Unsupported("a membership claim with a negative power")
        _plain_tree(args[0])
        return
    if head in ("eta", "Delta", "theta") or (head == "E" and args[0] != 2):
        return
    raise Unsupported(f"a membership claim with {head}")


def recheck_membership(cert: dict[str, Any], reasons: list[str], notes: list[str]) -> None:
    """Append to ``reasons`` what does not hold up."""
    from verifier.recheck.check import _orders

    space = cert["space"]
    if space.get("group") != "Gamma0":
        raise Unsupported("membership in a space for Gamma_1(N)")
    big_n, k, chi = int(space["level"]), Fraction(str(space["weight"])), int(space["character"])
    cusp = bool(space["cusp_forms"])
    tree = parse(str(cert["form"]["expr"]))
    _plain_tree(tree)
    atoms = Atoms()
    found: list[Any] = []
    atoms.walk(tree, found)
    level = 1
    for a in found:
        n = atoms.level(a)
        level = level * n // math.gcd(level, n)
    if any(atoms.weight(a).denominator == 2 for a in found) and level % 4:
        level = level * 4 // math.gcd(level, 4)
    if int(cert.get("form_level", -1)) != level:
        reasons.append(f"level of the form: certificate {cert.get('form_level')}, recomputed {level}")
    if big_n < 1 or big_n % level:
        reasons.append(f"the form's level {level} does not divide the space's level {big_n}")
        return
    prec = max(arith.sturm_bound(k, big_n), 1) + 1
    ev = Evaluator(atoms, big_n, prec)
    num, den = ev.side(tree)
    assert den is None
    nonzero = [(w, j, c) for (w, j, c), s in num.items() if not s.truncate(arith.sturm_bound(w, big_n) + 1).is_zero()]
    if not nonzero:
        notes.append("the form is 0")
        return
    for w, j, c in nonzero:
        if w != k or j:
            reasons.append(f"weight: the form has a nonzero part of weight {w} (E_2^{j}), the space weight {k}")
        if c != chi:
            reasons.append(f"character: certificate {chi}, recomputed {c}")
    stated = {int(d): Fraction(str(v)) for d, v in (cert.get("cusp_order_bounds") or {}).items()}
    lowest = plain(num, ev.e2, prec).lo
    need = 1 if cusp else 0
    if lowest < need:
        reasons.append(f"the expansion starts at q^{lowest}, so the order at infinity is below {need}")
    if big_n in stated and stated[big_n] > lowest:
        reasons.append(f"order at infinity: certificate {stated[big_n]}, recomputed {lowest}")
    for c in arith.divisors(big_n):
        if c == big_n:
            continue
        order = _orders(tree, atoms, big_n, c)[0]
        # A cusp form vanishes at every cusp: order > 0 (it may be fractional at an irregular
        # cusp when the character is not trivial; common practice).
        if order < 0 or (cusp and order == 0):
            reasons.append(f"the order at the cusps a/{c} is only known to be >= {order}, not > {need - 1}")
        if c in stated and stated[c] > order:
            reasons.append(f"order bound at the cusps a/{c}: certificate {stated[c]}, recomputed {order}")


def _count_roots(level: int, b: int) -> int:
    """#{u mod N : u^2 + b u + 1 = 0 mod N}."""
    return sum(1 for u in range(level) if (u * u + b * u + 1) % level == 0)


def dimension_facts(level: int) -> dict[str, Any]:
    """Index, elliptic points, cusps and genus of Gamma_0(N)."""
    if level > MAX_LEVEL_COUNT:
        raise Unsupported(f"level {level} is too large to count elliptic points")
    m = arith.index_gamma0(level)
    e2 = _count_roots(level, 0) if level > 1 else 1
    e3 = _count_roots(level, 1) if level > 1 else 1
    cusps = sum(arith.totient(math.gcd(d, level // d)) for d in arith.divisors(level))
    genus = 1 + Fraction(m, 12) - Fraction(e2, 4) - Fraction(e3, 3) - Fraction(cusps, 2)
    if genus.denominator != 1:
        raise ValueError(f"non-integral genus {genus} for level {level}")
    return {"index": m, "elliptic_points": [e2, e3], "cusps": cusps, "genus": int(genus)}


def dimension(k: int, level: int, cusp: bool) -> int:
    """dim M_k or S_k of Gamma_0(N), trivial character (module docstring)."""
    f = dimension_facts(level)
    g, ec = int(f["genus"]), int(f["cusps"])
    e2, e3 = (int(x) for x in f["elliptic_points"])
    if k < 0 or k % 2:
        return 0
    if k == 0:
        return 0 if cusp else 1
    if k == 2:
        return g if cusp else g + ec - 1
    full = (k - 1) * (g - 1) + (k // 4) * e2 + (k // 3) * e3 + (k // 2) * ec
    return full - ec if cusp else full


def recheck_dimension(cert: dict[str, Any], reasons: list[str], notes: list[str]) -> None:
    """Append to ``reasons`` what does not hold up."""
    space = cert["space"]
    k, level, cusp = int(space["weight"]), int(space["level"]), bool(space["cusp_forms"])
    facts = dimension_facts(level)
    for name, value in facts.items():
        if cert.get(name) != value:
            reasons.append(f"{name} of Gamma_0({level}): certificate {cert.get(name)}, recomputed {value}")
    d = dimension(k, level, cusp)
    if int(cert["dimension"]) != d:
        what = "S" if cusp else "M"
        reasons.append(f"dim {what}_{k}(Gamma_0({level})): certificate {cert['dimension']}, recomputed {d}")
