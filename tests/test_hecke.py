"""Hecke operators and eigenform decisions, checked against values from outside the module.

Sources, named beside each test: docs/method.md#hecke with Diamond–Shurman Prop. 5.3.1 (T_n Delta, T_p theta^2); the tau
table of Ramanujan (1916); the a_p of eta(tau)^2 eta(11tau)^2 by point counting on its elliptic curve
(point counts on the curve named there); E_k is a T_n-eigenform with eigenvalue sigma_(k-1)(n)
(standard, from memory). Expected coefficients of refutations are recomputed here by hand from
these values, never read back from the module under test.
"""

from __future__ import annotations

from collections.abc import Callable
from fractions import Fraction

import pytest
from verifier.claims.eigenform import (
    decide_eigen,
    decide_normalised_eigenform,
    eigen_input_precision,
    eigenform_prime_bound,
    normalised_eigenform_input_precision,
)
from verifier.forms.delta import delta_series
from verifier.forms.eta import EtaQuotient
from verifier.prove.groups import sturm_bound
from verifier.prove.hecke import hecke, operator_name, required_input_precision
from verifier.series.qseries import QSeries

# Ramanujan (1916), table of tau(n), n = 1..12.
TAU = [1, -24, 252, -1472, 4830, -6048, -16744, 84480, -113643, -115920, 534612, -370944]

# a_p of eta(tau)^2 eta(11tau)^2 for p = 2, 3, 5, ..., 37: p + 1 - #E(F_p) on y^2 + y = x^3 - x^2 - 10x - 20
# (Eichler-Shimura; Shimura 1971, §7.5, from memory).
LEVEL11_AP = {2: -2, 3: -1, 5: 1, 7: -2, 11: 1, 13: 4, 17: -2, 19: 0, 23: -1, 29: 0, 31: 7, 37: 3}
# Its first coefficients a_1 .. a_12 (from memory; they agree with the a_p above).
LEVEL11_SERIES = [1, -2, -1, 2, 1, 2, -2, 0, -2, -2, 1, -2]

ONE = Fraction(1)


def sigma(r: int, n: int) -> int:
    """sum of d^r over the divisors d of n, by trial division."""
    return sum(d**r for d in range(1, n + 1) if n % d == 0)


def eisenstein(k: int, prec: int) -> QSeries:
    """E_4 = 1 + 240 sum sigma_3(n) q^n and E_6 = 1 - 504 sum sigma_5(n) q^n (Serre, A Course in Arithmetic, Ch.
    VII §4)."""
    c = {4: 240, 6: -504}[k]
    return QSeries.from_coefficients([1] + [c * sigma(k - 1, n) for n in range(1, prec)], 0, prec)


def level11(prec: int) -> QSeries:
    return EtaQuotient.of({1: 2, 11: 2}).series(prec)


def theta_squared(prec: int) -> QSeries:
    return (EtaQuotient.theta() ** 2).series(prec)


def chi_m4(n: int) -> int:
    """chi_{-4}(n): 0 for even n, +1 for n = 1 mod 4, -1 for n = 3 mod 4."""
    return 0 if n % 2 == 0 else (1 if n % 4 == 1 else -1)


def level11_eisenstein(prec: int) -> QSeries:
    """(E_2(tau) - 11 E_2(11 tau)) / (-24) = 5/12 + sum sigma'(n) q^n, sigma'(n) = sum of d | n with 11 not dividing d.

    From E_2 = 1 - 24 sum sigma(n) q^n (docs/method.md#eisenstein): sigma(n) - 11 sigma(n/11) drops exactly the divisors
    divisible by 11. It is a normalised eigenform: a_p = 1 + p for p != 11, and U_11 fixes it (the divisors
    of 11n prime to 11 are those of n).
    """
    coeffs: list[Fraction | int] = [Fraction(5, 12)]
    coeffs += [sum(d for d in range(1, n + 1) if n % d == 0 and d % 11) for n in range(1, prec)]
    return QSeries.from_coefficients(coeffs, 0, prec)


def test_level11_series_matches_table() -> None:
    # Ramanujan 1916, table of tau(n)
    s = level11(13)
    assert s.coefficients(1, 13) == LEVEL11_SERIES
    assert s[0] == 0


# ---------------------------------------------------------------------------
# The operator itself
# ---------------------------------------------------------------------------


def test_required_precision() -> None:
    assert required_input_precision(5, 2) == 6
    assert required_input_precision(1, 10) == 10
    assert required_input_precision(3, 0) == 0


@pytest.mark.parametrize("n", [2, 3, 4, 5, 6, 9])
def test_hecke_delta(n: int) -> None:
    # docs/method.md#hecke: T_n Delta = tau(n) Delta; tau from Ramanujan (1916).
    prec = 12 // n + 1
    image = hecke(delta_series(n * (prec - 1) + 1), n, Fraction(12), 1, 1, prec)
    assert image.prec == prec
    assert image.coefficients(0, prec) == [0] + [TAU[n - 1] * TAU[m - 1] for m in range(1, prec)]


def test_hecke_delta_coefficient_formula() -> None:
    # a_2(T_2 Delta) = tau(4) + 2^11 tau(1) = -1472 + 2048 = 576 = tau(2)^2 (Ramanujan's table).
    image = hecke(delta_series(5), 2, 12, 1, 1, 3)
    assert image[2] == 576 == TAU[1] ** 2


def test_hecke_needs_enough_input() -> None:
    with pytest.raises(ValueError, match=r"O\(q\^11\)"):
        hecke(delta_series(10), 5, 12, 1, 1, 3)
    hecke(delta_series(11), 5, 12, 1, 1, 3)


def test_hecke_rejects_bad_data() -> None:
    f = delta_series(20)
    with pytest.raises(NotImplementedError, match="half-integral"):
        hecke(EtaQuotient.theta().series(20), 3, Fraction(1, 2), 1, 4, 3)
    with pytest.raises(ValueError, match="conductor"):
        hecke(f, 2, 12, -1, 1, 3)  # chi_{-4} is no character mod 1
    with pytest.raises(ValueError, match="is 0"):
        hecke(f, 2, 12, -1, 4, 3)  # odd character, even weight
    with pytest.raises(ValueError, match="positive"):
        hecke(f, 0, 12, 1, 1, 3)
    with pytest.raises(ValueError, match="negative powers"):
        hecke(QSeries.from_coefficients([1, 0, 1], -1, 20), 2, 12, 1, 1, 3)


def test_operator_names() -> None:
    assert operator_name(11, 11) == "U_11"
    assert operator_name(4, 2) == "U_4"
    assert operator_name(6, 2) == "T_6"
    assert operator_name(5, 11) == "T_5"


@pytest.mark.parametrize("k", [4, 6])
@pytest.mark.parametrize("n", [2, 3, 4, 5, 6, 7, 8, 9, 10, 12])
def test_eisenstein_eigenvalues(k: int, n: int) -> None:
    # T_n E_k = sigma_(k-1)(n) E_k (from memory); compared well beyond the Sturm bound.
    prec = 8
    e = eisenstein(k, n * (prec - 1) + 1)
    image = hecke(e, n, k, 1, 1, prec)
    lam = sigma(k - 1, n)
    assert image.coefficients(0, prec) == [lam * c for c in e.coefficients(0, prec)]


def _e4_cubed_plus_5_delta(prec: int) -> QSeries:
    return eisenstein(4, prec) ** 3 + delta_series(prec).scale(5)


@pytest.mark.parametrize(
    ("k", "form"),
    [
        (4, lambda prec: eisenstein(4, prec)),
        (6, lambda prec: eisenstein(6, prec)),
        # Not an eigenform: the operator relations hold on the whole space M_12.
        (12, _e4_cubed_plus_5_delta),
    ],
)
def test_multiplicativity_and_recursion(k: int, form: Callable[[int], QSeries]) -> None:
    # docs/method.md#hecke: T_mn = T_m T_n for coprime m, n; T_(p^(r+1)) = T_p T_(p^r) - p^(k-1) T_(p^(r-1)).
    prec = 6
    big = form(36 * (prec - 1) + 1)

    def t(f: QSeries, n: int, out: int) -> QSeries:
        return hecke(f, n, k, 1, 1, out)

    for m, n in [(2, 3), (3, 4), (4, 9)]:
        direct = t(big, m * n, prec)
        composed = t(t(big, n, m * (prec - 1) + 1), m, prec)
        assert direct.coefficients(0, prec) == composed.coefficients(0, prec)
    for p, r in [(2, 1), (2, 2), (3, 1)]:
        left = t(big, p ** (r + 1), prec)
        right = t(t(big, p**r, p * (prec - 1) + 1), p, prec) - t(big, p ** (r - 1), prec).scale(p ** (k - 1))
        assert left.coefficients(0, prec) == right.coefficients(0, prec)


def test_level11_eigenvalues() -> None:
    # The a_p table above; T_n for n = 2..7 and 11 (docs/method.md#hecke).
    prec = 12
    for p, ap in LEVEL11_AP.items():
        f = level11(p * (prec - 1) + 1)
        image = hecke(f, p, 2, 1, 11, prec)
        assert image.coefficients(0, prec) == [ap * c for c in f.coefficients(0, prec)], p
    # U_11 = T_11 at level 11: a_m -> a_(11m), eigenvalue a_11 = 1.
    f = level11(11 * 5 + 1)
    u = hecke(f, 11, 2, 1, 11, 6)
    assert u.coefficients(0, 6) == f.coefficients(0, 6)
    assert [u[m] for m in range(6)] == [f[11 * m] for m in range(6)]


def test_level11_composite_eigenvalues() -> None:
    # a_4 = a_2^2 - 2 = 2 and a_6 = a_2 a_3 = 2 (the series above and the relations of docs/method.md#hecke).
    for n, an in [(4, 2), (6, 2), (9, LEVEL11_AP[3] ** 2 - 3), (22, LEVEL11_AP[2] * LEVEL11_AP[11])]:
        assert decide_eigen(level11(eigen_input_precision(n, 2, 11)), n, 2, 1, 11, an).proved, n


@pytest.mark.parametrize("p", [3, 5, 7, 11, 13, 17, 19])
def test_theta_squared(p: int) -> None:
    # docs/method.md#hecke: T_p theta^2 = (1 + chi_{-4}(p)) theta^2 for odd p (weight 1, level 4, chi_{-4}).
    prec = 10
    f = theta_squared(p * (prec - 1) + 1)
    image = hecke(f, p, 1, -1, 4, prec)
    lam = 1 + chi_m4(p)
    assert image.coefficients(0, prec) == [lam * c for c in f.coefficients(0, prec)]
    assert decide_eigen(f, p, 1, -1, 4, lam).proved


def test_theta_squared_u2() -> None:
    # r_2(2n) = r_2(n) (n^2 + m^2 = 2N iff ((n+m)/2)^2 + ((n-m)/2)^2 = N), so U_2 theta^2 = theta^2.
    d = decide_eigen(theta_squared(40), 2, 1, -1, 4, None)
    assert d.proved and d.eigenvalue == 1


# ---------------------------------------------------------------------------
# decide_eigen
# ---------------------------------------------------------------------------


@pytest.mark.parametrize("n", [2, 3, 4, 5, 6, 9])
def test_decide_delta(n: int) -> None:
    f = delta_series(eigen_input_precision(n, 12, 1))
    d = decide_eigen(f, n, Fraction(12), 1, 1, TAU[n - 1])
    assert d.proved and d.bound == 1 and d.eigenvalue == TAU[n - 1]
    found = decide_eigen(f, n, 12, 1, 1, None)
    assert found.proved and found.eigenvalue == TAU[n - 1]


def test_decide_delta_false_eigenvalue() -> None:
    # T_5 Delta = 4831 Delta is false: a_1(T_5 Delta) = tau(5) = 4830 (Ramanujan), against 4831 a_1(Delta) = 4831.
    d = decide_eigen(delta_series(6), 5, 12, 1, 1, 4831)
    assert d.refuted
    assert (d.operator, d.index, d.left, d.right) == (5, 1, Fraction(TAU[4]), Fraction(4831))


def test_decide_level11_false_eigenvalue() -> None:
    # T_3 f = f is false: a_1(T_3 f) = a_3 = -1 (the a_p table above) but the right side has a_1 = 1.
    d = decide_eigen(level11(7), 3, 2, 1, 11, 1)
    assert d.refuted and (d.index, d.left, d.right) == (1, Fraction(-1), ONE)
    # U_11 f = -f is false at q^1 too: a_11 = 1.
    d = decide_eigen(level11(23), 11, 2, 1, 11, -1)
    assert d.refuted and (d.index, d.left, d.right) == (1, ONE, Fraction(-1))


def test_decide_theta_squared_false_eigenvalue() -> None:
    # T_3 theta^2 = 2 theta^2 is false. With B(4, 1) = 0 only a_0 is compared:
    # a_0(T_3 theta^2) = (1 + chi_{-4}(3) 3^0) a_0 = 0, while 2 a_0(theta^2) = 2.
    assert sturm_bound(1, 4) == 0
    d = decide_eigen(theta_squared(10), 3, 1, -1, 4, 2)
    assert d.refuted and (d.index, d.left, d.right) == (0, Fraction(0), Fraction(2))


def test_decide_e4_plus_delta() -> None:
    # E_4 + Delta is no eigenform of T_2 (in weight 12, where Delta lives, and in weight 4).
    # Its a_1 = 240 + 1 = 241 and a_2 = 2160 - 24 = 2136, so lambda would be 2136/241; at q^0,
    # a_0(T_2 f) = (1 + 2^(k-1)) a_0 = 1 + 2^(k-1), while lambda a_0 = 2136/241.
    for k in (12, 4):
        f = eisenstein(4, 40) + delta_series(40)
        d = decide_eigen(f, 2, k, 1, 1, None)
        assert d.refuted
        assert d.eigenvalue == Fraction(2136, 241)
        assert (d.index, d.left, d.right) == (0, Fraction(1 + 2 ** (k - 1)), Fraction(2136, 241))


def test_decide_zero_form_is_no_eigenvector() -> None:
    d = decide_eigen(QSeries.from_coefficients([0] * 5), 2, 12, 1, 1, None)
    assert d.refuted and d.index is None and "0" in d.reason


def test_decide_needs_precision() -> None:
    # B(1, 12) = 1, so T_7 needs a_0 .. a_7.
    assert eigen_input_precision(7, 12, 1) == 8
    with pytest.raises(ValueError, match=r"O\(q\^8\)"):
        decide_eigen(delta_series(7), 7, 12, 1, 1, TAU[6])
    assert decide_eigen(delta_series(8), 7, 12, 1, 1, TAU[6]).proved


def test_decide_eisenstein_uses_constant_term() -> None:
    # E_4 / 240 has a_1 = 1; E_4 itself: lambda = a_2/a_1 = 2160/240 = 9 = sigma_3(2).
    d = decide_eigen(eisenstein(4, 5), 2, 4, 1, 1, None)
    assert d.proved and d.eigenvalue == 9


# ---------------------------------------------------------------------------
# decide_normalised_eigenform
# ---------------------------------------------------------------------------


def test_prime_bounds() -> None:
    # R = floor(k m_0(2N)/12): m_0(2) = 3, m_0(22) = 36, m_0(8) = 12.
    assert eigenform_prime_bound(12, 1) == 3
    assert eigenform_prime_bound(2, 11) == 6
    assert eigenform_prime_bound(1, 4) == 1
    assert eigenform_prime_bound(4, 1) == 1


def test_delta_is_normalised_eigenform() -> None:
    d = decide_normalised_eigenform(delta_series(normalised_eigenform_input_precision(12, 1)), 12, 1, 1)
    assert d.proved
    assert d.eigenvalues == ((2, Fraction(TAU[1])), (3, Fraction(TAU[2])))


def test_level11_is_normalised_eigenform() -> None:
    need = normalised_eigenform_input_precision(2, 11)
    assert need == 11  # primes 2, 3, 5 up to R = 6; T_5 compared on a_0 .. a_2
    d = decide_normalised_eigenform(level11(need), 2, 1, 11)
    assert d.proved and d.prime_bound == 6
    assert d.eigenvalues == tuple((p, Fraction(LEVEL11_AP[p])) for p in (2, 3, 5))


def test_level11_eisenstein_is_normalised_eigenform() -> None:
    # Not a cusp form (a_0 = 5/12): the criterion covers the whole space M_2(Gamma0(11)).
    d = decide_normalised_eigenform(level11_eisenstein(11), 2, 1, 11)
    assert d.proved
    assert d.eigenvalues == ((2, Fraction(3)), (3, Fraction(4)), (5, Fraction(6)))
    # The sum of two normalised eigenforms with different eigenvalues, halved, has a_1 = 1 but is none.
    # a_1 = 1, a_2 = (-2 + 3)/2 = 1/2. At q^0: a_0(T_2 f) = (1 + 2) a_0 = 3 * 5/24, while a_2 a_0 = 5/48.
    mix = (level11(11) + level11_eisenstein(11)).scale(Fraction(1, 2))
    d = decide_normalised_eigenform(mix, 2, 1, 11)
    assert d.refuted
    assert (d.operator, d.index, d.left, d.right) == (2, 0, Fraction(15, 24), Fraction(5, 48))


def test_eisenstein_level1_normalised() -> None:
    # M_4(SL2(Z)) is one-dimensional: R = 1, no prime to check; E_4/240 is a normalised eigenform.
    d = decide_normalised_eigenform(eisenstein(4, 5).scale(Fraction(1, 240)), 4, 1, 1)
    assert d.proved and d.eigenvalues == ()
    # E_4 itself has a_1 = 240.
    d = decide_normalised_eigenform(eisenstein(4, 5), 4, 1, 1)
    assert d.refuted and (d.index, d.left, d.right) == (1, Fraction(240), ONE)


def test_theta_squared_normalised() -> None:
    # theta^2 / 4 = 1/4 + q + q^2 + q^4 + 2 q^5 + ... (Hardy–Wright Thm 278, r_2(n)/4); M_1(Gamma0(4), chi_{-4}) needs
    # no prime.
    d = decide_normalised_eigenform(theta_squared(10).scale(Fraction(1, 4)), 1, -1, 4)
    assert d.proved and d.prime_bound == 1


def test_e4_cubed_plus_delta_not_normalised_eigenform() -> None:
    # f = (E_4^3 + Delta)/721: a_1(E_4^3) = 3 * 240 = 720. a_2(E_4^3) = 3*2160 + 3*240^2 = 179280,
    # so a_2(f) = (179280 - 24)/721 = 179256/721. At q^0: a_0(T_2 f) = (1 + 2^11)/721 = 2049/721,
    # and a_2(f) a_0(f) = 179256/721^2.
    f = (eisenstein(4, 10) ** 3 + delta_series(10)).scale(Fraction(1, 721))
    assert f[2] == Fraction(179256, 721)
    d = decide_normalised_eigenform(f, 12, 1, 1)
    assert d.refuted
    assert (d.operator, d.index, d.left, d.right) == (2, 0, Fraction(2049, 721), Fraction(179256, 721**2))


def test_normalised_needs_precision_and_weight() -> None:
    with pytest.raises(ValueError, match="known only"):
        decide_normalised_eigenform(level11(10), 2, 1, 11)
    with pytest.raises(ValueError, match="weight"):
        decide_normalised_eigenform(QSeries.from_coefficients([1, 0]), 0, 1, 1)
    with pytest.raises(NotImplementedError):
        decide_normalised_eigenform(EtaQuotient.theta().series(10), Fraction(1, 2), 1, 4)


def test_coefficients_beyond_sturm_bound_still_refute() -> None:
    # E_4 + Delta is not in M_4, so agreement on a_0 .. a_B (B(1, 4) = 0) proves nothing about it.
    # T_2 f = 9 f: at q^0 both sides are 9 (1 + 2^3 = 9); at q^1, a_1(T_2 f) = a_2(f) = 2160 - 24 = 2136,
    # while 9 a_1(f) = 9 * 241 = 2169. The input known to q^39 determines T_2 f up to q^19.
    d = decide_eigen(eisenstein(4, 40) + delta_series(40), 2, 4, 1, 1, 9)
    assert d.refuted and d.bound == 0 and d.compared == 19
    assert (d.index, d.left, d.right) == (1, Fraction(2136), Fraction(2169))
    # E_4 alone: the same comparison proves T_2 E_4 = 9 E_4 (sigma_3(2) = 9).
    d = decide_eigen(eisenstein(4, 40), 2, 4, 1, 1, 9)
    assert d.proved and d.compared == 19
