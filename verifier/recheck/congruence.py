"""Re-check a congruence ``left = right (mod M)`` for every n (certificate method ``sturm-congruence``).

The difference F = left - right is recomputed as pieces f E_2^j (f a modular form on
Gamma_0(N) of one weight and quadratic character).  For every prime power p^e || M,
independently of the certificate's own arithmetic:

1. a piece whose coefficients through the Sturm bound of its own weight are p-integral and
   0 mod p^e is 0 mod p^e everywhere (Sturm's theorem, J. Sturm, LNM 1240, 1987, which
   holds modulo prime powers; a p-adic denominator would show within that bound too);
2. of the other pieces, v_i is the least p-adic valuation of a coefficient of piece i within its
   own bound, a = max(0, -v_i), and the scaled piece p^a f_i only needs its other factors exact
   mod p^(e - v_i); E_2 is replaced by E_{p+1} (p >= 5, E_2 = E_{p+1} mod p: J.-P. Serre,
   "Congruences et formes modulaires", Sem. Bourbaki 416, 1972) or by 1 (E_2 = 1 - 24 sum
   sigma(n) q^n, so E_2 = 1 mod 8 and mod 3), only where that substitution is exact enough, or,
   when the certificate names a proof level N p^s, by E_2(tau) - p^s E_2(p^s tau), a form of
   weight 2 on Gamma_0(p^s) (Diamond-Shurman, GTM 228, Section 1.2) equal to E_2 mod p^s;
3. each piece is multiplied by a level-one form H = 1 (mod p^(e - v_i)) up to the certificate's
   common weight K: powers of E_{p-1} (p >= 5; E_{p-1} = 1 mod p by von Staudt-Clausen), of
   E_4 = 1 + 240(...) and E_6 = 1 - 504(...) (p = 2, 3), and H = 1 (mod p^b) gives
   H^p = 1 (mod p^(b+1)) (common practice);
4. G = sum p^a f_i S^j_i H_i lies in M_K(Gamma_0(N'), chi) (N' the proof level), and it must be
   0 mod p^(a+e) through floor(K [SL_2(Z) : Gamma_0(N')] / 12).

A proof after lifting eta quotients by Frobenius is re-checked by :mod:`verifier.recheck.frobenius`,
which then runs steps 1-4 on the lifted sides (:func:`prime_power_of`).
Multipliers are this module's own choice; a common weight they cannot reach leaves the
certificate not re-checked (never failed).
"""

from __future__ import annotations

import math
from fractions import Fraction
from typing import Any

from verifier.recheck import arith
from verifier.recheck.atoms import eisenstein
from verifier.recheck.graded import Unsupported, g_add, plain
from verifier.recheck.series import Series

MAX_COMBINATIONS = 10_000
DIRECT_SCAN = 30  # coefficients of left - right scanned directly, at least


def _valuation(x: Fraction, p: int) -> int:
    num, den, v = x.numerator, x.denominator, 0
    while num % p == 0:
        num //= p
        v += 1
    while den % p == 0:
        den //= p
        v -= 1
    return v


def _residue(x: Fraction, m: int) -> int | None:
    """x mod m, None when the denominator is not prime to m."""
    if math.gcd(x.denominator, m) != 1:
        return None
    return x.numerator * pow(x.denominator, -1, m) % m


def _residues(s: Series, stop: int, mod: int, what: str) -> list[int]:
    out = []
    for n in range(stop):
        r = _residue(s[n], mod)
        if r is None:
            raise Unsupported(f"{what} is not integral modulo {mod}")
        out.append(r)
    return out


def _mul_mod(a: list[int], b: list[int], m: int) -> list[int]:
    out = [0] * len(a)
    for i, x in enumerate(a):
        if x:
            for j in range(len(a) - i):
                out[i + j] = (out[i + j] + x * b[j]) % m
    return out


def _multipliers(p: int, t: int) -> list[tuple[int, int]]:
    """(k, power): E_k^power = 1 (mod p^t), of weight k * power (step 3 of the module docstring)."""
    if p >= 5:
        return [(p - 1, p ** (t - 1))]
    # E_4 = 1 mod 2^4 * 3, E_6 = 1 mod 2^3 * 3^2 (from 240 and 504).
    have = {2: {4: 4, 6: 3}, 3: {4: 1, 6: 2}}[p]
    return [(k, p ** max(0, t - a)) for k, a in have.items()]


def e2_precision(p: int, k: int) -> int:
    """The largest s <= 12 with E_2 = E_k (mod p^s) coefficientwise (E_0 = 1); 0 when none.

    E_2 = 1 - 24 sum sigma_1(n) q^n and E_k = 1 + c_k sum sigma_(k-1)(n) q^n, c_k = -2k/B_k, so
    E_k - E_2 = (c_k + 24) sigma_(k-1)(n) + 24 (sigma_(k-1)(n) - sigma_1(n)) at q^n: s is the least of
    v_p(c_k + 24) (when c_k is p-integral) and v_p(24) + t, t the largest with d^(k-1) = d (mod p^t)
    for every integer d (checked on d mod p^t, a full period); for E_0 = 1 it is v_p(24).
    """
    top = 12
    v24 = _valuation(Fraction(24), p)
    if k == 0:
        return min(v24, top)
    if k < 4 or k % 2:
        return 0
    c = -2 * k / arith.bernoulli(k)
    if _valuation(c, p) < 0:
        return 0
    first = top if c + 24 == 0 else min(_valuation(c + 24, p), top)
    t = 0
    while t < top and all((pow(d, k - 1, p ** (t + 1)) - d) % p ** (t + 1) == 0 for d in range(p ** (t + 1))):
        t += 1
    return min(first, v24 + t)


def _combination(gap: int, gens: list[tuple[int, int]]) -> list[int] | None:
    """Nonnegative exponents n_g with sum n_g * weight_g = gap (None if there are none)."""
    weights = [k * e for k, e in gens]
    if gap < 0:
        return None
    if len(weights) == 1:
        return [gap // weights[0]] if gap % weights[0] == 0 else None
    w0, w1 = weights
    for n0 in range(min(gap // w0, MAX_COMBINATIONS) + 1):
        rest = gap - n0 * w0
        if rest % w1 == 0:
            return [n0, rest // w1]
    return None


def recheck_congruence(claim: Any, cert: dict[str, Any], reasons: list[str], notes: list[str]) -> None:
    """Append to ``reasons`` what does not hold up (``claim`` is a ``check._Claim``)."""
    level = claim.level
    modulus = int(cert["modulus"])
    if modulus < 2:
        reasons.append(f"modulus {modulus} is not at least 2")
        return
    n_class = cert.get("n_class")
    keep: set[int] | None = None
    if n_class is not None:
        # A claim on a class of n (docs/method.md#classes-of-n): the class must be a union of cosets of
        # the squares among the units mod m (so real characters cut it out), with the multiples of the
        # primes of m all in or all out; the difference restricted to it lies on Gamma_0(N m^2).
        m = int(n_class["modulus"])
        keep = {int(r) % m for r in n_class["residues"]}
        why = _class_problem(m, keep)
        if why is not None:
            reasons.append(why)
            return
        level = level * m * m
        if int(n_class.get("level", -1)) != level:
            reasons.append(f"level of the restricted form: certificate {n_class.get('level')}, recomputed {level}")
    if int(cert.get("level", -1)) != level:
        reasons.append(f"level: certificate {cert.get('level')}, recomputed {level}")
    index = arith.index_gamma0(level)
    if int(cert.get("index", -1)) != index:
        reasons.append(f"index of Gamma_0({level}): certificate {cert.get('index')}, recomputed {index}")
    stated = {(int(d["prime"]), int(d["exponent"])): d for d in cert.get("prime_powers", [])}
    mine = sorted(arith.factor(modulus).items())
    if sorted(stated) != mine:
        reasons.append(f"prime powers of {modulus}: certificate {sorted(stated)}, recomputed {mine}")
        return
    lifted_only = all(d.get("frobenius") is not None for d in stated.values())
    if keep is not None and lifted_only:
        reasons.append("a claim on a class of n proved with Frobenius lifts is not re-checked")
        return
    diff, ev, need = _difference(claim, stated, level, strict=not lifted_only)
    if keep is not None:
        m = int(n_class["modulus"])  # type: ignore[index]
        diff = {key: _only(s, m, keep) for key, s in diff.items()}
    listed = {(Fraction(str(q["weight"])), int(q["e2_power"]), int(q["character"])) for q in cert.get("pieces", [])}
    for (w, j, c), s in sorted(diff.items()):
        if (w + 2 * j, j, c) not in listed and not s.is_zero():
            reasons.append(
                f"the piece of weight {w + 2 * j} (E_2^{j}, character {c}) of left - right is not in the certificate"
            )
    for w, j, c in sorted(listed):
        if (w - 2 * j, j, c) not in diff:
            reasons.append(f"the certificate's piece of weight {w} (E_2^{j}, character {c}) does not occur")
    pieces = [(w, j, c, s) for (w, j, c), s in diff.items() if not s.is_zero()]
    # Direct scan: every known coefficient of left - right must be 0 mod M.
    total = plain(diff, ev.e2, need)
    for n in range(min(total.lo, need), need):
        if _residue(total[n], modulus) != 0:
            reasons.append(f"the coefficient of q^{n} of left - right is {total[n]}, not 0 mod {modulus}")
            return
    biggest = 0
    for (p, e), detail in sorted(stated.items()):
        if detail.get("frobenius") is not None:
            from verifier.recheck.frobenius import recheck_lift

            bound = recheck_lift(claim, p, e, detail, reasons, notes)
        else:
            bound = _prime_power(pieces, p, e, level, detail, reasons)
        biggest = max(biggest, bound)
    if int(cert.get("bound", -1)) != biggest:
        reasons.append(f"bound: certificate {cert.get('bound')}, recomputed {biggest}")


def _class_problem(m: int, keep: set[int]) -> str | None:
    """Why the class ``keep`` mod m is not cut out by real characters (None when it is)."""
    if m < 2:
        return f"the class's modulus {m} is not at least 2"
    units = [r for r in range(m) if math.gcd(r, m) == 1]
    rest = [r for r in range(m) if math.gcd(r, m) != 1]
    if any(r in keep for r in rest) and not all(r in keep for r in rest):
        return f"the class mod {m} takes some but not all n sharing a factor with {m}"
    squares = {s * s % m for s in units}
    for r in units:
        for s in squares:
            if (r in keep) != (r * s % m in keep):
                return (
                    f"the class mod {m} holds {r} but not {r * s % m}, a square times it: no real character cuts it out"
                )
    return None


def _only(s: Series, m: int, keep: set[int]) -> Series:
    """The series with the coefficients of q^n, n mod m outside ``keep``, set to 0."""
    coeffs = [c if (s.lo + i) % m in keep else Fraction(0) for i, c in enumerate(s.coeffs)]
    return Series(s.lo, coeffs, s.prec)


def _difference(
    claim: Any, stated: dict[tuple[int, int], dict[str, Any]], level: int, strict: bool = True
) -> tuple[Any, Any, int]:
    """The graded pieces of left - right, known far enough for every bound used (``strict``: the
    pieces must have integral weights >= 0, as steps 1-4 need; a proof by Frobenius lifts alone
    only scans left - right directly)."""
    # How far the pieces are needed: their own bounds and the stated common weights' bounds.
    probe = claim.evaluate(2)
    keys = set()
    for tree in claim.trees:
        n, d = probe.side(tree)
        if d is not None:
            raise Unsupported("a congruence between quotients")
        keys |= set(n)
    need = 1
    for w, _j, _ in keys:
        if w.denominator != 1 or w < 0:
            if strict:
                raise Unsupported("a congruence with a piece of half-integral or negative weight")
            continue
        need = max(need, arith.sturm_bound(w, level) + 1)
    for d in stated.values():
        if d.get("weight") is not None:
            at = int(d.get("e2_level", level))
            need = max(need, arith.sturm_bound(Fraction(int(d["weight"])), at) + 1)
    need = max(need, DIRECT_SCAN)
    ev = claim.evaluate(need)
    (nl, _), (nr, _) = (ev.side(t) for t in claim.trees)
    diff = g_add(nl, nr, -1)
    return diff, ev, need


def _prime_power(
    pieces: list[tuple[Fraction, int, int, Series]],
    p: int,
    e: int,
    level: int,
    detail: dict[str, Any],
    reasons: list[str],
) -> int:
    """Steps 1-4 for p^e; the bound used."""
    q = p**e
    active = []
    own = 0
    for w, j, c, s in pieces:
        b = arith.sturm_bound(w, level)
        own = max(own, b)
        if all(_residue(s[n], q) == 0 for n in range(b + 1)):
            continue
        active.append((w, j, c, s, b))
    if not active:
        if detail.get("bound") is not None and int(detail["bound"]) != own:
            reasons.append(f"mod {q}: bound: certificate {detail['bound']}, recomputed {own}")
        return own
    if len({c for _, _, c, _, _ in active}) > 1:
        reasons.append(f"mod {q}: the pieces not 0 mod {q} by themselves carry different characters")
        return 0
    # v_i: the least p-adic valuation of a coefficient of piece i, read within its own bound.
    vals_min = []
    for _, _, _, s, b in active:
        vals = [_valuation(s[n], p) for n in range(b + 1) if s[n] != 0]
        vals_min.append(min(vals) if vals else e)
    a = max(0, max(-v for v in vals_min))
    mod = p ** (a + e)
    if detail.get("weight") is None:
        reasons.append(f"mod {q}: the certificate gives no common weight for the pieces not 0 mod {q}")
        return 0
    big_k = int(detail["weight"])
    # The level of the proof: the claim's, or a multiple p^s of it when E_2 was replaced by
    # E_2(tau) - p^s E_2(p^s tau), a form of weight 2 on Gamma_0(p^s) (Diamond-Shurman, Section 1.2).
    proof_level = int(detail.get("e2_level", level))
    shift = proof_level // math.gcd(proof_level, level)
    shift_exp = 0
    while shift % p == 0:
        shift //= p
        shift_exp += 1
    if shift != 1 or proof_level % level:
        reasons.append(
            f"mod {q}: the proof's level {proof_level} is not the claim's level {level} times a power of {p}"
        )
        return 0
    big_b = arith.sturm_bound(Fraction(big_k), proof_level)
    if int(detail.get("bound", -1)) != big_b:
        reasons.append(f"mod {q}: bound of weight {big_k}: certificate {detail.get('bound')}, recomputed {big_b}")
    stop = big_b + 1
    # E_2 substitutes S = E_2 (mod p^s): (weight of S, s, series mod p^(a+e)).
    named = ""
    if proof_level != level:
        n_shift = p ** max(shift_exp, 0)
        e2 = eisenstein(2, stop)
        s_series = [e2[n] - (n_shift * e2[n // n_shift] if n % n_shift == 0 else 0) for n in range(stop)]
        sub = (2, shift_exp, [_residue(x, mod) or 0 for x in s_series])
    else:
        k_s, s_exact = (p + 1, 1) if p >= 5 else ((0, 3) if p == 2 else (0, 1))
        stated_sub = str(detail.get("e2_replaced_by") or "")
        if stated_sub == "1" or (stated_sub.startswith("E_") and stated_sub[2:].isdigit()):
            named = stated_sub  # the certificate's own substitute, its precision recomputed
            k_s = 0 if named == "1" else int(named[2:])
            s_exact = e2_precision(p, k_s)
        s_res = [1 % mod] + [0] * (stop - 1)
        if k_s:
            s_res = _residues(eisenstein(k_s, stop), stop, mod, f"E_{k_s}")
        sub = (k_s, s_exact, s_res)
    powers: dict[tuple[int, int, int], list[int]] = {}
    total = [0] * stop
    for (w, j, _, s, _), v_i in zip(active, vals_min, strict=True):
        t_i = e - v_i  # the precision the factors of the scaled piece p^a f_i need
        if j and t_i > sub[1] and named:
            reasons.append(f"mod {q}: E_2 = {named} holds only mod {p}^{sub[1]}, but this piece needs mod {p}^{t_i}")
            return big_b
        if j and t_i > sub[1]:
            raise Unsupported(f"mod {q}: E_2 is known only mod {p}^{sub[1]} here, too little for this piece")
        gens = _multipliers(p, t_i)
        k_i = int(w) + j * sub[0]
        exps = _combination(big_k - k_i, gens)
        if exps is None:
            raise Unsupported(f"mod {q}: this re-checker's multipliers do not join weight {k_i} to {big_k}")
        term = []
        for n in range(stop):
            r = _residue(s[n] * p**a, mod)
            if r is None:
                reasons.append(f"mod {q}: a piece has more than {p}^{a} in the denominator of q^{n}")
                return big_b
            term.append(r)
        for _ in range(j):
            term = _mul_mod(term, sub[2], mod)
        for (k, power), n_g in zip(gens, exps, strict=True):
            if not n_g:
                continue
            if (k, power, t_i) not in powers:
                base = _residues(eisenstein(k, stop), stop, mod, f"E_{k}")
                res = [1 % mod] + [0] * (stop - 1)
                for _ in range(power if stop > 1 else 0):
                    res = _mul_mod(res, base, mod)
                pt = p**t_i
                if [x % pt for x in res] != [1 % pt] + [0] * (stop - 1):
                    reasons.append(f"mod {q}: E_{k}^{power} is not 1 mod {pt} through q^{big_b}")
                    return big_b
                powers[(k, power, t_i)] = res
            for _ in range(n_g):
                term = _mul_mod(term, powers[(k, power, t_i)], mod)
        total = [(x + y) % mod for x, y in zip(total, term, strict=True)]
    bad = next((n for n, r in enumerate(total) if r), None)
    if bad is not None:
        reasons.append(
            f"mod {q}: the weight-{big_k} form built from left - right has coefficient {total[bad]} mod {mod} "
            f"at q^{bad}, within its bound {big_b}"
        )
    return big_b


def prime_power_of(claim: Any, p: int, e: int, detail: dict[str, Any], reasons: list[str]) -> int:
    """Steps 1-4 modulo p^e alone for the claim ``claim`` (a ``check._Claim``), after a direct scan
    of the known coefficients of left - right modulo p^e; the bound used."""
    level = claim.level
    diff, ev, need = _difference(claim, {(p, e): detail}, level)
    total = plain(diff, ev.e2, need)
    for n in range(min(total.lo, need), need):
        if _residue(total[n], p**e) != 0:
            reasons.append(f"mod {p**e}: the coefficient of q^{n} of the lifted left - right is {total[n]}")
            return 0
    pieces = [(w, j, c, s) for (w, j, c), s in diff.items() if not s.is_zero()]
    return _prime_power(pieces, p, e, level, detail, reasons)
