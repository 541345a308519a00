"""Re-checking progressions decided by U_m (method ``u-operator``, docs/method.md#progressions).

For F = prod f_delta^{r_delta} (f_delta = prod_n (1 - q^{delta n})), the certificate names a
multiplier E = prod eta(delta tau)^{u_delta}.  Everything the proof rests on is recomputed:

* h = prod eta(delta tau)^{r_delta} E(m tau), its weight, its least level by Newman's
  conditions, its character (Gordon-Hughes-Newman) and its orders at the cusps (Ligozat):
  h must be a holomorphic form of integral weight (M. Newman, Proc. London Math. Soc. 1959;
  G. Ligozat, 1975);
* e, the order of h at infinity, and t + e = 0 (mod m), so that
  U_m h = q^k P_E(q) sum a(mn + t) q^n with k = (t + e)/m and P_E = prod (1 - q^n)-part of E;
* the level of U_m h: U_p keeps the level when p | N and multiplies it by p otherwise
  (U_p = T_p - chi(p) p^(k-1) V_p; Ono, The Web of Modularity, CBMS 102, 2004, §2.4; from memory);
  the terms gamma q^s prod f^{s_delta} of the claimed side, times E, must be eta quotients
  of the same weight and character, with matching q-powers (lambda = 0);
* the bound: floor(k m_0(N') / 12) (Sturm), less the lower bounds of the orders at cusps where
  a term of the claimed side has a pole (the valence formula, as in :mod:`.check`);
* the coefficients a(mn + t) for n <= bound, straight from the product F by schoolbook
  multiplication and division by the sparse series prod (1 - q^{delta n}) (Euler's pentagonal
  theorem), compared with 0 modulo M, or with the claimed side.

Since U_m h - E (claimed side) = q^k P_E(q) (sum a(mn+t) q^n - claimed side) and P_E has
constant term 1 (a unit, also modulo M), comparing the progression with the claimed side
through q^bound shows that the difference of the forms vanishes through q^bound.
"""

from __future__ import annotations

import math
from fractions import Fraction
from typing import Any

from verifier.recheck import arith
from verifier.recheck.atoms import TooLarge
from verifier.recheck.graded import Unsupported

MAX_COEFFICIENTS = 100_000  # coefficients of F the re-checker computes at most

Pairs = list[tuple[int, int]]


def _pairs(x: Any, what: str) -> Pairs:
    if not isinstance(x, list):
        raise ValueError(f"{what} is not a list of pairs")
    out: dict[int, int] = {}
    for item in x:
        d, r = (int(v) for v in item)
        if d < 1:
            raise ValueError(f"{what}: delta {d} < 1")
        out[d] = out.get(d, 0) + r
    return sorted((d, r) for d, r in out.items() if r)


def _pentagonal(limit: int, step: int) -> list[tuple[int, int]]:
    """(exponent, sign) of prod_n (1 - q^(step n)) below q^limit (Euler's pentagonal theorem)."""
    out = [(0, 1)]
    j = 1
    while True:
        g1, g2 = step * j * (3 * j - 1) // 2, step * j * (3 * j + 1) // 2
        if g1 >= limit:
            break
        sign = -1 if j % 2 else 1
        out.append((g1, sign))
        if g2 < limit:
            out.append((g2, sign))
        j += 1
    return out


def product_coefficients(pairs: Pairs, count: int, modulus: int | None = None) -> list[int]:
    """The first ``count`` coefficients of prod f_delta^{r_delta} (modulo ``modulus`` if given).

    Multiplying by f_delta is a sparse schoolbook convolution; dividing by it solves
    g f_delta = c term by term, with the same sparse terms (f_delta has constant term 1).
    """
    if count > MAX_COEFFICIENTS:
        raise TooLarge(f"it needs {count} coefficients of the product, more than {MAX_COEFFICIENTS}")
    c = [0] * count
    if count:
        c[0] = 1
    for d, r in pairs:
        sparse = _pentagonal(count, d)
        for _ in range(abs(r)):
            if r > 0:
                out = [0] * count
                for e, sign in sparse:
                    for i in range(count - e):
                        out[i + e] += sign * c[i]
                c = out
            else:
                for i in range(count):  # g[i] = c[i] - sum_{e > 0} sign_e g[i - e]
                    acc = c[i]
                    for e, sign in sparse[1:]:
                        if e > i:
                            break
                        acc -= sign * c[i - e]
                    c[i] = acc
            if modulus is not None:
                c = [x % modulus for x in c]
    return c


def _s(pairs: Pairs) -> int:
    return sum(d * r for d, r in pairs)


def _combine(*parts: Pairs) -> Pairs:
    out: dict[int, int] = {}
    for part in parts:
        for d, r in part:
            out[d] = out.get(d, 0) + r
    return sorted((d, r) for d, r in out.items() if r)


def raised_level(level: int, m: int) -> int:
    """The level of U_m f for f on Gamma_0(level): times each prime of m not dividing the level."""
    out = level
    for p in arith.factor(m):
        if level % p:
            out *= p
    return out


def recheck_progression(cert: dict[str, Any], reasons: list[str], notes: list[str]) -> None:
    """Append to ``reasons`` what does not hold up in a ``u-operator`` certificate."""
    rec = cert["progression"]
    comps = rec.get("components")
    if comps is None:
        bound = _one(rec, reasons, notes, "")
    else:
        if not comps:
            reasons.append("the certificate lists no classes")
            return
        bounds = [_one(c, reasons, notes, f"class t = {c.get('claimed_t')}: ") for c in comps]
        bound = max(bounds)
        if "dissection" in rec:
            p = int(rec["dissection"])
            ts = sorted(int(c["claimed_t"]) for c in comps)
            if ts != list(range(p)) or any(int(c["m"]) != p for c in comps):
                reasons.append(f"the classes {ts} (moduli {[c['m'] for c in comps]}) are not every t mod {p} once")
        if "n_class" in rec:
            _class_covered(rec, comps, reasons)
        if "residues" in rec:
            mine = [int(c["claimed_t"]) - int(c["m"]) * int(c["start"]) for c in comps]
            if [int(x) for x in rec["residues"]] != mine:
                reasons.append(f"the listed residues {rec['residues']} are not those of the classes {mine}")
    if cert.get("bound") is not None and int(cert["bound"]) != bound:
        reasons.append(f"bound: certificate {cert['bound']}, recomputed {bound}")


def _class_covered(rec: dict[str, Any], comps: list[dict[str, Any]], reasons: list[str]) -> None:
    """The classes proved are the author's a(m0 n + t0) on the class of n, each residue once.

    For the residue r of the class (modulo k), n = n0 + k n' with n0 = r (mod k), so the
    argument is m0 k n' + (m0 n0 + t0): the component must have m = m0 k and that t.  The n0
    must lie within k of one another (each the least n of its residue from a common start).
    """
    k = int(rec["n_class"]["modulus"])
    residues = sorted(int(r) for r in rec["n_class"]["residues"])
    m0, t0 = (int(x) for x in rec["argument"])
    starts = [int(x) for x in rec["starts"]]
    if len(starts) != len(comps) or sorted(n0 % k for n0 in starts) != residues:
        reasons.append(f"the starts {starts} do not give each residue {residues} mod {k} once")
        return
    if max(starts) - min(starts) >= k:
        reasons.append(f"the starts {starts} are not the least n of their residues from one start")
    for n0, c in zip(starts, comps, strict=True):
        if int(c["m"]) != m0 * k or int(c["claimed_t"]) != m0 * n0 + t0:
            reasons.append(
                f"the class n = {n0} mod {k} of a({m0}n + {t0}) is a({m0 * k}n' + {m0 * n0 + t0}), "
                f"not the proved a({c['m']}n' + {c['claimed_t']})"
            )


def _one(rec: dict[str, Any], reasons: list[str], notes: list[str], where: str) -> int:
    """Re-check one class t mod m; returns the recomputed bound."""
    if "product" not in rec or "multiplier_exponents" not in rec:
        raise Unsupported("the progression record carries no products to rebuild the proof from (an older report)")

    def bad(text: str) -> None:
        reasons.append(where + text)

    f_pairs = _pairs(rec["product"], "product")
    mult = _pairs(rec["multiplier_exponents"], "multiplier")
    m, t = int(rec["m"]), int(rec["t"])
    claimed_t = int(rec.get("claimed_t", t))
    modulus = None if rec.get("modulus") is None else int(rec["modulus"])
    terms = rec.get("terms")
    if m < 1 or not 0 <= t < m:
        bad(f"t = {t} is not a residue modulo m = {m}")
        return -1
    if claimed_t % m != t or (claimed_t != t and terms is not None):
        bad(f"the proved class t = {t} is not the claimed t = {claimed_t}")
    # h = F(tau) E(m tau) as an eta quotient (f_delta = q^(-delta/24) eta(delta tau)).
    h = _combine(f_pairs, [(m * d, u) for d, u in mult])
    if _pairs(rec.get("form_exponents", []), "form") != h:
        bad(f"the form U_m is applied to: certificate {rec.get('form_exponents')}, recomputed {h}")
    weight2 = sum(r for _, r in h)
    if weight2 % 2 or weight2 < 2:
        bad(f"h has weight {Fraction(weight2, 2)}, not a positive integer")
        return -1
    k = weight2 // 2
    level = arith.eta_least_level(h)
    if level is None:
        bad("h satisfies Newman's conditions at no level")
        return -1
    form = rec.get("form") or {}
    for name, value in (("weight", k), ("level", level)):
        if int(form.get(name, -1)) != value:
            bad(f"{name} of h: certificate {form.get(name)}, recomputed {value}")
    for c in arith.divisors(level):
        order = arith.ligozat_order(h, level, c)
        if order < 0:
            bad(f"h has order {order} at the cusps a/{c}: not holomorphic")
    kernel = arith.eta_kernel(h)
    if int(rec.get("character_kernel", 0)) != kernel:
        bad(f"character of h: certificate {rec.get('character_kernel')}, recomputed {kernel}")
    if _s(h) % 24:
        bad("the order of h at infinity is not an integer")
        return -1
    e = _s(h) // 24
    if int(rec.get("e", -1)) != e:
        bad(f"order of h at infinity: certificate {rec.get('e')}, recomputed {e}")
    if e < 0 or (t + e) % m:
        bad(f"t + e = {t + e} is not a nonnegative multiple of m = {m}: U_m h is not the progression")
        return -1
    target = raised_level(level, m)
    term_pairs: list[tuple[Fraction, Fraction, Pairs, Pairs]] = []
    for term in terms or []:
        gamma, shift = Fraction(str(term["coeff"])), Fraction(str(term["shift"]))
        mono = _pairs(term["product"], "a term")
        lam = Fraction(t, m) + Fraction(_s(f_pairs), 24 * m) - (Fraction(_s(mono), 24) - shift)
        if lam != 0:
            bad(f"a term of the claimed side has the q-shift lambda = {lam}, not 0")
        eta_term = _combine(mult, mono)
        if sum(r for _, r in eta_term) != 2 * k:
            bad(f"a term of the claimed side has weight {Fraction(sum(r for _, r in eta_term), 2)} after E, not {k}")
            return -1
        lvl = arith.eta_least_level(eta_term)
        if lvl is None:
            bad("a term of the claimed side is no eta quotient on any Gamma_0(N)")
            return -1
        target = target * lvl // math.gcd(target, lvl)
        term_pairs.append((gamma, shift, mono, eta_term))
    for _, _, _, eta_term in term_pairs:
        why = arith.eta_conditions(eta_term, target)
        if why:
            bad(f"a term of the claimed side at level {target}: {why}")
        if arith.eta_kernel(eta_term) != kernel:
            bad(f"a term of the claimed side has character {arith.eta_kernel(eta_term)}, not {kernel}")
    tgt = rec.get("target") or {}
    if int(tgt.get("level", -1)) != target:
        bad(f"level of U_m h: certificate {tgt.get('level')}, recomputed {target}")
    if int(tgt.get("weight", -1)) != k:
        bad(f"weight of U_m h: certificate {tgt.get('weight')}, recomputed {k}")
    poles: dict[int, Fraction] = {}
    for c in arith.divisors(target):
        if c == target:
            continue
        low = min([Fraction(0)] + [arith.ligozat_order(x[3], target, c) for x in term_pairs])
        if low < 0:
            poles[c] = low
    stated = {int(d): Fraction(str(v)) for d, v in (rec.get("poles") or {}).items()}
    if stated != poles:
        mine = {str(d): str(v) for d, v in poles.items()}
        bad(f"orders at cusps with poles: certificate {rec.get('poles')}, recomputed {mine}")
    if poles and modulus is not None:
        bad("a congruence is proved with a term that has a pole at a cusp (Sturm's theorem needs forms)")
    total = Fraction(k * arith.index_gamma0(target), 12)
    for c, low in poles.items():
        total -= low * arith.totient(math.gcd(c, target // c))
    bound = math.floor(total)
    if int(tgt.get("sturm_bound", -1)) != bound:
        bad(f"bound: certificate {tgt.get('sturm_bound')}, recomputed {bound}")
    if int(rec.get("coefficients_compared", -1)) != bound + 1:
        bad(f"coefficients compared: certificate {rec.get('coefficients_compared')}, needed {bound + 1}")
    if bound < 0:
        return bound
    # The progression, straight from the product F.
    need = m * bound + t + 1
    exact = terms is not None and modulus is None
    coeffs = product_coefficients(f_pairs, need, None if exact else modulus)
    prog = coeffs[t:need:m]
    claimed = (
        _claimed(term_pairs, bound + 1, None if exact else modulus)
        if terms is not None
        else [Fraction(0)] * (bound + 1)
    )
    for n in range(bound + 1):
        a, b = Fraction(prog[n]), claimed[n]
        differs = a != b if exact else _differs_mod(a, b, modulus)
        if differs:
            mod = f" modulo {modulus}" if modulus is not None else ""
            bad(f"a({m}n+{t}) at n = {n} is {a}, the claimed side has {b}{mod}")
            break
    notes.append(f"{where}a({m}n+{t}) compared for n <= {bound}")
    return bound


def _differs_mod(a: Fraction, b: Fraction, modulus: int | None) -> bool:
    assert modulus is not None
    diff = a - b
    return diff.numerator % modulus != 0 or math.gcd(diff.denominator, modulus) != 1


def _claimed(terms: list[tuple[Fraction, Fraction, Pairs, Pairs]], count: int, modulus: int | None) -> list[Fraction]:
    """Coefficients of q^0 .. q^(count-1) of sum gamma q^shift prod f^s."""
    out = [Fraction(0)] * count
    for gamma, shift, mono, _ in terms:
        if shift.denominator != 1 or shift < 0:
            raise ValueError(f"a term of the claimed side has the power q^{shift}")
        s = int(shift)
        if s >= count:
            continue
        body = product_coefficients(mono, count - s, modulus)
        for i, c in enumerate(body):
            out[i + s] += gamma * c
    return out
