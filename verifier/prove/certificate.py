"""Certificates as data: what a second program needs to re-verify a proved claim.

A certificate is a JSON object attached to every ``proved`` claim (``certificate`` in the
JSON report).  It restates the claim in a small expression language and lists the facts
the proof rests on, so that ``qreferee recheck`` (:mod:`verifier.recheck`, an independent
implementation) can confirm it without the manuscript.

Fields (``format`` 1):

* ``format``: 1; ``method``: ``sturm``, ``valence``, ``expansion``, ``witness``, or the
  method of a proof the re-checker does not cover (``cusp-orders``, ...);
* ``relation``: ``=`` or ``!=``;
* ``left``, ``right``: ``{"expr": S, "truncation": t}`` with S an expression (below) and t
  the exclusive end of the exponents a printed side claims (null: exact);
* ``exponent_unit``: the claim was rescaled (tau -> T tau, and the nome): the author's
  exponent is the certificate's exponent divided by this rational;
* ``space``: ``{"weight", "level", "character", "proof_weight", "cleared_weight"}``;
  ``character`` is the kernel D of the quadratic character n -> (D/n) (1: trivial), or
  the list of kernels when pieces of the top weight carry several;
* ``pieces``: one per (weight, power of E_2, character) of the cleared difference
  ``N_L D_R - N_R D_L``: ``{"weight", "e2_power", "character", "bound", "from"}``;
  ``weight`` is that of the modular coefficient of ``E_2^e2_power``;
* ``bound``: the largest exponent compared; ``index``: [SL_2(Z) : Gamma_0(level)];
  ``cusp_order_bounds`` (valence only): lower bounds of the orders at the cusps c/d,
  keyed by d;
* ``coefficients``: ``{"side": "left", "from": a, "to": b, "sha256": h, "values": [...]}``:
  the left side's coefficients of q^a .. q^b; h is the SHA-256 of the UTF-8 text made of
  one line ``n:c`` per exponent (c as ``p`` or ``p/q``, lowest terms); ``values`` lists
  them when there are at most :data:`MAX_LISTED`;
* ``witness`` (method ``witness``): ``{"n", "left", "right"}``, the exponent (in the
  certificate's exponents) and the two different exact values there;
* ``sturm-congruence`` (a congruence ``left = right (mod modulus)`` for every n, proved piece by
  piece modulo each prime power): ``left``, ``right`` (the generating functions), ``modulus``,
  ``level``, ``index``, ``pieces`` (``{"weight", "e2_power", "character"}`` of each piece of
  ``left - right``, numbered from 0) and ``prime_powers``: per prime power p^e, what the proof
  used (``vanishing_pieces`` with their own bounds, ``scaled_by`` p^a, ``e2_replaced_by``,
  ``multipliers`` per piece, the common ``weight`` and its ``bound``);
* ``cusp-orders`` (``f in M_k`` or ``S_k``): ``form`` (``{"expr"}``), ``space`` (``{"weight",
  "level", "character", "cusp_forms", "group"}``), ``form_level`` (the least level found for
  the form) and ``cusp_order_bounds`` (lower bounds of the orders at the cusps c/d, keyed by d);
* ``dimension-formula``: ``space`` (``{"weight", "level", "cusp_forms"}``), the ``dimension``
  and the facts of the formula: ``index``, ``elliptic_points`` ([e_2, e_3]), ``cusps``,
  ``genus``;
* ``computation`` (a value ``tau(5) = 4830``, a congruence at a value, or a ``!=`` for all n
  shown by one n): ``relation`` (``=`` or ``!=``), ``modulus`` (congruences only) and
  ``arithmetic``: ``{"left": T, "right": T, "variable", "n", "left_value", "right_value"}``,
  T the sides in the arithmetic language below, ``variable`` the free variable (null: none) and
  ``n`` its value, and the two exact values computed;
* ``linear-algebra`` (``solve=``): ``unknowns``, ``solution`` (one value per unknown, as text),
  ``unique``, ``instance`` (the certificate of the claim with the solution put in, method
  ``sturm`` or ``valence``) and ``family``: ``{"zero": {"left", "right"}, "units": [...]}``, the
  sides with every unknown 0 and with one unknown 1 and the others 0 (side records);
* ``u-operator`` (progressions; docs/method.md#progressions): the ``progression`` object, each
  class (the object itself, or every entry of its ``components`` for a dissection or a list
  of residues) with, besides its documented fields, ``product`` (``[[delta, r], ...]``,
  F = prod f_delta^r), ``multiplier_exponents`` and ``form_exponents`` (E and h as
  ``[[delta, u], ...]`` of eta(delta tau)^u), ``character_kernel``, ``e`` (the order of h at
  infinity), ``claimed_t`` (t as the author wrote it, before reduction mod m) and ``terms``
  (the claimed side: ``[{"coeff", "shift", "product"}]``, or null for a congruence to 0);
* ``hecke`` (``f`` is a normalised eigenform; docs/method.md#claim-eigenform): ``form``
  (``{"expr"}``), ``space`` (``{"weight", "level", "character"}``, ``character`` the kernel D of
  the quadratic character), ``bound`` (the Sturm bound B of that space: each ``T_p f`` was compared
  with ``a_p f`` on ``a_0 .. a_B``), ``prime_bound`` (R, the bound of the Sturm space at level 2N:
  every prime ``p <= R`` was checked) and ``eigenvalues`` (``[[p, a_p], ...]``, a_p as text);
* ``sturm-congruence`` prime powers proved after the Frobenius lift carry, inside ``frobenius``,
  ``left_expr`` and ``right_expr``: the lifted sides as expressions (below);
* ``series`` (any certificate of :func:`make` whose sides contain series-only products, e.g. a
  method ``expansion`` or ``witness``): ``{digest: {"product": {"period", "values", "finite",
  "constant"}}}`` defining each ``(series digest d)`` atom that is a product (see
  :func:`series_definitions`);
* ``sturm``/``valence`` certificates carry ``space``, ``pieces``, ``bound``, ``index`` (and
  ``cusp_order_bounds``) and ``coefficients``; ``expansion`` carries ``coefficients``;
  other methods (values, ``solve=``, progressions) carry only ``method``, ``kind``, ``space_used`` and ``bound``.

Expressions (S-expressions, written as text):

====================================  ==============================================
``7``, ``-3/5``                       a rational constant
``(q n)``                             q^n (n an integer, after rescaling)
``(E k d)``                           E_k(d tau), k even (E_2 included)
``(Delta d)``                         Delta(d tau)
``(eta (d1 r1) (d2 r2) ...)``         prod eta(d_i tau)^(r_i)
``(theta d ((a b ..) (c d ..) ..))``  theta series of the even Gram matrix at d tau
``(Echar k psi phi d)``               Eisenstein series with characters (psi, phi)
``(utheta psi nu d)``                 sum_{n in Z} psi(n) n^nu q^{d n^2}, psi a kernel
``(series h d)``                      a series-only atom at d tau (h: digest, see ``series``)
``(+ a b)`` ``(- a b)`` ``(* a b)``   sum, difference, product
``(/ a b)`` ``(^ a n)``               quotient, integer power
``(D a)``                             q d/dq
``(T n a)`` ``(U n a)``               Hecke operators
====================================  ==============================================

Arithmetic expressions (``computation`` certificates) use the same syntax:

====================================  ==============================================
``7``, ``-3/5``; ``(var n)``          a constant; a variable
``(+ a b)`` ``(- a b)`` ``(* a b)``   sum, difference, product
``(/ a b)`` ``(^ a b)``               quotient, power (b an expression)
``(sigma k x)`` ``(tau x)``           sigma_k(x), Ramanujan's tau(x)
``(r s x)`` ``(rQ ((a b ..) ..) x)``  sums of s squares; representations by x^T A x / 2
``(p x)`` ``(pbar x)``                partitions, overpartitions
``(phi x)`` ``(mu x)`` ``(chi D x)``  Euler's phi, Moebius mu, the Kronecker symbol (D/x)
``(coef F x)``                        the coefficient of q^x in F (a form expression above)
``(sum-range v lo hi body)``          sum of body for v = lo .. hi
``(sum-divisors v x body)``           sum of body over the positive divisors v of x
====================================  ==============================================
"""

from __future__ import annotations

import hashlib
from collections.abc import Iterable
from fractions import Fraction
from typing import Any

from verifier.arith import terms as t
from verifier.elaborate import ir
from verifier.prove.outcome import frac_str

FORMAT = 1
MAX_LISTED = 40
# Methods whose certificates :mod:`verifier.recheck` re-verifies.
CHECKABLE = frozenset(
    {
        "sturm",
        "valence",
        "expansion",
        "witness",
        "sturm-congruence",
        "cusp-orders",
        "dimension-formula",
        "computation",
        "linear-algebra",
        "u-operator",
        "hecke",
    }
)


def sexpr(expr: ir.Expr) -> str:
    """The canonical reading of a typed expression in the certificate language."""
    if isinstance(expr, ir.Const):
        return frac_str(expr.value)
    if isinstance(expr, ir.QPower):
        return f"(q {frac_str(expr.exponent)})"
    if isinstance(expr, ir.Atom):
        return _atom(expr)
    if isinstance(expr, ir.Shift):
        assert expr.base is not None
        return f"(* (q {frac_str(expr.exponent)}) {sexpr(expr.base)})"
    if isinstance(expr, ir.Sum):
        assert expr.left is not None and expr.right is not None
        return f"({'+' if expr.sign > 0 else '-'} {sexpr(expr.left)} {sexpr(expr.right)})"
    if isinstance(expr, ir.Product | ir.Quotient):
        assert expr.left is not None and expr.right is not None
        op = "*" if isinstance(expr, ir.Product) else "/"
        return f"({op} {sexpr(expr.left)} {sexpr(expr.right)})"
    if isinstance(expr, ir.Power):
        assert expr.base is not None
        return f"(^ {sexpr(expr.base)} {expr.exponent})"
    if isinstance(expr, ir.Deriv):
        assert expr.base is not None
        return f"(D {sexpr(expr.base)})"
    if isinstance(expr, ir.Hecke):
        assert expr.base is not None
        return f"({expr.kind} {expr.n} {sexpr(expr.base)})"
    raise TypeError(f"no certificate spelling for {type(expr).__name__}")


def _atom(atom: ir.Atom) -> str:
    scale = frac_str(Fraction(atom.scale))
    if atom.key == "eta":
        pairs = " ".join(f"({frac_str(Fraction(d) * Fraction(atom.scale))} {r})" for d, r in atom.params)
        return f"(eta {pairs})"
    if atom.key == "Delta":
        return f"(Delta {scale})"
    if atom.key == "theta":
        rows = " ".join("(" + " ".join(str(int(x)) for x in row) + ")" for row in atom.params[0])
        return f"(theta {scale} ({rows}))"
    if atom.key == "Echar":
        k, psi, phi = atom.params
        return f"(Echar {k} {psi} {phi} {scale})"
    if atom.key == "utheta":
        kernel, nu = atom.params
        return f"(utheta {kernel} {nu} {scale})"
    if atom.key.startswith("E"):
        return f"(E {atom.key[1:]} {scale})"
    if atom.key == "series":
        # A product or sum that is no modular form: named by a digest of the author's text; the
        # certificate's ``series`` field defines the products among them (:func:`series_definitions`).
        return f"(series {_series_digest(atom)} {scale})"
    raise TypeError(f"no certificate spelling for the atom {atom.key}")


def _series_digest(atom: ir.Atom) -> str:
    return hashlib.sha256(repr((atom.text, atom.params)).encode("utf-8")).hexdigest()[:12]


def series_definitions(*exprs: ir.Expr) -> dict[str, Any]:
    """``{digest: {"product": {"period", "values", "finite", "constant"}}}`` for the series-only
    products among the atoms: ``constant * prod_{n>=1} (1 - q^n)^c(n)`` with
    ``c(n) = values[(n-1) % period] + finite[n]`` (``finite`` as ``[[n, c], ...]``; period 0: no
    periodic part).  Other series-only atoms (sums over Z, coefficient lists) are not defined here."""
    out: dict[str, Any] = {}
    for expr in exprs:
        for atom in ir.atoms_of(expr):
            if atom.key != "series" or not atom.params or atom.params[0] != "prod":
                continue
            _, period, values, finite, constant = atom.params
            out[_series_digest(atom)] = {
                "product": {
                    "period": int(period),
                    "values": [int(v) for v in values],
                    "finite": [[int(n), int(c)] for n, c in finite],
                    "constant": frac_str(Fraction(constant)),
                }
            }
    return out


def arith_sexpr(e: t.A) -> str:
    """An arithmetic expression in the certificate language (table above)."""
    if isinstance(e, t.Num):
        return frac_str(e.value)
    if isinstance(e, t.Var):
        return f"(var {e.name})"
    if isinstance(e, t.Bin):
        return f"({e.op} {arith_sexpr(e.left)} {arith_sexpr(e.right)})"
    if isinstance(e, t.Pow):
        return f"(^ {arith_sexpr(e.base)} {arith_sexpr(e.exponent)})"
    if isinstance(e, t.Sum):
        if e.kind == "divides":
            return f"(sum-divisors {e.var} {arith_sexpr(e.lower)} {arith_sexpr(e.body)})"
        assert e.upper is not None
        return f"(sum-range {e.var} {arith_sexpr(e.lower)} {arith_sexpr(e.upper)} {arith_sexpr(e.body)})"
    if isinstance(e, t.Fun):
        arg = arith_sexpr(e.arg)
        if e.name in ("sigma", "r", "chi"):
            return f"({e.name} {e.index} {arg})"
        if e.name == "rQ":
            rows = " ".join("(" + " ".join(str(int(x)) for x in row) + ")" for row in e.form.gram)
            return f"(rQ ({rows}) {arg})"
        if e.name == "coef":
            return f"(coef {sexpr(e.form)} {arg})"
        return f"({e.name} {arg})"
    raise TypeError(f"no certificate spelling for {type(e).__name__}")


def values(
    left: t.A,
    right: t.A,
    relation: str,
    variable: str | None,
    n: int | None,
    left_value: Fraction,
    right_value: Fraction,
    kind: str,
    modulus: int | None,
) -> dict[str, Any]:
    """The certificate of a claim decided by computing both sides at one n (method ``computation``)."""
    try:
        spelled = arith_sexpr(left), arith_sexpr(right)
    except TypeError:  # a construct with no spelling: the re-checker will say it is not re-checked
        return minimal("computation", kind, None, None)
    cert: dict[str, Any] = {
        "format": FORMAT,
        "method": "computation",
        "kind": kind,
        "space_used": None,
        "bound": None,
        "relation": "!=" if relation == "!=" else "=",
        "arithmetic": {
            "left": spelled[0],
            "right": spelled[1],
            "variable": variable,
            "n": n,
            "left_value": frac_str(left_value),
            "right_value": frac_str(right_value),
        },
    }
    if modulus is not None:
        cert["modulus"] = modulus
    return cert


def coefficient_lines(coefficients: Iterable[tuple[int, Fraction]]) -> str:
    """The text hashed by a certificate: one line ``n:c`` per exponent."""
    return "".join(f"{n}:{frac_str(Fraction(c))}\n" for n, c in coefficients)


def coefficient_record(start: int, values: list[Fraction], side: str = "left") -> dict[str, Any]:
    """The ``coefficients`` entry for the values of q^start, q^(start+1), ..."""
    pairs = list(enumerate(values, start))
    record: dict[str, Any] = {
        "side": side,
        "from": start,
        "to": start + len(values) - 1,
        "sha256": hashlib.sha256(coefficient_lines(pairs).encode()).hexdigest(),
    }
    if len(values) <= MAX_LISTED:
        record["values"] = [frac_str(Fraction(v)) for v in values]
    return record


def side_record(side: ir.Side) -> dict[str, Any]:
    """``{"expr", "truncation"}`` of one side (rescaled exponents)."""
    return {"expr": sexpr(side.expr), "truncation": side.truncation}


def make(
    method: str,
    relation: str,
    left: ir.Side,
    right: ir.Side,
    unit: Fraction,
    **fields: Any,
) -> dict[str, Any]:
    """A certificate for a claim between two sides."""
    cert: dict[str, Any] = {
        "format": FORMAT,
        "method": method,
        "relation": relation,
        "left": side_record(left),
        "right": side_record(right),
        "exponent_unit": frac_str(unit),
    }
    cert.update(fields)
    defined = series_definitions(left.expr, right.expr)
    if defined:
        cert["series"] = defined
    return cert


def minimal(method: str | None, kind: str, space: dict[str, Any] | None, bound: int | None) -> dict[str, Any]:
    """The certificate of a proof outside the re-checker's reach: what was used, no sides."""
    return {"format": FORMAT, "method": method or kind, "kind": kind, "space_used": space, "bound": bound}


def congruence(
    left: ir.Side,
    right: ir.Side,
    modulus: int,
    level: int,
    index: int,
    bound: int | None,
    pieces: list[tuple[Fraction, int, int]],
    prime_powers: list[dict[str, Any]],
    n_class: dict[str, Any] | None = None,
) -> dict[str, Any]:
    """The certificate of a congruence proved modulo each prime power (method ``sturm-congruence``).

    ``n_class`` (``{modulus, residues, level}``), for a claim on a class of n: the pieces were restricted
    to the class, on the level given there, which is also ``level`` (docs/method.md#classes-of-n).
    """
    restricted = {} if n_class is None else {"n_class": n_class}
    return {
        "format": FORMAT,
        "method": "sturm-congruence",
        "kind": "congruence",
        "space_used": None,
        "relation": "=",
        "left": side_record(left),
        "right": side_record(right),
        "modulus": modulus,
        "level": level,
        "index": index,
        "bound": bound,
        "pieces": [{"weight": frac_str(w), "e2_power": j, "character": k} for w, j, k in pieces],
        "prime_powers": [_with_lifted_sides(d, left, right) for d in prime_powers],
        **restricted,
    }


def _with_lifted_sides(detail: dict[str, Any], left: ir.Side, right: ir.Side) -> dict[str, Any]:
    """A prime power's record, with the sides lifted by Frobenius spelled out when the proof used them."""
    from verifier.prove.frobenius import lift_side

    frob = detail.get("frobenius")
    if not isinstance(frob, dict):
        return detail
    p, e = int(detail["prime"]), int(detail["exponent"])
    # Sides that lift to the same series ("same") need not lift to holomorphic forms.
    lifted = [lift_side(s.expr, p, e, holomorphic=not frob.get("same")) for s in (left, right)]
    if any(x is None for x in lifted):
        return detail
    spelled = {"left_expr": sexpr(lifted[0]), "right_expr": sexpr(lifted[1])}  # type: ignore[arg-type]
    return {**detail, "frobenius": {**frob, **spelled}}


def membership(
    side: ir.Side,
    space_used: dict[str, Any],
    space: dict[str, Any],
    form_level: int,
    bounds: dict[int, Fraction],
) -> dict[str, Any]:
    """The certificate of ``f in M_k`` or ``S_k`` (method ``cusp-orders``)."""
    return {
        "format": FORMAT,
        "method": "cusp-orders",
        "kind": "membership",
        "space_used": space_used,
        "bound": None,
        "form": {"expr": sexpr(side.expr)},
        "space": space,
        "form_level": form_level,
        "cusp_order_bounds": {str(d): frac_str(v) for d, v in sorted(bounds.items())},
    }


def eigenform(
    side: ir.Side,
    space_used: dict[str, Any],
    weight: int,
    level: int,
    kernel: int,
    bound: int,
    prime_bound: int,
    eigenvalues: Iterable[tuple[int, Fraction]],
) -> dict[str, Any]:
    """The certificate of ``f is a normalised eigenform`` (method ``hecke``)."""
    return {
        "format": FORMAT,
        "method": "hecke",
        "kind": "eigenform",
        "space_used": space_used,
        "bound": bound,
        "form": {"expr": sexpr(side.expr)},
        "space": {"weight": weight, "level": level, "character": kernel},
        "prime_bound": prime_bound,
        "eigenvalues": [[p, frac_str(Fraction(a))] for p, a in eigenvalues],
    }


def dimension(space_used: dict[str, Any], space: dict[str, Any], dim: int, facts: dict[str, Any]) -> dict[str, Any]:
    """The certificate of ``dim M_k = d`` (method ``dimension-formula``)."""
    return {
        "format": FORMAT,
        "method": "dimension-formula",
        "kind": "dimension",
        "space_used": space_used,
        "bound": None,
        "space": space,
        "dimension": dim,
        **facts,
    }
