"""Checks of eta quotients (docs/method.md#eta-theta) against sources outside the engine.

Each expected value names its source beside it: Gordon–Hughes and Newman (the level and
character criterion, docs/method.md#eta-modularity), Ligozat (orders at cusps, #ligozat), Dummit–Kisilevsky–McKay
and Martin (the eta products spanning one-dimensional spaces of cusp forms, docs/method.md#eta-modularity), Shimura
(half-integral weight, docs/method.md#half-integral-weight), classical theta identities checked against series
built here by
direct enumeration (docs/method.md#theta-nome), published tables (Ramanujan 1916; Serre, Ch. VII), or ``from
memory``.  The transformation
laws are checked numerically with mpmath, independently of the exact code paths.
"""

from __future__ import annotations

import math
import random
from fractions import Fraction

import mpmath
import pytest
import sympy
from verifier.forms.delta import delta_series
from verifier.forms.eta import EtaQuotient
from verifier.numbers import QuadraticCharacter, kronecker
from verifier.prove.groups import dim_cusp, index_gamma0
from verifier.series.qseries import QSeries

E = EtaQuotient.of
THETA = EtaQuotient.theta()


def _series(coeffs: dict[int, int], prec: int) -> QSeries:
    """The series sum coeffs[n] q^n + O(q^prec) (test helper, n >= 0)."""
    return QSeries.from_coefficients([coeffs.get(n, 0) for n in range(prec)], 0, prec)


def _phi(n: int) -> int:
    return sum(1 for a in range(1, n + 1) if math.gcd(a, n) == 1)


def _divisors(n: int) -> list[int]:
    return [d for d in range(1, n + 1) if n % d == 0]


# ---------------------------------------------------------------------------
# 1. Construction and invariants
# ---------------------------------------------------------------------------


def test_construction_normalises_and_validates() -> None:
    f = E({11: 2, 1: 2, 3: 0})
    assert f.exponents == ((1, 2), (11, 2))
    assert f.weight == 2 and f.s == 24 and f.offset == 1 and f.lcm_delta == 11
    assert E([(2, 3), (2, -3)]).exponents == ()
    with pytest.raises(ValueError):
        E({0: 1})
    with pytest.raises(ValueError):
        EtaQuotient(((2, 1), (1, 1)))  # not sorted
    with pytest.raises(ValueError):
        EtaQuotient(((1, 0),))
    with pytest.raises(TypeError):
        E({1: Fraction(1, 2)})  # type: ignore[arg-type]


def test_group_operations() -> None:
    # Definition (docs/method.md#eta-offset): exponents add under products; tau -> t tau multiplies the deltas.
    f = E({1: 2, 11: 2})
    assert f * f == f**2 == E({1: 4, 11: 4})
    assert f / f == E({}) and f**0 == E({})
    assert f.scaled(2) == E({2: 2, 22: 2})
    assert (THETA * E({1: 2, 4: 2})).exponents == ((2, 5),)
    assert THETA.weight == Fraction(1, 2) and THETA.is_half_integral and THETA.s == 0
    assert f.label() == "eta(tau)^2 eta(11tau)^2"
    with pytest.raises(ValueError):
        f.scaled(0)


# ---------------------------------------------------------------------------
# 2. q-expansions
# ---------------------------------------------------------------------------


def _naive_product(f: EtaQuotient, prec: int) -> QSeries:
    # Definition (docs/method.md#eta-offset): multiply the factors (1 - q^{delta n})^{r_delta} one by one, with the
    # generic rational series inverse for negative exponents.
    result = QSeries.constant(1, prec)
    for delta, r in f.exponents:
        n = 1
        while delta * n < prec:
            factor = QSeries.from_coefficients([1] + [0] * (delta * n - 1) + [-1], 0, prec)
            result = result * factor**r
            n += 1
    return result


def test_product_series_matches_naive_product() -> None:
    rng = random.Random(11)
    for _ in range(12):
        f = E({d: rng.randint(-5, 5) for d in rng.sample([1, 2, 3, 4, 5, 6, 8, 12], 3)})
        prec = 40
        assert f.product_series(prec).coefficients(0, prec) == _naive_product(f, prec).coefficients(0, prec), f
    assert E({}).product_series(5).coefficients(0, 5) == [1, 0, 0, 0, 0]
    assert E({1: 3}).product_series(0).prec == 0


def test_delta_is_eta_24() -> None:
    # Delta = eta^24 (docs/method.md#delta-eta-j), against the existing Delta builder.
    prec = 60
    assert E({1: 24}).series(prec).coefficients(0, prec) == delta_series(prec).coefficients(0, prec)
    # Ramanujan's table (1916): tau(1..6).
    assert E({1: 24}).series(7).coefficients(1, 7) == [1, -24, 252, -1472, 4830, -6048]


def test_series_requires_integral_offset() -> None:
    with pytest.raises(ValueError):
        E({1: 1}).series(10)
    # Rescaling tau -> 24 tau (docs/method.md#eta-offset) gives eta(24 tau) = q prod (1 - q^{24 n}).
    s = E({1: 1}).scaled(24).series(200)
    assert s.valuation == 1 and [s[n] for n in (2, 25, 49, 121, 169)] == [0, -1, -1, 1, 1]


def test_eta_1_squared_eta_11_squared() -> None:
    # eta(tau)^2 eta(11 tau)^2 = q - 2q^2 - q^3 + 2q^4 + q^5 + 2q^6 - 2q^7 - 2q^9 - 2q^10 + q^11 - 2q^12.
    f = E({1: 2, 11: 2}).series(40)
    assert f.coefficients(0, 13) == [0, 1, -2, -1, 2, 1, 2, -2, 0, -2, -2, 1, -2]
    # a_p for p = 2, ..., 37 (Eichler-Shimura: point counts on y^2 + y = x^3 - x^2 - 10x - 20).
    primes = [2, 3, 5, 7, 11, 13, 17, 19, 23, 29, 31, 37]
    assert [f[p] for p in primes] == [-2, -1, 1, -2, 1, 4, -2, 0, -1, 0, 7, 3]


def _theta_enum(prec: int) -> dict[int, int]:
    out: dict[int, int] = {}
    for n in range(-math.isqrt(prec) - 1, math.isqrt(prec) + 2):
        if n * n < prec:
            out[n * n] = out.get(n * n, 0) + 1
    return out


def test_theta_identities_by_enumeration() -> None:
    # docs/method.md#theta-nome (Whittaker–Watson Ch. XXI; Koblitz Ch. IV), right sides enumerated here.
    prec = 200
    rng = range(-20, 21)
    theta = _series(_theta_enum(prec), prec)
    assert THETA.offset == 0
    assert THETA.series(prec).coefficients(0, prec) == theta.coefficients(0, prec)
    # sum (-1)^n q^{n^2} = eta(tau)^2 / eta(2tau)
    alt: dict[int, int] = {}
    for n in rng:
        alt[n * n] = alt.get(n * n, 0) + (-1) ** abs(n)
    assert E({1: 2, 2: -1}).series(prec).coefficients(0, prec) == _series(alt, prec).coefficients(0, prec)
    # sum q^{(n+1/2)^2} = 2 eta(4tau)^2 / eta(2tau), offset q^{1/4}: the product is sum_{n>=0} q^{n(n+1)}.
    half = E({2: -1, 4: 2})
    assert half.offset == Fraction(1, 4)
    even: dict[int, int] = {n * (n + 1): 1 for n in range(0, 20)}
    assert half.product_series(prec).coefficients(0, prec) == _series(even, prec).coefficients(0, prec)
    # ... and after tau -> 4 tau: sum_{n in Z} q^{(2n+1)^2} = 2 eta(16tau)^2/eta(8tau), integral offset 1.
    odd: dict[int, int] = {}
    for n in rng:
        odd[(2 * n + 1) ** 2] = odd.get((2 * n + 1) ** 2, 0) + 1
    assert half.scaled(4).series(prec).scale(2).coefficients(0, prec) == _series(odd, prec).coefficients(0, prec)
    # Ramanujan's psi(q) = sum_{n>=0} q^{n(n+1)/2} = q^{-1/8} eta(2tau)^2 / eta(tau).
    psi = E({1: -1, 2: 2})
    assert psi.offset == Fraction(1, 8)
    tri: dict[int, int] = {n * (n + 1) // 2: 1 for n in range(0, 25)}
    assert psi.product_series(prec).coefficients(0, prec) == _series(tri, prec).coefficients(0, prec)


def test_jacobi_triple_product_identity() -> None:
    # theta_2 theta_3 theta_4 = 2 eta^3 (docs/method.md#theta-nome) at 2tau, with eta(2tau)^3 from Jacobi's
    # sum_{n>=0} (-1)^n (2n+1) q^{(2n+1)^2/4} (from memory): compare in the variable q after
    # tau -> 4 tau, where every exponent is an integer.
    prec = 300
    theta = _series(_theta_enum(prec), prec)
    alt: dict[int, int] = {}
    odd: dict[int, int] = {}
    for n in range(-20, 21):
        alt[n * n] = alt.get(n * n, 0) + (-1) ** abs(n)
        odd[(2 * n + 1) ** 2] = odd.get((2 * n + 1) ** 2, 0) + 1
    lhs = (theta * _series(alt, prec)).inflate(4).truncate(prec) * _series(odd, prec)
    jacobi = {(2 * n + 1) ** 2: (-1) ** n * (2 * n + 1) for n in range(0, 10)}
    assert lhs.coefficients(0, prec) == _series(jacobi, prec).scale(2).coefficients(0, prec)
    assert E({8: 3}).series(prec).scale(2).coefficients(0, prec) == lhs.coefficients(0, prec)


def test_jacobi_four_squares_identity() -> None:
    # docs/method.md#sums-of-squares: theta^4 = eta_1^8/eta_2^4 + 16 eta_4^8/eta_2^4 (Jacobi), exactly.
    prec = 300
    theta = _series(_theta_enum(prec), prec)
    rhs = E({1: 8, 2: -4}).series(prec) + E({2: -4, 4: 8}).series(prec).scale(16)
    assert (theta**4).coefficients(0, prec) == rhs.coefficients(0, prec)
    # Jacobi's four-square theorem (Hardy–Wright Thm 386): r_4(1..10) = 8, 24, 32, 24, 48, 96, 64, 24, 104, 144.
    assert (THETA**4).series(11).coefficients(1, 11) == [8, 24, 32, 24, 48, 96, 64, 24, 104, 144]


def test_large_precision_theta() -> None:
    # prec 10^4 through the exact inverse path (r < 0), against enumeration (docs/method.md#theta-nome).
    prec = 10_000
    poly = THETA.product_poly(prec)
    expected = _theta_enum(prec)
    assert all(int(poly[n]) == expected.get(n, 0) for n in range(prec))


# ---------------------------------------------------------------------------
# 3. Levels and characters
# ---------------------------------------------------------------------------


def test_least_levels_of_examples() -> None:
    # docs/method.md#eta-modularity examples (Gordon–Hughes / Newman criterion, #eta-modularity).
    assert E({1: 8, 2: -4}).least_level() == 4
    assert E({1: -8, 2: 16}).least_level() == 2
    assert E({1: 2, 11: 2}).least_level() == 11
    assert THETA.least_level() == 4
    assert E({24: 1}).least_level() == 576  # Shimura / docs/method.md#half-integral-weight: eta(24tau) on Gamma0(576)
    assert E({}).least_level() == 1


def test_modularity_failure() -> None:
    f = E({1: 13})
    assert f.least_level() is None
    assert f.modularity_failure() == "sum of delta*r_delta = 13 is not divisible by 24"
    assert E({1: 1}).modularity_failure() is not None
    assert E({1: 24}).modularity_failure() is None
    assert E({1: 2, 11: 2}).level_failure(22) is None
    assert "does not divide" in (E({1: 2, 11: 2}).level_failure(12) or "")
    assert "N/delta" in (E({1: 8, 2: -4}).level_failure(2) or "")
    with pytest.raises(ValueError):
        E({1: 8, 2: -4}).character(2)


def _brute_least_level(f: EtaQuotient, need_four: bool = True) -> int | None:
    # The conditions of docs/method.md#eta-modularity tried level by level (Gordon–Hughes; Newman), plus 4 | N for
    # half-integral weight (Shimura, docs/method.md#half-integral-weight) when need_four is set.
    if f.s % 24:
        return None
    big_l = f.lcm_delta
    for n in range(big_l, 24 * 4 * big_l + 1, big_l):
        if sum((n // d) * r for d, r in f.exponents) % 24 == 0 and (
            not need_four or not f.is_half_integral or n % 4 == 0
        ):
            return n
    raise AssertionError("unreachable: 24 L always works")


def test_least_level_against_brute_force() -> None:
    rng = random.Random(5)
    pool = [1, 2, 3, 4, 5, 6, 8, 9, 12, 16, 18, 24]
    checked = 0
    while checked < 150:
        ds = rng.sample(pool, rng.randint(1, 4))
        f = E({d: rng.randint(-6, 6) for d in ds})
        if f.s % 24:
            assert f.least_level() is None and f.modularity_failure() is not None
            continue
        checked += 1
        n_min = f.least_level()
        assert n_min == _brute_least_level(f), f
        # From memory (a parity argument): for odd sum r the two congruences already force 4 | N.
        assert n_min == _brute_least_level(f, need_four=False), f
        assert n_min is not None
        # Every admissible level is a multiple of the least one (docs/method.md#eta-modularity).
        for n in range(1, 3 * n_min + 1):
            admissible = f.level_failure(n) is None
            assert admissible == (n % n_min == 0), (f, n)


def test_characters_of_examples() -> None:
    # docs/method.md#half-integral-weight / #eta-half-integral (Shimura's convention): eta(24tau) has chi_12, theta and
    # theta^3 the trivial character.
    assert E({24: 1}).character(576) == QuadraticCharacter.from_integer(12)
    assert THETA.character(4).is_trivial
    assert (THETA**3).character(4).is_trivial
    # docs/method.md#half-integral-weight: theta * eta(24tau) has chi_{-3} (a weight-1 integral quotient,
    # #eta-modularity).
    assert (THETA * E({24: 1})).character(576) == QuadraticCharacter.from_integer(-3)
    # docs/method.md#half-integral-weight: theta^2 in weight 1 carries chi_{-4}; so do eta(24tau)^2 (at 576)
    # (#eta-half-integral).
    assert (THETA**2).character(4) == QuadraticCharacter.from_integer(-4)
    assert (E({24: 1}) ** 2).character(576) == QuadraticCharacter.from_integer(-4)
    # From memory: eta(tau) eta(23tau) is the weight-1 form of level 23 with chi_{-23}.
    assert E({1: 1, 23: 1}).least_level() == 23
    assert E({1: 1, 23: 1}).character(23) == QuadraticCharacter.from_integer(-23)


# ---------------------------------------------------------------------------
# 4. Cusps (Ligozat)
# ---------------------------------------------------------------------------

# docs/method.md#eta-modularity (Dummit–Kisilevsky–McKay 1985; Martin 1996): (exponents, level, weight);
# each is a cusp form with trivial character spanning a one-dimensional S_k(Gamma0(N)).
CUSP_FORMS = [
    ({1: 2, 11: 2}, 11, 2),
    ({1: 1, 2: 1, 7: 1, 14: 1}, 14, 2),
    ({1: 1, 3: 1, 5: 1, 15: 1}, 15, 2),
    ({2: 2, 10: 2}, 20, 2),
    ({2: 1, 4: 1, 6: 1, 12: 1}, 24, 2),
    ({3: 2, 9: 2}, 27, 2),
    ({4: 2, 8: 2}, 32, 2),
    ({6: 4}, 36, 2),
    ({1: 4, 5: 4}, 5, 4),
    ({1: 2, 2: 2, 3: 2, 6: 2}, 6, 4),
    ({2: 4, 4: 4}, 8, 4),
    ({3: 8}, 9, 4),
    ({1: 6, 3: 6}, 3, 6),
    ({2: 12}, 4, 6),
    ({1: 8, 2: 8}, 2, 8),
    ({1: 24}, 1, 12),
]


@pytest.mark.parametrize(("exponents", "level", "weight"), CUSP_FORMS)
def test_dkm_martin_cusp_forms(exponents: dict[int, int], level: int, weight: int) -> None:
    f = E(exponents)
    assert f.weight == weight
    assert f.least_level() == level
    assert f.character(level).is_trivial
    assert all(v > 0 for v in f.orders(level).values())
    assert f.is_cusp_form(level) and f.is_holomorphic(level)
    assert dim_cusp(weight, level) == 1  # the spaces are one-dimensional (DKM; Martin)


def test_ligozat_orders_worked_examples() -> None:
    # Ligozat's formula (docs/method.md#ligozat), worked by hand: orders at d = 1, 2, 4 on Gamma0(4).
    assert list((THETA**4).orders(4).values()) == [0, 1, 0]
    assert list(E({1: 8, 2: -4}).orders(4).values()) == [1, 0, 0]
    assert list(E({2: -4, 4: 8}).orders(4).values()) == [0, 0, 1]
    # docs/method.md#poles-at-cusps: X = eta_1^16 eta_4^8 / eta_2^24 and Y = eta_1^8 eta_4^16 / eta_2^24.
    assert list(E({1: 16, 2: -24, 4: 8}).orders(4).values()) == [1, -1, 0]
    assert list(E({1: 8, 2: -24, 4: 16}).orders(4).values()) == [0, -1, 1]
    assert not E({1: 16, 2: -24, 4: 8}).is_holomorphic(4)
    # docs/method.md#valence-formula: theta^2 has order 1/2 at the cusp 1/2 of Gamma0(4).
    assert (THETA**2).order_at_cusp(2, 4) == Fraction(1, 2)
    assert THETA.order_at_cusp(2, 4) == Fraction(1, 4)
    assert THETA.is_holomorphic(4) and not THETA.is_cusp_form(4)
    # At infinity (d = N) the order is s/24 (docs/method.md#ligozat).
    assert E({24: 1}).order_at_cusp(576, 576) == 1
    with pytest.raises(ValueError):
        E({1: 2, 11: 2}).order_at_cusp(3, 11)
    with pytest.raises(ValueError):
        E({1: 2, 11: 2}).orders(12)


def test_valence_formula_for_random_quotients() -> None:
    # Valence formula (docs/method.md#valence-formula, #ligozat): sum over cusps of the orders equals k m_0(N)/12.
    # There are phi(gcd(d, N/d)) cusps with denominator d (docs/method.md#cusps), all with the same order.
    rng = random.Random(7)
    for _ in range(150):
        ds = rng.sample([1, 2, 3, 4, 5, 6, 7, 8, 9, 10, 12], rng.randint(1, 4))
        f = E({d: rng.randint(-9, 9) for d in ds})
        level = f.lcm_delta * rng.randint(1, 6)
        total = sum(_phi(math.gcd(d, level // d)) * v for d, v in f.orders(level).items())
        assert total == f.weight * index_gamma0(level) / 12, (f, level)


# ---------------------------------------------------------------------------
# 5. Transformation laws, numerically (mpmath)
# ---------------------------------------------------------------------------


def _evaluate(f: EtaQuotient, tau: mpmath.mpc, terms: int) -> mpmath.mpc:
    """f(tau) = q^{s/24} P(q), with P summed from its exact coefficients below q^terms."""
    coeffs = [int(c) for c in f.product_poly(terms).coeffs()]
    q = mpmath.exp(2j * mpmath.pi * tau)
    value = mpmath.polyval(coeffs[::-1], q) if coeffs else mpmath.mpf(0)
    return mpmath.exp(2j * mpmath.pi * tau * mpmath.mpf(f.s) / 24) * value


def _gamma(c: int, d: int) -> tuple[int, int, int, int]:
    a = pow(d, -1, abs(c))
    b, rem = divmod(a * d - 1, c)
    assert rem == 0 and a * d - b * c == 1
    return a, b, c, d


def _points(a: int, b: int, c: int, d: int) -> list[tuple[mpmath.mpc, mpmath.mpc, int]]:
    """Points tau with Im(tau), Im(gamma tau) both about 1/|c| (their product is at most 1/c^2).

    With tau = (-d + x + i t sign(c)) / c one has c tau + d = x + i t sign(c).  Returns
    (tau, gamma tau, number of terms for about 26 correct digits).
    """
    out = []
    for x, t in ((0.13, 0.9), (-0.27, 1.1)):
        cz = mpmath.mpc(x, t if c > 0 else -t)
        tau = (cz - d) / c
        gtau = (a * tau + b) / (c * tau + d)
        y = min(tau.imag, gtau.imag)
        terms = int(60 / (2 * math.pi * float(y))) + 20
        out.append((tau, gtau, terms))
    return out


def _ghn_symbol(f: EtaQuotient, d: int) -> int:
    # The character exactly as docs/method.md#eta-modularity states it (Gordon–Hughes; Newman): ((-1)^k prod delta^|r| /
    # d).
    k = int(f.weight)
    return kronecker((-1) ** k * math.prod(delta ** abs(r) for delta, r in f.exponents), d)


# Integral weight, from docs/method.md#eta-modularity, #half-integral-weight, "from memory" (eta(tau) eta(23 tau)), and
# found
# by a search over small exponents: (exponents, level, expected character as a discriminant).
GHN_CASES = [
    ({1: 2, 11: 2}, 11, 1),
    ({1: 1, 23: 1}, 23, -23),
    ({1: -4, 2: 10, 4: -4}, 4, -4),  # theta^2
    ({4: 6}, 16, -4),
    ({2: 3, 6: 3}, 12, -3),
    ({1: -2, 2: 3, 4: 1, 8: 2}, 8, 8),
    ({1: -2, 2: 3, 4: -1, 8: 6}, 8, -8),
    ({1: -3, 2: 6, 3: 5, 6: -4}, 24, 12),
]


@pytest.mark.parametrize(("exponents", "level", "disc"), GHN_CASES)
def test_ghn_transformation_law_numerically(exponents: dict[int, int], level: int, disc: int) -> None:
    f = E(exponents)
    k = int(f.weight)
    assert f.least_level() == level and f.is_holomorphic(level)
    chi = f.character(level)
    assert chi.disc == disc
    seen: set[int] = set()
    with mpmath.workdps(30):
        for c, d in ((level, 5), (level, -7), (-level, 11), (2 * level, 13), (level, 17)):
            if math.gcd(c, d) != 1:
                continue
            a, b, c, d = _gamma(c, d)
            expected = chi(d)
            assert expected == _ghn_symbol(f, d)
            seen.add(expected)
            for tau, gtau, terms in _points(a, b, c, d):
                ratio = _evaluate(f, gtau, terms) / ((c * tau + d) ** k * _evaluate(f, tau, terms))
                assert abs(ratio - expected) < mpmath.mpf(10) ** -15, (f, (a, b, c, d), ratio)
    # A nontrivial character must actually have been seen taking the value -1.
    assert (-1 in seen) == (disc != 1)


# Half-integral weight (Shimura, docs/method.md#half-integral-weight): f(gamma tau) = chi(d) j(gamma, tau)^{2 lambda +
# 1} f(tau).
HALF_CASES = [
    ({1: -2, 2: 5, 4: -2}, 4, 1),  # theta itself: checks the multiplier j and the test
    ({1: -6, 2: 15, 4: -6}, 4, 1),  # theta^3
    ({8: 3}, 64, 1),  # eta(8tau)^3 = sum (-1)^n (2n+1) q^{(2n+1)^2} (from memory)
    ({24: 1}, 576, 12),  # docs/method.md#half-integral-weight
]


@pytest.mark.parametrize(("exponents", "level", "disc"), HALF_CASES)
def test_shimura_transformation_law_numerically(exponents: dict[int, int], level: int, disc: int) -> None:
    f = E(exponents)
    two_k = int(2 * f.weight)  # 2 lambda + 1
    assert f.least_level() == level and f.is_holomorphic(level)
    chi = f.character(level)
    assert chi.disc == disc
    seen: set[int] = set()
    with mpmath.workdps(30):
        for c, d in ((level, 5), (level, -7), (-level, 11), (level, 19)):
            a, b, c, d = _gamma(c, d)
            if d < 0:  # -gamma acts the same way and j(-gamma, tau) = j(gamma, tau)
                a, b, c, d = -a, -b, -c, -d
            expected = chi(d)
            seen.add(expected)
            eps_inv = 1 if d % 4 == 1 else -1j
            for tau, gtau, terms in _points(a, b, c, d):
                j = int(sympy.jacobi_symbol(c % d, d)) * eps_inv * mpmath.sqrt(c * tau + d)
                ratio = _evaluate(f, gtau, terms) / (j**two_k * _evaluate(f, tau, terms))
                assert abs(ratio - expected) < mpmath.mpf(10) ** -15, (f, (a, b, c, d), ratio)
    assert (-1 in seen) == (disc != 1)
