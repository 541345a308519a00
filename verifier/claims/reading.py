"""Recognising progression claims in the claim AST (docs/method.md#progressions).

Three shapes, each turned into :class:`verifier.claims.progression.Claim` objects:

* ``\\sum_{n \\ge 0} a(mn+t) q^n = G`` (either side), a(n) a partition-type function;
* ``a(mn+t) \\equiv 0 \\pmod M`` (with an optional range ``n \\ge s``), also for ``t`` in a listed
  set written after the claim, ``(t \\in \\{3, 5, 6\\})`` or ``\\text{for } t \\in \\{3, 5, 6\\}``
  (read by the grammar as a qualifier of the row, ``ast.Statement.residues``);
* a dissection ``F = sum_i gamma_i q^{e_i} prod f_{delta}^{s}`` in which every delta of the
  right side is divisible by a prime p that does not divide every delta of F: one claim
  per residue class modulo p (classes without terms claim 0).

Anything else returns None, and the claim goes on to the other decision procedures.
"""

from __future__ import annotations

import math
from collections.abc import Callable, Mapping
from dataclasses import dataclass
from fractions import Fraction
from typing import Any

from verifier.claims.products import Mono, NotProduct, ProductSum, Reader, partition_function
from verifier.claims.progression import Claim
from verifier.numbers import prime_factors
from verifier.parse import ast


@dataclass(frozen=True)
class Reading:
    """The progression claims one written claim stands for.

    ``dissection`` is the modulus p of a dissection (then ``claims`` has one claim per
    class t mod p, and F's own coefficients are the author's exponents), else None.
    """

    claims: tuple[Claim, ...]
    dissection: int | None = None
    left: Mono | None = None  # F, for a dissection
    right: ProductSum = ()  # the claimed sum, for a dissection
    residues: tuple[str, tuple[int, ...]] | None = None  # (t, listed values) of a residue set
    n_class: ast.NClass | None = None  # the class of n the congruence is stated on (one claim per residue)


def _linear(node: ast.Node, var: str, fixed: Mapping[str, int] | None = None) -> tuple[int, int] | None:
    """``m var + t`` as (m, t) with integers, or None; names in ``fixed`` stand for their values."""
    if isinstance(node, ast.Name) and node.text == var and node.arg is None:
        return 1, 0
    if fixed and isinstance(node, ast.Name) and node.arg is None and node.text in fixed:
        return 0, fixed[node.text]
    if isinstance(node, ast.Number):
        return 0, node.value
    if isinstance(node, ast.BinOp) and node.op in "+-":
        a, b = _linear(node.left, var, fixed), _linear(node.right, var, fixed)
        if a is None or b is None:
            return None
        sign = 1 if node.op == "+" else -1
        return a[0] + sign * b[0], a[1] + sign * b[1]
    if isinstance(node, ast.BinOp) and node.op == "*":
        a, b = _linear(node.left, var, fixed), _linear(node.right, var, fixed)
        if a is None or b is None or (a[0] and b[0]):
            return None
        return a[0] * b[1] + b[0] * a[1], a[1] * b[1]
    return None


def _term(
    node: ast.Node,
    var: str,
    products: Mapping[str, ProductSum],
    forms: Mapping[str, Any],
    fixed: Mapping[str, int] | None = None,
    start: int | None = 0,
) -> tuple[Mono, int, int, str] | None:
    """``a(m var + t)``: (generating function, m, t, spelling) when a is a partition function.

    t may be negative when the claim starts at ``var >= start`` with m start + t >= 0
    (``p(5n-1)`` for n >= 1); ``start=None`` (no range written) accepts any t, and the caller
    starts the claim at the first n with m n + t >= 0.
    """
    if not isinstance(node, ast.Call):
        return None
    gen = partition_function(node.name, products, forms)
    lin = _linear(node.argument, var, fixed)
    if gen is None or lin is None or lin[0] < 1 or (start is not None and lin[0] * max(start, 0) + lin[1] < 0):
        return None
    name = "\\overline{p}" if node.name == "\\pbar" else node.name
    m, t = lin
    inside = (f"{m}{var}" if m > 1 else var) + (f"+{t}" if t > 0 else (f"{t}" if t else ""))
    return gen, m, t, f"{name}({inside})"


def _is_q_power(node: ast.Node, var: str) -> bool:
    return (
        isinstance(node, ast.Power)
        and isinstance(node.base, ast.Name)
        and node.base.text == "q"
        and isinstance(node.exponent, ast.Name)
        and node.exponent.text == var
    )


def _generating_sum(
    node: ast.Node, products: Mapping[str, ProductSum], forms: Mapping[str, Any]
) -> tuple[Mono, int, int, str] | None:
    if not (isinstance(node, ast.BigSum) and node.kind == "at_least"):
        return None
    if not (isinstance(node.lower, ast.Number) and node.lower.value == 0):
        return None
    body = node.body
    if not (isinstance(body, ast.BinOp) and body.op == "*"):
        return None
    for call, qn in ((body.left, body.right), (body.right, body.left)):
        if _is_q_power(qn, node.var):
            return _term(call, node.var, products, forms)
    return None


def _usable(gen: Mono) -> bool:
    # a(n) = gen's coefficients; the method is set up for F = prod f^r (coefficient 1, no q-power).
    return gen.coeff == 1 and gen.shift == 0


def read(
    left: ast.Node,
    right: ast.Node,
    rel: str,
    modulus: int | None,
    start_n: int | None,
    products: Mapping[str, ProductSum],
    forms: Mapping[str, Any],
    dissection_ok: Callable[[], bool],
    residues: tuple[str, tuple[int, ...]] | None = None,
    n_class: ast.NClass | None = None,
) -> Reading | None:
    """The progression claims of ``left rel right``, or None when it is not one of the shapes.

    With ``residues = (t, values)`` only a congruence ``a(m n + t) \\equiv 0`` is read, as one
    claim per listed value of t (in the listed order).  With a class of n written after the
    claim (``(n \\equiv 4 \\pmod 5)``, ``(n \\text{ odd})``), only such a congruence is read, as
    one claim per residue of the class (:func:`class_claims`).
    """
    reader = Reader(products, forms)
    if rel == "≡" and modulus is not None and modulus > 1:
        if residues is not None and n_class is not None:
            return None
        if residues is None and not start_n and n_class is None:
            relative = _internal(left, right, modulus, products, forms)
            if relative is not None:
                return relative
        for a, b in ((left, right), (right, left)):
            if not (isinstance(b, ast.Number) and b.value == 0):
                continue
            var = _variable(a, residues[0] if residues else None)
            if var is None:
                continue
            if n_class is not None:
                term = _term(a, var, products, forms) if var == n_class.var else None
                if term is None or not _usable(term[0]):
                    return None
                gen, m, t, what = term
                return Reading(class_claims(what, dict(gen.exps), m, t, modulus, start_n, n_class), n_class=n_class)
            claims = []
            for value in residues[1] if residues else (None,):
                fixed = {residues[0]: value} if residues and value is not None else None
                term = _term(a, var, products, forms, fixed, start_n)
                if term is None or not _usable(term[0]):
                    return None
                gen, m, t, what = term
                # With no range written, the claim starts where the argument m n + t is >= 0, and
                # at n = 1 when t = 0: a(mn) at n = 0 is the constant term, which a claim for all n
                # leaves out (as a(n), r_4(n) and sigma(n) claims do, docs/method.md#claim-arithmetic).
                start = start_n if start_n is not None else (1 if t == 0 else max(0, -(t // m)))
                if start < 0 or (m == 1 and start > 0 and residues is None):
                    # a(n) = 0 mod M for n >= s > 0 is no progression: the congruence of the
                    # generating function (constant terms removed) decides it.
                    return None
                # n >= start: a(m(n' + start) + t) with n' >= 0.
                claims.append(Claim(what, dict(gen.exps), m, t + m * start, None, modulus, start))
            return Reading(tuple(claims), residues=residues)
        return None
    if residues is not None or n_class is not None:
        return None
    if rel != "=" or modulus is not None:
        return None
    for a, b in ((left, right), (right, left)):
        found = _generating_sum(a, products, forms)
        if found is None:
            continue
        gen, m, t, what = found
        if not _usable(gen):
            return None
        try:
            rhs = reader.read(b)
        except NotProduct:
            return None
        if any(mono.shift.denominator != 1 for mono in rhs):
            # A fractional power of q is no part of a power series in q: the claim is compared
            # (and refuted) as an identity of forms, with a witness at that exponent.
            return None
        return Reading((Claim(what, dict(gen.exps), m, t, rhs, None),))
    found_dissection = _dissection(reader, left, right)
    if found_dissection is None or not dissection_ok():
        return None
    return found_dissection


def class_claims(
    what: str, exps: dict[int, int], m: int, t: int, modulus: int, start_n: int | None, n_class: ast.NClass
) -> tuple[Claim, ...]:
    """``a(mn + t) = 0 (mod M)`` for the n >= s of a class, one progression claim per residue r.

    The n of the class with n = r (mod k) and n >= s are n = n0 + k n' (n' >= 0), n0 the least
    of them, and a(mn + t) = a(mk n' + m n0 + t).  A class is read on n >= 1 unless a range is
    written (as for claims on classes elsewhere, docs/method.md#classes-of-n), and never below
    the n where the argument mn + t becomes negative.
    """
    k = n_class.modulus
    s = start_n if start_n is not None else 1
    s = max(s, -(t // m))
    out = []
    for r in sorted(n_class.residues):
        n0 = s + (r - s) % k
        out.append(Claim(what, dict(exps), m * k, m * n0 + t, None, modulus, n0, k))
    return tuple(out)


def _internal(
    left: ast.Node, right: ast.Node, modulus: int, products: Mapping[str, ProductSum], forms: Mapping[str, Any]
) -> Reading | None:
    """An internal congruence ``a(mn+t) \\equiv c\\, a(n) \\pmod M`` (c an integer, possibly 1 or -1)."""
    var = _variable(left)
    term = _term(left, var, products, forms) if var else None
    if var is None or term is None or not _usable(term[0]) or term[1] < 2:
        return None
    gen, m, t, what = term
    node, sign = right, 1
    if isinstance(node, ast.Neg):
        node, sign = node.operand, -1
    coeff = 1
    if isinstance(node, ast.BinOp) and node.op == "*" and isinstance(node.left, ast.Number):
        coeff, node = node.left.value, node.right
    if not (isinstance(node, ast.Call) and isinstance(left, ast.Call) and node.name == left.name):
        return None
    if _linear(node.argument, var) != (1, 0) or coeff == 0:
        return None
    rhs = (Mono(Fraction(sign * coeff), Fraction(0), gen.exps),)
    return Reading((Claim(what, dict(gen.exps), m, t, rhs, modulus),))


def _variable(node: ast.Node, residue: str | None = None) -> str | None:
    """The running variable of ``a(m n + t)``: its one name other than the residue variable."""
    if isinstance(node, ast.Call):
        names = {n.text for n in ast.walk(node.argument) if isinstance(n, ast.Name)} - {residue}
        if len(names) == 1:
            return next(iter(names))
    return None


def _dissection(reader: Reader, left: ast.Node, right: ast.Node) -> Reading | None:
    try:
        f_side, g_side = reader.read(left), reader.read(right)
    except NotProduct:
        return None
    if len(f_side) != 1 or len(g_side) < 2 or not _usable(f_side[0]):
        return None
    f = f_side[0]
    if any(m.shift.denominator != 1 or m.shift < 0 for m in g_side):
        return None
    g = 0
    for mono in g_side:
        for d, _ in mono.exps:
            g = math.gcd(g, d)
    if g < 2:
        return None
    primes = [p for p in prime_factors(g) if any(d % p for d, _ in f.exps)]
    if not primes:
        return None
    p = primes[0]
    claims = []
    for t in range(p):
        comp = tuple(
            Mono.make(mono.coeff, (mono.shift - t) / p, {d // p: r for d, r in mono.exps})
            for mono in g_side
            if int(mono.shift) % p == t
        )
        claims.append(Claim(f"coefficient of q^({p}n+{t})", dict(f.exps), p, t, comp, None))
    assert all(c.shift.denominator == 1 for claim in claims for c in claim.rhs or ())
    return Reading(tuple(claims), p, f, g_side)


def shift_text(x: Fraction) -> str:
    """A q-shift as text."""
    return str(x.numerator) if x.denominator == 1 else f"{x.numerator}/{x.denominator}"
