"""Re-verify one certificate (see the ``certificate`` field of the JSON report).

The verdicts are ``confirmed``, ``recheck-failed`` (the certificate is wrong: what differs
is listed) and ``not-rechecked`` (the certificate uses a construct or method this checker
does not implement, or is too large for it; the reason is given).
"""

from __future__ import annotations

import hashlib
import math
from dataclasses import dataclass, field
from fractions import Fraction
from typing import Any

from verifier.recheck import arith
from verifier.recheck.atoms import TooLarge
from verifier.recheck.graded import Atoms, Evaluator, Graded, Unsupported, plain
from verifier.recheck.series import Series, Unknown
from verifier.recheck.sexpr import Malformed, parse

CONFIRMED, FAILED, NOT_RECHECKED = "confirmed", "recheck-failed", "not-rechecked"
MAX_PREC = 3000  # the largest working precision the schoolbook re-checker attempts


@dataclass
class Result:
    """The re-checker's verdict on one certificate."""

    status: str
    reasons: list[str] = field(default_factory=list)
    notes: list[str] = field(default_factory=list)

    def to_dict(self) -> dict[str, Any]:
        """The JSON form."""
        return {"status": self.status, "reasons": self.reasons, "notes": self.notes}


def _frac(x: Fraction) -> str:
    return str(x.numerator) if x.denominator == 1 else f"{x.numerator}/{x.denominator}"


def coefficient_hash(start: int, values: list[Fraction]) -> str:
    """SHA-256 of one line ``n:c`` per exponent (the certificate's convention)."""
    text = "".join(f"{n}:{_frac(c)}\n" for n, c in enumerate(values, start))
    return hashlib.sha256(text.encode()).hexdigest()


def recheck(cert: Any) -> Result:
    """Re-verify a certificate."""
    if not isinstance(cert, dict):
        return Result(FAILED, ["the certificate is not an object"])
    if cert.get("format") != 1:
        return Result(NOT_RECHECKED, [f"unknown certificate format {cert.get('format')!r}"])
    method = cert.get("method")
    try:
        if method in ("sturm", "valence"):
            return _forms(cert, method)
        if method == "expansion":
            return _expansion(cert)
        if method == "witness":
            return _witness(cert)
        if method in _BY_PARTS:
            return _by_parts(cert, method)
        if method in _REST:
            return _rest(cert, method)
    except (Unsupported, TooLarge) as exc:
        return Result(NOT_RECHECKED, [str(exc)])
    except (Malformed, KeyError, TypeError, ValueError, ZeroDivisionError, Unknown) as exc:
        return Result(FAILED, [f"the certificate cannot be read or evaluated: {type(exc).__name__}: {exc}"])
    why = _NOT_COVERED.get(str(method), "this re-checker has no independent re-check for it")
    return Result(NOT_RECHECKED, [f"the method {method!r}: {why}"])


_BY_PARTS = ("sturm-congruence", "cusp-orders", "dimension-formula")
_REST = ("computation", "linear-algebra", "u-operator", "hecke")
_NOT_COVERED: dict[str, str] = {}
_NEEDS = {"computation": "arithmetic", "linear-algebra": "instance", "u-operator": "progression", "hecke": "form"}


def _rest(cert: dict[str, Any], method: str) -> Result:
    """Values, solved unknowns, progressions, eigenforms (:mod:`.values`, ``.solved``, ``.progression``, ``.hecke``)."""
    from verifier.recheck.hecke import recheck_eigenform
    from verifier.recheck.progression import recheck_progression
    from verifier.recheck.solved import recheck_solved
    from verifier.recheck.values import recheck_values

    if not isinstance(cert.get(_NEEDS[method]), dict):
        return Result(NOT_RECHECKED, [f"the {method} certificate carries no {_NEEDS[method]!r} to re-check"])
    reasons: list[str] = []
    notes: list[str] = []
    if method == "computation":
        recheck_values(cert, reasons, notes)
    elif method == "linear-algebra":
        recheck_solved(cert, reasons, notes)
    elif method == "hecke":
        recheck_eigenform(cert, reasons, notes)
    else:
        recheck_progression(cert, reasons, notes)
    return Result(FAILED, reasons, notes) if reasons else Result(CONFIRMED, notes=notes)


def _by_parts(cert: dict[str, Any], method: str) -> Result:
    """Congruences, memberships and dimensions (:mod:`verifier.recheck.congruence`, ``.membership``)."""
    from verifier.recheck.congruence import recheck_congruence
    from verifier.recheck.membership import recheck_dimension, recheck_membership

    reasons: list[str] = []
    notes: list[str] = []
    if method == "sturm-congruence":
        if "left" not in cert:
            return Result(NOT_RECHECKED, ["the congruence certificate carries no sides"])
        recheck_congruence(_Claim(cert), cert, reasons, notes)
    elif method == "cusp-orders":
        if "form" not in cert:
            return Result(NOT_RECHECKED, ["the membership certificate carries no form (e.g. the form 0)"])
        recheck_membership(cert, reasons, notes)
    else:
        if "dimension" not in cert:
            return Result(NOT_RECHECKED, ["the dimension certificate carries no dimension"])
        recheck_dimension(cert, reasons, notes)
    return Result(FAILED, reasons, notes) if reasons else Result(CONFIRMED, notes=notes)


class _Claim:
    """The two sides of a certificate, their atoms and level."""

    def __init__(
        self, cert: dict[str, Any] | None = None, trees: list[Any] | None = None, series: bool = False
    ) -> None:
        """``series``: accept the certificate's series-only products (methods that compare coefficients only)."""
        if trees is None:
            assert cert is not None
            trees = [parse(str(cert[s]["expr"])) for s in ("left", "right")]
        self.trees = trees
        defs = cert.get("series") if series and cert is not None else None
        self.atoms = Atoms(defs if isinstance(defs, dict) else None)
        found: list[Any] = []
        for t in self.trees:
            self.atoms.walk(t, found)
        self.atom_list = found
        level = 1
        for a in found:
            n = self.atoms.level(a)
            level = level * n // math.gcd(level, n)
        if any(self.atoms.weight(a).denominator == 2 for a in found) and level % 4:
            level = level * 4 // math.gcd(level, 4)
        self.level = level

    def evaluate(self, prec: int) -> Evaluator:
        if prec > MAX_PREC:
            raise TooLarge(f"it needs {prec} coefficients, more than the re-checker's {MAX_PREC}")
        return Evaluator(self.atoms, self.level, prec)

    def laurent(self, which: int, stop: int) -> Series:
        """A side's q-expansion known below q^stop."""
        work = max(stop, 1)
        for _ in range(8):
            ev = self.evaluate(work)
            n, d = ev.side(self.trees[which])
            s = plain(n, ev.e2, work)
            if d is not None:
                den = plain(d, ev.e2, work)
                if den.is_zero():  # its first nonzero term lies beyond the working precision
                    work *= 2
                    continue
                s = s / den
            if s.prec >= stop:
                return s
            work += stop - s.prec
        raise TooLarge(f"the expansion did not reach q^{stop - 1}")


def side_series(tree: Any, stop: int) -> Series:
    """The q-expansion of one expression tree, known below q^stop."""
    return _Claim(trees=[tree]).laurent(0, stop)


def _check_coefficients(claim: _Claim, cert: dict[str, Any], reasons: list[str], both: bool = True) -> None:
    rec = cert.get("coefficients")
    if rec is None:
        return
    start, end = int(rec["from"]), int(rec["to"])
    left = claim.laurent(0, end + 1)
    values = left.window(start, end + 1)
    if left.lo < start:
        reasons.append(f"the left side has a nonzero coefficient at q^{left.lo}, below the compared range")
    if both:
        right = claim.laurent(1, end + 1)
        for n in range(start, end + 1):
            if left[n] != right[n]:
                reasons.append(f"coefficients of q^{n} differ: left {_frac(left[n])}, right {_frac(right[n])}")
                break
        if right.lo < start:
            reasons.append(f"the right side has a nonzero coefficient at q^{right.lo}, below the compared range")
    listed = rec.get("values")
    if listed is not None:
        for n, (mine, theirs) in enumerate(zip(values, listed, strict=False), start):
            if Fraction(str(theirs)) != mine:
                reasons.append(f"coefficient of q^{n}: certificate {theirs}, recomputed {_frac(mine)}")
        if len(listed) != len(values):
            reasons.append(f"the certificate lists {len(listed)} coefficients for q^{start}..q^{end}")
    digest = coefficient_hash(start, values)
    if digest != rec.get("sha256"):
        reasons.append("the hash of the compared coefficients differs from the recomputed one")


def _expansion(cert: dict[str, Any]) -> Result:
    claim = _Claim(cert, series=True)
    reasons: list[str] = []
    truncs = [cert[s].get("truncation") for s in ("left", "right")]
    stops = [int(t) for t in truncs if t is not None]
    if not stops:
        return Result(FAILED, ["an expansion proof needs a printed side that ends (\\cdots or O(q^n))"])
    rec = cert.get("coefficients")
    if not isinstance(rec, dict):
        return Result(FAILED, ["an expansion certificate lists no coefficients"])
    if int(rec["to"]) + 1 != min(stops):
        reasons.append(
            f"the compared range ends at q^{rec['to']}, but the printed side claims up to q^{min(stops) - 1}"
        )
    if int(rec["from"]) > 0:
        reasons.append(f"the compared range starts at q^{rec['from']}, after q^0")
    _check_coefficients(claim, cert, reasons)
    return Result(FAILED, reasons) if reasons else Result(CONFIRMED)


def _witness(cert: dict[str, Any]) -> Result:
    claim = _Claim(cert, series=True)
    w = cert["witness"]
    n = int(w["n"])
    left, right = claim.laurent(0, n + 1)[n], claim.laurent(1, n + 1)[n]
    reasons = []
    if left == right:
        reasons.append(f"both sides have the coefficient {_frac(left)} at q^{n}: no difference there")
    for name, mine in (("left", left), ("right", right)):
        if Fraction(str(w[name])) != mine:
            reasons.append(f"{name} coefficient of q^{n}: certificate {w[name]}, recomputed {_frac(mine)}")
    return Result(FAILED, reasons) if reasons else Result(CONFIRMED)


def _orders(tree: Any, atoms: Atoms, level: int, c: int) -> tuple[Fraction, Fraction]:
    """Lower bounds for the orders at the cusps a/c of a side's numerator and denominator."""
    if isinstance(tree, Fraction):
        return Fraction(0), Fraction(0)
    head, args = tree[0], tree[1:]
    if head in ("E", "Delta", "eta", "theta", "Echar"):
        return atoms.order_at(tree, level, c), Fraction(0)
    if head in ("+", "-"):
        (na, da), (nb, db) = (_orders(a, atoms, level, c) for a in args)
        return min(na + db, nb + da), da + db
    if head == "*":
        (na, da), (nb, db) = (_orders(a, atoms, level, c) for a in args)
        return na + nb, da + db
    if head == "/":
        (na, da), (nb, db) = (_orders(a, atoms, level, c) for a in args)
        return na + db, da + nb
    if head == "^":
        n, d = _orders(args[0], atoms, level, c)
        e = int(args[1])
        return (n * e, d * e) if e >= 0 else (d * -e, n * -e)
    raise Unsupported(f"no order bound for {head} at a cusp")


def _forms(cert: dict[str, Any], method: str) -> Result:
    claim = _Claim(cert)
    atoms, level = claim.atoms, claim.level
    reasons: list[str] = []
    notes: list[str] = []
    space = cert.get("space") or {}
    if int(space.get("level", -1)) != level:
        reasons.append(f"level: certificate {space.get('level')}, recomputed {level}")
    m = arith.index_gamma0(level)
    if int(cert.get("index", -1)) != m:
        reasons.append(f"index of Gamma_0({level}): certificate {cert.get('index')}, recomputed {m}")
    # Lower bounds of the orders at the cusps other than infinity (c = level is infinity).
    cusp_bounds: dict[int, Fraction] = {}
    holomorphic = all(atoms.order_at(a, level, c) >= 0 for a in claim.atom_list for c in arith.divisors(level))
    if not holomorphic:
        # Poles at cusps other than infinity: bound the orders of the cleared difference.
        if atoms.has_e2 or atoms.has_deriv:
            raise Unsupported("E_2 or derivatives together with forms that have poles at cusps")
        for c in arith.divisors(level):
            if c == level:
                continue
            (nl, dl), (nr, dr) = (_orders(t, atoms, level, c) for t in claim.trees)
            cusp_bounds[c] = min(nl + dr, nr + dl)
    poles = any(v < 0 for v in cusp_bounds.values())
    if poles != (method == "valence"):
        reasons.append(
            f"method: certificate {method}, but the orders at the cusps "
            f"{'include' if poles else 'exclude'} poles, so the proof is by "
            f"{'the valence formula' if poles else 'the Sturm bound'}"
        )

    def required(w: Fraction) -> int:
        if not poles:
            return arith.sturm_bound(w, level)
        total = w * m / 12
        for c, v in cusp_bounds.items():
            total -= v * arith.totient(math.gcd(c, level // c))
        return math.floor(total)

    if poles:
        stated = {int(k): Fraction(str(v)) for k, v in (cert.get("cusp_order_bounds") or {}).items()}
        for c, v in cusp_bounds.items():
            if c in stated and stated[c] > v:
                reasons.append(f"order bound at the cusps 1/{c}: certificate {_frac(stated[c])}, recomputed {_frac(v)}")
    # The cleared difference P = N_L D_R - N_R D_L, by pieces, known far enough.
    work = int(cert.get("bound", 0)) + 2
    for _ in range(8):
        ev = claim.evaluate(work)
        (n_l, d_l), (n_r, d_r) = ev.side(claim.trees[0]), ev.side(claim.trees[1])
        p = _cleared(n_l, d_l, n_r, d_r)
        need = max((required(w) + 1 for (w, _, _) in p), default=0)
        known = min((s.prec for s in p.values()), default=work)
        if known >= need:
            break
        work += need - known
    else:
        raise TooLarge("the cleared difference did not reach its bound")
    for den, name in ((d_l, "left"), (d_r, "right")):
        if den is not None and plain(den, ev.e2, work).is_zero():
            reasons.append(f"the {name} denominator is not shown to be nonzero")
    stated_pieces = {
        (Fraction(str(q["weight"])), int(q["e2_power"]), int(q["character"])): q for q in cert.get("pieces", [])
    }
    top = max((w for (w, _, _) in p), default=Fraction(0))
    top_chars = sorted({c for (w, _, c) in p if w == top})
    # The certificate's bound is the largest over the pieces it lists; a piece it does not list
    # must vanish through its own bound (checked below), and then needs no place in it.
    biggest: int | None = None
    for (w, j, c), s in sorted(p.items(), key=lambda kv: (kv[0][0], -kv[0][1], kv[0][2])):
        b = required(w)
        if (w, j, c) in stated_pieces or not s.is_zero():
            biggest = b if biggest is None else max(biggest, b)
        if not s.is_zero() and s.lo <= b:
            reasons.append(
                f"the weight-{_frac(w)} part (E_2^{j}, character {c}) of the cleared difference has the "
                f"coefficient {_frac(s[s.lo])} at q^{s.lo}, within its bound {b}"
            )
        q = stated_pieces.get((w, j, c))
        if q is None:
            same = [k for k in stated_pieces if k[0] == w and k[1] == j]
            if same:
                reasons.append(
                    f"character of the weight-{_frac(w)} piece (E_2^{j}): certificate "
                    f"{', '.join(str(k[2]) for k in same)}, recomputed {c}"
                )
            else:
                notes.append(f"the weight-{_frac(w)} piece (E_2^{j}, character {c}) is not listed; checked to {b}")
        elif int(q["bound"]) != b:
            reasons.append(f"bound of the weight-{_frac(w)} piece (E_2^{j}): certificate {q['bound']}, recomputed {b}")
    if biggest is not None and int(cert.get("bound", -1)) != biggest:
        reasons.append(f"bound: certificate {cert.get('bound')}, recomputed {biggest}")
    stated_chars = space.get("character")
    stated_list = sorted(stated_chars) if isinstance(stated_chars, list) else [stated_chars]
    if p and stated_list != top_chars:
        reasons.append(f"character: certificate {stated_chars}, recomputed {top_chars}")
    weight = _claim_weight(claim, ev)
    if weight is not None and str(space.get("weight")) != _frac(weight):
        reasons.append(f"weight: certificate {space.get('weight')}, recomputed {_frac(weight)}")
    _check_coefficients(claim, cert, reasons, both=False)
    return Result(FAILED, reasons, notes) if reasons else Result(CONFIRMED, notes=notes)


def _cleared(nl: Graded, dl: Graded | None, nr: Graded, dr: Graded | None) -> Graded:
    from verifier.recheck.graded import _times, g_add

    return g_add(_times(nl, dr), _times(nr, dl), -1)


def _side_weight(n: Graded, d: Graded | None) -> Fraction | None:
    nonzero = [w + 2 * j for (w, j, _), s in n.items() if not s.is_zero()]
    if not nonzero:
        return None
    den = max((w + 2 * j for (w, j, _) in d), default=Fraction(0)) if d is not None else Fraction(0)
    return max(nonzero) - den


def _claim_weight(claim: _Claim, ev: Evaluator) -> Fraction | None:
    for tree in claim.trees:
        w = _side_weight(*ev.side(tree))
        if w is not None:
            return w
    return None
