"""Unary theta series sum psi(n) n^nu q^{t n^2} as modular atoms (docs/method.md#unary-theta).

The level and character the project gives these series are checked numerically first, with
mpmath, at points gamma tau for gamma in Gamma_0(4 r^2 t) with both signs of c and d, against
the automorphy factor of docs/method.md#half-integral-weight: theta_{psi,nu,t}(gamma tau) =
chi(d) j(gamma, tau)^{2 nu + 1} theta_{psi,nu,t}(tau) with j(gamma, tau) = theta(gamma tau)/theta(tau)
(Shimura, "On modular forms of half integral weight", Ann. of Math. 97 (1973), §2; the
transformation law is the statement checked, not a value from the code under test).  Dropping
the factor (4t/.) must make the check fail for t > 1.

Then identities from named sources are proved (each first checked by brute force in the test),
and a false variant of each is refuted.
"""

from __future__ import annotations

import math
import random
from fractions import Fraction

import mpmath
import pytest
from tests.brute import eta_product
from verifier.forms import registry
from verifier.forms.unary_theta import KEY, character, level
from verifier.numbers import QuadraticCharacter, kronecker

mpmath.mp.dps = 30


def _theta(kernel: int, nu: int, t: int, tau: mpmath.mpc) -> mpmath.mpc:
    """sum_{n in Z} psi(n) n^nu e^{2 pi i t n^2 tau}, summed directly (psi = the Kronecker symbol)."""
    disc = QuadraticCharacter(kernel).disc
    im = float(mpmath.im(tau))
    top = int(math.sqrt(80 / (2 * math.pi * t * im))) + 2
    total = mpmath.mpc(0)
    for n in range(-top, top + 1):
        c = kronecker(disc, n) * n**nu
        if c:
            total += c * mpmath.exp(2j * mpmath.pi * t * n * n * tau)
    return total


def _gammas(level_n: int, rng: random.Random) -> list[tuple[int, int, int, int]]:
    """Elements (a, b, c, d) of Gamma_0(N) with c != 0, both signs of c and of d."""
    out = []
    while len(out) < 10:
        c = level_n * rng.choice([1, 2, 3]) * rng.choice([1, -1])
        d = rng.randrange(1, 12 * abs(c)) * rng.choice([1, -1])
        if math.gcd(c, d) != 1:
            continue
        _, x, y = _egcd(d, -c)  # a d - b c = 1
        out.append((x, y, c, d))
    signs = {(c > 0, d > 0) for _, _, c, d in out}
    return out if len(signs) > 1 else _gammas(level_n, rng)


def _egcd(a: int, b: int) -> tuple[int, int, int]:
    """(g, x, y) with a x + b y = g; here a x + b y = 1 gives a = x, b = y for a d - b c = 1."""
    old_r, r, old_s, s, old_t, t = a, b, 1, 0, 0, 1
    while r:
        k = old_r // r
        old_r, r = r, old_r - k * r
        old_s, s = s, old_s - k * s
        old_t, t = t, old_t - k * t
    if old_r < 0:
        old_r, old_s, old_t = -old_r, -old_s, -old_t
    return old_r, old_s, old_t


def _law_holds(kernel: int, nu: int, t: int, chi: QuadraticCharacter, seed: int) -> bool:
    """Whether theta_{psi,nu,t}(gamma tau) = chi(d) j^{2nu+1} theta_{psi,nu,t}(tau) at several gamma."""
    rng = random.Random(seed)
    n_level = level(kernel, nu, t)
    checked = 0
    for a, b, c, d in _gammas(n_level, rng):
        assert a * d - b * c == 1 and c % n_level == 0
        eps = mpmath.mpf(rng.uniform(-0.3, 0.3))
        tau = mpmath.mpc(-mpmath.mpf(d) / c + eps / abs(c), mpmath.mpf(1) / abs(c))
        gtau = (a * tau + b) / (c * tau + d)
        theta_tau, theta_gtau = _theta(1, 0, 1, tau), _theta(1, 0, 1, gtau)
        if min(abs(theta_tau), abs(theta_gtau)) < mpmath.mpf(10) ** -6:
            continue  # tau near the cusp 1/2, where theta vanishes: j is not accurate there
        j = theta_gtau / theta_tau
        lhs = _theta(kernel, nu, t, gtau)
        rhs = chi.value(d) * j ** (2 * nu + 1) * _theta(kernel, nu, t, tau)
        scale = max(abs(lhs), abs(rhs))
        if scale < mpmath.mpf(10) ** -8:
            continue  # too close to a zero of the form for a relative comparison
        checked += 1
        if abs(lhs - rhs) > mpmath.mpf(10) ** -12 * scale:
            return False
    assert checked >= 4, "too few usable test points"
    return True


CASES = [(k, 0) for k in (1, 3, 5, 2)] + [
    (k, 1) for k in (-1, -3, -2)
]  # 1, chi_12, chi_5, chi_8; chi_-4, chi_-3, chi_-8


@pytest.mark.parametrize(("kernel", "nu"), CASES)
@pytest.mark.parametrize("t", [1, 2, 3])
def test_transformation_law_numerically(kernel: int, nu: int, t: int) -> None:
    # Shimura 1973, §2 (from memory): level 4 r^2 t, character psi chi_{-4}^nu (4t/.), theta multiplier.
    assert _law_holds(kernel, nu, t, character(kernel, nu, t), seed=1000 * t + 10 * kernel + nu)


@pytest.mark.parametrize(("kernel", "nu"), CASES)
@pytest.mark.parametrize("t", [2, 3])
def test_a_wrong_character_fails_the_numerical_check(kernel: int, nu: int, t: int) -> None:
    # Without the factor (4t/.) the law fails (a control on the check above).
    wrong = QuadraticCharacter(kernel) * (QuadraticCharacter(-1) if nu else QuadraticCharacter(1))
    assert wrong != character(kernel, nu, t)
    assert not _law_holds(kernel, nu, t, wrong, seed=77 + t)


def test_registry_knows_the_atom() -> None:
    # The registry's level, character and cusp orders are those of the family module.
    assert registry.level(KEY, 3, (5, 0)) == 4 * 25 * 3
    assert registry.character(KEY, 3, (5, 0), 300) == character(5, 0, 3)
    assert registry.cusp_orders(KEY, (5, 0), 300, 3) is None  # holomorphic at every cusp
    s = registry.build_series(KEY, (-1, 1), 30)
    # eta(8 tau)^3 = sum_{n >= 1} chi_{-4}(n) n q^{n^2} (Jacobi; from memory): 2 q - 6 q^9 + 10 q^25.
    assert [s[i] for i in (0, 1, 9, 25)] == [0, 2, -6, 10]
    assert all(s[i] == 0 for i in range(30) if i not in (1, 9, 25))


# -- identities from named sources, proved; false variants refuted -------------------------
N = 150
Series = list[Fraction]


def zsum(w: object, e: object, lower: int | None = None) -> Series:
    """sum_n w(n) q^{e(n)} by enumeration (n over Z, or n >= lower), to q^{N-1}."""
    out = [Fraction(0)] * N
    for n in range(-200, 201):
        if lower is not None and n < lower:
            continue
        c = Fraction(w(n))  # type: ignore[operator]
        if c:
            ex = Fraction(e(n))  # type: ignore[operator]
            assert ex.denominator == 1
            if 0 <= ex < N:
                out[int(ex)] += c
    return out


def prod(exps: dict[int, int], shift: int = 0, factor: int = 1) -> Series:
    """factor * q^shift * prod_d prod_{n>=1} (1 - q^{dn})^{r_d}, multiplied out factor by factor."""
    a = eta_product(exps, N)
    return [Fraction(0)] * shift + [Fraction(factor * x) for x in a[: N - shift]]


def add(*parts: Series) -> Series:
    return [sum(xs, Fraction(0)) for xs in zip(*parts, strict=True)]


def times(c: int, s: Series, shift: int = 0) -> Series:
    return [Fraction(0)] * shift + [c * x for x in s[: N - shift]]


def chi(d: int) -> object:
    return lambda n: kronecker(d, n)


PSI = zsum(lambda n: 1, lambda n: Fraction(n * (n + 1), 2), 0)  # psi(q) = sum_{n>=0} q^{n(n+1)/2}
PHI = zsum(lambda n: 1, lambda n: n * n)  # phi(q) = sum_{n in Z} q^{n^2}
ZS = r"\sum_{n\in\mathbb Z}"

# (source, claim, left, right, false variants as (claim, left, right))
IDENTITIES: list[tuple[str, str, Series, Series, list[tuple[str, Series, Series]]]] = [
    (
        "Euler's pentagonal theorem with the Kronecker symbol (Ono, Web of Modularity, Thm 1.60; from memory)",
        ZS + r"\left(\frac{12}{n}\right) q^{(n^2-1)/24} = 2\prod_{n\ge1}(1-q^n)",
        zsum(chi(12), lambda n: Fraction(n * n - 1, 24)),
        prod({1: 1}, 0, 2),
        [
            (ZS + r"\left(\frac{12}{n}\right) q^{(n^2-1)/24} = -2\prod_{n\ge1}(1-q^n)", [], prod({1: 1}, 0, -2)),
            (ZS + r"\left(\frac{12}{n}\right) q^{(n^2-1)/24} = 2\prod_{n\ge1}(1-q^{2n})", [], prod({2: 1}, 0, 2)),
        ],
    ),
    (
        "eta(24 tau) = sum chi_12(n) q^{n^2}, half of it (Euler; Serre-Stark 1977, §2)",
        ZS + r"\left(\frac{12}{n}\right) q^{n^2} = 2\eta(24\tau)",
        zsum(chi(12), lambda n: n * n),
        prod({24: 1}, 1, 2),
        [
            (ZS + r"\left(\frac{12}{n}\right) q^{n^2} = \eta(24\tau)", [], prod({24: 1}, 1, 1)),
            (ZS + r"\left(\frac{12}{n}\right) q^{n^2} = 2q\eta(24\tau)", [], prod({24: 1}, 2, 2)),
            (
                ZS + r"\left(\frac{-4}{n}\right) n q^{n^2} = 2\eta(24\tau)",
                zsum(lambda n: kronecker(-4, n) * n, lambda n: n * n),
                prod({24: 1}, 1, 2),
            ),
        ],
    ),
    (
        "Jacobi's identity f_1^3 = sum (-1)^n (2n+1) q^{n(n+1)/2} "
        "(Berndt, Ramanujan's Notebooks III, Ch. 16, Entry 24(ii); from memory)",
        r"\sum_{n\ge0}(-1)^n(2n+1)q^{n(n+1)/2} = \prod_{n\ge1}(1-q^n)^3",
        zsum(lambda n: (-1) ** n * (2 * n + 1), lambda n: Fraction(n * (n + 1), 2), 0),
        prod({1: 3}),
        [
            (
                r"\sum_{n\ge0}(2n+1)q^{n(n+1)/2} = \prod_{n\ge1}(1-q^n)^3",
                zsum(lambda n: 2 * n + 1, lambda n: Fraction(n * (n + 1), 2), 0),
                prod({1: 3}),
            ),
            (r"\sum_{n\ge0}(-1)^n(2n+1)q^{n(n+1)/2} = \prod_{n\ge1}(1-q^n)^3(1-q^{2n})", [], prod({1: 3, 2: 1})),
        ],
    ),
    (
        "eta(8 tau)^3 = sum_{n>=1} chi_{-4}(n) n q^{n^2} (Jacobi; Berndt III, Ch. 16; from memory)",
        r"\sum_{n\ge1}\left(\frac{-4}{n}\right) n q^{n^2} = \eta(8\tau)^3",
        zsum(lambda n: kronecker(-4, n) * n, lambda n: n * n, 1),
        prod({8: 3}, 1),
        [
            (r"\sum_{n\ge1}\left(\frac{-4}{n}\right) n q^{n^2} = -\eta(8\tau)^3", [], prod({8: 3}, 1, -1)),
            (
                r"\sum_{n\ge1}\left(\frac{-4}{n}\right) n q^{n^2+1} = \eta(8\tau)^3",
                zsum(lambda n: kronecker(-4, n) * n, lambda n: n * n + 1, 1),
                prod({8: 3}, 1),
            ),
        ],
    ),
    (
        "Gauss: psi(q) = f_2^2/f_1 (Berndt III, Ch. 16, Entry 22(ii); from memory)",
        r"\sum_{n\ge0} q^{n(n+1)/2} = \prod_{n\ge1}\frac{(1-q^{2n})^2}{1-q^n}",
        PSI,
        prod({1: -1, 2: 2}),
        [(r"\sum_{n\ge0} q^{n(n+1)/2} = \prod_{n\ge1}\frac{(1-q^{2n})^3}{1-q^n}", [], prod({1: -1, 2: 3}))],
    ),
    (
        "2-dissection of psi: psi(q) = f(q^6, q^10) + q f(q^2, q^14) "
        "(Berndt III, Ch. 16, Entry 25; Hirschhorn, The Power of q, Ch. 1; from memory)",
        ZS + r" q^{8n^2+2n} + q" + ZS + r" q^{8n^2+6n} = \sum_{n\ge0} q^{n(n+1)/2}",
        add(zsum(lambda n: 1, lambda n: 8 * n * n + 2 * n), zsum(lambda n: 1, lambda n: 8 * n * n + 6 * n + 1)),
        PSI,
        [
            (
                "q" + ZS + r" q^{8n^2+2n} + " + ZS + r" q^{8n^2+6n} = \sum_{n\ge0} q^{n(n+1)/2}",
                add(zsum(lambda n: 1, lambda n: 8 * n * n + 2 * n + 1), zsum(lambda n: 1, lambda n: 8 * n * n + 6 * n)),
                PSI,
            ),
            (
                ZS + r" q^{8n^2+2n} - q" + ZS + r" q^{8n^2+6n} = \sum_{n\ge0} q^{n(n+1)/2}",
                add(
                    zsum(lambda n: 1, lambda n: 8 * n * n + 2 * n), zsum(lambda n: -1, lambda n: 8 * n * n + 6 * n + 1)
                ),
                PSI,
            ),
        ],
    ),
    (
        "2-dissection of phi: phi(q) = phi(q^4) + 2q psi(q^8) (Berndt III, Ch. 16, Entry 25(i),(ii); from memory)",
        ZS + r" q^{n^2} = " + ZS + r" q^{4n^2} + 2q\sum_{n\ge0} q^{4n^2+4n}",
        PHI,
        add(zsum(lambda n: 1, lambda n: 4 * n * n), zsum(lambda n: 2, lambda n: 4 * n * n + 4 * n + 1, 0)),
        [
            (
                ZS + r" q^{n^2} = " + ZS + r" q^{4n^2} + 2\sum_{n\ge0} q^{4n^2+4n}",
                [],
                add(zsum(lambda n: 1, lambda n: 4 * n * n), zsum(lambda n: 2, lambda n: 4 * n * n + 4 * n, 0)),
            )
        ],
    ),
    (
        "3-dissection of phi: phi(q) = phi(q^9) + 2q f(q^3, q^15) (Hirschhorn, The Power of q, Ch. 14; from memory)",
        ZS + r" q^{n^2} = " + ZS + r" q^{9n^2} + 2q" + ZS + r" q^{9n^2+6n}",
        PHI,
        add(zsum(lambda n: 1, lambda n: 9 * n * n), zsum(lambda n: 2, lambda n: 9 * n * n + 6 * n + 1)),
        [
            (
                ZS + r" q^{n^2} = " + ZS + r" q^{9n^2} + 2q^2" + ZS + r" q^{9n^2+6n}",
                [],
                add(zsum(lambda n: 1, lambda n: 9 * n * n), zsum(lambda n: 2, lambda n: 9 * n * n + 6 * n + 2)),
            ),
            (
                ZS + r" q^{n^2} = 2" + ZS + r" q^{9n^2} + q" + ZS + r" q^{9n^2+6n}",
                [],
                add(zsum(lambda n: 2, lambda n: 9 * n * n), zsum(lambda n: 1, lambda n: 9 * n * n + 6 * n + 1)),
            ),
        ],
    ),
    (
        "3-dissection of psi: psi(q) = f(q^3, q^6) + q psi(q^9) "
        "(Berndt III, Ch. 16, Entry 25; Hirschhorn, The Power of q, Ch. 14; from memory)",
        r"\sum_{n\ge0} q^{n(n+1)/2} = " + ZS + r" q^{(9n^2+3n)/2} + q\sum_{n\ge0} q^{9n(n+1)/2}",
        PSI,
        add(
            zsum(lambda n: 1, lambda n: Fraction(9 * n * n + 3 * n, 2)),
            zsum(lambda n: 1, lambda n: Fraction(9 * n * (n + 1), 2) + 1, 0),
        ),
        [
            (
                r"\sum_{n\ge0} q^{n(n+1)/2} = q" + ZS + r" q^{(9n^2+3n)/2} + \sum_{n\ge0} q^{9n(n+1)/2}",
                [],
                add(
                    zsum(lambda n: 1, lambda n: Fraction(9 * n * n + 3 * n, 2) + 1),
                    zsum(lambda n: 1, lambda n: Fraction(9 * n * (n + 1), 2), 0),
                ),
            )
        ],
    ),
]


def _verdict(text: str) -> tuple[str, object, object]:
    from verifier import check_text

    (claim,) = check_text(f"%@claim\n\\[ {text} \\]\n", "c.tex").claims
    fd = claim.outcome.first_difference
    return claim.verdict, (fd["n"] if fd else None), claim.outcome.code


@pytest.mark.parametrize("case", IDENTITIES, ids=[c[1][:40] for c in IDENTITIES])
def test_true_identity_is_proved(case: tuple[str, str, Series, Series, list[tuple[str, Series, Series]]]) -> None:
    source, text, left, right, _ = case
    assert left == right, f"brute force: {source} does not hold as written"
    verdict, _, code = _verdict(text)
    assert verdict == "proved", (source, code)


@pytest.mark.parametrize("case", IDENTITIES, ids=[c[1][:40] for c in IDENTITIES])
def test_false_variant_is_refuted(case: tuple[str, str, Series, Series, list[tuple[str, Series, Series]]]) -> None:
    _, _, left, _, variants = case
    for text, vleft, vright in variants:
        vleft = vleft or left
        first = next((i for i in range(N) if vleft[i] != vright[i]), None)
        assert first is not None, f"brute force: the variant {text} is not false"
        verdict, at, _ = _verdict(text)
        assert (verdict, at) == ("refuted", first), text


def test_pieces_of_different_weights_and_characters_are_decided_each_on_its_own() -> None:
    # eta(24 tau) = (1/2) sum chi_12(n) q^{n^2} and eta(8 tau)^3 = (1/2) sum chi_{-4}(n) n q^{n^2}
    # (the identities above): a weight with both parts splits into weights 1/2 and 3/2.
    both = ZS + r"\left(\left(\frac{12}{n}\right) + \left(\frac{-4}{n}\right) n\right) q^{n^2}"
    left = zsum(lambda n: kronecker(12, n) + kronecker(-4, n) * n, lambda n: n * n)
    assert add(left, prod({8: 3}, 1, -2)) == prod({24: 1}, 1, 2)
    assert _verdict(both + r" - 2\eta(8\tau)^3 = 2\eta(24\tau)")[0] == "proved"
    wrong = add(left, prod({8: 3}, 1, 2))
    first = next(i for i in range(N) if wrong[i] != prod({24: 1}, 1, 2)[i])
    assert _verdict(both + r" + 2\eta(8\tau)^3 = 2\eta(24\tau)")[:2] == ("refuted", first)
    # Two characters of weight 1/2 (common practice: a sum of two series, rearranged).
    two = ZS + r"\left(\left(\frac{12}{n}\right) + \left(\frac{5}{n}\right)\right) q^{n^2} = 2\eta(24\tau) + "
    assert _verdict(two + ZS + r"\left(\frac{5}{n}\right) q^{n^2}")[0] == "proved"
    false = add(zsum(chi(5), lambda n: n * n), times(-1, zsum(chi(8), lambda n: n * n)))
    first = next(i for i in range(N) if false[i])
    assert _verdict(two + ZS + r"\left(\frac{8}{n}\right) q^{n^2}")[:2] == ("refuted", first)


def test_partial_theta_functions_are_never_proved() -> None:
    # sum_{n>=1} chi_{-4}(n) q^{n^2} is a partial theta function (one-sided, odd weight): no modular
    # form; both sides agree (n = 2m+1, chi_{-4}(2m+1) = (-1)^m; common practice), so only series evidence.
    text = r"\sum_{n\ge1}\left(\frac{-4}{n}\right) q^{n^2} = \sum_{n\ge0}(-1)^n q^{(2n+1)^2}"
    assert zsum(chi(-4), lambda n: n * n, 1) == zsum(lambda n: (-1) ** n, lambda n: (2 * n + 1) ** 2, 0)
    assert _verdict(text)[::2] == ("unproven", "series-only")


def test_weights_with_complex_characters_are_not_placed() -> None:
    from verifier.elaborate.unary import characters_of

    # An odd function modulo 5 is a combination of the two quartic characters mod 5 (no odd quadratic
    # character has conductor dividing 5; Ireland-Rosen, Ch. 8 §1): not placed.
    odd5 = [Fraction(v) for v in (0, 1, 0, 0, -1)]
    assert characters_of(odd5, odd=True) is None
    # [x = +-1 mod 16] needs the even characters of order 4 modulo 16: not placed.
    assert characters_of([Fraction(int(x in (1, 15))) for x in range(16)], odd=False) is None
    # [x = +-1 mod 8] = ([x odd] + chi_8(x)) / 2 (common practice): placed, with those coefficients.
    found = characters_of([Fraction(int(x in (1, 7))) for x in range(8)], odd=False)
    assert found == {(1, 1): Fraction(1, 2), (2, 1): Fraction(-1, 2), (1, 2): Fraction(1, 2)}


def test_an_unsupported_weight_stays_series_only() -> None:
    # n^2 is no weight of a unary theta series of weight <= 3/2: compared as series only.
    text = ZS + r"(-1)^n n^2 q^{n^2} = " + ZS + r"(-1)^n n^2 q^{n^2}"
    assert _verdict(text)[::2] == ("unproven", "series-only")


# -- the independent re-checker -------------------------------------------------------------
def _certificate(text: str) -> dict[str, object]:
    import json

    from verifier import check_text

    data = json.loads(json.dumps(check_text(f"%@claim\n\\[ {text} \\]\n", "c.tex").to_dict()))
    (claim,) = data["claims"]
    assert claim["verdict"] == "proved"
    cert: dict[str, object] = claim["certificate"]
    return cert


@pytest.mark.parametrize("case", IDENTITIES, ids=[c[1][:40] for c in IDENTITIES])
def test_certificates_are_rechecked(case: tuple[str, str, Series, Series, list[tuple[str, Series, Series]]]) -> None:
    from verifier.recheck.check import CONFIRMED, recheck

    assert recheck(_certificate(case[1])).status == CONFIRMED


@pytest.mark.parametrize(
    ("old", "new"),
    [
        ("(utheta 3 0 1)", "(utheta 5 0 1)"),  # another character
        ("(utheta 3 0 1)", "(utheta 3 0 2)"),  # another scale
        ("(utheta 3 0 1)", "(utheta 3 1 1)"),  # n^1 with an even character: no such form
        ("(utheta 3 0 1)", "(utheta 6 0 1)"),  # the kernel of no character the claim's space allows
    ],
)
def test_an_altered_unary_theta_fails_the_recheck(old: str, new: str) -> None:
    import copy

    from verifier.recheck.check import FAILED, recheck

    cert = _certificate(ZS + r"\left(\frac{12}{n}\right) q^{n^2} = 2\eta(24\tau)")
    altered = copy.deepcopy(cert)
    left = altered["left"]
    assert isinstance(left, dict) and left["expr"] == old
    left["expr"] = new
    assert recheck(altered).status == FAILED
