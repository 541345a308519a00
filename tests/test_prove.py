"""End-to-end verdicts through :func:`verifier.check_text`, against sources outside the engine.

Every expected value is either quoted from a published table (named beside the case, with
the section of docs/method.md that states the formula) or computed here, independently of the
engine, from ``sympy.divisor_sigma``, ``sympy.bernoulli`` and the product
``q prod (1 - q^n)^24`` with plain ``Fraction`` arithmetic.

The claim cases are data: one list, one parametrised test (STYLE.md, lesson 7).
"""

from __future__ import annotations

import random
from collections.abc import Callable
from dataclasses import dataclass
from fractions import Fraction
from functools import cache

import pytest
import sympy
from verifier import check_text
from verifier.api import ClaimResult

# ---------------------------------------------------------------------------
# An independent exact Laurent-series model (not the engine's)
# ---------------------------------------------------------------------------

PREC = 24  # coefficients are exact for exponents < PREC


class L:
    """A truncated Laurent series in q with exact rational coefficients."""

    def __init__(self, coeffs: dict[int, Fraction] | None = None) -> None:
        self.c = {n: Fraction(a) for n, a in (coeffs or {}).items() if a and n < PREC}

    def __getitem__(self, n: int) -> Fraction:
        return self.c.get(n, Fraction(0))

    def __add__(self, other: L | int | Fraction) -> L:
        other = _lift(other)
        keys = set(self.c) | set(other.c)
        return L({n: self[n] + other[n] for n in keys})

    __radd__ = __add__

    def __neg__(self) -> L:
        return L({n: -a for n, a in self.c.items()})

    def __sub__(self, other: L | int | Fraction) -> L:
        return self + (-_lift(other))

    def __rsub__(self, other: L | int | Fraction) -> L:
        return _lift(other) - self

    def __mul__(self, other: L | int | Fraction) -> L:
        other = _lift(other)
        out: dict[int, Fraction] = {}
        for i, a in self.c.items():
            for j, b in other.c.items():
                if i + j < PREC:
                    out[i + j] = out.get(i + j, Fraction(0)) + a * b
        return L(out)

    __rmul__ = __mul__

    def __pow__(self, e: int) -> L:
        out = L({0: Fraction(1)})
        for _ in range(e):
            out = out * self
        return out

    def valuation(self) -> int:
        return min(self.c)

    def inverse(self) -> L:
        """1/self, by the recursion for the inverse of a unit power series."""
        v = self.valuation()
        lead = self[v]
        u = [self[v + i] / lead for i in range(PREC + 2)]
        inv = [Fraction(1)]
        for n in range(1, PREC + 2):
            inv.append(-sum(u[i] * inv[n - i] for i in range(1, n + 1)))
        return L({n - v: inv[n] / lead for n in range(PREC + 2)})

    def first_difference(self, other: L, start: int = -5) -> int | None:
        for n in range(start, PREC):
            if self[n] != other[n]:
                return n
        return None


def _lift(x: L | int | Fraction) -> L:
    return x if isinstance(x, L) else L({0: Fraction(x)})


def poly(coeffs: dict[int, int | Fraction]) -> L:
    """A printed expansion (exactly the printed coefficients, others 0)."""
    return L({n: Fraction(a) for n, a in coeffs.items()})


@cache
def E(k: int, d: int = 1) -> L:
    """E_k(d tau) = 1 - (2k/B_k) sum sigma_{k-1}(n) q^{dn}  (docs/method.md#eisenstein; Serre VII §4.2)."""
    const = Fraction(-2 * k) / Fraction(str(sympy.bernoulli(k)))
    coeffs = {0: Fraction(1)}
    for n in range(1, PREC):
        if d * n < PREC:
            coeffs[d * n] = const * int(sympy.divisor_sigma(n, k - 1))
    return L(coeffs)


@cache
def Delta() -> L:
    """Delta = q prod (1 - q^n)^24  (docs/method.md#delta-eta-j; Apostol Ch. 3)."""
    out = L({1: Fraction(1)})
    for n in range(1, PREC):
        out = out * (L({0: Fraction(1), n: Fraction(-1)}) ** 24)
    return out


@cache
def J() -> L:
    """j = E_4^3 / Delta  (docs/method.md#delta-eta-j)."""
    return E(4) ** 3 * Delta().inverse()


def m0(n: int) -> int:
    """[SL_2(Z) : Gamma_0(N)] = N prod_{p|N} (1 + 1/p)  (docs/method.md#index)."""
    m = Fraction(n)
    for p in sympy.primefactors(n):
        m *= Fraction(p + 1, p)
    return int(m)


def sturm(k: int, level: int) -> int:
    """B(N, k) = floor(k m_0(N) / 12)  (docs/method.md#sturm-bound; Sturm, LNM 1240)."""
    return k * m0(level) // 12


def test_independent_model_against_published_tables() -> None:
    # tau(1..12) (Ramanujan 1916 table; Serre VII §4.5).
    tau = [1, -24, 252, -1472, 4830, -6048, -16744, 84480, -113643, -115920, 534612, -370944]
    assert [Delta()[n] for n in range(1, 13)] == tau
    # j coefficients c(-1..4) (Apostol Ch. 1; Serre VII §3.3).
    assert [J()[n] for n in range(-1, 5)] == [1, 744, 196884, 21493760, 864299970, 20245856256]
    # Serre, A Course in Arithmetic, Ch. VII §4: E_6 = 1 - 504q - 16632q^2 - 122976q^3 - 532728q^4 - 1575504q^5.
    assert [E(6)[n] for n in range(6)] == [1, -504, -16632, -122976, -532728, -1575504]


# ---------------------------------------------------------------------------
# Claim cases: (latex, verdict, first differing n) plus what to check beside them
# ---------------------------------------------------------------------------


@dataclass(frozen=True)
class Case:
    latex: str
    verdict: str
    n: int | None = None
    # Independent (left, right) series; the engine's first_difference values must match them at n.
    sides: Callable[[], tuple[L, L]] | None = None
    # For Sturm proofs: (space weight, group, top component weight, level); bound = B(level, weight).
    sturm: tuple[str, str, int, int] | None = None
    kind: str | None = None
    source: str = ""


SL2 = "SL2(Z)"

CASES: list[tuple[str, Case]] = [
    # --- true identities of level one, proved by the Sturm bound -------------------------
    ("e8", Case("E_8 = E_4^2", "proved", sturm=("8", SL2, 8, 1), source="docs/method.md#eisenstein; Serre VII §4")),
    ("e10", Case("E_{10} = E_4 E_6", "proved", sturm=("10", SL2, 10, 1), source="docs/method.md#eisenstein")),
    ("e14", Case("E_{14} = E_4^2 E_6", "proved", sturm=("14", SL2, 14, 1), source="docs/method.md#eisenstein")),
    (
        "e12-691",
        Case("691E_{12} = 441E_4^3 + 250E_6^2", "proved", sturm=("12", SL2, 12, 1), source="docs/method.md#eisenstein"),
    ),
    (
        "e12-frac",
        Case(
            "E_{12} = \\frac{441}{691}E_4^3 + \\dfrac{250}{691}E_6^2",
            "proved",
            sturm=("12", SL2, 12, 1),
            source="docs/method.md#eisenstein (same identity, divided by 691)",
        ),
    ),
    (
        "e12-inverse",
        Case(
            "E_{12} = 691^{-1}\\left(441 E_4^3 + 250 E_6^2\\right)",
            "proved",
            sturm=("12", SL2, 12, 1),
            source="docs/method.md#eisenstein",
        ),
    ),
    (
        "delta",
        Case(
            "1728\\Delta = E_4^3 - E_6^2",
            "proved",
            sturm=("12", SL2, 12, 1),
            source="docs/method.md#delta-eta-j; Serre VII §4",
        ),
    ),
    (
        "delta-cdot",
        Case(
            "\\Delta = \\tfrac{1}{1728} \\cdot (E_4^3 - E_6^2)",
            "proved",
            sturm=("12", SL2, 12, 1),
            source="docs/method.md#delta-eta-j",
        ),
    ),
    (
        "e4e8",
        Case(
            "E_4 \\times E_8 = E_6^2 + 1728\\Delta",
            "proved",
            sturm=("12", SL2, 12, 1),
            source="docs/method.md#eisenstein, #delta-eta-j",
        ),
    ),
    # j = E_4^3/Delta: denominators of weight 12 on each side are cleared, so the
    # difference lives in weight 0 + 24 (docs/method.md#claim-identity step 1, #sturm-bound).
    (
        "j-def",
        Case("j = \\frac{E_4^3}{\\Delta}", "proved", sturm=("0", SL2, 24, 1), source="docs/method.md#delta-eta-j"),
    ),
    (
        "j-1728",
        Case(
            "j - 1728 = \\frac{E_6^2}{\\Delta}",
            "proved",
            sturm=("0", SL2, 24, 1),
            source="docs/method.md#delta-eta-j: divide E_4^3 - E_6^2 = 1728 Delta by Delta",
        ),
    ),
    # --- E_2 and level 2/4 -------------------------------------------------------------
    # E_2(tau) - N E_2(N tau) is in M_2(Gamma_0(N)) (docs/method.md#e2; Zagier 1-2-3 §2.3).
    (
        "level2-square",
        Case(
            "\\left(2E_2(2\\tau) - E_2(\\tau)\\right)^2 = \\tfrac{1}{5}\\left(E_4(\\tau) + 4E_4(2\\tau)\\right)",
            "proved",
            sturm=("4", "Gamma0(2)", 4, 2),
            source="docs/method.md#e2, #sturm-bound; dim M_4(Gamma_0(2)) = 2 (#dimensions), checked on a_0, a_1 here",
        ),
    ),
    (
        "level4-linear",
        Case(
            "E_2(\\tau) - 4E_2(4\\tau) = E_2(\\tau) - 2E_2(2\\tau) + 2(E_2(2\\tau) - 2E_2(4\\tau))",
            "proved",
            sturm=("2", "Gamma0(4)", 2, 4),
            source="docs/method.md#e2 (each bracket in M_2(Gamma_0(N)))",
        ),
    ),
    (
        "quasimodular-split",
        Case(
            "E_2 E_4^2 = E_2 E_8",
            "proved",
            sturm=("10", SL2, 8, 1),
            source="docs/method.md#quasimodular: the E_2^1 component lies in M_8",
        ),
    ),
    # --- false variants: refuted at the first differing coefficient -------------------------
    (
        "e12-691-wrong",
        Case(
            "691E_{12} = 441E_4^3 + 251E_6^2",
            "refuted",
            0,
            lambda: (691 * E(12), 441 * E(4) ** 3 + 251 * E(6) ** 2),
            source="docs/method.md#eisenstein",
        ),
    ),
    (
        "e12-denominator-typo",
        Case(
            "E_{12} = \\frac{441}{619}E_4^3 + \\frac{250}{691}E_6^2",
            "refuted",
            0,
            lambda: (E(12), Fraction(441, 619) * E(4) ** 3 + Fraction(250, 691) * E(6) ** 2),
            source="docs/method.md#eisenstein",
        ),
    ),
    (
        "delta-sign",
        Case(
            "1728\\Delta = E_4^3 + E_6^2",
            "refuted",
            0,
            lambda: (1728 * Delta(), E(4) ** 3 + E(6) ** 2),
            source="docs/method.md#delta-eta-j",
        ),
    ),
    (
        "delta-factor",
        Case("1727\\Delta = E_4^3 - E_6^2", "refuted", 1, lambda: (1727 * Delta(), E(4) ** 3 - E(6) ** 2)),
    ),
    (
        "e4e8-e12",
        Case(
            "E_4 E_8 = E_{12}",
            "refuted",
            1,
            lambda: (E(4) * E(8), E(12)),
            source="docs/method.md#eisenstein: E_12 differs from E_4^3 by a multiple of Delta",
        ),
    ),
    (
        "quasimodular-wrong",
        Case(
            "E_2 E_8 = E_4 E_6",
            "refuted",
            1,
            lambda: (E(2) * E(8), E(4) * E(6)),
            source="docs/method.md#e2, #quasimodular",
        ),
    ),
    (
        "level2-wrong",
        Case(
            "\\left(2E_2(2\\tau) - E_2(\\tau)\\right)^2 = \\tfrac{1}{5}\\left(E_4(\\tau) + 3E_4(2\\tau)\\right)",
            "refuted",
            0,
            lambda: ((2 * E(2, 2) - E(2)) ** 2, Fraction(1, 5) * (E(4) + 3 * E(4, 2))),
            source="docs/method.md#e2",
        ),
    ),
    (
        "level4-wrong",
        Case(
            "E_2(\\tau) - 4E_2(4\\tau) = E_2(\\tau) - 2E_2(2\\tau) + 2(E_2(2\\tau) - 3E_2(4\\tau))",
            "refuted",
            0,
            lambda: (E(2) - 4 * E(2, 4), E(2) - 2 * E(2, 2) + 2 * (E(2, 2) - 3 * E(2, 4))),
        ),
    ),
    (
        "j-const",
        Case(
            "j = 1728",
            "refuted",
            -1,
            lambda: (J(), L({0: Fraction(1728)})),
            source="docs/method.md#delta-eta-j, #poles-at-cusps",
        ),
    ),
    # --- sides of different weights: refuted (a form of weight k is never one of weight k') ---
    (
        "weights-4-6",
        Case("E_4 = E_6", "refuted", 1, lambda: (E(4), E(6)), source="docs/method.md#quasimodular (graded ring)"),
    ),
    ("weights-12-6", Case("E_{12} = E_6", "refuted", 1, lambda: (E(12), E(6)))),
    ("weights-4-0", Case("E_4 = 1", "refuted", 1, lambda: (E(4), L({0: Fraction(1)})))),
    (
        "weights-10-12",
        Case(
            "E_{10} = E_4 E_8",
            "refuted",
            1,
            lambda: (E(10), E(4) * E(8)),
            source="docs/method.md#eisenstein (weight index swapped)",
        ),
    ),
    (
        "weights-level2",
        Case("\\Delta(2\\tau) = \\Delta^2", "refuted", 3, lambda: (_rescale(Delta(), 2), Delta() ** 2)),
    ),
    # --- \neq claims -----------------------------------------------------------------------
    (
        "neq-true",
        Case("E_4 \\neq E_6", "proved", 1, lambda: (E(4), E(6)), kind="inequality"),
    ),
    (
        "neq-quasimodular",
        Case("E_2^2 \\neq E_4", "proved", 1, lambda: (E(2) ** 2, E(4)), kind="inequality", source="docs/method.md#e2"),
    ),
    ("neq-false", Case("E_4^2 \\neq E_8", "refuted", kind="inequality", source="docs/method.md#eisenstein")),
    ("neq-false-12", Case("E_4 E_8 \\neq E_6^2 + 1728\\Delta", "refuted", kind="inequality")),
    # --- printed expansions (a claim about exactly the printed coefficients) ----------------
    (
        "prefix-e4",
        Case(
            "E_4 = 1 + 240q + 2160q^2 + 6720q^3 + 17520q^4 + 30240q^5 + \\cdots",
            "proved",
            kind="prefix",
            source="Serre VII §4; Zagier 1-2-3 §2",
        ),
    ),
    (
        "prefix-e10",
        Case("E_{10} = 1 - 264q - 135432q^2 - 5196576q^3 + O(q^{4})", "proved", kind="prefix", source="Serre VII §4"),
    ),
    (
        "prefix-e12",
        Case(
            "691E_{12} = 691 + 65520q + 134250480q^2 + \\cdots",
            "proved",
            kind="prefix",
            source="Serre VII §4: E_12 = 1 + 65520/691 (q + 2049q^2 + ...)",
        ),
    ),
    (
        "prefix-tau",
        Case(
            "\\Delta = q - 24q^2 + 252q^3 - 1472q^4 + 4830q^5 - 6048q^6 - 16744q^7 + 84480q^8"
            " - 113643q^9 - 115920q^{10} + 534612q^{11} - 370944q^{12} + O(q^{13})",
            "proved",
            kind="prefix",
            source="tau(1..12), Ramanujan 1916 table",
        ),
    ),
    (
        "prefix-j",
        Case(
            "j = q^{-1} + 744 + 196884q + 21493760q^2 + 864299970q^3 + 20245856256q^4 + O(q^{5})",
            "proved",
            kind="prefix",
            source="Apostol Ch. 1; Serre VII §3.3",
        ),
    ),
    (
        "prefix-j-744",
        Case(
            "j - 744 = q^{-1} + 196884q + 21493760q^2 + \\cdots",
            "proved",
            kind="prefix",
            source="docs/method.md#delta-eta-j",
        ),
    ),
    (
        "prefix-j-no-pole",
        Case(
            "j - 744 = 196884q + 21493760q^2 + \\cdots",
            "refuted",
            -1,
            lambda: (J() - 744, poly({1: 196884, 2: 21493760})),
            kind="prefix",
            source="docs/method.md#poles-at-cusps: the principal part q^{-1} must be compared",
        ),
    ),
    (
        "prefix-ramanujan-e4",
        Case(
            "\\frac{E_2 E_4 - E_6}{720} = q + 18q^2 + 84q^3 + 292q^4 + 630q^5 + O(q^{6})",
            "proved",
            kind="prefix",
            source="docs/method.md#derivatives: DE_4 = (E_2E_4 - E_6)/3, so the series is sum n sigma_3(n) q^n",
        ),
    ),
    (
        "prefix-ramanujan-e2",
        Case(
            "\\frac{E_2^2 - E_4}{12} = -24q - 144q^2 - 288q^3 + \\cdots",
            "proved",
            kind="prefix",
            source="docs/method.md#derivatives: DE_2 = (E_2^2 - E_4)/12 = -24 sum n sigma(n) q^n",
        ),
    ),
    (
        "prefix-ramanujan-delta",
        Case(
            "E_2\\Delta = q - 48q^2 + 756q^3 - 5888q^4 + \\cdots",
            "proved",
            kind="prefix",
            source="docs/method.md#derivatives: D Delta = E_2 Delta = sum n tau(n) q^n",
        ),
    ),
    (
        "prefix-level2",
        Case(
            "E_2(\\tau) - 2E_2(2\\tau) = -1 - 24q - 24q^2 - 96q^3 - 24q^4 - 144q^5 + \\cdots",
            "proved",
            kind="prefix",
            source="docs/method.md#e2; -1 - 24 sum sigma_odd(n) q^n",
        ),
    ),
    (
        "prefix-wrong-term",
        Case(
            "E_6 = 1 - 504q - 16632q^2 - 122967q^3 + \\cdots",
            "refuted",
            3,
            lambda: (E(6), poly({0: 1, 1: -504, 2: -16632, 3: -122967})),
            kind="prefix",
            source="Serre VII §4",
        ),
    ),
    (
        "prefix-missing-middle",
        Case(
            "E_4 = 1 + 240q + 6720q^3 + \\cdots",
            "refuted",
            2,
            lambda: (E(4), poly({0: 1, 1: 240, 3: 6720})),
            kind="prefix",
        ),
    ),
    (
        "prefix-big-o-claims-zeros",
        Case(
            "E_4 = 1 + 240q + 2160q^2 + O(q^{5})",
            "refuted",
            3,
            lambda: (E(4), poly({0: 1, 1: 240, 2: 2160})),
            kind="prefix",
        ),
    ),
    (
        "prefix-neq-true",
        Case(
            "E_4 \\neq 1 + 240q + 2161q^2 + \\cdots",
            "proved",
            2,
            lambda: (E(4), poly({0: 1, 1: 240, 2: 2161})),
            kind="prefix",
        ),
    ),
    ("prefix-neq-false", Case("E_4 \\neq 1 + 240q + \\cdots", "refuted", kind="prefix")),
]


def _rescale(s: L, d: int) -> L:
    return L({d * n: a for n, a in s.c.items()})


def _check_one(latex: str) -> ClaimResult:
    report = check_text("%@claim\n\\[ " + latex + " \\]\n", "case.tex")
    assert len(report.claims) == 1, [c.outcome.message for c in report.claims]
    return report.claims[0]


@pytest.mark.parametrize("case", [pytest.param(c, id=name) for name, c in CASES])
def test_claim(case: Case) -> None:
    claim = _check_one(case.latex)
    o = claim.outcome
    assert o.verdict == case.verdict, o.message
    if case.kind is not None:
        assert o.kind == case.kind
    if case.n is None:
        assert o.first_difference is None
    else:
        fd = o.first_difference
        assert fd is not None and fd["n"] == case.n, o.message
        assert case.sides is not None
        left, right = case.sides()
        # The data is consistent with the independent model ...
        assert left.first_difference(right) == case.n
        # ... and the engine reports the same two values.
        assert Fraction(fd["left"]) == left[case.n]
        assert Fraction(fd["right"]) == right[case.n]
    if case.sturm is not None:
        weight, group, top_weight, level = case.sturm
        assert o.method == "sturm"
        assert o.bound == sturm(top_weight, level)
        assert o.space["weight"] == weight
        assert o.space["group"] == group
    if o.kind == "prefix":
        assert o.method == "expansion"
    elif o.kind == "inequality" and o.verdict == "proved":
        assert o.method == "witness"  # README: a proved \neq is certified by a witness


def test_sturm_bound_values_from_math_md() -> None:
    # docs/method.md#sturm-bound sample values: B(1, 12) = 1, B(4, 2) = 1, B(11, 2) = 2.
    assert sturm(12, 1) == 1 and sturm(2, 4) == 1 and sturm(2, 11) == 2


def test_chain_gives_one_claim_per_relation() -> None:
    report = check_text("%@claim name=c\n\\[ E_6 E_8 = E_{14} = E_4 E_{10} \\]\n", "c.tex")
    assert [c.verdict for c in report.claims] == ["proved", "proved"]
    assert [c.name for c in report.claims] == ["c", "c.2"]
    assert all(c.outcome.bound == sturm(14, 1) for c in report.claims)


def test_define_then_use() -> None:
    text = "%@define F = E_4 E_6\n%@claim\n\\[ F = E_{10} \\]\n%@claim\n\\[ F = E_{12} \\]\n"
    first, second = check_text(text, "d.tex").claims
    assert first.verdict == "proved"
    assert second.verdict == "refuted"
    assert second.outcome.first_difference["n"] == 1
    assert Fraction(second.outcome.first_difference["left"]) == (E(4) * E(6))[1]


def test_newcommand_macros_are_expanded() -> None:
    text = (
        "\\newcommand{\\Eis}[1]{E_{#1}}\n\\newcommand{\\disc}{\\Delta}\n"
        "%@claim\n\\[ 1728\\disc = \\Eis{4}^3 - \\Eis{6}^2 \\]\n"
    )
    (claim,) = check_text(text, "m.tex").claims
    assert claim.verdict == "proved"


def test_align_rows_and_continuation() -> None:
    text = (
        "%@claim name=a\n\\begin{align}\n"
        "  E_{12} &= \\frac{441}{691}E_4^3 + \\frac{250}{691}E_6^2 \\\\\n"
        "         &= E_4^3 - \\frac{432000}{691}\\Delta \\\\\n"
        "         &= E_4^3 - \\frac{432001}{691}\\Delta\n"
        "\\end{align}\n"
    )
    claims = check_text(text, "a.tex").claims
    assert [c.verdict for c in claims] == ["proved", "proved", "refuted"]
    # The third row continues from the second row's right side.
    fd = claims[2].outcome.first_difference
    assert fd["n"] == 1
    second = E(4) ** 3 - Fraction(432000, 691) * Delta()
    third = E(4) ** 3 - Fraction(432001, 691) * Delta()
    assert (Fraction(fd["left"]), Fraction(fd["right"])) == (second[1], third[1])
    assert [c.location.line for c in claims] == [3, 4, 5]


def test_markdown_claims() -> None:
    text = (
        "# note\n\n<!-- @define G = E_4 E_6 -->\n\n<!-- @claim name=g -->\n$$ G = E_{10} $$\n\n"
        "<!-- @claim name=h -->\n```math\nE_4 = 1 + 240q + 2160q^2 + \\cdots\n```\n"
    )
    claims = check_text(text, "n.md", markdown=True).claims
    assert [(c.name, c.verdict) for c in claims] == [("g", "proved"), ("h", "proved")]


# ---------------------------------------------------------------------------
# Errors: (latex, code); options
# ---------------------------------------------------------------------------

ERRORS = [
    ("mixed-weight", "E_4 + E_6 = E_{10}", "mixed-weight"),
    ("mixed-weight-right", "E_4^3 = E_4^2 - 720\\Delta", "mixed-weight"),
    ("zero-division-form", "\\frac{1}{E_4^3 - E_6^2 - 1728\\Delta} = E_4", "zero-division"),
    ("zero-division-constant", "E_4/0 = E_4", "zero-division"),
    ("too-large-exponent", "\\Delta^{100000} = \\Delta", "too-large"),
    ("budget-default", "E_{4000}(9973\\tau) = E_{4000}(9973\\tau)", "budget"),
    ("unknown-symbol", "E_4 E_6 = F_{10}", "unknown-symbol"),
    ("not-exact", "E_4 E_6 = 1.5 E_{10}", "not-exact"),
]


@pytest.mark.parametrize(("latex", "code"), [pytest.param(t, c, id=i) for i, t, c in ERRORS])
def test_error_codes(latex: str, code: str) -> None:
    claim = _check_one(latex)
    assert claim.verdict == "error"
    assert claim.outcome.code == code


def test_budget_from_max_terms() -> None:
    # E_4^{3000} lies in M_{12000}: B = 1000, so 1001 coefficients are needed.
    text = "%@claim\n\\[ E_4^{3000} = E_4^{3000} \\]\n"
    (over,) = check_text(text, "b.tex", max_terms=500).claims
    assert over.verdict == "error" and over.outcome.code == "budget"
    (within,) = check_text(text, "b.tex", max_terms=2000).claims
    assert within.verdict == "proved" and within.outcome.bound == sturm(12000, 1)


def test_mixed_weight_location_points_into_the_claim() -> None:
    (claim,) = check_text("%@claim\n\\[ E_4 + E_6 = E_{10} \\]\n", "w.tex").claims
    assert claim.location.line == 2
    assert 4 <= claim.location.column <= 12


OPTIONS = [
    ("weight-and-group-agree", "weight=8 group={SL_2(\\mathbb Z)}", "E_4^2 = E_8", "proved", None),
    ("weight-disagrees", "weight=10", "E_4^2 = E_8", "error", "weight-mismatch"),
    ("weight-on-expansion", "weight=12", "E_4^3 = 1 + 720q + O(q^2)", "proved", None),
    (
        "group-level-two",
        "weight=4 group=\\Gamma_0(2)",
        "(2E_2(2\\tau) - E_2(\\tau))^2 = \\frac{E_4(\\tau) + 4E_4(2\\tau)}{5}",
        "proved",
        None,
    ),
    (
        "group-multiple-level",
        "group=\\Gamma_0(4)",
        "(2E_2(2\\tau) - E_2(\\tau))^2 = \\frac{E_4(\\tau) + 4E_4(2\\tau)}{5}",
        "proved",
        None,
    ),
    (
        "group-too-small",
        "group={SL_2(\\mathbb Z)}",
        "E_2(\\tau) - 2E_2(2\\tau) = -1 - 24q + \\cdots",
        "error",
        "group-mismatch",
    ),
    (
        "group-wrong-level",
        "group=\\Gamma_0(3)",
        "(2E_2(2\\tau) - E_2(\\tau))^2 = \\frac{E_4(\\tau) + 4E_4(2\\tau)}{5}",
        "error",
        "group-mismatch",
    ),
    ("weight-unreadable", "weight=banana", "E_4 E_6 = E_{10}", "error", "bad-option"),
    ("group-unreadable", "group=foo", "E_4 E_6 = E_{10}", "error", "bad-group"),
]


@pytest.mark.parametrize(("options", "latex", "verdict", "code"), [pytest.param(*rest, id=i) for i, *rest in OPTIONS])
def test_tag_options(options: str, latex: str, verdict: str, code: str | None) -> None:
    (claim,) = check_text(f"%@claim {options}\n\\[ {latex} \\]\n", "o.tex").claims
    assert claim.verdict == verdict, claim.outcome.message
    assert claim.outcome.code == code


# ---------------------------------------------------------------------------
# Soundness battery: small perturbations of true identities are never proved
# ---------------------------------------------------------------------------

# (template with {0}, {1}, ... for integers, the true integers; docs/method.md section)
TEMPLATES: list[tuple[str, tuple[int, ...]]] = [
    ("{0}E_{{12}} = {1}E_4^3 + {2}E_6^2", (691, 441, 250)),  # docs/method.md#eisenstein
    ("{0}\\Delta = E_4^3 - {1}E_6^2", (1728, 1)),  # docs/method.md#delta-eta-j
    ("E_{{12}} = E_4^3 - \\frac{{{0}}}{{{1}}}\\Delta", (432000, 691)),  # docs/method.md#eisenstein + #delta-eta-j
    ("j - {0} = q^{{-1}} + {1}q + {2}q^2 + \\cdots", (744, 196884, 21493760)),  # Apostol, Ch. 1
    ("\\Delta = q - {0}q^2 + {1}q^3 - {2}q^4 + \\cdots", (24, 252, 1472)),  # Ramanujan 1916, table of tau(n)
    ("(2E_2(2\\tau) - E_2(\\tau))^2 = \\frac{{1}}{{{0}}}(E_4(\\tau) + {1}E_4(2\\tau))", (5, 4)),  # docs/method.md#e2
    ("\\frac{{E_2E_4 - E_6}}{{{0}}} = q + {1}q^2 + \\cdots", (720, 18)),  # docs/method.md#derivatives
    ("j - {0} = \\frac{{E_6^2}}{{\\Delta}}", (1728,)),  # docs/method.md#delta-eta-j
    ("{0}E_{{14}} = {1}E_4^2E_6", (1, 1)),  # docs/method.md#eisenstein
]

# A weight index changed (a subscript or an exponent swapped for a neighbour).
SWAPS = [
    "E_{10} = E_4 E_8",
    "E_{12} = E_4 E_6",
    "E_8 = E_4 E_6",
    "E_{14} = E_6^2 E_4",
    "E_8 = E_4^3",
    "1728\\Delta = E_4^3 - E_8^2",
    "691E_{12} = 441E_4^3 + 250E_6^3",
    "j = \\frac{E_6^3}{\\Delta}",
    "E_2(\\tau) - 2E_2(2\\tau) = E_2(\\tau) - 2E_2(3\\tau)",
]


def _perturbations() -> list[str]:
    rng = random.Random(20240601)
    out: list[str] = []
    for template, values in TEMPLATES:
        for i in range(len(values)):
            delta = rng.choice((-1, 1))
            changed = list(values)
            changed[i] += delta
            if changed[i] == 0:
                changed[i] = values[i] + 2
            out.append(template.format(*changed))
    # A second pass with the other sign, so both directions are exercised.
    for template, values in TEMPLATES:
        i = rng.randrange(len(values))
        changed = list(values)
        changed[i] += 1 if rng.random() < 0.5 else -1
        if changed[i] == 0:
            changed[i] = 2
        out.append(template.format(*changed))
    return out + SWAPS


@pytest.mark.parametrize(("template", "values"), TEMPLATES)
def test_templates_are_true(template: str, values: tuple[int, ...]) -> None:
    claim = _check_one(template.format(*values))
    assert claim.verdict == "proved", claim.outcome.message


@pytest.mark.parametrize("latex", _perturbations())
def test_perturbation_is_never_proved(latex: str) -> None:
    assert len(_perturbations()) >= 30
    claim = _check_one(latex)
    assert claim.verdict != "proved", claim.outcome.message
