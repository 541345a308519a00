"""Generating functions of arithmetic expressions (docs/method.md#generating-functions).

``generating_function(e, "n")`` returns a typed form expression G with
``G = sum_{n >= 0} e(n) q^n`` exactly (the constant term is e(0) under the conventions
of :mod:`verifier.arith.values`), or raises :class:`Untranslatable` with the reason.
G is quasimodular of mixed weight; proofs split it by weight and E_2-power (docs/method.md#quasimodular).

Translations (each one exact):
* sigma_k(n/d), k odd: (B_{k+1} / (2(k+1))) (1 - E_{k+1}(d tau));
* tau(n/d) -> Delta(d tau); r_s(n/d) -> theta(d tau)^s; r_Q(n) -> Theta_Q; a_F(n/d) -> F(d tau);
* n^j e(n) -> D^j G (D = q d/dq);
* sum_{m=L}^{n-c} m^a n^e X(m) Y(n-m) -> D^e( D^a G_X^{>=L} * G_Y^{>=c} ) (convolutions, L, c in {0, 1});
* sum_{d | n} (-1)^{alpha n + beta d + gamma n/d} d^a (n/d)^b: split by the parities of d and n/d
  into S(n), S(n/2), S(n/4) with S(n) = sum_{d|n} d^a (n/d)^b = n^min(a,b) sigma_|a-b|(n).
* sum_{d | n} psi(n/d) phi(d) d^a (n/d)^b with quadratic characters of fundamental
  discriminants -> D^min(a,b) of (E_k^{psi,phi} - constant)/2 (docs/method.md#eisenstein-characters).
Pointwise products of two arithmetic functions, sigma_k with k even, p(n), phi, mu and
progressions a(Mn + r) have no translation here: such claims are decided only by direct values.
"""

from __future__ import annotations

from dataclasses import dataclass
from fractions import Fraction
from typing import Any

from verifier.arith import terms as t
from verifier.arith.values import NotEvaluable, Values
from verifier.elaborate import ir
from verifier.elaborate.rescale import rescale_expr
from verifier.forms.eisenstein import bernoulli
from verifier.forms.registry import eta_params

MAX_POWER = 12


class Untranslatable(Exception):
    """No modular generating function is known for this expression."""


# -- building typed expressions ---------------------------------------------------------
def const(c: Fraction) -> ir.Expr:
    """A rational constant."""
    return ir.Const(ir.Typ(Fraction(0) if c else None), str(c), Fraction(c))


def add(a: ir.Expr, b: ir.Expr, sign: int = 1) -> ir.Expr:
    """``a + sign b`` (weights may differ: the result is marked mixed)."""
    wa, wb = a.typ.weight, b.typ.weight
    weights = [w for w in (wa, wb) if w is not None]
    mixed = a.typ.mixed or b.typ.mixed or (wa is not None and wb is not None and wa != wb)
    typ = ir.Typ(
        max(weights, default=None),
        max(a.typ.depth, b.typ.depth),
        1,
        a.typ.den_weight + b.typ.den_weight,
        False,
        False,
        mixed,
    )
    return ir.Sum(typ, f"{a.text} {'+' if sign > 0 else '-'} {b.text}", a, b, sign)


def add_all(pieces: list[ir.Expr]) -> ir.Expr:
    """The sum of ``pieces``, added pairwise so that a long sum gives a shallow tree."""
    assert pieces
    while len(pieces) > 1:
        pieces = [add(pieces[i], pieces[i + 1]) for i in range(0, len(pieces) - 1, 2)] + (
            [pieces[-1]] if len(pieces) % 2 else []
        )
    return pieces[0]


def mul(a: ir.Expr, b: ir.Expr) -> ir.Expr:
    """``a * b``."""
    if isinstance(a, ir.Const) and a.value == 1:
        return b
    weights = [w for w in (a.typ.weight, b.typ.weight) if w is not None]
    typ = ir.Typ(
        sum(weights, Fraction(0)) if weights else None,
        a.typ.depth + b.typ.depth,
        1,
        a.typ.den_weight + b.typ.den_weight,
        False,
        False,
        a.typ.mixed or b.typ.mixed,
    )
    return ir.Product(typ, f"({a.text})({b.text})", a, b)


def deriv(e: ir.Expr, times: int = 1) -> ir.Expr:
    """``D^times e``."""
    for _ in range(times):
        w = e.typ.weight
        typ = ir.Typ(None if w is None else w + 2, e.typ.depth + 1, 1, e.typ.den_weight * 2, False, False, e.typ.mixed)
        e = ir.Deriv(typ, f"D({e.text})", e)
    return e


def atom(key: str, weight: Fraction, scale: int = 1, depth: int = 0, params: tuple[Any, ...] = ()) -> ir.Atom:
    """A named form at ``scale * tau``."""
    return ir.Atom(ir.Typ(weight, depth, scale), key, key, Fraction(scale), params)


def sigma_generating_function(k: int, scale: int = 1) -> ir.Expr:
    """sum_{n >= 1} sigma_k(n / scale) q^n for odd k >= 1 (docs/method.md#generating-functions, first row)."""
    if k < 1 or k % 2 == 0:
        raise Untranslatable(f"sigma_{k} has no modular generating function (k must be odd)")
    w = k + 1
    factor = bernoulli(w) / (2 * w)
    eis = atom(f"E{w}", Fraction(w), scale, 1 if w == 2 else 0)
    return mul(const(factor), add(const(Fraction(1)), eis, -1))


# -- monomials -------------------------------------------------------------------------
@dataclass
class Mono:
    """``coeff * var^power * basic`` (basic: a function or sum depending on var, or None)."""

    coeff: Fraction
    power: int
    basic: t.A | None


def _depends(e: t.A, var: str) -> bool:
    return var in t.free_variables(e)


def monomials(e: t.A, var: str, values: Values) -> list[Mono]:
    """Expand ``e`` as a sum of monomials in ``var`` with at most one basic factor each."""
    if not _depends(e, var):
        if t.free_variables(e):
            raise Untranslatable(f"{e.text} involves a variable other than {var}")
        try:
            return [Mono(values.value(e, {}), 0, None)]
        except NotEvaluable as exc:
            raise Untranslatable(str(exc)) from exc
    if isinstance(e, t.Var):
        return [Mono(Fraction(1), 1, None)]
    if isinstance(e, t.Fun | t.Sum):
        return [Mono(Fraction(1), 0, e)]
    if isinstance(e, t.Bin):
        if e.op in "+-":
            right = monomials(e.right, var, values)
            if e.op == "-":
                right = [Mono(-m.coeff, m.power, m.basic) for m in right]
            return monomials(e.left, var, values) + right
        if e.op == "*":
            return [_times(a, b) for a in monomials(e.left, var, values) for b in monomials(e.right, var, values)]
        if e.op == "/":
            if _depends(e.right, var):
                raise Untranslatable(f"division by {e.right.text}")
            d = values.value(e.right, {})
            if d == 0:
                raise Untranslatable("division by 0")
            return [Mono(m.coeff / d, m.power, m.basic) for m in monomials(e.left, var, values)]
    if isinstance(e, t.Pow) and not _depends(e.exponent, var):
        k = values.value(e.exponent, {})
        if k.denominator != 1 or not 0 <= k <= MAX_POWER:
            raise Untranslatable(f"the power {e.text} is not a small non-negative integer")
        out = [Mono(Fraction(1), 0, None)]
        for _ in range(int(k)):
            out = [_times(a, b) for a in out for b in monomials(e.base, var, values)]
        return out
    raise Untranslatable(f"{e.text} has no modular generating function")


def _times(a: Mono, b: Mono) -> Mono:
    if a.basic is not None and b.basic is not None:
        raise Untranslatable(
            f"the product {a.basic.text} * {b.basic.text} of two arithmetic functions of the same variable "
            "has no modular generating function in general"
        )
    return Mono(a.coeff * b.coeff, a.power + b.power, a.basic if a.basic is not None else b.basic)


# -- generating functions -------------------------------------------------------------
def generating_function(e: t.A, var: str, values: Values) -> ir.Expr:
    """``sum_{var >= 0} e(var) q^var`` as a typed expression (see the module docstring)."""
    pieces: list[ir.Expr] = []
    for m in monomials(e, var, values):
        if m.basic is None:
            raise Untranslatable(
                f"the polynomial part {e.text} has no modular generating function (sum of q^n is not modular)"
            )
        piece = deriv(_basic(m.basic, var, values), m.power)
        piece = mul(const(m.coeff), piece)
        pieces.append(piece)
    return add_all(pieces)


# Partition functions whose generating function is a product prod f_delta^{r_delta}, f_k = (q^k;q^k)_inf:
# p(n) (1/f_1, Euler) and the overpartitions (f_2/f_1^2, Corteel and Lovejoy, Trans. AMS 356 (2004)).
_PRODUCTS: dict[str, dict[int, int]] = {"p": {1: -1}, "pbar": {1: -2, 2: 1}}


def _product_generating_function(exps: dict[int, int], d: int) -> ir.Expr:
    """sum_n a(n/d) q^n = prod f_{d delta}^{r_delta} = q^{-sum d delta r / 24} prod eta(d delta tau)^r."""
    params = eta_params({Fraction(d * delta): r for delta, r in exps.items()})
    weight = Fraction(sum(exps.values()), 2)
    base = ir.Atom(ir.Typ(weight), "eta", "eta", Fraction(1), params)
    shift = -Fraction(sum(d * delta * r for delta, r in exps.items()), 24)
    return base if shift == 0 else ir.Shift(base.typ, "q-power", base, shift)


def fractional_shift(expr: ir.Expr) -> bool:
    """Whether ``expr`` contains q^c with c not an integer (it must be rescaled before evaluation)."""
    if isinstance(expr, ir.Shift) and expr.exponent.denominator != 1:
        return True
    return any(
        isinstance(child, ir.Expr) and fractional_shift(child)
        for child in (getattr(expr, "left", None), getattr(expr, "right", None), getattr(expr, "base", None))
    )


def _scale_of(arg: t.A, var: str, values: Values) -> int:
    """d for an argument var / d (or var)."""
    if isinstance(arg, t.Var) and arg.name == var:
        return 1
    if isinstance(arg, t.Bin) and arg.op == "/" and isinstance(arg.left, t.Var) and arg.left.name == var:
        if not _depends(arg.right, var):
            d = values.value(arg.right, {})
            if d.denominator == 1 and d > 0:
                return int(d)
    raise Untranslatable(f"the argument {arg.text} is not {var} or {var}/d")


def _basic(e: t.A, var: str, values: Values) -> ir.Expr:
    if isinstance(e, t.Fun):
        d = _scale_of(e.arg, var, values)
        if e.name == "sigma":
            assert e.index is not None
            return sigma_generating_function(e.index, d)
        if e.name == "tau":
            return atom("Delta", Fraction(12), d)
        if e.name in _PRODUCTS:
            return _product_generating_function(_PRODUCTS[e.name], d)
        if e.name == "r":
            assert e.index is not None
            theta = ir.Atom(
                ir.Typ(Fraction(1, 2)), "theta", "eta", Fraction(1), eta_params({2 * d: 5, d: -2, 4 * d: -2})
            )
            if e.index == 0:
                return const(Fraction(1))
            return ir.Power(ir.Typ(Fraction(e.index, 2)), "theta^s", theta, e.index)
        if e.name == "rQ":
            form = e.form
            return ir.Atom(ir.Typ(form.weight), "Theta_Q", "theta", Fraction(d), (form.gram,))
        if e.name == "coef":
            # A form with fractional exponents (f_1^2 = q^{-1/12} eta^2) is returned as it is: the claim's
            # two generating functions are rescaled together (verifier.claims.coefficients).
            form_expr: ir.Expr = e.form
            if form_expr.typ.printed:
                raise Untranslatable("the defined form is a printed expansion")
            return rescale_expr(form_expr, d) if d != 1 else form_expr
        raise Untranslatable(f"{e.text} has no modular generating function")
    if isinstance(e, t.Sum):
        if e.kind == "from":
            return _convolution(e, var, values)
        return _divisor_sum(e, var, values)
    raise Untranslatable(f"{e.text} has no modular generating function")


def _restricted(g: ir.Expr, x: t.A, var: str, lower: int, values: Values) -> ir.Expr:
    """The generating function of x restricted to var >= lower (lower in {0, 1})."""
    if lower == 0:
        return g
    try:
        c0 = values.value(x, {var: 0})
    except NotEvaluable as exc:
        raise Untranslatable(str(exc)) from exc
    return g if c0 == 0 else add(g, const(c0), -1)


def _convolution(s: t.Sum, var: str, values: Values) -> ir.Expr:
    m = s.var
    lower = values.value(s.lower, {}) if not t.free_variables(s.lower) else None
    if lower not in (0, 1):
        raise Untranslatable(f"{s.text}: the sum must start at {m} = 0 or 1")
    assert s.upper is not None and lower is not None
    c = _offset_below(s.upper, var, values)
    if c not in (0, 1):
        raise Untranslatable(f"{s.text}: the sum must end at {var} or {var} - 1")
    other = "\u2113"  # a fresh variable for n - m
    pieces: list[ir.Expr] = []
    for a, e, coeff, x, y in _conv_monomials(s.body, var, m, other, values):
        if x is None or y is None:
            raise Untranslatable(f"{s.text}: each term needs a function of {m} and a function of {var} - {m}")
        gx = _restricted(generating_function(x, m, values), x, m, int(lower), values)
        gy = _restricted(generating_function(y, other, values), y, other, c, values)
        piece = deriv(mul(deriv(gx, a), gy), e)
        piece = mul(const(coeff), piece)
        pieces.append(piece)
    return add_all(pieces)


def _offset_below(upper: t.A, var: str, values: Values) -> int | None:
    if isinstance(upper, t.Var) and upper.name == var:
        return 0
    if isinstance(upper, t.Bin) and upper.op == "-" and isinstance(upper.left, t.Var) and upper.left.name == var:
        if not t.free_variables(upper.right):
            v = values.value(upper.right, {})
            return int(v) if v.denominator == 1 else None
    return None


def _conv_monomials(
    body: t.A, n: str, m: str, other: str, values: Values
) -> list[tuple[int, int, Fraction, t.A | None, t.A | None]]:
    """(power of m, power of n, coefficient, X(m), Y(n - m) rewritten in ``other``)."""
    out: list[tuple[int, int, Fraction, t.A | None, t.A | None]] = [(0, 0, Fraction(1), None, None)]
    for factor in _factors(body):
        out = [_mul_conv(term, piece) for term in out for piece in _conv_factor(factor, n, m, other, values)]
    return out


def _factors(e: t.A) -> list[t.A]:
    if isinstance(e, t.Bin) and e.op == "*":
        return _factors(e.left) + _factors(e.right)
    return [e]


def _mul_conv(
    a: tuple[int, int, Fraction, t.A | None, t.A | None], b: tuple[int, int, Fraction, t.A | None, t.A | None]
) -> tuple[int, int, Fraction, t.A | None, t.A | None]:
    if (a[3] is not None and b[3] is not None) or (a[4] is not None and b[4] is not None):
        raise Untranslatable("a convolution term multiplies two functions of the same variable")
    return (a[0] + b[0], a[1] + b[1], a[2] * b[2], a[3] or b[3], a[4] or b[4])


def _is_n_minus_m(e: t.A, n: str, m: str) -> bool:
    return (
        isinstance(e, t.Bin)
        and e.op == "-"
        and isinstance(e.left, t.Var)
        and e.left.name == n
        and isinstance(e.right, t.Var)
        and e.right.name == m
    )


def _conv_factor(
    f: t.A, n: str, m: str, other: str, values: Values
) -> list[tuple[int, int, Fraction, t.A | None, t.A | None]]:
    free = t.free_variables(f)
    if not free:
        return [(0, 0, values.value(f, {}), None, None)]
    if isinstance(f, t.Var):
        return [(1, 0, Fraction(1), None, None)] if f.name == m else [(0, 1, Fraction(1), None, None)]
    if _is_n_minus_m(f, n, m):  # n - m = n - m: two monomials
        return [(0, 1, Fraction(1), None, None), (1, 0, Fraction(-1), None, None)]
    if isinstance(f, t.Pow) and not t.free_variables(f.exponent):
        k = values.value(f.exponent, {})
        if k.denominator == 1 and 0 <= k <= MAX_POWER:
            out: list[tuple[int, int, Fraction, t.A | None, t.A | None]] = [(0, 0, Fraction(1), None, None)]
            for _ in range(int(k)):
                out = [_mul_conv(a, b) for a in out for b in _conv_factor(f.base, n, m, other, values)]
            return out
    if isinstance(f, t.Bin) and f.op == "*":
        return [
            _mul_conv(a, b)
            for a in _conv_factor(f.left, n, m, other, values)
            for b in _conv_factor(f.right, n, m, other, values)
        ]
    if isinstance(f, t.Bin) and f.op in "+-" and not isinstance(f.left, t.Fun):
        left = _conv_factor(f.left, n, m, other, values)
        right = _conv_factor(f.right, n, m, other, values)
        if f.op == "-":
            right = [(a, b, -c, x, y) for a, b, c, x, y in right]
        return left + right
    if isinstance(f, t.Fun):
        if free == {m}:
            return [(0, 0, Fraction(1), f, None)]
        if free == {n, m} and (_is_n_minus_m(f.arg, n, m) or _is_scaled_n_minus_m(f.arg, n, m)):
            return [(0, 0, Fraction(1), None, _substitute_other(f, n, m, other))]
    raise Untranslatable(f"{f.text} is not a function of {m} or of {n} - {m}")


def _is_scaled_n_minus_m(arg: t.A, n: str, m: str) -> bool:
    return (
        isinstance(arg, t.Bin) and arg.op == "/" and _is_n_minus_m(arg.left, n, m) and not t.free_variables(arg.right)
    )


def _substitute_other(f: t.Fun, n: str, m: str, other: str) -> t.Fun:
    fresh = t.Var(other, other)
    if _is_n_minus_m(f.arg, n, m):
        return t.Fun(f.text, f.name, f.index, fresh, f.form)
    assert isinstance(f.arg, t.Bin)
    return t.Fun(f.text, f.name, f.index, t.Bin(f.arg.text, "/", fresh, f.arg.right), f.form)


def _divisor_sum(s: t.Sum, var: str, values: Values) -> ir.Expr:
    d = s.var
    if isinstance(s.lower, t.Bin) and s.lower.op == "/" and isinstance(s.lower.left, t.Var):
        # sum over the divisors of n/c: the same sum at n/c, i.e. tau -> c tau.
        if s.lower.left.name == var and not t.free_variables(s.lower.right):
            c = values.value(s.lower.right, {})
            if c.denominator == 1 and c > 0:
                # sum_{d | n/c} body(n, d) at n = c m is sum_{d | m} body(c m, d): translate that sum
                # in m (renamed n), then tau -> c tau puts it back at n = c m.
                body = _times_variable(s.body, var, s.var, int(c))
                inner = t.Sum(s.text, s.kind, s.var, s.lower.left, s.upper, body)
                return rescale_expr(_divisor_sum(inner, var, values), int(c))
    if not (isinstance(s.lower, t.Var) and s.lower.name == var):
        raise Untranslatable(f"{s.text}: only sums over the divisors of {var} or {var}/c are translated")
    pieces: list[ir.Expr] = []
    for coeff, a, b, sign, psi, phi in _divisor_monomials(s.body, var, d, values):
        if psi == 1 and phi == 1:
            piece = _parity_split(a, b, sign)
        elif sign is not None:
            raise Untranslatable(f"{s.text}: signs and characters together are not translated")
        else:
            piece = _character_sum(a, b, psi, phi)
        piece = mul(const(coeff), piece)
        pieces.append(piece)
    return add_all(pieces)


Sign = tuple[int, int, int, int] | None  # (alpha, beta, gamma, delta) of (-1)^{alpha n + beta d + gamma n/d + delta}
DivMono = tuple[Fraction, int, int, Sign, int, int]  # coeff, power of d, power of n/d, sign, psi(n/d), phi(d)


def _divisor_monomials(body: t.A, n: str, d: str, values: Values) -> list[DivMono]:
    out: list[DivMono] = [(Fraction(1), 0, 0, None, 1, 1)]
    for f in _factors(body):
        out = [_mul_div(x, y) for x in out for y in _divisor_factor(f, n, d, values)]
    return out


def _mul_div(x: DivMono, y: DivMono) -> DivMono:
    sign: Sign
    if x[3] is None:
        sign = y[3]
    elif y[3] is None:
        sign = x[3]
    else:
        sign = tuple((p + q) % 2 for p, q in zip(x[3], y[3], strict=True))  # type: ignore[assignment]
    if (x[4] != 1 and y[4] != 1) or (x[5] != 1 and y[5] != 1):
        raise Untranslatable("a product of two characters of the same argument")
    return (x[0] * y[0], x[1] + y[1], x[2] + y[2], sign, x[4] * y[4], x[5] * y[5])


def _times_variable(e: t.A, n: str, d: str, c: int) -> t.A:
    """``e`` with n replaced by c n (n/d becoming c (n/d))."""
    scale = t.Num(str(c), Fraction(c))
    if _is_codivisor(e, n, d):
        return t.Bin(e.text, "*", scale, e)
    if isinstance(e, t.Var):
        return t.Bin(e.text, "*", scale, e) if e.name == n else e
    if isinstance(e, t.Bin):
        return t.Bin(e.text, e.op, _times_variable(e.left, n, d, c), _times_variable(e.right, n, d, c))
    if isinstance(e, t.Pow):
        return t.Pow(e.text, _times_variable(e.base, n, d, c), _times_variable(e.exponent, n, d, c))
    if isinstance(e, t.Fun):
        return t.Fun(e.text, e.name, e.index, _times_variable(e.arg, n, d, c), e.form)
    if isinstance(e, t.Sum):
        return t.Sum(
            e.text,
            e.kind,
            e.var,
            _times_variable(e.lower, n, d, c),
            None if e.upper is None else _times_variable(e.upper, n, d, c),
            _times_variable(e.body, n, d, c),
        )
    return e


def _is_codivisor(e: t.A, n: str, d: str) -> bool:
    return (
        isinstance(e, t.Bin)
        and e.op == "/"
        and isinstance(e.left, t.Var)
        and e.left.name == n
        and isinstance(e.right, t.Var)
        and e.right.name == d
    )


def _divisor_factor(f: t.A, n: str, d: str, values: Values) -> list[DivMono]:
    if not t.free_variables(f):
        return [(values.value(f, {}), 0, 0, None, 1, 1)]
    if isinstance(f, t.Var) and f.name == d:
        return [(Fraction(1), 1, 0, None, 1, 1)]
    if isinstance(f, t.Var) and f.name == n:  # n = d * (n/d)
        return [(Fraction(1), 1, 1, None, 1, 1)]
    if _is_codivisor(f, n, d):
        return [(Fraction(1), 0, 1, None, 1, 1)]
    if isinstance(f, t.Bin) and f.op == "*":
        return [
            _mul_div(x, y)
            for x in _divisor_factor(f.left, n, d, values)
            for y in _divisor_factor(f.right, n, d, values)
        ]
    if isinstance(f, t.Fun) and f.name == "chi":
        from verifier.numbers import is_fundamental_discriminant

        assert f.index is not None
        if not is_fundamental_discriminant(f.index):
            raise Untranslatable(f"{f.text}: only characters of fundamental discriminants are translated")
        kernel = QuadraticCharacterKernel(f.index)
        if isinstance(f.arg, t.Var) and f.arg.name == d:
            return [(Fraction(1), 0, 0, None, 1, kernel)]
        if _is_codivisor(f.arg, n, d):
            return [(Fraction(1), 0, 0, None, kernel, 1)]
    if isinstance(f, t.Pow):
        if not t.free_variables(f.base) and values.value(f.base, {}) == -1:
            return [(Fraction(1), 0, 0, _linear_parity(f.exponent, n, d, values), 1, 1)]
        if not t.free_variables(f.exponent):
            k = values.value(f.exponent, {})
            if k.denominator == 1 and 0 <= k <= 64:
                out: list[DivMono] = [(Fraction(1), 0, 0, None, 1, 1)]
                for _ in range(int(k)):
                    out = [_mul_div(x, y) for x in out for y in _divisor_factor(f.base, n, d, values)]
                return out
    raise Untranslatable(
        f"{f.text}: divisor sums are translated for powers of d and n/d, signs (-1)^(...) and characters chi_D"
    )


def QuadraticCharacterKernel(disc: int) -> int:
    """The kernel of the character (disc / .)."""
    from verifier.numbers import QuadraticCharacter

    return int(QuadraticCharacter.from_integer(disc).kernel)


def _character_sum(a: int, b: int, psi: int, phi: int) -> ir.Expr:
    """sum_{n>=1} (sum_{d|n} psi(n/d) phi(d) d^a (n/d)^b) q^n via E_k^{psi,phi}.

    See docs/method.md#eisenstein-characters.
    """
    from verifier.forms.eisenstein_chars import constant_term, is_defined
    from verifier.numbers import QuadraticCharacter

    if a < b:  # swap the roles of d and n/d
        a, b, psi, phi = b, a, phi, psi
    k = a - b + 1
    chi_psi, chi_phi = QuadraticCharacter(psi), QuadraticCharacter(phi)
    if not is_defined(k, chi_psi, chi_phi):
        raise Untranslatable(f"no Eisenstein series of weight {k} with these characters (parity)")
    eis = ir.Atom(ir.Typ(Fraction(k)), f"E_{k}^(psi,phi)", "Echar", Fraction(1), (k, psi, phi))
    c0 = constant_term(k, chi_psi, chi_phi)
    gen = mul(const(Fraction(1, 2)), add(eis, const(c0), -1))
    return deriv(gen, b)


def _linear_parity(e: t.A, n: str, d: str, values: Values) -> tuple[int, int, int, int]:
    """(alpha, beta, gamma, delta) mod 2 with e = alpha n + beta d + gamma n/d + delta."""
    if not t.free_variables(e):
        v = values.value(e, {})
        if v.denominator != 1:
            raise Untranslatable("a fractional exponent of -1")
        return (0, 0, 0, int(v) % 2)
    if isinstance(e, t.Var):
        return (1, 0, 0, 0) if e.name == n else (0, 1, 0, 0)
    if _is_codivisor(e, n, d):
        return (0, 0, 1, 0)
    if isinstance(e, t.Bin) and e.op in "+-":
        a, b = _linear_parity(e.left, n, d, values), _linear_parity(e.right, n, d, values)
        return tuple((x + y) % 2 for x, y in zip(a, b, strict=True))  # type: ignore[return-value]
    if isinstance(e, t.Bin) and e.op == "*" and not t.free_variables(e.left):
        k = values.value(e.left, {})
        if k.denominator == 1:
            inner = _linear_parity(e.right, n, d, values)
            return tuple((int(k) * x) % 2 for x in inner)  # type: ignore[return-value]
    raise Untranslatable(f"the sign exponent {e.text} is not linear in n, d and n/d")


def _s_function(a: int, b: int) -> ir.Expr:
    """sum_{n>=1} S(n) q^n with S(n) = sum_{d|n} d^a (n/d)^b = n^min(a,b) sigma_|a-b|(n)."""
    low, diff = min(a, b), abs(a - b)
    return deriv(sigma_generating_function(diff), low)


def _parity_split(a: int, b: int, sign: Sign) -> ir.Expr:
    s = _s_function(a, b)
    if sign is None:
        return s
    s2, s4 = rescale_expr(s, 2), rescale_expr(s, 4)
    two_a, two_b = Fraction(2) ** a, Fraction(2) ** b
    # Classes by (d even?, n/d even?): C_ee = 2^{a+b} S(n/4), C_eo = 2^a S(n/2) - C_ee,
    # C_oe = 2^b S(n/2) - C_ee, C_oo = S(n) - (2^a + 2^b) S(n/2) + C_ee.
    classes = {
        (0, 0): [(two_a * two_b, s4)],
        (0, 1): [(two_a, s2), (-two_a * two_b, s4)],
        (1, 0): [(two_b, s2), (-two_a * two_b, s4)],
        (1, 1): [(Fraction(1), s), (-(two_a + two_b), s2), (two_a * two_b, s4)],
    }
    alpha, beta, gamma, delta = sign
    pieces: list[ir.Expr] = []
    for (dp, ep), parts in classes.items():
        n_odd = dp * ep  # n is odd exactly when d and n/d are both odd (parity 1 = odd)
        exponent = alpha * n_odd + beta * dp + gamma * ep + delta
        sgn = -1 if exponent % 2 else 1
        for c, g in parts:
            piece = mul(const(sgn * c), g)
            pieces.append(piece)
    return add_all(pieces)
