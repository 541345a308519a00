"""Checks of Bernoulli numbers, E_k, Delta and j against sources outside the engine.

Each expected value names its source beside it: a published table, an independent
library (sympy for exact number theory, mpmath for high-precision numerics), a
classical theorem, or ``from memory`` / ``common practice``.
"""

from __future__ import annotations

from fractions import Fraction
from math import comb

import mpmath
import pytest
import sympy
from verifier.forms.delta import delta_series, euler_product
from verifier.forms.eisenstein import (
    bernoulli,
    divisor_sigma_list,
    eisenstein_constant,
    eisenstein_series,
)
from verifier.series.qseries import PrecisionError, QSeries

# ---------------------------------------------------------------------------
# 1. Bernoulli numbers
# ---------------------------------------------------------------------------

# Abramowitz & Stegun, Handbook of Mathematical Functions, Ch. 23, Table 23.2
# (convention t/(e^t - 1) = sum B_n t^n/n!, so B_1 = -1/2).
AS_TABLE_23_2 = {
    0: Fraction(1),
    1: Fraction(-1, 2),
    2: Fraction(1, 6),
    4: Fraction(-1, 30),
    6: Fraction(1, 42),
    8: Fraction(-1, 30),
    10: Fraction(5, 66),
    12: Fraction(-691, 2730),
    14: Fraction(7, 6),
    16: Fraction(-3617, 510),
    18: Fraction(43867, 798),
    20: Fraction(-174611, 330),
}


def test_bernoulli_against_abramowitz_stegun_table_23_2() -> None:
    for n in range(21):
        # Abramowitz & Stegun Table 23.2; B_n = 0 for odd n >= 3 (A&S 23.2, same table)
        expected = AS_TABLE_23_2.get(n, Fraction(0))
        assert bernoulli(n) == expected, n
        assert isinstance(bernoulli(n), Fraction)


def test_bernoulli_recurrence() -> None:
    # sum_{k=0}^{n} C(n+1, k) B_k = 0 for n >= 1 (common practice: follows from
    # t = (e^t - 1) * sum B_k t^k/k!, the generating function with B_1 = -1/2).
    for n in range(1, 61):
        assert sum(comb(n + 1, k) * bernoulli(k) for k in range(n + 1)) == 0, n


def test_bernoulli_against_sympy_up_to_60() -> None:
    # sympy >= 1.12 uses B_1 = +1/2 (the t e^t/(e^t - 1) convention); older versions
    # returned -1/2.  Either way only the sign of B_1 may differ: all other B_n agree.
    assert abs(Fraction(str(sympy.bernoulli(1)))) == Fraction(1, 2)
    assert bernoulli(1) == Fraction(-1, 2)  # A&S Table 23.2 convention
    for n in range(61):
        if n == 1:
            continue
        assert bernoulli(n) == Fraction(str(sympy.bernoulli(n))), n


def test_bernoulli_against_zeta_values() -> None:
    # B_{2m} = (-1)^(m+1) 2 (2m)! zeta(2m) / (2 pi)^(2m)  (Abramowitz & Stegun 23.2.16,
    # from memory), evaluated with mpmath's zeta (independent numerics).
    with mpmath.workdps(40):
        for m in range(1, 16):
            k = 2 * m
            b = bernoulli(k)
            sign = (-1) ** (m + 1)
            numeric = sign * 2 * mpmath.factorial(k) * mpmath.zeta(k) / (2 * mpmath.pi) ** k
            exact = mpmath.mpf(b.numerator) / b.denominator
            assert abs(numeric - exact) < mpmath.mpf(10) ** -30 * abs(numeric), k


def test_bernoulli_rejects_negative_index() -> None:
    with pytest.raises(ValueError):
        bernoulli(-1)


# ---------------------------------------------------------------------------
# 2. Eisenstein constants and divisor sums
# ---------------------------------------------------------------------------


def test_eisenstein_constants_match_math_md() -> None:
    # -2k/B_k for k = 2..16: docs/method.md#eisenstein (Serre, A Course in Arithmetic, Ch. VII §4.2;
    # Zagier, 1-2-3 of Modular Forms §2.1-2.2).  Also recomputed from A&S Table 23.2.
    expected = {
        2: Fraction(-24),
        4: Fraction(240),
        6: Fraction(-504),
        8: Fraction(480),
        10: Fraction(-264),
        12: Fraction(65520, 691),
        14: Fraction(-24),
        16: Fraction(16320, 3617),
    }
    for k, c in expected.items():
        assert eisenstein_constant(k) == c, k
        assert c == Fraction(-2 * k) / AS_TABLE_23_2[k]


def test_eisenstein_constant_equals_two_over_zeta_one_minus_k() -> None:
    # E_k = 1 + (2 / zeta(1-k)) sum sigma_{k-1}(n) q^n, since zeta(1-k) = -B_k/k
    # (common practice); zeta from mpmath.
    with mpmath.workdps(40):
        for k in range(2, 31, 2):
            c = eisenstein_constant(k)
            assert abs(2 / mpmath.zeta(1 - k) - mpmath.mpf(c.numerator) / c.denominator) < (
                mpmath.mpf(10) ** -30 * abs(2 / mpmath.zeta(1 - k))
            )


def test_eisenstein_constant_rejects_odd_or_small_weight() -> None:
    for k in (0, 1, 3, 5, -2):
        with pytest.raises(ValueError):
            eisenstein_constant(k)


@pytest.mark.parametrize("r", [1, 3, 5, 7, 9, 11, 13])
def test_eisenstein_coefficients_against_sympy_divisor_sigma(r: int) -> None:
    # E_k = 1 - (2k/B_k) sum sigma_{k-1}(n) q^n (docs/method.md#eisenstein), with sigma and B_k
    # both taken from sympy, independent of the engine.  B_k via sympy (k >= 2 even,
    # so the B_1 convention does not matter).
    k = r + 1
    n_max = 500
    const = -2 * k / Fraction(str(sympy.bernoulli(k)))
    e = eisenstein_series(k, n_max)
    assert e.prec == n_max
    assert e[0] == 1
    sig = divisor_sigma_list(r, n_max)
    assert sig[0] == 0
    for n in range(1, n_max):
        s = int(sympy.divisor_sigma(n, r))
        assert sig[n] == s, (r, n)
        assert e[n] == const * s, (k, n)
    with pytest.raises(PrecisionError):
        e[n_max]


# ---------------------------------------------------------------------------
# 3. Tables: first coefficients of E_k, tau(n), j
# ---------------------------------------------------------------------------


def test_first_coefficients_of_eisenstein_series() -> None:
    # Sources: Serre, A Course in Arithmetic, Ch. VII §4; Zagier, 1-2-3 of
    # Modular Forms §2 (section numbers from memory there).
    assert eisenstein_series(2, 6).coefficients(0, 6) == [1, -24, -72, -96, -168, -144]
    # (E_2 entries for q^4, q^5 from memory: -24 sigma(4) = -168, -24 sigma(5) = -144)
    assert eisenstein_series(4, 6).coefficients(0, 6) == [1, 240, 2160, 6720, 17520, 30240]
    assert eisenstein_series(6, 6).coefficients(0, 6) == [
        1,
        -504,
        -16632,
        -122976,
        -532728,
        -1575504,
    ]
    assert eisenstein_series(8, 4).coefficients(0, 4) == [1, 480, 61920, 1050240]
    assert eisenstein_series(10, 4).coefficients(0, 4) == [1, -264, -135432, -5196576]
    c12 = Fraction(65520, 691)
    assert eisenstein_series(12, 5).coefficients(0, 5) == [
        1,
        c12,
        c12 * 2049,
        c12 * 177148,
        c12 * 4196353,
    ]


# Ramanujan, Trans. Cambridge Philos. Soc. 22 (1916) 159-184, table of tau(n)
# (Serre, A Course in Arithmetic, Ch. VII §4).
RAMANUJAN_TAU_1_12 = [
    1,
    -24,
    252,
    -1472,
    4830,
    -6048,
    -16744,
    84480,
    -113643,
    -115920,
    534612,
    -370944,
]


def test_ramanujan_tau_table() -> None:
    d = delta_series(13)
    assert d.valuation == 1
    assert d[0] == 0
    assert d.coefficients(1, 13) == RAMANUJAN_TAU_1_12
    # further primes, from memory (Ramanujan's 1916 table runs to n = 30)
    d = delta_series(24)
    assert [d[13], d[17], d[19], d[23]] == [-577738, -6905934, 10661420, 18643272]


def test_tau_multiplicativity_hecke_and_bounds() -> None:
    # Mordell's theorem (Serre, A Course in Arithmetic, Ch. VII §5.4, from memory):
    # tau(mn) = tau(m) tau(n) for gcd(m, n) = 1 and
    # tau(p^(a+1)) = tau(p) tau(p^a) - p^11 tau(p^(a-1)).
    # Deligne's bound |tau(p)| <= 2 p^(11/2) (from memory).
    # tau(n) = sigma_11(n) mod 691 (Ramanujan 1916; sigma from sympy).
    n_max = 400
    d = delta_series(n_max)
    tau = [int(d[n]) for n in range(n_max)]
    for m in range(1, 40):
        for n in range(1, n_max // m):
            if m * n < n_max and sympy.gcd(m, n) == 1:
                assert tau[m * n] == tau[m] * tau[n], (m, n)
    for p in sympy.primerange(2, 20):
        pa = [1, p]
        while pa[-1] * p < n_max:
            pa.append(pa[-1] * p)
        for a in range(1, len(pa) - 1):
            assert tau[pa[a + 1]] == tau[p] * tau[pa[a]] - p**11 * tau[pa[a - 1]], (p, a)
    for p in sympy.primerange(2, n_max):
        assert tau[p] ** 2 <= 4 * p**11, p
    for n in range(1, n_max):
        assert (tau[n] - int(sympy.divisor_sigma(n, 11))) % 691 == 0, n


def test_j_coefficients() -> None:
    # Apostol, Modular Functions and Dirichlet Series, Ch. 1; Serre Ch. VII §3.3):
    # c(-1..4); c(5) = 333202640600 from memory.
    p = 10
    j = eisenstein_series(4, p) ** 3 / delta_series(p)
    assert j.valuation == -1
    # Delta = q (1 + O(q^(p-1))): 1/Delta is known below q^(p-2) (common practice)
    assert j.prec == p - 2
    assert j.coefficients(-1, 5) == [1, 744, 196884, 21493760, 864299970, 20245856256]
    assert j[5] == 333202640600


def test_euler_product_against_naive_product() -> None:
    # prod_{n>=1} (1 - q^n) by direct multiplication (definition), and the pentagonal
    # number theorem (Hardy & Wright, Ch. XIX, Thm 353, from memory): only exponents k(3k-1)/2.
    prec = 120
    naive = [1] + [0] * (prec - 1)
    for n in range(1, prec):
        for e in range(prec - 1, n - 1, -1):
            naive[e] -= naive[e - n]
    ep = euler_product(prec)
    assert [int(ep[i]) for i in range(prec)] == naive
    pentagonal = {k * (3 * k - 1) // 2 for k in range(-10, 11)}
    assert all(c == 0 for i, c in enumerate(naive) if i not in pentagonal)


def test_delta_against_naive_product() -> None:
    # Delta = q prod (1 - q^n)^24 (docs/method.md#delta-eta-j), expanded naively in Python integers.
    prec = 60
    body = [1] + [0] * (prec - 2)
    for n in range(1, prec - 1):
        for _ in range(24):
            for e in range(prec - 2, n - 1, -1):
                body[e] -= body[e - n]
    d = delta_series(prec)
    assert d.prec == prec
    assert d.coefficients(0, prec) == [0, *body]


# ---------------------------------------------------------------------------
# 5. Algebraic identities between E_k and Delta (exact, far beyond the Sturm bound)
# ---------------------------------------------------------------------------

P = 150


def test_eisenstein_product_identities() -> None:
    # docs/method.md#eisenstein: E_8 = E_4^2, E_10 = E_4 E_6, E_14 = E_4^2 E_6, 691 E_12 = 441 E_4^3 + 250 E_6^2
    # (Serre, A Course in Arithmetic, Ch. VII §4; Zagier, 1-2-3 §2.2; dim M_k = 1 for
    # k = 8, 10, 14 and dim M_12 = 2).
    e4, e6 = eisenstein_series(4, P), eisenstein_series(6, P)
    assert eisenstein_series(8, P).first_difference(e4 * e4, 0, P) is None
    assert eisenstein_series(10, P).first_difference(e4 * e6, 0, P) is None
    assert eisenstein_series(14, P).first_difference(e4 * e4 * e6, 0, P) is None
    lhs = eisenstein_series(12, P).scale(691)
    rhs = (e4**3).scale(441) + (e6**2).scale(250)
    assert lhs.first_difference(rhs, 0, P) is None
    # sanity: a wrong identity is detected (E_12 is not E_4^3)
    assert eisenstein_series(12, P).first_difference(e4**3, 0, P) == 1


def test_delta_equals_e4_cubed_minus_e6_squared() -> None:
    # docs/method.md#delta-eta-j: 1728 Delta = E_4^3 - E_6^2 (Serre Ch. VII §4.4; Apostol Ch. 1).
    e4, e6 = eisenstein_series(4, P), eisenstein_series(6, P)
    assert delta_series(P).scale(1728).first_difference(e4**3 - e6**2, 0, P) is None


def test_e12_minus_delta_is_691_divisible() -> None:
    # Ramanujan 1916 congruence tau(n) = sigma_11(n) mod 691, in series form:
    # (691/65520) (E_12 - 1) - Delta = sum (sigma_11(n) - tau(n)) q^n has integer
    # coefficients divisible by 691 (Serre, A Course in Arithmetic, Ch. VII §4).
    e12 = eisenstein_series(12, P)
    d = delta_series(P)
    diff = (e12 - QSeries.constant(1, P)).scale(Fraction(691, 65520)) - d
    assert diff[0] == 0
    for n in range(1, P):
        assert diff[n].denominator == 1
        assert diff[n] % 691 == 0


# ---------------------------------------------------------------------------
# 4. Numerical checks with mpmath (independent of any table)
# ---------------------------------------------------------------------------

DPS = 40
TERMS = 200
TOL = mpmath.mpf(10) ** -30
IM_MIN = mpmath.mpf("0.79")  # a little below 0.8 so that decimal rounding cannot bite


def _to_mp(c: Fraction) -> mpmath.mpf:
    return mpmath.mpf(c.numerator) / c.denominator


def evaluate(s: QSeries, tau: mpmath.mpc) -> mpmath.mpc:
    """sum_{n < prec} a_n q^n at q = exp(2 pi i tau) (truncated; fine for Im tau >= 0.8)."""
    q = mpmath.exp(2j * mpmath.pi * tau)
    total = mpmath.mpc(0)
    for n in range(s.valuation, s.prec):
        c = s[n]
        if c:
            total += _to_mp(c) * q**n
    return total


def close(a: mpmath.mpc, b: mpmath.mpc, scale: mpmath.mpf | None = None) -> bool:
    ref = scale if scale is not None else max(mpmath.mpf(1), abs(b))
    return abs(a - b) <= TOL * ref


@pytest.fixture(scope="module")
def series() -> dict[str, QSeries]:
    e4 = eisenstein_series(4, TERMS)
    d = delta_series(TERMS)
    return {
        "E2": eisenstein_series(2, TERMS),
        "E4": e4,
        "E6": eisenstein_series(6, TERMS),
        "Delta": d,
        "j": e4**3 / d,
    }


@pytest.fixture(autouse=True)
def _mp_precision():
    with mpmath.workdps(DPS):
        yield


def points() -> list[mpmath.mpc]:
    # Points with Im tau >= 0.8 and Im(-1/tau) >= 0.8, so |q| <= e^(-1.6 pi) at both ends
    # and 200 terms leave a truncation error far below 10^-40.
    with mpmath.workdps(DPS):
        return [
            mpmath.mpc("0.1", "1.1"),
            mpmath.mpc("-0.3", "0.9"),
            mpmath.mpc("0.45", "0.95"),
            mpmath.mpc("0.2", "0.8"),
            mpmath.mpc("-0.05", "1.02"),
        ]


def test_points_are_far_from_the_real_axis() -> None:
    for tau in points():
        assert tau.imag >= IM_MIN
        assert (-1 / tau).imag >= IM_MIN


@pytest.mark.parametrize("name,k", [("E4", 4), ("E6", 6), ("Delta", 12)])
def test_modularity_under_s(series: dict[str, QSeries], name: str, k: int) -> None:
    # f(-1/tau) = tau^k f(tau) for f in M_k(SL_2(Z)) (common practice; Serre Ch. VII §2).
    f = series[name]
    for tau in points():
        lhs = evaluate(f, -1 / tau)
        rhs = tau**k * evaluate(f, tau)
        assert close(lhs, rhs, max(abs(lhs), abs(rhs))), (name, tau)


@pytest.mark.parametrize("name,k", [("E4", 4), ("E6", 6), ("Delta", 12)])
def test_modularity_under_another_matrix(series: dict[str, QSeries], name: str, k: int) -> None:
    # gamma = [[0, -1], [1, -1]]: f(gamma tau) = (tau - 1)^k f(tau) (common practice).
    f = series[name]
    tau = mpmath.mpc("0.5", "0.9")
    g_tau = -1 / (tau - 1)
    assert g_tau.imag >= IM_MIN
    lhs = evaluate(f, g_tau)
    rhs = (tau - 1) ** k * evaluate(f, tau)
    assert close(lhs, rhs, max(abs(lhs), abs(rhs)))


def test_e2_quasimodular_law(series: dict[str, QSeries]) -> None:
    # docs/method.md#e2 (Zagier 1-2-3 §2.3 eq. (17), from memory):
    # E_2(gamma tau) = (c tau + d)^2 E_2(tau) + 6 c (c tau + d) / (pi i).
    e2 = series["E2"]
    for (a, b, c, d), tau in [
        ((0, -1, 1, 0), mpmath.mpc("0.1", "1.1")),
        ((0, -1, 1, 0), mpmath.mpc("-0.3", "0.9")),
        ((0, -1, 1, -1), mpmath.mpc("0.5", "0.9")),
    ]:
        assert a * d - b * c == 1
        g_tau = (a * tau + b) / (c * tau + d)
        assert g_tau.imag >= IM_MIN
        j_fac = c * tau + d
        lhs = evaluate(e2, g_tau)
        rhs = j_fac**2 * evaluate(e2, tau) + 6 * c * j_fac / (mpmath.pi * 1j)
        assert close(lhs, rhs)
        # the correction term is really needed: E_2 alone is not modular
        assert abs(lhs - j_fac**2 * evaluate(e2, tau)) > 0.1


def test_special_values(series: dict[str, QSeries]) -> None:
    i = mpmath.mpc(0, 1)
    rho = mpmath.exp(2j * mpmath.pi / 3)
    # E_6(i) = 0 and E_4(rho) = 0 (Serre Ch. VII §3, valence formula; from memory)
    assert abs(evaluate(series["E6"], i)) < TOL
    assert abs(evaluate(series["E4"], rho)) < TOL
    # j(i) = 1728, j(e^(2 pi i/3)) = 0 (docs/method.md#delta-eta-j; Apostol Ch. 1; Serre Ch. VII §3.3)
    assert close(evaluate(series["j"], i), mpmath.mpf(1728))
    assert abs(evaluate(series["j"], rho)) < TOL * 1728
    # class-number-one values (from memory): j(i sqrt 2) = 8000, j((1 + i sqrt 7)/2) = -3375,
    # j((1 + i sqrt 11)/2) = -32768
    assert close(evaluate(series["j"], i * mpmath.sqrt(2)), mpmath.mpf(8000))
    assert close(evaluate(series["j"], (1 + i * mpmath.sqrt(7)) / 2), mpmath.mpf(-3375))
    assert close(evaluate(series["j"], (1 + i * mpmath.sqrt(11)) / 2), mpmath.mpf(-32768))


def test_j_against_mpmath_kleinj(series: dict[str, QSeries]) -> None:
    # mpmath.kleinj computes Klein's J = g_2^3 / (g_2^3 - 27 g_3^2) from theta functions,
    # and j = 1728 J (mpmath documentation of kleinj).
    for tau in points():
        ref = 1728 * mpmath.kleinj(tau)
        assert close(evaluate(series["j"], tau), ref, max(mpmath.mpf(1), abs(ref))), tau


def test_delta_against_mpmath_product_and_theta(series: dict[str, QSeries]) -> None:
    # Delta = q prod (1 - q^n)^24 (docs/method.md#delta-eta-j), evaluated with mpmath's q-Pochhammer
    # symbol qp(q) = prod_{n>=1} (1 - q^n); and Delta = (theta_2 theta_3 theta_4 / 2)^8 in
    # Jacobi's nome e^(pi i tau) (Jacobi's 2 eta^3 = theta_2 theta_3 theta_4; from memory),
    # with mpmath.jtheta.
    for tau in points():
        q = mpmath.exp(2j * mpmath.pi * tau)
        nome = mpmath.exp(1j * mpmath.pi * tau)
        value = evaluate(series["Delta"], tau)
        product = q * mpmath.qp(q) ** 24
        t2, t3, t4 = (mpmath.jtheta(n, 0, nome) for n in (2, 3, 4))
        theta = (t2 * t3 * t4 / 2) ** 8
        assert close(value, product, abs(product)), tau
        assert close(value, theta, abs(theta)), tau


def test_e4_against_theta_functions(series: dict[str, QSeries]) -> None:
    # E_4 = (theta_2^8 + theta_3^8 + theta_4^8) / 2 in Jacobi's nome e^(pi i tau)
    # (from memory), with mpmath.jtheta.
    for tau in points():
        nome = mpmath.exp(1j * mpmath.pi * tau)
        ref = (sum(mpmath.jtheta(n, 0, nome) ** 8 for n in (2, 3, 4))) / 2
        assert close(evaluate(series["E4"], tau), ref), tau


def test_e4_e6_against_weierstrass_invariants(series: dict[str, QSeries]) -> None:
    # 1728 J = 1728 E_4^3 / (E_4^3 - E_6^2)  (docs/method.md#eisenstein: g_2 ~ E_4, g_3 ~ E_6;
    # mpmath.kleinj as reference): checks E_6 numerically independently of Delta.
    for tau in points():
        e4 = evaluate(series["E4"], tau)
        e6 = evaluate(series["E6"], tau)
        ref = 1728 * mpmath.kleinj(tau)
        val = 1728 * e4**3 / (e4**3 - e6**2)
        assert close(val, ref, max(mpmath.mpf(1), abs(ref))), tau
