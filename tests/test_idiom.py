"""The q-series idiom: infinite products, q-Pochhammer symbols, sums over Z, Lambert and
double sums, ranges written as conditions, and the author's variable.

Every expected verdict comes from an independent brute-force expansion written here with
plain Python integers (no qreferee code): products are multiplied out factor by factor and
sums over Z are summed term by term, to N coefficients.  A true identity must come out
``proved`` (when it is an identity of eta quotients) or ``unproven`` (series with no modular
proof), never ``refuted``; a false one must be ``refuted`` at the first exponent where the
brute force sees the difference.  The classical identities checked are Euler's pentagonal
number theorem (Andrews, *The Theory of Partitions*, Cor. 1.7), Jacobi's triple product
(Andrews, Thm 2.8) in Gauss's special cases phi(q), phi(-q), psi(q) (Berndt, *Ramanujan's
Notebooks III*, Ch. 16, Entries 22), Euler's odd/distinct parts theorem (Andrews, Cor. 1.2),
Jacobi's identity for f_1^3 (Berndt, Entry 24(ii)) and the Lambert series of sigma
(Apostol, *Introduction to Analytic Number Theory*, Ch. 11 exercises, from memory).
"""

from __future__ import annotations

import math
from collections.abc import Callable
from pathlib import Path

import pytest
from sympy import divisor_sigma
from verifier import check_path, check_text

N = 60
Series = list[int]


# -- brute force (independent of qreferee) ---------------------------------------------
def product(factors: Callable[[int], int], n: int = N) -> Series:
    """prod_{k>=1} (1 - q^k)^{e(k)} by multiplying out, exponent function e."""
    a = [1] + [0] * (n - 1)
    for k in range(1, n):
        e = factors(k)
        for _ in range(abs(e)):
            if e > 0:
                a = [a[i] - (a[i - k] if i >= k else 0) for i in range(n)]
            else:
                for i in range(k, n):
                    a[i] += a[i - k]
    return a


def plus_product(exponents: list[int], power: int = 1, n: int = N) -> Series:
    """prod over the listed exponents of (1 + q^e)^power, multiplied out."""
    a = [1] + [0] * (n - 1)
    for e in exponents:
        for _ in range(power):
            a = [a[i] + (a[i - e] if i >= e else 0) for i in range(n)]
    return a


def z_sum(weight: Callable[[int], int], exponent: Callable[[int], int], n: int = N, lower: int | None = None) -> Series:
    a = [0] * n
    for k in range(-4 * n if lower is None else lower, 4 * n):
        e = exponent(k)
        if 0 <= e < n:
            a[e] += weight(k)
    return a


def f(k: int) -> Series:
    """f_k = (q^k; q^k)_infinity."""
    return product(lambda m: 1 if m % k == 0 else 0)


def mul(*ss: Series) -> Series:
    out = [1] + [0] * (N - 1)
    for s in ss:
        out = [sum(out[j] * s[i - j] for j in range(i + 1)) for i in range(N)]
    return out


def inv(s: Series) -> Series:
    out = [0] * N
    out[0] = 1
    for i in range(1, N):
        out[i] = -sum(s[j] * out[i - j] for j in range(1, i + 1))
    return out


def scale(c: int, s: Series) -> Series:
    return [c * x for x in s]


def first_difference(a: Series, b: Series) -> int | None:
    return next((i for i in range(N) if a[i] != b[i]), None)


def verdict_of(text: str) -> tuple[str, object, str | None]:
    (claim,) = check_text(f"%@claim\n\\[ {text} \\]\n", "c.tex").claims
    fd = claim.outcome.first_difference
    return claim.verdict, (fd["n"] if fd else None), claim.outcome.code


# (claim, brute-force left, brute-force right, proved when true: an identity of modular forms)
CASES: list[tuple[str, Callable[[], Series], Callable[[], Series], bool]] = [
    # Euler's pentagonal number theorem, three spellings of the sum and of the product.
    (
        r"\sum_{n\in\mathbb{Z}} (-1)^n q^{n(3n-1)/2} = \prod_{n=1}^{\infty}(1-q^n)",
        lambda: z_sum(lambda k: (-1) ** k, lambda k: k * (3 * k - 1) // 2),
        lambda: f(1),
        True,
    ),
    (
        r"\sum_{n=-\infty}^{\infty} (-1)^{n} q^{\frac{n(3n+1)}{2}} = (q;q)_\infty",
        lambda: z_sum(lambda k: (-1) ** k, lambda k: k * (3 * k + 1) // 2),
        lambda: f(1),
        True,
    ),
    (
        r"\sum_{n\in\mathbb Z} (-1)^n q^{n(3n-1)} = \prod_{n\ge1}(1-q^{2n})",
        lambda: z_sum(lambda k: (-1) ** k, lambda k: k * (3 * k - 1)),
        lambda: f(2),
        True,
    ),
    # Gauss: phi(q), phi(-q), psi(q) (Jacobi triple product).
    (
        r"\sum_{n=-\infty}^{\infty} q^{n^2} = \frac{(q^2;q^2)_\infty^5}{(q;q)_\infty^2 (q^4;q^4)_\infty^2}",
        lambda: z_sum(lambda k: 1, lambda k: k * k),
        lambda: mul(f(2), f(2), f(2), f(2), f(2), inv(mul(f(1), f(1), f(4), f(4)))),
        True,
    ),
    (
        r"\sum_{n\in\mathbb{Z}} (-1)^n q^{n^2} = \frac{(q;q)_\infty^2}{(q^2;q^2)_\infty}",
        lambda: z_sum(lambda k: (-1) ** k, lambda k: k * k),
        lambda: mul(f(1), f(1), inv(f(2))),
        True,
    ),
    (
        r"\sum_{n\in\mathbb Z} q^{n(n+1)/2} = 2\frac{(q^2;q^2)_\infty^2}{(q;q)_\infty}",
        lambda: z_sum(lambda k: 1, lambda k: k * (k + 1) // 2),
        lambda: scale(2, mul(f(2), f(2), inv(f(1)))),
        True,
    ),
    # Euler: distinct parts = odd parts, in products and Pochhammer symbols.
    (
        r"\prod_{n\ge1}(1+q^n) = \prod_{n=1}^{\infty}\frac{1}{1-q^{2n-1}}",
        lambda: plus_product(list(range(1, N))),
        lambda: product(lambda k: -1 if k % 2 else 0),
        True,
    ),
    (
        r"(-q;q)_\infty (q;q^2)_\infty = 1",
        lambda: mul(plus_product(list(range(1, N))), product(lambda k: 1 if k % 2 else 0)),
        lambda: [1] + [0] * (N - 1),
        True,
    ),
    (
        r"(-q;q^2)_\infty = \frac{(q^2;q^2)_\infty^2}{(q;q)_\infty (q^4;q^4)_\infty}",
        lambda: plus_product(list(range(1, N, 2))),
        lambda: mul(f(2), f(2), inv(mul(f(1), f(4)))),
        True,
    ),
    (
        r"(q,q^2,q^3;q^3)_\infty = (q;q)_\infty",
        lambda: product(lambda k: 1),
        lambda: f(1),
        True,
    ),
    (
        r"q\prod_{n\ge1}(1-q^n)^{24} = q\,(q;q)_\infty^{24}",
        lambda: product(lambda k: 24),
        lambda: product(lambda k: 24),
        True,
    ),
    # Series with no modular proof: equal, so unproven; and false variants.
    (
        r"\prod_{n\ge1}(1-q^{5n-1})(1-q^{5n-4}) = (q;q^5)_\infty (q^4;q^5)_\infty",
        lambda: product(lambda k: 1 if k % 5 in (1, 4) else 0),
        lambda: product(lambda k: 1 if k % 5 in (1, 4) else 0),
        False,
    ),
    (
        r"\sum_{n\ge0} (-1)^n (2n+1) q^{n(n+1)/2} = (q;q)_\infty^3",
        lambda: z_sum(lambda k: (-1) ** k * (2 * k + 1), lambda k: k * (k + 1) // 2, lower=0),
        lambda: mul(f(1), f(1), f(1)),
        True,  # a unary theta series: (1/2) q^{-1/8} theta_{chi_{-4},1}(tau/8) (docs/method.md#sums-over-z)
    ),
    (
        r"\frac{1}{(q;q^5)_\infty(q^4;q^5)_\infty} = \frac{1}{(q^2;q^5)_\infty(q^3;q^5)_\infty}",
        lambda: product(lambda k: -1 if k % 5 in (1, 4) else 0),
        lambda: product(lambda k: -1 if k % 5 in (2, 3) else 0),
        False,
    ),
    (
        r"\sum_{n\in\mathbb{Z}} (-1)^n q^{n(3n+1)} = \prod_{n=1}^{\infty}(1-q^n)",
        lambda: z_sum(lambda k: (-1) ** k, lambda k: k * (3 * k + 1)),
        lambda: f(1),
        True,
    ),
    (
        r"(-q;q^2)_\infty = \frac{(q^2;q^2)_\infty^2}{(q;q)_\infty (q^4;q^4)_\infty^2}",
        lambda: plus_product(list(range(1, N, 2))),
        lambda: mul(f(2), f(2), inv(mul(f(1), f(4), f(4)))),
        True,
    ),
    (
        r"\sum_{n\ge0} (-1)^n (2n+1) q^{n(n+1)/2} = (q;q)_\infty^2",
        lambda: z_sum(lambda k: (-1) ** k * (2 * k + 1), lambda k: k * (k + 1) // 2, lower=0),
        lambda: mul(f(1), f(1)),
        False,
    ),
    (
        r"E_6 = 1 - 504\sum_{n\ge1}\sigma_6(n)q^n",
        lambda: [1] + [-504 * int(divisor_sigma(n, 5)) for n in range(1, N)],
        lambda: [1] + [-504 * int(divisor_sigma(n, 6)) for n in range(1, N)],
        False,
    ),
    (
        r"\sum_{n\ge1} \frac{n q^n}{1-q^n} = \sum_{n\ge1}\sigma(n) q^n",
        lambda: [0] + [int(divisor_sigma(n, 1)) for n in range(1, N)],
        lambda: [0] + [int(divisor_sigma(n, 1)) for n in range(1, N)],
        True,
    ),
    (
        r"\sum_{n,m\ge1} q^{nm} = \sum_{n\ge1}\sigma_0(n) q^n",
        lambda: [0] + [int(divisor_sigma(n, 0)) for n in range(1, N)],
        lambda: [0] + [int(divisor_sigma(n, 0)) for n in range(1, N)],
        False,
    ),
    (
        r"\sum_{n,m\ge1} q^{nm} = \sum_{n\ge1}\sigma(n) q^n",
        lambda: [0] + [int(divisor_sigma(n, 0)) for n in range(1, N)],
        lambda: [0] + [int(divisor_sigma(n, 1)) for n in range(1, N)],
        False,
    ),
]


@pytest.mark.parametrize(("text", "left", "right", "modular"), CASES, ids=[c[0][:48] for c in CASES])
def test_verdict_agrees_with_brute_force(
    text: str, left: Callable[[], Series], right: Callable[[], Series], modular: bool
) -> None:
    verdict, n, code = verdict_of(text)
    diff = first_difference(left(), right())
    if diff is None:
        assert verdict == ("proved" if modular else "unproven"), (verdict, n)
        if not modular:
            assert code == "series-only"
    else:
        assert verdict == "refuted"
        assert n == diff


def test_e6_with_sigma_6_is_refuted_at_q2() -> None:
    # -504 sigma_5(2) = -16632 and -504 sigma_6(2) = -32760 (sigma_5(2) = 33, sigma_6(2) = 65; sympy).
    (claim,) = check_text("%@claim\n\\[ E_6 = 1 - 504\\sum_{n\\ge1}\\sigma_6(n)q^n \\]\n", "c.tex").claims
    assert claim.verdict == "refuted"
    fd = claim.outcome.first_difference
    assert fd is not None
    assert (fd["n"], fd["left"], fd["right"]) == (2, "-16632", "-32760")
    assert -504 * int(divisor_sigma(2, 5)) == -16632 and -504 * int(divisor_sigma(2, 6)) == -32760


@pytest.mark.parametrize(
    ("text", "construct"),
    [
        (r"\prod_{n\ge1}(1-q^n)^{n} = 1", "non-periodic exponent"),
        (r"\sum_{n\ge0} \frac{q^{n^2}}{(q;q)_n} = \frac{1}{(q;q^5)_\infty(q^4;q^5)_\infty}", "symbolic length"),
        (r"\prod_{n\ge1}(1-q^{n^2}) = 1", "not linear"),
        (r"(q;q^{1/2})_\infty = 1", "base is not q^M"),
        (r"\sum_{n\in\mathbb Z} q^{n} = 1", "quadratic"),
    ],
)
def test_constructs_not_read_are_named(text: str, construct: str) -> None:
    (claim,) = check_text(f"%@claim\n\\[ {text} \\]\n", "c.tex").claims
    assert claim.verdict == "error"
    assert claim.outcome.code == "unsupported-notation"
    assert construct in claim.outcome.message
    assert claim.outcome.hint


@pytest.mark.parametrize(
    ("text", "verdict"),
    [
        # Ramanujan's convolution sum_{m<n} sigma(m) sigma(n-m) = (5 sigma_3 + (1-6n) sigma)/12
        # (Ramanujan 1916, from memory), with its range written four ways.
        (r"\sum_{0<m<n} \sigma(m)\sigma(n-m) = \frac{5\sigma_3(n) + (1-6n)\sigma(n)}{12}", "proved"),
        (r"\sum_{m<n} \sigma(m)\sigma(n-m) = \frac{5\sigma_3(n) + (1-6n)\sigma(n)}{12}", "proved"),
        (r"\sum_{\substack{a+b=n\\ a,b\ge1}} \sigma(a)\sigma(b) = \frac{5\sigma_3(n) + (1-6n)\sigma(n)}{12}", "proved"),
        (r"\sum_{1\le m\le n-1} \sigma(m)\sigma(n-m) = \frac{5\sigma_3(n) + (1-6n)\sigma(n)}{12}", "proved"),
        (r"\sum_{0<m<n} \sigma(m)\sigma(n-m) = \frac{5\sigma_3(n) + (1-7n)\sigma(n)}{12}", "refuted"),
        # The odd divisors: sigma(n) - 2 sigma(n/2) (common practice).
        (r"\sum_{d\mid n,\ d \text{ odd}} d = \sigma(n) - 2\sigma(n/2)", "proved"),
        (r"\sum_{d\mid n,\ d \text{ even}} d = 2\sigma(n/2)", "proved"),
        (r"\sum_{d\mid n,\ d \text{ odd}} d = \sigma(n) - \sigma(n/2)", "refuted"),
    ],
)
def test_ranges_written_as_conditions(text: str, verdict: str) -> None:
    assert verdict_of(text)[0] == verdict


def test_convolution_with_linear_condition_matches_brute_force() -> None:
    # sum_{m + 2l = n, m, l >= 1} sigma(m) sigma(l), computed directly with sympy.
    def brute(n: int) -> int:
        return sum(int(divisor_sigma(m, 1) * divisor_sigma((n - m) // 2, 1)) for m in range(1, n) if (n - m) % 2 == 0)

    claim_true = r"\sum_{m+2l=n} \sigma(m)\sigma(l) = \sum_{m+2l=n} \sigma(l)\sigma(m)"
    assert verdict_of(claim_true)[0] in ("proved", "unproven")
    wrong = r"\sum_{m+2l=n} \sigma(m)\sigma(l) = \sum_{0<m<n}\sigma(m)\sigma(n-m)"
    verdict, n, _ = verdict_of(wrong)
    full = [sum(int(divisor_sigma(m, 1) * divisor_sigma(k - m, 1)) for m in range(1, k)) for k in range(1, 30)]
    first = next(k for k in range(1, 30) if brute(k) != full[k - 1])
    assert verdict == "refuted" and n == first


@pytest.mark.parametrize(
    "text",
    [
        r"\eta^{14}(q^4) = \eta(4z)^{14}",
        r"E_4^2(z) = E_8(w)",
        r"\eta\left(\frac{\tau}{2}\right)^{2} = \eta(\tau/2)^2",
        r"E_4(q^2) = E_4(2w)",
        r"E_4^{3}(w) - E_6^{2}(w) = 1728\Delta(w)",
        # eta(2 tau)^2 = q^{1/6} f_2^2 (definition of eta; docs/method.md#eta-offset).
        r"\eta(q^2)^{2} = q^{1/6}(q^2;q^2)_\infty^{2}",
    ],
)
def test_the_authors_variable(text: str) -> None:
    assert verdict_of(text)[0] == "proved"


def test_wrong_power_of_q_in_front_is_refuted() -> None:
    # eta(2 tau)^2 starts at q^{1/6}, not q^{1/12} (definition of eta).
    verdict, n, _ = verdict_of(r"\eta(2z)^{2} = q^{1/12}(q^2;q^2)_\infty^{2}")
    assert verdict == "refuted" and n == "1/12"


def test_macro_house_style_for_pochhammer() -> None:
    text = (
        "\\newcommand{\\qp}[2]{(#1;#2)_\\infty}\n%@claim\n"
        "\\[ \\prod_{n\\ge1}(1+q^n) = \\frac{\\qp{q^2}{q^2}}{\\qp{q}{q}} \\]\n"
    )
    (claim,) = check_text(text, "m.tex").claims
    assert claim.verdict == "proved"


CORPUS = Path(__file__).parent / "data" / "idiom"


def test_corpus_has_no_wrong_verdict() -> None:
    # Every claim of the small corpus is decided, unproven (series only) or an honest error;
    # the false variants (after the "false variants" marker) are never proved.
    for path in sorted(CORPUS.iterdir()):
        report = check_path(path)
        text = path.read_text(encoding="utf-8")
        marker = text.lower().find("false variants")
        for claim in report.claims:
            if marker >= 0 and claim.location.line > text[:marker].count("\n") + 1:
                assert claim.verdict != "proved", (path.name, claim.location.line)
            assert claim.outcome.code != "internal", (path.name, claim.location.line)


@pytest.mark.parametrize(
    ("text", "verdict"),
    [
        # E_4 = 1 + 240 sum sigma_3(n) q^n (Serre, A Course in Arithmetic, VII.4) with q = e^{2 pi i z}.
        (r"E_4(z) = 1 + 240\sum_{n\ge1}\sigma_3(n) e^{2\pi i n z}", "proved"),
        # eta = q^{1/24} prod (1 - q^n) (definition), prefactor e^{pi i tau/12} = q^{1/24}.
        (r"\eta(\tau) = e^{\pi i\tau/12}\prod_{n\ge1}(1-e^{2\pi i n\tau})", "proved"),
        (r"\eta(\tau)\exp(-\pi i\tau/12) = \prod_{n=1}^{\infty}(1-\exp(2\pi i n\tau))", "proved"),
        # Delta = q prod (1 - q^n)^24 (Jacobi; Serre VII.4.4), and a wrong prefactor.
        (r"\Delta(z) = e^{2\pi i z}\prod_{n\ge1}(1-e^{2\pi i n z})^{24}", "proved"),
        (r"\Delta(z) = e^{\pi i z}\prod_{n\ge1}(1-e^{2\pi i n z})^{24}", "refuted"),
    ],
)
def test_exponentials_are_powers_of_q(text: str, verdict: str) -> None:
    assert verdict_of(text)[0] == verdict


def test_another_letter_for_q_is_read_and_said() -> None:
    # theta = prod (1 - q^{2n})(1 + q^{2n-1})^2 (Jacobi triple product, Andrews Thm 2.8), written in x.
    text = "%@claim\n\\[ \\sum_{n\\in\\mathbb Z} x^{n^2} = \\prod_{n\\ge1}(1-x^{2n})(1+x^{2n-1})^2 \\]\n"
    (claim,) = check_text(text, "x.tex").claims
    assert claim.verdict == "proved"
    assert "x read as q" in (claim.reading or "")
    wrong = text.replace(")^2 \\]", ") \\]")
    (claim,) = check_text(wrong, "x.tex").claims
    assert claim.verdict == "refuted"


def test_shorthand_family_f_k() -> None:
    # f_k = (q^k;q^k)_infinity; phi(q) = f_2^5/(f_1^2 f_4^2) (Berndt, Ramanujan's Notebooks III, Ch. 16, Entry 22).
    text = (
        "%@define f_k = (q^k;q^k)_\\infty\n"
        "%@claim\n\\[ \\sum_{n\\in\\mathbb Z} q^{n^2} = \\frac{f_2^5}{f_1^2 f_4^2} \\]\n"
        "%@claim\n\\[ \\sum_{n\\in\\mathbb Z} q^{n^2} = \\frac{f_2^5}{f_1^2 f_4} \\]\n"
    )
    verdicts = [c.verdict for c in check_text(text, "f.tex").claims]
    assert verdicts == ["proved", "refuted"]
    # brute force: the two right sides first differ where f_4 starts to matter, at q^4.
    right_true = mul(f(2), f(2), f(2), f(2), f(2), inv(mul(f(1), f(1), f(4), f(4))))
    right_false = mul(f(2), f(2), f(2), f(2), f(2), inv(mul(f(1), f(1), f(4))))
    assert first_difference(right_true, right_false) == 4
    assert right_true == z_sum(lambda k: 1, lambda k: k * k)


def test_a_family_may_not_redefine_built_in_forms() -> None:
    text = "%@define E_k = (q^k;q^k)_\\infty\n%@claim\n\\[ E_4^3 - E_6^2 = 1728\\Delta \\]\n"
    report = check_text(text, "e.tex")
    assert [c.verdict for c in report.claims] == ["proved"]
    assert any(d.code == "bad-define" for d in report.diagnostics)


def test_the_statement_of_the_variable_is_no_claim() -> None:
    (claim,) = check_text("%@claim\n\\[ q = e^{2\\pi i \\tau} \\]\n", "q.tex").claims
    assert claim.verdict == "error" and claim.outcome.code == "unsupported-notation"


def test_family_members_with_braced_indices_and_empty_subscripts() -> None:
    # f_{16} is a member of the family f_k = (q^k;q^k)_infty like f_3; sigma_{}(n) (a macro with an
    # empty index) is sigma(n).  Euler: f_1 = 1 - q - q^2 + q^5 + ... (Euler's pentagonal theorem),
    # so f_16 = 1 - q^16 - ...; Besge's convolution sum (Ramanujan 1916, Table IV) with empty indices.
    from verifier import check_text

    text = (
        "%@define f_k = (q^k;q^k)_\\infty\n"
        "%@claim\n\\[ f_{16} = 1 - q^{16} - q^{32} + O(q^{33}) \\]\n"
        "%@claim\n\\[ \\sum_{m=1}^{n-1}\\sigma_{}(m)\\sigma_{}(n-m) = "
        "\\frac{5\\sigma_{3}(n)+(1-6n)\\sigma_{}(n)}{12} \\]\n"
    )
    assert [c.verdict for c in check_text(text).claims] == ["proved", "proved"]


def _lattice_counts(a: int, b: int, c: int, terms: int) -> list[int]:
    """Number of (x, y) in Z^2 with a x^2 + b xy + c y^2 = n, by enumeration (no qreferee code)."""
    counts = [0] * terms
    r = terms + 1
    for x in range(-r, r + 1):
        for y in range(-r, r + 1):
            n = a * x * x + b * x * y + c * y * y
            if 0 <= n < terms:
                counts[n] += 1
    return counts


def _printed(counts: list[int]) -> str:
    return " + ".join(f"{c}q^{{{n}}}" for n, c in enumerate(counts) if c) + " + \\cdots"


@pytest.mark.parametrize("a,b,c", [(1, 1, 1), (1, 0, 1), (1, 0, 2), (2, 1, 3), (1, 0, 3)])
def test_sums_over_z2_are_theta_series_of_binary_forms(a: int, b: int, c: int) -> None:
    # sum_{x,y in Z} q^{a x^2 + b xy + c y^2} is the theta series of the Gram matrix
    # [[2a, b], [b, 2c]] (Conway and Sloane, Sphere Packings, Lattices and Groups, ch. 2, §2.3);
    # the coefficients are counted here by enumeration.
    from verifier import check_text

    counts = _lattice_counts(a, b, c, 12)
    body = f"{a}x^2 + {b}xy + {c}y^2".replace("1x", "x").replace("1y", "y").replace(" + 0xy", "")
    wrong = list(counts)
    wrong[5] += 2
    text = (
        f"%@claim\n\\[ \\sum_{{x,y\\in\\mathbb Z}} q^{{{body}}} = {_printed(counts)} \\]\n"
        f"%@claim\n\\[ \\sum_{{x,y\\in\\mathbb Z}} q^{{{body}}} = {_printed(wrong)} \\]\n"
    )
    report = check_text(text)
    assert [c.verdict for c in report.claims] == ["proved", "refuted"], [c.outcome.message for c in report.claims]
    assert report.claims[1].outcome.first_difference == {"n": 5, "left": str(counts[5]), "right": str(wrong[5])}


def _diagonal_counts(coefficients: tuple[int, ...], terms: int) -> list[int]:
    """Number of x in Z^r with sum c_i x_i^2 = n, by enumeration (no qreferee code)."""
    counts = [1] + [0] * (terms - 1)
    for c in coefficients:
        nxt = [0] * terms
        for n, v in enumerate(counts):
            if v:
                x = 0
                while n + c * x * x < terms:
                    nxt[n + c * x * x] += v * (1 if x == 0 else 2)
                    x += 1
        counts = nxt
    return counts


@pytest.mark.parametrize(
    "index,coefficients",
    [
        ("x,y,z\\in\\mathbb Z", (1, 1, 1)),
        ("(x,y,z)\\in\\mathbb{Z}^3", (1, 1, 1)),
        ("x,y,z\\in\\mathbb Z", (1, 1, 2)),
        ("a,b,c,d\\in\\mathbb Z", (1, 1, 1, 1)),
        ("(a,b,c,d,e)\\in\\mathbb Z^{5}", (1, 1, 1, 1, 3)),
    ],
)
def test_sums_over_zr_are_theta_series_of_diagonal_forms(index: str, coefficients: tuple[int, ...]) -> None:
    # sum_{x in Z^r} q^{sum c_i x_i^2} = prod_i theta(c_i tau) (Grosswald, Representations of
    # Integers as Sums of Squares, ch. 9); r_3(n) and r_4(n) for the first n agree with Jacobi's
    # four-square theorem, r_4(n) = 8 sum_{d | n, 4 not | d} d (Hardy and Wright, Thm 386).
    from verifier import check_text

    counts = _diagonal_counts(coefficients, 12)
    if coefficients == (1, 1, 1, 1):
        assert counts[1:] == [8 * sum(d for d in range(1, n + 1) if n % d == 0 and d % 4) for n in range(1, 12)]
    names = [v.strip("()") for v in index.split("\\in")[0].split(",")]
    body = " + ".join(f"{c if c > 1 else ''}{v}^2" for c, v in zip(coefficients, names, strict=True))
    wrong = list(counts)
    wrong[7] += 1
    text = (
        f"%@claim\n\\[ \\sum_{{{index}}} q^{{{body}}} = {_printed(counts)} \\]\n"
        f"%@claim\n\\[ \\sum_{{{index}}} q^{{{body}}} = {_printed(wrong)} \\]\n"
    )
    report = check_text(text)
    assert [c.verdict for c in report.claims] == ["proved", "refuted"], [c.outcome.message for c in report.claims]
    assert report.claims[1].outcome.first_difference == {"n": 7, "left": str(counts[7]), "right": str(wrong[7])}


def test_lattice_sums_that_are_not_read() -> None:
    # An indefinite form, and a power of Z that does not match the variables: errors, never verdicts.
    from verifier import check_text

    text = (
        "%@claim\n\\[ \\sum_{x,y,z\\in\\mathbb Z} q^{x^2+y^2-z^2} = 1 + 4q + \\cdots \\]\n"
        "%@claim\n\\[ \\sum_{x,y\\in\\mathbb Z^3} q^{x^2+y^2} = 1 + 4q + \\cdots \\]\n"
    )
    report = check_text(text)
    assert [(c.verdict, c.outcome.code) for c in report.claims] == [
        ("error", "unsupported-notation"),
        ("error", "syntax"),
    ]


def test_the_hexagonal_lattice_sum_is_the_cubic_theta_function() -> None:
    # a(q) = sum q^{x^2+xy+y^2} = (eta(tau)^3 + 9 eta(9 tau)^3) / eta(3 tau) (Borwein, Borwein and
    # Garvan, Trans. AMS 343 (1994), from memory); a sum with a linear term is not read.
    from verifier import check_text

    text = (
        "%@claim\n\\[ \\sum_{x,y\\in\\mathbb Z} q^{x^2+xy+y^2} = "
        "\\frac{\\eta(\\tau)^{3} + 9\\eta(9\\tau)^{3}}{\\eta(3\\tau)} \\]\n"
        "%@claim\n\\[ \\sum_{x,y\\in\\mathbb Z} q^{x^2+y^2+x} = 1 \\]\n"
    )
    report = check_text(text)
    assert [(c.verdict, c.outcome.code) for c in report.claims] == [
        ("proved", None),
        ("error", "unsupported-notation"),
    ]


def test_a_printed_expansion_behind_a_power_of_q() -> None:
    # E_4 / eta^8 = q^{-1/3} (1 + 240 q + 2160 q^2 + ...)(1 + 8q + 44q^2 + ...): E_4 from sigma_3
    # (Serre, A Course in Arithmetic, ch. VII, §4.2) and 1/prod(1-q^n)^8 by brute force here.
    from verifier import check_text

    e4 = [1] + [240 * sum(d**3 for d in range(1, n + 1) if n % d == 0) for n in range(1, 3)]
    inv = [1, 0, 0]
    for n in range(1, 3):  # multiply by 1/(1-q^n)^8 = sum_k binom(k+7, 7) q^{nk}
        new = [0, 0, 0]
        for i, c in enumerate(inv):
            k = 0
            while i + n * k < 3:
                new[i + n * k] += c * math.comb(k + 7, 7)
                k += 1
        inv = new
    c = [sum(e4[i] * inv[m - i] for i in range(m + 1)) for m in range(3)]
    good = f"q^{{-1/3}}\\left(1+{c[1]}q+{c[2]}q^2+\\cdots\\right)"
    bad = f"q^{{-1/3}}\\left(1+{c[1]}q+{c[2] - 1}q^2+\\cdots\\right)"
    text = (
        f"%@claim\n\\[ \\frac{{E_4(\\tau)}}{{\\eta(\\tau)^8}} = {good} \\]\n"
        f"%@claim\n\\[ \\frac{{E_4(\\tau)}}{{\\eta(\\tau)^8}} = {bad} \\]\n"
        "%@claim\n\\[ \\Delta = q(1 - 24q + 252q^2 + O(q^3)) \\]\n"
    )
    report = check_text(text)
    assert [r.verdict for r in report.claims] == ["proved", "refuted", "proved"]
    assert report.claims[1].outcome.first_difference == {"n": "5/3", "left": str(c[2]), "right": str(c[2] - 1)}


def test_a_constant_times_a_power_of_q_in_front_of_a_product() -> None:
    # The 2-dissection 1/f_1^2 = f_8^5/(f_2^5 f_16^2) + 2q f_4^2 f_16^2/(f_2^5 f_8) (Hirschhorn,
    # The Power of q, ch. 1, from memory); 2q in front of a product is q^1 times a form, so the claim
    # is an identity of eta quotients; with 3q it is false at q^1 (2 partitions into two colours).
    from verifier import check_text

    text = (
        "%@define f_k = (q^k;q^k)_\\infty\n"
        "%@claim\n\\[ \\frac{1}{f_1^2} = \\frac{f_8^5}{f_2^5f_{16}^2} + 2q\\frac{f_4^2f_{16}^2}{f_2^5f_8} \\]\n"
        "%@claim\n\\[ \\frac{1}{f_1^2} = \\frac{f_8^5}{f_2^5f_{16}^2} + 3q\\frac{f_4^2f_{16}^2}{f_2^5f_8} \\]\n"
    )
    report = check_text(text)
    assert [c.verdict for c in report.claims] == ["proved", "refuted"]
    assert report.claims[1].outcome.first_difference == {"n": 1, "left": "2", "right": "3"}
