r"""Level-N claims end to end: certificates, rescaling, the nome, groups, characters, spaces.

Every expected value names its source beside it: published references (Sturm's bound, Sturm
1987; Shimura's half-integral weight, Shimura 1973; the valence formula; Gordon–Hughes and
Newman; Ligozat; the eta products of Dummit–Kisilevsky–McKay 1985 and Martin 1996; Jacobi's
identity theta_3^4 = theta_2^4 + theta_4^4 and his four-square theorem; theta series of
quadratic forms, Iwaniec Thm 10.9; the dimension formulas, Diamond–Shurman Thm 3.5.1), with the
section of docs/method.md that states each formula, classical
theorems named at the case (Euler's pentagonal number theorem, Jacobi's cube of eta), or
values computed here, independently of the engine, with an exact series model written below
(eta products by repeated multiplication, theta series by summing over n, Eisenstein series
from divisor sums).

The soundness battery at the end perturbs true level-N identities (one coefficient, one eta
exponent, one scaling d, or one power) and checks, with the independent model, that every
perturbed claim is false; the engine must never prove one of them.
"""

from __future__ import annotations

import math
import random
from dataclasses import dataclass
from fractions import Fraction
from typing import Any

from verifier import check_text
from verifier.api import ClaimResult

# ---------------------------------------------------------------------------
# Helpers: running claims, and an independent model of the series
# ---------------------------------------------------------------------------

GRAMS = {
    # Hexagonal lattice A_2 (docs/method.md#theta-quadratic-forms): Q = x^2 + xy + y^2, level 3, chi_{-3}.
    "A": "\\begin{pmatrix}2&1\\\\1&2\\end{pmatrix}",
    # x^2 + 3y^2: det 12, level 12, chi = (-12/.) = chi_{-3} (docs/method.md#theta-quadratic-forms).
    "B": "\\begin{pmatrix}2&0\\\\0&6\\end{pmatrix}",
    # D_4 (the Cartan matrix, from memory): level 2, trivial character (docs/method.md#theta-quadratic-forms).
    "D": "\\begin{pmatrix}2&-1&0&0\\\\-1&2&-1&-1\\\\0&-1&2&0\\\\0&-1&0&2\\end{pmatrix}",
    # E_8 (Cartan matrix of the E_8 diagram, from memory): even unimodular, theta = E_4.
    "E": (
        "\\begin{pmatrix}2&-1&0&0&0&0&0&0\\\\-1&2&-1&0&0&0&0&0\\\\0&-1&2&-1&0&0&0&0\\\\"
        "0&0&-1&2&-1&0&0&0\\\\0&0&0&-1&2&-1&0&-1\\\\0&0&0&0&-1&2&-1&0\\\\"
        "0&0&0&0&0&-1&2&0\\\\0&0&0&0&-1&0&0&2\\end{pmatrix}"
    ),
}
_PREAMBLE = "".join(f"%@define {k} = {v}\n" for k, v in GRAMS.items())


# Two claims used several times: docs/method.md#poles-at-cusps (X + Y = 1) and #sums-of-squares (the four-square eta
# identity).
X_PLUS_Y = (
    r"\frac{\eta(\tau)^{16}\eta(4\tau)^8}{\eta(2\tau)^{24}}"
    r" + 16\frac{\eta(\tau)^8\eta(4\tau)^{16}}{\eta(2\tau)^{24}} = 1"
)
FOUR_SQUARES = r"\theta(\tau)^4 = \frac{\eta(\tau)^8}{\eta(2\tau)^4} + 16\frac{\eta(4\tau)^8}{\eta(2\tau)^4}"


def check_all(claims: list[tuple[str, str]]) -> list[ClaimResult]:
    """Check (options, claim) pairs in one document, after the Gram-matrix definitions."""
    doc = _PREAMBLE + "".join(f"%@claim name=c{i} {opts}\n\\[ {text} \\]\n" for i, (opts, text) in enumerate(claims))
    report = check_text(doc)
    assert len(report.claims) == len(claims), [c.outcome.message for c in report.claims]
    return report.claims


def check(text: str, options: str = "") -> ClaimResult:
    return check_all([(options, text)])[0]


def m0(n: int) -> int:
    """[SL_2(Z) : Gamma_0(N)] as the number of points of P^1(Z/N) (docs/method.md#index)."""
    pairs = sum(1 for c in range(n) for d in range(n) if math.gcd(math.gcd(c, d), n) == 1)
    units = sum(1 for a in range(1, n + 1) if math.gcd(a, n) == 1)
    return pairs // units


def sturm(n: int, k: Fraction | int) -> int:
    """floor(k m_0(N) / 12) (docs/method.md#sturm-bound; for half-integral k, #half-integral-weight)."""
    return math.floor(Fraction(k) * m0(n) / 12)


def ligozat(exps: dict[int, int], n: int) -> dict[int, Fraction]:
    """Orders of prod eta(delta tau)^r at the cusps c/d of Gamma_0(N), keyed by d (docs/method.md#ligozat)."""
    return {
        d: Fraction(n, 24)
        * sum(Fraction(math.gcd(d, de) ** 2 * r, math.gcd(d, n // d) * d * de) for de, r in exps.items())
        for d in range(1, n + 1)
        if n % d == 0
    }


PREC = 60  # the model's series are exact for exponents < PREC


class Ser:
    """A truncated series sum c_e q^e, e rational, exact for e < PREC."""

    def __init__(self, c: dict[Fraction, Fraction] | None = None) -> None:
        self.c = {Fraction(e): Fraction(v) for e, v in (c or {}).items() if v and e < PREC}

    @staticmethod
    def const(a: Fraction | int) -> Ser:
        return Ser({Fraction(0): Fraction(a)})

    def __add__(self, other: Ser) -> Ser:
        out = dict(self.c)
        for e, v in other.c.items():
            out[e] = out.get(e, Fraction(0)) + v
        return Ser(out)

    def scale(self, a: Fraction) -> Ser:
        return Ser({e: a * v for e, v in self.c.items()})

    def __mul__(self, other: Ser) -> Ser:
        out: dict[Fraction, Fraction] = {}
        for e1, v1 in self.c.items():
            for e2, v2 in other.c.items():
                if e1 + e2 < PREC:
                    out[e1 + e2] = out.get(e1 + e2, Fraction(0)) + v1 * v2
        return Ser(out)

    def power(self, p: int) -> Ser:
        out = Ser.const(1)
        for _ in range(p):
            out = out * self
        return out


def sigma(n: int, r: int) -> int:
    return sum(d**r for d in range(1, n + 1) if n % d == 0)


# -2k/B_k for k = 2, 4, 6 (docs/method.md#eisenstein table).
_EIS = {2: -24, 4: 240, 6: -504}


def eis(k: int, d: int) -> Ser:
    """E_k(d tau) = 1 + (-2k/B_k) sum sigma_{k-1}(n) q^{dn} (docs/method.md#eisenstein, #hecke)."""
    return Ser(
        {Fraction(0): Fraction(1)} | {Fraction(n * d): Fraction(_EIS[k] * sigma(n, k - 1)) for n in range(1, PREC)}
    )


def theta_ser(d: int) -> Ser:
    """theta(d tau) = sum_{n in Z} q^{d n^2} (docs/method.md#theta-nome)."""
    return Ser({Fraction(d * n * n): Fraction(1 if n == 0 else 2) for n in range(0, 9)})


def theta_a2() -> Ser:
    """r(n) for x^2 + xy + y^2 (Theta_A, docs/method.md#theta-quadratic-forms) by counting the points of a box."""
    out: dict[Fraction, Fraction] = {}
    for x in range(-10, 11):
        for y in range(-10, 11):
            v = x * x + x * y + y * y
            out[Fraction(v)] = out.get(Fraction(v), Fraction(0)) + 1
    # x^2 + xy + y^2 >= 3/4 max(x, y)^2, so every norm below 90 comes from inside the box: exact below PREC.
    return Ser(out)


def eta_ser(exps: tuple[tuple[int, int], ...]) -> Ser:
    """q^{s/24} prod (1 - q^{delta n})^{r_delta} by repeated multiplication (docs/method.md#eta-offset)."""
    poly = [Fraction(0)] * PREC
    poly[0] = Fraction(1)
    for delta, r in exps:
        for n in range(1, PREC):
            m = delta * n
            if m >= PREC:
                break
            for _ in range(abs(r)):
                if r > 0:
                    for i in range(PREC - 1, m - 1, -1):
                        poly[i] -= poly[i - m]
                else:
                    for i in range(m, PREC):
                        poly[i] += poly[i - m]
    off = Fraction(sum(d * r for d, r in exps), 24)
    return Ser({off + i: poly[i] for i in range(PREC)})


# ---------------------------------------------------------------------------
# A small claim language for the battery: render to LaTeX and evaluate in the model
# ---------------------------------------------------------------------------


@dataclass(frozen=True)
class Fac:
    """One factor: kind 'eta' (data = ((delta, r), ...)), 'E' (data = (k, d)), 'theta' (data = d),
    'A2' (Theta_A), or 'sum' (data = a side, parenthesised); raised to ``power``."""

    kind: str
    data: Any
    power: int = 1


Term = tuple[Fraction, tuple[Fac, ...]]
Side = tuple[Term, ...]


def _arg(d: int) -> str:
    return "(\\tau)" if d == 1 else f"({d}\\tau)"


def _pow(p: int) -> str:
    return "" if p == 1 else f"^{{{p}}}"


def render_fac(f: Fac) -> str:
    if f.kind == "eta":
        exps: tuple[tuple[int, int], ...] = f.data
        num = "".join(f"\\eta{_arg(d)}{_pow(r)}" for d, r in exps if r > 0) or "1"
        den = "".join(f"\\eta{_arg(d)}{_pow(-r)}" for d, r in exps if r < 0)
        body = f"\\frac{{{num}}}{{{den}}}" if den else num
        return body if f.power == 1 else f"\\left({body}\\right){_pow(f.power)}"
    if f.kind == "E":
        k, d = f.data
        return f"E_{{{k}}}{_arg(d)}{_pow(f.power)}"
    if f.kind == "theta":
        return f"\\theta{_arg(f.data)}{_pow(f.power)}"
    if f.kind == "A2":
        return f"\\Theta_A{_pow(f.power)}"
    return f"\\left({render(f.data)}\\right){_pow(f.power)}"


def render(side: Side) -> str:
    out = ""
    for i, (c, facs) in enumerate(side):
        sign = "-" if c < 0 else "+"
        a = abs(c)
        coef = (
            ""
            if a == 1 and facs
            else (str(a.numerator) if a.denominator == 1 else f"\\frac{{{a.numerator}}}{{{a.denominator}}}")
        )
        body = coef + " ".join(render_fac(f) for f in facs)
        out += (("-" if sign == "-" else "") if i == 0 else f" {sign} ") + body
    return out


def value_fac(f: Fac) -> Ser:
    if f.kind == "eta":
        base = eta_ser(f.data)
    elif f.kind == "E":
        base = eis(*f.data)
    elif f.kind == "theta":
        base = theta_ser(f.data)
    elif f.kind == "A2":
        base = theta_a2()
    else:
        base = value(f.data)
    return base.power(f.power)


def value(side: Side) -> Ser:
    total = Ser()
    for c, facs in side:
        term = Ser.const(c)
        for f in facs:
            term = term * value_fac(f)
        total = total + term
    return total


def first_difference(a: Ser, b: Ser) -> Fraction | None:
    """The least exponent below PREC - 10 where the series differ (None: they agree there)."""
    for e in sorted(set(a.c) | set(b.c)):
        if e >= PREC - 10:
            return None
        if a.c.get(e, 0) != b.c.get(e, 0):
            return e
    return None


def eta(**kw: int) -> Fac:
    return Fac("eta", tuple(sorted((int(k[1:]), v) for k, v in kw.items())))


def E(k: int, d: int = 1, p: int = 1) -> Fac:
    return Fac("E", (k, d), p)


def T(c: int | Fraction, *facs: Fac) -> Term:
    return (Fraction(c), facs)


# True identities on Gamma_0(N) (sources beside each; each is also checked in the model below).
TRUE_IDENTITIES: list[tuple[str, Side, Side]] = [
    # docs/method.md#sums-of-squares (Jacobi; Whittaker–Watson Ch. XXI): theta^4 = eta_1^8/eta_2^4 + 16 eta_4^8/eta_2^4.
    ("4.7", (T(1, Fac("theta", 1, 4)),), (T(1, eta(e1=8, e2=-4)), T(16, eta(e4=8, e2=-4)))),
    # Jacobi's four-square theorem (docs/method.md#sums-of-squares): theta^4 = (4 E_2(4 tau) - E_2(tau)) / 3.
    ("jacobi4", (T(1, Fac("theta", 1, 4)),), (T(Fraction(4, 3), E(2, 4)), T(Fraction(-1, 3), E(2)))),
    # r_8 (docs/method.md#sums-of-squares) in M_4(Gamma_0(4)), dim 3 (#dimension-gamma0): coefficients fitted on
    # a_0..a_2, checked to q^49.
    (
        "theta8",
        (T(1, Fac("theta", 1, 8)),),
        (T(Fraction(1, 15), E(4)), T(Fraction(-2, 15), E(4, 2)), T(Fraction(16, 15), E(4, 4))),
    ),
    # M_4(Gamma_0(2)) = <E_4, E_4(2 tau)> (dim 2, docs/method.md#dimension-gamma0); the eta quotients of #sturm-bound
    # and its square root.
    ("eta16", (T(1, eta(e2=16, e1=-8)),), (T(Fraction(1, 240), E(4)), T(Fraction(-1, 240), E(4, 2)))),
    ("eta16b", (T(1, eta(e1=16, e2=-8)),), (T(Fraction(16, 15), E(4, 2)), T(Fraction(-1, 15), E(4)))),
    # (2 E_2(2 tau) - E_2)^2 in M_4(Gamma_0(2)) (docs/method.md#e2, #dimension-gamma0).
    (
        "square",
        (T(1, Fac("sum", (T(2, E(2, 2)), T(-1, E(2))), 2)),),
        (T(Fraction(1, 5), E(4)), T(Fraction(4, 5), E(4, 2))),
    ),
    # docs/method.md#poles-at-cusps (worked example): X + Y = 1 on Gamma_0(4).
    ("X+Y", (T(1, eta(e1=16, e4=8, e2=-24)), T(16, eta(e1=8, e4=16, e2=-24))), (T(1),)),
    # The cubic identity for the hexagonal lattice (weight 3, Gamma_0(3), chi_{-3}); checked to q^49.
    ("cubic", (T(1, Fac("A2", None, 3)),), (T(1, eta(e1=9, e3=-3)), T(27, eta(e3=9, e1=-3)))),
    # Theta_{A_2}^2 in M_2(Gamma_0(3)), dim 1 (docs/method.md#dimension-gamma0), spanned by (3 E_2(3 tau) - E_2)/2
    # (#e2).
    ("A2sq", (T(1, Fac("A2", None, 2)),), (T(Fraction(3, 2), E(2, 3)), T(Fraction(-1, 2), E(2)))),
    # docs/method.md#theta-nome: theta^2 and theta^3 as eta quotients.
    ("theta2", (T(1, Fac("theta", 1, 2)),), (T(1, eta(e2=10, e1=-4, e4=-4)),)),
    ("theta3", (T(1, Fac("theta", 1, 3)),), (T(1, eta(e2=15, e1=-6, e4=-6)),)),
    # theta(tau) = theta(4 tau) + sum over odd n (docs/method.md#theta-nome with psi(q) = eta(2tau)^2/eta(tau)
    # q^{-1/8}).
    ("odd", (T(1, Fac("theta", 1)),), (T(1, Fac("theta", 4)), T(2, eta(e16=2, e8=-1)))),
    # A product in two orders: trivially true, but its perturbations (theta(3tau) -> theta(6tau)) are not.
    ("x2+3y2", (T(1, Fac("theta", 1), Fac("theta", 3)),), (T(1, Fac("theta", 3), Fac("theta", 1)),)),
]


def test_the_true_identities_hold_in_the_model_and_are_proved() -> None:
    for name, lhs, rhs in TRUE_IDENTITIES:
        assert first_difference(value(lhs), value(rhs)) is None, name
    results = check_all([("", f"{render(lhs)} = {render(rhs)}") for _, lhs, rhs in TRUE_IDENTITIES])
    for (name, _, _), r in zip(TRUE_IDENTITIES, results, strict=True):
        assert r.verdict == "proved", (name, r.source, r.outcome.message)


# ---------------------------------------------------------------------------
# 1. Certificates
# ---------------------------------------------------------------------------

CERTIFICATES = [
    # (claim, (weight, group, character), (method, bound), dimension or None)
    # docs/method.md#sums-of-squares: all three terms in M_2(Gamma_0(4)); B(4,2) = 1; dim M_2(Gamma_0(4)) = 2
    # (#dimension-gamma0).
    (FOUR_SQUARES, ("2", "Gamma0(4)", "trivial"), ("sturm", sturm(4, 2)), 2),
    # docs/method.md#sturm-bound sample value: B(4,1) = 0 for chi_{-4}; theta^2 as an eta quotient (#theta-nome).
    (
        r"\theta(\tau)^2 = \frac{\eta(2\tau)^{10}}{\eta(\tau)^4\eta(4\tau)^4}",
        ("1", "Gamma0(4)", "chi_{-4}"),
        ("sturm", 0),
        None,
    ),
    # Theta_{A_2} has chi_{-3} on Gamma_0(3) (docs/method.md#theta-quadratic-forms), so its cube does; the eta quotients
    # have the
    # GHN character ((-1)^3 3^3 / d) = chi_{-3} (docs/method.md#eta-modularity). B(3,3) = 1.
    (
        r"\Theta_A^3 = \frac{\eta(\tau)^9}{\eta(3\tau)^3} + 27\frac{\eta(3\tau)^9}{\eta(\tau)^3}",
        ("3", "Gamma0(3)", "chi_{-3}"),
        ("sturm", sturm(3, 3)),
        None,
    ),
    # r_8 in M_4(Gamma_0(4)): B = 2, dim 3 (docs/method.md#dimension-gamma0).
    (
        r"\theta(\tau)^8 = \frac{E_4(\tau) - 2E_4(2\tau) + 16E_4(4\tau)}{15}",
        ("4", "Gamma0(4)", "trivial"),
        ("sturm", sturm(4, 4)),
        3,
    ),
    # eta_1^8 eta_2^8 spans S_8(Gamma_0(2)) (docs/method.md#eta-modularity); B(2,8) = 2; dim M_8(Gamma_0(2)) = 3
    # (#dimension-gamma0).
    (
        r"\eta(\tau)^8\eta(2\tau)^8 = \frac{(E_4(\tau) - E_4(2\tau))(16E_4(2\tau) - E_4(\tau))}{3600}",
        ("8", "Gamma0(2)", "trivial"),
        ("sturm", sturm(2, 8)),
        3,
    ),
    # Half-integral weight (docs/method.md#half-integral-weight): floor((3/2) m_0(4) / 12) = 0.
    (
        r"\theta(\tau)^3 = \frac{\eta(2\tau)^{15}}{\eta(\tau)^6\eta(4\tau)^6}",
        ("3/2", "Gamma0(4)", "trivial"),
        ("sturm", 0),
        None,
    ),
    # x^2 + 3y^2: level 12, chi_{-3} (docs/method.md#theta-quadratic-forms); B(12,1) = 2.
    (r"\Theta_B = \theta(\tau)\theta(3\tau)", ("1", "Gamma0(12)", "chi_{-3}"), ("sturm", sturm(12, 1)), None),
    # Theta_{D_4} in M_2(Gamma_0(2)), dim 1 (docs/method.md#dimension-gamma0): B(2,2) = 0.
    (r"\Theta_D = 2E_2(2\tau) - E_2(\tau)", ("2", "Gamma0(2)", "trivial"), ("sturm", sturm(2, 2)), 1),
    # Theta_{E_8} = E_4 (docs/method.md#theta-quadratic-forms), level one: B(1,4) = 0.
    (r"\Theta_E = E_4", ("4", "SL2(Z)", "trivial"), ("sturm", 0), 1),
    # docs/method.md#poles-at-cusps worked example: weight 0, cusp-order lower bounds 0 (d=1) and -1 (d=2): bound 1.
    (X_PLUS_Y, ("0", "Gamma0(4)", "trivial"), ("valence", 1), None),
]


def test_certificates() -> None:
    results = check_all([("", c[0]) for c in CERTIFICATES])
    for (claim, space, (method, bound), dim), r in zip(CERTIFICATES, results, strict=True):
        o = r.outcome
        assert o.verdict == "proved", (claim, o.message)
        assert o.space is not None
        assert (o.space["weight"], o.space["group"], o.space["character"]) == space, claim
        assert (o.method, o.bound) == (method, bound), claim
        assert o.terms_compared >= bound + 1, claim
        if dim is not None:
            assert o.space["dimension"] == dim, claim


def test_sturm_bounds_against_the_index() -> None:
    # docs/method.md#index values of m_0(N), N = 1..12 (computed here from P^1(Z/N)).
    assert [m0(n) for n in range(1, 13)] == [1, 3, 4, 6, 6, 12, 8, 12, 12, 18, 12, 24]
    # docs/method.md#sturm-bound sample values: B(1,12) = 1, B(4,2) = 1, B(11,2) = 2.
    assert (sturm(1, 12), sturm(4, 2), sturm(11, 2)) == (1, 1, 2)


def test_valence_certificate_of_the_weight_zero_identity() -> None:
    # docs/method.md#poles-at-cusps: Ligozat orders of X and Y at d = 1, 2, 4 are (1, -1, 0) and (0, -1, 1); the
    # lower bounds at the cusps other than infinity are min(., ., 0) = 0 and -1; the bound is
    # floor(0 * m/12 - (0 - 1)) = 1.
    x, y = {1: 16, 4: 8, 2: -24}, {1: 8, 4: 16, 2: -24}
    lx, ly = ligozat(x, 4), ligozat(y, 4)
    assert (lx[1], lx[2], lx[4]) == (1, -1, 0) and (ly[1], ly[2], ly[4]) == (0, -1, 1)
    lows = {d: min(lx[d], ly[d], 0) for d in (1, 2)}
    r = check(X_PLUS_Y)
    assert r.verdict == "proved" and r.outcome.method == "valence"
    assert r.outcome.bound == math.floor(-sum(lows.values())) == 1
    # A false variant is refuted at q^1 (X = 1 - 16q + ..., Y = 16q + ..., computed in the model).
    r = check(X_PLUS_Y.replace("+ 16", "- 16"))
    assert r.verdict == "refuted" and r.outcome.first_difference == {"n": 1, "left": "-32", "right": "0"}


def test_membership_certificate_lists_the_ligozat_orders() -> None:
    # eta_1^2 eta_2 eta_4 eta_8^2: GHN on Gamma_0(8) with character ((-1)^3 2*4*8^2 / d) = chi_{-8}
    # (docs/method.md#eta-modularity); every Ligozat order is positive (#ligozat), so it is a cusp form.
    exps = {1: 2, 2: 1, 4: 1, 8: 2}
    expected = ligozat(exps, 8)
    assert expected == {1: 1, 2: Fraction(1, 2), 4: Fraction(1, 2), 8: 1}
    r = check(r"\eta(\tau)^2\eta(2\tau)\eta(4\tau)\eta(8\tau)^2 \in S_3(\Gamma_0(8), \chi_{-8})")
    assert r.verdict == "proved" and r.outcome.method == "cusp-orders"
    got = {c["cusp_denominator"]: Fraction(c["order_at_least"]) for c in r.outcome.components}
    assert got == expected


# docs/method.md#dimension-gamma0 table (Diamond–Shurman Thm 3.5.1), N = 1..12.
DIM_TABLE = {
    ("M", 2): [0, 1, 1, 2, 1, 3, 1, 3, 3, 3, 2, 5],
    ("S", 2): [0, 0, 0, 0, 0, 0, 0, 0, 0, 0, 1, 0],
    ("M", 4): [1, 2, 2, 3, 3, 5, 3, 5, 5, 7, 4, 9],
    ("S", 4): [0, 0, 0, 0, 1, 1, 1, 1, 1, 3, 2, 3],
    ("M", 6): [1, 2, 3, 4, 3, 7, 5, 7, 7, 9, 6, 13],
    ("S", 6): [0, 0, 1, 1, 1, 3, 3, 3, 3, 5, 4, 7],
}


def test_dimension_claims_follow_the_table() -> None:
    claims = []
    for (letter, k), row in DIM_TABLE.items():
        for n, d in enumerate(row, start=1):
            claims.append(("", f"\\dim {letter}_{k}(\\Gamma_0({n})) = {d}"))
            claims.append(("", f"\\dim {letter}_{k}(\\Gamma_0({n})) = {d + 1}"))
    # docs/method.md#dimension-gamma0: dim S_2(Gamma_0(23)) = dim S_2(Gamma_0(37)) = 2, dim S_2(Gamma_0(48)) = 3.
    for n, d in ((23, 2), (37, 2), (48, 3)):
        claims.append(("", f"\\dim S_2(\\Gamma_0({n})) = {d}"))
        claims.append(("", f"\\dim S_2(\\Gamma_0({n})) = {d + 1}"))
    results = check_all(claims)
    for i in range(0, len(results), 2):
        assert results[i].verdict == "proved", results[i].source
        assert results[i].outcome.method == "dimension-formula"
        assert results[i + 1].verdict == "refuted", results[i + 1].source


# ---------------------------------------------------------------------------
# 2. Rescaling: fractional exponents in printed expansions and in refutations
# ---------------------------------------------------------------------------


def test_rescaling_eta_expansions() -> None:
    results = check_all(
        [
            # Euler's pentagonal number theorem: eta = sum chi_12(n) q^{n^2/24} (docs/method.md#half-integral-weight,
            # #eta-offset).
            ("", r"\eta(\tau) = q^{1/24} - q^{25/24} - q^{49/24} + q^{121/24} + q^{169/24} + \cdots"),
            ("", r"\eta(\tau) = q^{1/24} + q^{25/24} + \cdots"),
            # Jacobi: eta^3 = sum_{n>=0} (-1)^n (2n+1) q^{(2n+1)^2/8} (from memory; model below).
            ("", r"\eta(\tau)^3 = q^{1/8} - 3q^{9/8} + 5q^{25/8} - 7q^{49/8} + \cdots"),
            ("", r"\eta(\tau)^3 = q^{1/8} - 3q^{9/8} + 5q^{17/8} + \cdots"),
            # eta(tau)^12 = q^{1/2} - 12 q^{3/2} + ...: tau and 2 tau swapped.
            ("", r"\eta(\tau)^{12} = q - 12q^3 + \cdots"),
            ("", r"\eta(2\tau)^{12} = q - 12q^3 + 54q^5 + \cdots"),
        ]
    )
    model = eta_ser(((1, 3),))
    assert [model.c.get(Fraction(e, 8), 0) for e in (1, 9, 25, 49)] == [1, -3, 5, -7]
    assert [r.verdict for r in results] == ["proved", "refuted", "proved", "refuted", "refuted", "proved"]
    assert results[0].outcome.method == "expansion"
    assert results[1].outcome.first_difference == {"n": "25/24", "left": "-1", "right": "1"}
    assert results[3].outcome.first_difference == {"n": "17/8", "left": "0", "right": "5"}
    assert results[4].outcome.first_difference == {"n": "1/2", "left": "1", "right": "0"}


def test_mixed_offsets_refute_at_a_fraction() -> None:
    # theta_2 = sum q^{(n+1/2)^2} = 2 q^{1/4} + ... but 2 eta(2tau)^2/eta(tau) = 2 q^{1/8} + ...
    # (docs/method.md#theta-nome).
    r = check(r"\theta_2 = \frac{2\eta(2\tau)^2}{\eta(\tau)}")
    assert r.verdict == "refuted" and r.outcome.first_difference == {"n": "1/8", "left": "0", "right": "2"}
    # theta(tau) - theta(4 tau) is the sum over odd n, 2 eta(16tau)^2/eta(8tau), not its 1/2-shift.
    r = check(r"\theta(\tau) = \theta(4\tau) + \frac{2\eta(8\tau)^2}{\eta(4\tau)}")
    assert r.verdict == "refuted" and r.outcome.first_difference == {"n": "1/2", "left": "0", "right": "2"}


# ---------------------------------------------------------------------------
# 3. The nome
# ---------------------------------------------------------------------------

PI = "nome={e^{\\pi i\\tau}}"


def test_nome_changes_the_meaning_of_the_thetas() -> None:
    results = check_all(
        [
            # In q = e^{2 pi i tau}, theta_3 = theta and Jacobi's four-square theorem holds
            # (docs/method.md#sums-of-squares).
            ("", r"\theta_3^4 = \frac{4E_2(4\tau) - E_2(\tau)}{3}"),
            # In the nome, theta_3(tau) = theta(tau/2) = 1 + 8 q_N + ..., while the right side is
            # 1 + 8 q_N^2 + ...: refuted at q_N^1 (docs/method.md#theta-nome).
            (PI, r"\theta_3^4 = \frac{4E_2(4\tau) - E_2(\tau)}{3}"),
            # Jacobi's theta_3^4 = theta_2^4 + theta_4^4 holds in both readings (formal identity,
            # docs/method.md#theta-nome).
            ("", r"\theta_3^4 = \theta_2^4 + \theta_4^4"),
            (PI, r"\theta_3^4 = \theta_2^4 + \theta_4^4"),
            ("nome={e^{2\\pi i\\tau}}", r"\theta_3^4 = \theta_2^4 + \theta_4^4"),
            # theta_2 theta_3 theta_4 = 2 eta^3 in Jacobi's nome (docs/method.md#theta-nome); in q it is 2 eta(2tau)^3.
            (PI, r"\theta_2\theta_3\theta_4 = 2\eta(\tau)^3"),
            ("", r"\theta_2\theta_3\theta_4 = 2\eta(\tau)^3"),
            ("", r"\theta_2\theta_3\theta_4 = 2\eta(2\tau)^3"),
            # eta(tau) = q_N^{1/12} prod (1 - q_N^{2n}) in the nome q_N = q^{1/2}.
            (PI, r"\eta(\tau) = q^{1/12} - q^{25/12} - q^{49/12} + \cdots"),
            (PI, r"\eta(\tau) = q^{1/24} - q^{25/24} + \cdots"),
            # theta_2^2 = 4 q^{1/2} + ... has no partner on the left (wrong exponent).
            (PI, r"\theta_3^2 = \theta_2^2 + \theta_4^2"),
            (PI, r"\theta_2 = 2q^{1/4} + 2q^{9/4} + 2q^{25/4} + \cdots"),
            (PI, r"\theta_4 = \frac{\eta(\tau/2)^2}{\eta(\tau)}"),
        ]
    )
    verdicts = [r.verdict for r in results]
    assert verdicts == [
        "proved", "refuted", "proved", "proved", "proved", "proved", "refuted",
        "proved", "proved", "refuted", "refuted", "proved", "proved",
    ]  # fmt: skip
    assert results[1].outcome.first_difference == {"n": 1, "left": "8", "right": "0"}
    assert results[6].outcome.first_difference == {"n": "1/8", "left": "0", "right": "2"}
    assert results[9].outcome.first_difference == {"n": "1/24", "left": "0", "right": "1"}
    assert results[10].outcome.first_difference == {"n": "1/2", "left": "0", "right": "4"}


def test_unreadable_nome_is_an_error() -> None:
    r = check(r"\theta_3 = 1 + 2q + \cdots", "nome={e^{3\\pi i\\tau}}")
    assert r.verdict == "error" and r.outcome.code == "bad-option"


# ---------------------------------------------------------------------------
# 4. Groups and characters stated in the tag
# ---------------------------------------------------------------------------


def test_group_mismatch_names_the_atom_that_needs_the_larger_level() -> None:
    # E_4(2 tau) has level 2 (docs/method.md#hecke, V_2); E_4 alone is level one.
    r = check(r"E_4(\tau)E_4(2\tau) = E_4(2\tau)E_4(\tau)", "group=SL2(Z)")
    assert r.verdict == "error" and r.outcome.code == "group-mismatch"
    assert "E_4(2\\tau)" in r.outcome.message and "2" in r.outcome.message
    assert "E_4(\\tau) needs" not in r.outcome.message
    # eta(24 tau) has least level 576 (docs/method.md#eta-modularity); 288 is too small.
    r = check(r"\eta(24\tau) = q - q^{25} - q^{49} + \cdots", "group={\\Gamma_0(288)}")
    assert r.verdict == "error" and r.outcome.code == "group-mismatch"
    assert "\\eta(24\\tau)" in r.outcome.message and "576" in r.outcome.message
    # E_2(4 tau) and theta need level 4 (docs/method.md#e2, #eta-modularity); Gamma_0(2) is too small.
    r = check(r"\theta(\tau)^4 = \frac{4E_2(4\tau) - E_2(\tau)}{3}", "group={\\Gamma_0(2)}")
    assert r.verdict == "error" and r.outcome.code == "group-mismatch" and "4" in r.outcome.message
    # A level the claim needs, or a multiple of it, is accepted (docs/method.md#claim-identity: the lcm of the levels).
    for group in ("{\\Gamma_0(4)}", "{\\Gamma_0(12)}", "{\\Gamma_1(4)}"):
        r = check(FOUR_SQUARES, f"group={group}")
        assert r.verdict == "proved", group


def test_character_option() -> None:
    eta_theta2 = r"\theta(\tau)^2 = \frac{\eta(2\tau)^{10}}{\eta(\tau)^4\eta(4\tau)^4}"
    results = check_all(
        [
            # theta^2 in M_1(Gamma_0(4), chi_{-4}) (docs/method.md#half-integral-weight: squaring introduces chi_{-4}).
            ("character={\\chi_{-4}}", eta_theta2),
            ("character={\\chi_{-3}}", eta_theta2),
            ("character=trivial", eta_theta2),
            # x^2 + 3y^2: chi_{-3} (docs/method.md#theta-quadratic-forms).
            ("character={\\chi_{-3}}", r"\Theta_B = \theta(\tau)\theta(3\tau)"),
            ("character={\\chi_{-4}}", r"\Theta_B = \theta(\tau)\theta(3\tau)"),
            # eta_1^3 eta_7^3: GHN character ((-1)^3 7^3 / d) = chi_{-7} (docs/method.md#eta-modularity).
            ("character={\\chi_{-7}}", r"\eta(\tau)^3\eta(7\tau)^3 = q - 3q^2 + 5q^4 + \cdots"),
        ]
    )
    assert [r.verdict for r in results] == ["proved", "error", "error", "proved", "error", "proved"]
    assert {results[i].outcome.code for i in (1, 2, 4)} == {"character-mismatch"}


# ---------------------------------------------------------------------------
# 5. Membership: not modular, wrong character, half-integral weight
# ---------------------------------------------------------------------------

MEMBERSHIP = [
    # (claim, verdict, source)
    (
        r"\frac{\eta(\tau)^8}{\eta(2\tau)^4} \in M_2(\Gamma_0(4))",
        "proved",
        "docs/method.md#eta-modularity least level 4; #sums-of-squares orders (1,0,0)",
    ),
    (r"\frac{\eta(\tau)^8}{\eta(2\tau)^4} \in S_2(\Gamma_0(4))", "refuted", "constant term 1"),
    (
        r"\eta(\tau)^4\eta(2\tau)^4 \in S_4(\Gamma_0(8))",
        "refuted",
        "docs/method.md#eta-offset: s = 12, exponents in 1/2 + Z",
    ),
    (r"\eta(2\tau)^4\eta(4\tau)^4 \in S_4(\Gamma_0(8))", "proved", "docs/method.md#eta-modularity (DKM)"),
    (
        r"\eta(\tau)^2 \in S_1(\Gamma_0(12), \chi_{-4})",
        "refuted",
        "docs/method.md#eta-offset: s = 2, not invariant under tau -> tau + 1",
    ),
    (
        r"\eta(\tau) \in S_{1/2}(\Gamma_0(576), \chi_{12})",
        "refuted",
        "docs/method.md#eta-offset: exponents in 1/24 + Z",
    ),
    (
        r"\frac{\eta(4\tau)^{16}}{\eta(\tau)^8\eta(2\tau)^4} \in M_2(\Gamma_0(4))",
        "refuted",
        "docs/method.md#ligozat: order -1 at 0",
    ),
    (r"E_2(2\tau) \in M_2(\Gamma_0(2))", "refuted", "docs/method.md#e2: E_2 is only quasimodular"),
    (r"E_2(\tau) - 2E_2(2\tau) \in M_2(\Gamma_0(2))", "proved", "docs/method.md#e2"),
    (r"E_4(\tau) - E_4(2\tau) \in S_4(\Gamma_0(2))", "refuted", "docs/method.md#dimension-gamma0: S_4(Gamma_0(2)) = 0"),
    (
        r"\eta(\tau)^3\eta(7\tau)^3 \in S_3(\Gamma_0(7), \chi_{-7})",
        "proved",
        "docs/method.md#eta-modularity GHN character, #ligozat orders (1,1)",
    ),
    (
        r"\eta(\tau)^3\eta(7\tau)^3 \in S_3(\Gamma_0(7))",
        "refuted",
        "docs/method.md#characters parity: odd weight, trivial character",
    ),
    (r"\theta(\tau)^2 \in M_1(\Gamma_0(4))", "refuted", "docs/method.md#half-integral-weight: chi_{-4}"),
    (
        r"\theta(\tau)^2 \in M_1(\Gamma_0(4), \chi_{-4})",
        "proved",
        "docs/method.md#half-integral-weight, #sums-of-squares",
    ),
    (r"\Theta_A \in M_1(\Gamma_0(3), \chi_{-3})", "proved", "docs/method.md#theta-quadratic-forms"),
    (
        r"\Theta_A \in M_1(\Gamma_0(12), \chi_{-4})",
        "refuted",
        "docs/method.md#theta-quadratic-forms: chi_{-3}, and chi_{-3}(5) != chi_{-4}(5)",
    ),
    (r"\eta(2\tau)^{12} \in S_6(\Gamma_0(2))", "refuted", "docs/method.md#dimension-gamma0: S_6(Gamma_0(2)) = 0"),
    (
        r"\eta(\tau)^2\eta(11\tau)^2 \in S_2(\Gamma_0(1))",
        "refuted",
        "docs/method.md#dimension-level-one: S_2(SL_2(Z)) = 0",
    ),
    # Half-integral weight (docs/method.md#half-integral-weight).
    (r"\theta(\tau) \in M_{1/2}(\Gamma_0(4))", "proved", "docs/method.md#half-integral-weight (Shimura)"),
    (r"\theta(\tau)^3 \in M_{3/2}(\Gamma_0(4))", "proved", "docs/method.md#half-integral-weight"),
    (
        r"\theta(\tau)^3 \in M_{3/2}(\Gamma_0(4), \chi_{-4})",
        "refuted",
        "docs/method.md#half-integral-weight parity: chi must be even",
    ),
    (
        r"\eta(24\tau) \in S_{1/2}(\Gamma_0(576), \chi_{12})",
        "proved",
        "Shimura 1973; docs/method.md#half-integral-weight",
    ),
    (
        r"\eta(24\tau) \in M_{1/2}(\Gamma_0(576), \chi_{12})",
        "proved",
        "docs/method.md#half-integral-weight; S is inside M",
    ),
    (
        r"\eta(24\tau) \in S_{1/2}(\Gamma_0(576), \chi_{-3})",
        "refuted",
        "docs/method.md#half-integral-weight parity: chi_{-3} is odd",
    ),
    (
        r"\eta(24\tau) \in S_{1/2}(\Gamma_0(576))",
        "refuted",
        "docs/method.md#half-integral-weight: the character is chi_{12}",
    ),
    (
        r"\eta(24\tau)^2 \in S_1(\Gamma_0(288), \chi_{-4})",
        "proved",
        "docs/method.md#eta-modularity at N = 288: 288/24*2 = 24; #ligozat orders > 0",
    ),
]


def test_membership() -> None:
    results = check_all([("", c) for c, _, _ in MEMBERSHIP])
    for (claim, verdict, source), r in zip(MEMBERSHIP, results, strict=True):
        assert r.verdict == verdict, (claim, source, r.outcome.message)


def test_ligozat_facts_used_above() -> None:
    # Independent checks of the orders quoted in MEMBERSHIP (docs/method.md#ligozat).
    assert ligozat({4: 16, 1: -8, 2: -4}, 4) == {1: -1, 2: 0, 4: 2}
    assert ligozat({1: 8, 2: -4}, 4) == {1: 1, 2: 0, 4: 0}
    assert ligozat({1: 3, 7: 3}, 7) == {1: 1, 7: 1}
    assert min(ligozat({24: 2}, 288).values()) > 0


def test_half_integral_identities() -> None:
    results = check_all(
        [
            ("weight=3/2", r"\theta(\tau)^3 = \frac{\eta(2\tau)^{15}}{\eta(\tau)^6\eta(4\tau)^6}"),
            # r_3 (brute force in the model): 7 is not a sum of three squares.
            ("", r"\theta^3 = 1 + 6q + 12q^2 + 8q^3 + 6q^4 + 24q^5 + 24q^6 + 12q^8 + 30q^9 + \cdots"),
            ("", r"\theta^3 = 1 + 6q + 12q^2 + 8q^3 + 6q^4 + 24q^5 + 24q^6 + 6q^7 + \cdots"),
            # theta = theta(4 tau) + 2 eta(16tau)^2/eta(8tau) (docs/method.md#theta-nome with n even / odd).
            ("", r"\theta(\tau) = \theta(4\tau) + \frac{2\eta(16\tau)^2}{\eta(8\tau)}"),
            # eta(8 tau)^3 = q - 3q^9 + ...: the right side has q-coefficient 8, the left 6.
            ("", r"\theta(\tau)^3 = \frac{\eta(2\tau)^{15}}{\eta(\tau)^6\eta(4\tau)^6} + 2\eta(8\tau)^3"),
            # eta(24 tau) = sum chi_12(n) q^{n^2} (Euler), level 576.
            ("group={\\Gamma_0(576)}", r"\eta(24\tau) = q - q^{25} - q^{49} + q^{121} + q^{169} + \cdots"),
        ]
    )
    three = value(((Fraction(1), (Fac("theta", 1, 3),)),))
    assert [three.c.get(Fraction(n), 0) for n in range(10)] == [1, 6, 12, 8, 6, 24, 24, 0, 12, 30]
    assert [r.verdict for r in results] == ["proved", "proved", "refuted", "proved", "refuted", "proved"]
    assert results[0].outcome.space == {"weight": "3/2", "group": "Gamma0(4)", "character": "trivial"}
    assert results[2].outcome.first_difference == {"n": 7, "left": "0", "right": "6"}
    assert results[4].outcome.first_difference == {"n": 1, "left": "6", "right": "8"}


def test_false_eta_quotient_with_fractional_offset_is_refuted() -> None:
    # Wrong exponents: each right side is an eta quotient with sum delta r_delta not divisible by
    # 24 (offsets 1/8, 1/8, 11/24 by docs/method.md#eta-offset), the left side has constant term 1, so the sides
    # differ at q^0 (left 1, right 0; also checked in the model). Nothing divides by zero.
    claims = [
        r"\theta(\tau)^2 = \frac{\eta(2\tau)^{10}}{\eta(\tau)^{5}\eta(4\tau)^{3}}",
        r"\theta(\tau)^3 = \frac{\eta(2\tau)^{15}}{\eta(\tau)^{7}\eta(4\tau)^{5}}",
        r"\theta(\tau)^2 = \frac{\eta(4\tau)^{3}}{\eta(\tau)}",
        r"\frac{\eta(2\tau)^{10}}{\eta(\tau)^{4}\eta(4\tau)^{4}}"
        r" = \frac{\eta(2\tau)^{10}}{\eta(\tau)^{5}\eta(4\tau)^{3}}",
    ]
    assert first_difference(value((T(1, Fac("theta", 1, 2)),)), value((T(1, eta(e2=10, e1=-5, e4=-3)),))) == 0
    for r in check_all([("", c) for c in claims]):
        assert r.verdict == "refuted", (r.source, r.outcome.code, r.outcome.message)
        assert r.outcome.first_difference == {"n": 0, "left": "1", "right": "0"}, r.source


# ---------------------------------------------------------------------------
# 6. Soundness battery: perturbed true identities are never proved
# ---------------------------------------------------------------------------


def _perturb(rng: random.Random, lhs: Side, rhs: Side) -> tuple[str, Side, Side]:
    """One change to one side: a coefficient, an eta exponent, a scaling d, or a power."""
    sides = [list(lhs), list(rhs)]
    which = rng.randrange(2)
    side = sides[which]
    i = rng.randrange(len(side))
    c, facs = side[i]
    kinds = ["coefficient"]
    if any(f.kind == "eta" and len(f.data) >= 2 for f in facs):
        kinds.append("exponent")
    if any(f.kind in ("E", "theta", "eta") for f in facs):
        kinds.append("delta")
    if any(f.kind in ("theta", "A2", "sum") for f in facs):
        kinds.append("power")
    kind = rng.choice(kinds)
    if kind == "coefficient":
        new_c = c + rng.choice([1, -1, 2, Fraction(1, 2)]) if c.denominator == 1 else c * rng.choice([2, -1, 3])
        side[i] = (new_c, facs)
    else:
        j = rng.choice([k for k, f in enumerate(facs) if _fits(kind, f)])
        f = facs[j]
        if kind == "exponent":
            exps = list(f.data)
            a, b = rng.sample(range(len(exps)), 2)
            exps[a] = (exps[a][0], exps[a][1] + 1)
            exps[b] = (exps[b][0], exps[b][1] - 1)
            new = Fac("eta", tuple((d, r) for d, r in exps if r), f.power)
        elif kind == "delta":
            if f.kind == "eta":
                exps = list(f.data)
                a = rng.randrange(len(exps))
                merged: dict[int, int] = {}
                for k, (d, r) in enumerate(exps):
                    dd = 2 * d if k == a else d
                    merged[dd] = merged.get(dd, 0) + r
                new = Fac("eta", tuple(sorted((d, r) for d, r in merged.items() if r)), f.power)
            elif f.kind == "E":
                k, d = f.data
                new = Fac("E", (k, d * rng.choice([2, 3])), f.power)
            else:
                new = Fac("theta", f.data * 2, f.power)
        else:
            new = Fac(f.kind, f.data, f.power + rng.choice([1, -1] if f.power > 1 else [1]))
        side[i] = (c, (*facs[:j], new, *facs[j + 1 :]))
    return kind, tuple(sides[0]), tuple(sides[1])


def _fits(kind: str, f: Fac) -> bool:
    if kind == "exponent":
        return f.kind == "eta" and len(f.data) >= 2
    if kind == "delta":
        return f.kind in ("E", "theta", "eta")
    return f.kind in ("theta", "A2", "sum")


def test_soundness_battery() -> None:
    rng = random.Random(20240613)
    cases: list[tuple[str, str, Fraction]] = []
    seen: set[str] = set()
    while len(cases) < 40:
        name, lhs, rhs = rng.choice(TRUE_IDENTITIES)
        kind, new_lhs, new_rhs = _perturb(rng, lhs, rhs)
        diff = first_difference(value(new_lhs), value(new_rhs))
        text = f"{render(new_lhs)} = {render(new_rhs)}"
        if diff is None or text in seen:
            continue  # the change left a true identity (or a repeat): not a perturbation to test
        seen.add(text)
        cases.append((f"{name}/{kind}", text, diff))
    results = check_all([("", text) for _, text, _ in cases])
    for (label, text, diff), r in zip(cases, results, strict=True):
        assert r.verdict != "proved", (label, text)
        if r.verdict == "refuted":
            n = r.outcome.first_difference["n"] if r.outcome.first_difference else None
            assert Fraction(str(n)) == diff, (label, text, n, diff)
    # The battery must exercise refutations, not only errors.
    assert sum(r.verdict == "refuted" for r in results) >= 30
