"""Checks of the truncated q-series arithmetic against independent references.

Every expected value here comes from outside the engine: a naive pure-Python
computation with ``fractions.Fraction`` (the definition of the operation), a
textbook identity, or a classical table.  Each check names its source beside it.
"""

from __future__ import annotations

import random
from fractions import Fraction
from math import comb

import pytest
from verifier.series.qseries import PrecisionError, QSeries

# ---------------------------------------------------------------------------
# Naive reference implementations (the definitions, written without flint)
# ---------------------------------------------------------------------------


def naive_mul(a: dict[int, Fraction], b: dict[int, Fraction]) -> dict[int, Fraction]:
    """Cauchy product of two finitely supported Laurent polynomials (definition)."""
    out: dict[int, Fraction] = {}
    for i, x in a.items():
        for j, y in b.items():
            out[i + j] = out.get(i + j, Fraction(0)) + x * y
    return out


def naive_inverse(coeffs: list[Fraction], n: int) -> list[Fraction]:
    """First n coefficients of 1/f for f = sum coeffs[i] q^i, coeffs[0] != 0.

    The recurrence g_0 = 1/f_0, g_m = -(1/f_0) sum_{i=1}^{m} f_i g_{m-i}
    (common practice: coefficient comparison in f g = 1).
    """
    f0 = coeffs[0]
    g = [1 / f0]
    for m in range(1, n):
        s = sum(
            (coeffs[i] * g[m - i] for i in range(1, min(m, len(coeffs) - 1) + 1)),
            Fraction(0),
        )
        g.append(-s / f0)
    return g


def random_rational(rng: random.Random) -> Fraction:
    return Fraction(rng.randint(-50, 50), rng.randint(1, 12))


def random_series(rng: random.Random) -> tuple[QSeries, dict[int, Fraction], int, int]:
    """A random series with nonzero leading coefficient: (series, coeffs, valuation, prec)."""
    offset = rng.randint(-4, 5)
    length = rng.randint(1, 25)
    coeffs = [random_rational(rng) for _ in range(length)]
    while coeffs[0] == 0:
        coeffs[0] = random_rational(rng)
    prec = offset + length
    s = QSeries.from_coefficients(coeffs, offset=offset, prec=prec)
    return s, {offset + i: c for i, c in enumerate(coeffs)}, offset, prec


# ---------------------------------------------------------------------------
# Construction, coefficient access and PrecisionError
# ---------------------------------------------------------------------------


def test_from_coefficients_round_trip_exact_rationals_and_big_integers() -> None:
    # common practice: exact arithmetic must survive values beyond 64 bits and
    # non-dyadic denominators unchanged.
    big = 2**200 + 12345
    coeffs = [Fraction(1, 3), Fraction(-7, 691), big, Fraction(0), Fraction(-big, 3617)]
    s = QSeries.from_coefficients(coeffs, offset=-2)
    assert s.prec == 3
    assert s.valuation == -2
    assert s.coefficients(-2, 3) == coeffs
    # below the valuation the coefficients are known to be 0
    assert s[-10] == 0
    assert all(isinstance(c, Fraction) for c in s.coefficients(-5, 3))


def test_leading_zeros_move_into_the_valuation() -> None:
    # common practice: the valuation is the exponent of the first nonzero coefficient.
    s = QSeries.from_coefficients([0, 0, 0, 5, 1], offset=1, prec=6)
    assert s.valuation == 4
    assert s.coefficients(0, 6) == [0, 0, 0, 0, 5, 1]


def test_precision_error_beyond_prec() -> None:
    # common practice: O(q^prec) means the coefficient of q^prec is unknown.
    s = QSeries.from_coefficients([1, 2, 3], prec=3)
    assert s[2] == 3
    with pytest.raises(PrecisionError):
        s[3]
    with pytest.raises(PrecisionError):
        s.coefficients(0, 4)
    assert s.coefficients(0, 3) == [1, 2, 3]
    # a zero series known below q^4 still refuses q^4
    z = QSeries.from_coefficients([0, 0], prec=4)
    assert z.is_zero()
    assert z[3] == 0
    with pytest.raises(PrecisionError):
        z[4]
    # PrecisionError is an ArithmeticError
    assert issubclass(PrecisionError, ArithmeticError)


def test_constant_and_monomial() -> None:
    # common practice: definitions of c + O(q^p) and c q^e + O(q^p).
    c = QSeries.constant(Fraction(5, 7), 4)
    assert c.coefficients(0, 4) == [Fraction(5, 7), 0, 0, 0]
    m = QSeries.monomial(-3, 2, Fraction(-2, 9))
    assert m.valuation == -3
    assert m.coefficients(-3, 2) == [Fraction(-2, 9), 0, 0, 0, 0]
    with pytest.raises(PrecisionError):
        m[2]


def test_truncate_lowers_precision_only() -> None:
    # common practice: truncation forgets coefficients at and above the new precision.
    s = QSeries.from_coefficients([1, 2, 3, 4, 5], prec=5)
    t = s.truncate(3)
    assert t.prec == 3
    assert t.coefficients(0, 3) == [1, 2, 3]
    with pytest.raises(PrecisionError):
        t[3]
    assert s.truncate(10).prec == 5  # truncation never invents precision


# ---------------------------------------------------------------------------
# Addition: precision is the minimum of the two
# ---------------------------------------------------------------------------


def test_addition_precision_is_minimum_and_cancellation_moves_valuation() -> None:
    # common practice: (A + O(q^r)) + (B + O(q^s)) = A + B + O(q^min(r, s)).
    a = QSeries.from_coefficients([1, 1, 1, 1, 1, 1], prec=6)
    b = QSeries.from_coefficients([-1, -1, 2], prec=3)
    s = a + b
    assert s.prec == 3
    assert s.coefficients(0, 3) == [0, 0, 3]
    assert s.valuation == 2
    d = a - a
    assert d.is_zero()
    assert d.prec == 6


def test_random_add_sub_match_naive() -> None:
    rng = random.Random(20240611)
    for _ in range(100):
        a, ca, _, pa = random_series(rng)
        b, cb, _, pb = random_series(rng)
        prec = min(pa, pb)
        lo = min(min(ca), min(cb))
        s, d = a + b, a - b
        assert s.prec == prec and d.prec == prec
        for n in range(lo, prec):
            assert s[n] == ca.get(n, 0) + cb.get(n, 0)
            assert d[n] == ca.get(n, 0) - cb.get(n, 0)


# ---------------------------------------------------------------------------
# Multiplication: cross-check against the naive Cauchy product
# ---------------------------------------------------------------------------


def test_random_products_match_naive_convolution() -> None:
    # Reference: the Cauchy product (definition).  If a = q^u (A + O(q^r)) and
    # b = q^v (B + O(q^s)) with A(0), B(0) != 0, then ab = q^(u+v) (AB + O(q^min(r, s)))
    # (common practice), i.e. ab is known below q^min(u + pb, v + pa).
    rng = random.Random(31415)
    for _ in range(150):
        a, ca, va, pa = random_series(rng)
        b, cb, vb, pb = random_series(rng)
        expected_prec = min(va + pb, vb + pa)
        ref = naive_mul(ca, cb)
        p = a * b
        assert p.prec == expected_prec
        for n in range(va + vb - 3, expected_prec):
            assert p[n] == ref.get(n, 0), (n, ca, cb)
        with pytest.raises(PrecisionError):
            p[expected_prec]
        # commutativity (common practice)
        q = b * a
        assert q.prec == p.prec
        assert q.first_difference(p, va + vb, expected_prec) is None


def test_product_precision_with_offsets_worked_example() -> None:
    # a = q^2 (1 + q + ... ) + O(q^10): relative precision 8.
    # b = q^3 (1 - q + ...) + O(q^8): relative precision 5.
    # ab = q^5 (...) + O(q^(5 + min(8, 5))) = O(q^10)   (common practice)
    a = QSeries.from_coefficients([1] * 8, offset=2, prec=10)
    b = QSeries.from_coefficients([1, -1, 1, -1, 1], offset=3, prec=8)
    p = a * b
    assert p.valuation == 5
    assert p.prec == 10
    # (sum_{i<8} q^i) (sum_{j<5} (-q)^j): coefficients of q^0..q^4 are 1,0,1,0,1
    assert p.coefficients(5, 10) == [1, 0, 1, 0, 1]


def test_product_with_zero_series_keeps_only_known_precision() -> None:
    # common practice: O(q^5) * (1 + q + O(q^10)) = O(q^5).
    z = QSeries.from_coefficients([], prec=5)
    one_plus_q = QSeries.from_coefficients([1, 1], prec=10)
    p = z * one_plus_q
    assert p.is_zero()
    assert p.prec == 5


def test_scale() -> None:
    # common practice: c (sum a_n q^n) = sum c a_n q^n, same precision.
    s = QSeries.from_coefficients([1, Fraction(1, 2), 3], offset=-1, prec=2)
    t = s.scale(Fraction(-4, 3))
    assert t.prec == 2
    assert t.coefficients(-1, 2) == [Fraction(-4, 3), Fraction(-2, 3), -4]
    zero = s.scale(0)
    assert zero.is_zero()
    assert zero.prec == 2


# ---------------------------------------------------------------------------
# Powers
# ---------------------------------------------------------------------------


def test_binomial_powers() -> None:
    # Binomial theorem (common practice): (1 + q)^n = sum C(n, k) q^k.
    one_plus_q = QSeries.from_coefficients([1, 1], prec=30)
    for n in (0, 1, 2, 5, 17):
        p = one_plus_q**n
        assert p.coefficients(0, 30) == [comb(n, k) for k in range(30)]
    # (1 - q)^(-2) = sum (k + 1) q^k  (common practice)
    inv_sq = QSeries.from_coefficients([1, -1], prec=20) ** -2
    assert inv_sq.coefficients(0, 20) == [k + 1 for k in range(20)]


def test_power_precision_of_series_with_valuation() -> None:
    # (q + q^2 + O(q^5))^3 = q^3 (1 + q + O(q^4))^3 = q^3 (1 + 3q + 3q^2 + q^3) + O(q^7)
    # (common practice: relative precision 4 is preserved by powers).
    s = QSeries.from_coefficients([0, 1, 1], prec=5)
    c = s**3
    assert c.valuation == 3
    assert c.prec == 7
    assert c.coefficients(0, 7) == [0, 0, 0, 1, 3, 3, 1]
    # agrees with repeated multiplication
    assert (s * s * s).prec == 7
    assert (s * s * s).first_difference(c, 0, 7) is None


def test_random_powers_match_repeated_naive_products() -> None:
    rng = random.Random(2718)
    for _ in range(30):
        a, ca, va, pa = random_series(rng)
        e = rng.randint(1, 4)
        ref: dict[int, Fraction] = {0: Fraction(1)}
        for _ in range(e):
            ref = naive_mul(ref, ca)
        rel = pa - va
        p = a**e
        assert p.valuation == e * va
        assert p.prec == e * va + rel
        for n in range(e * va, e * va + rel):
            assert p[n] == ref.get(n, 0)


# ---------------------------------------------------------------------------
# Inverse and division
# ---------------------------------------------------------------------------


def test_geometric_series_inverse() -> None:
    # 1/(1 - q) = 1 + q + q^2 + ...  (common practice)
    inv = QSeries.from_coefficients([1, -1], prec=40).inverse()
    assert inv.prec == 40
    assert inv.coefficients(0, 40) == [1] * 40
    # 1/(1 - q)^2 = sum (n + 1) q^n
    inv2 = QSeries.from_coefficients([1, -2, 1], prec=25).inverse()
    assert inv2.coefficients(0, 25) == [n + 1 for n in range(25)]


def test_random_inverse_matches_recurrence_and_multiplies_to_one() -> None:
    rng = random.Random(1618)
    for _ in range(80):
        n = rng.randint(1, 30)
        coeffs = [random_rational(rng) for _ in range(n)]
        while coeffs[0] == 0:
            coeffs[0] = random_rational(rng)
        f = QSeries.from_coefficients(coeffs, prec=n)
        g = f.inverse()
        # inverse of a series with nonzero constant term keeps the precision n
        assert g.prec == n
        assert g.coefficients(0, n) == naive_inverse(coeffs, n)
        one = f * g
        assert one.prec == n
        assert one.coefficients(0, n) == [1] + [0] * (n - 1)
        with pytest.raises(PrecisionError):
            one[n]


def test_laurent_inverse_shifts_valuation_and_loses_precision() -> None:
    # f = q^2 + q^3 + O(q^10) = q^2 (1 + q + O(q^8)); 1/f = q^-2 (1 - q + q^2 - ...) + O(q^6)
    # (common practice: relative precision 8 is kept, absolute precision becomes -2 + 8).
    f = QSeries.from_coefficients([1, 1], offset=2, prec=10)
    g = f.inverse()
    assert g.valuation == -2
    assert g.prec == 6
    assert g.coefficients(-2, 6) == [(-1) ** k for k in range(8)]
    # q^-3 + O(q^2)  ->  inverse q^3 + O(q^8)
    h = QSeries.from_coefficients([1], offset=-3, prec=2).inverse()
    assert h.valuation == 3
    assert h.prec == 8
    assert h.coefficients(0, 8) == [0, 0, 0, 1, 0, 0, 0, 0]


def test_random_laurent_division_matches_naive() -> None:
    # a / b with b = q^v (B + O(q^s)): a/b = q^-v * a * (1/B) with relative precision
    # min(rel(a), s) (common practice).
    rng = random.Random(8128)
    for _ in range(80):
        a, ca, va, pa = random_series(rng)
        b, cb, vb, pb = random_series(rng)
        rel_b = pb - vb
        binv_coeffs = naive_inverse([cb[vb + i] for i in range(rel_b)], rel_b)
        binv = {-vb + i: c for i, c in enumerate(binv_coeffs)}
        ref = naive_mul(ca, binv)
        expected_prec = min(pa - vb, va + rel_b - vb)
        d = a / b
        assert d.prec == expected_prec
        for n in range(va - vb, expected_prec):
            assert d[n] == ref.get(n, 0)


def test_inverse_of_zero_series_raises() -> None:
    # common practice: 1/O(q^n) is undefined.
    with pytest.raises(ZeroDivisionError):
        QSeries.from_coefficients([0, 0, 0], prec=3).inverse()


def test_partition_generating_function() -> None:
    # 1 / prod_{n>=1} (1 - q^n) = sum p(n) q^n (Euler; Hardy & Wright, An Introduction to
    # the Theory of Numbers, Ch. XIX).  Values p(0..20) and p(100) = 190569292: from memory
    # (the classical table of partition numbers).
    prec = 101
    prod = QSeries.constant(1, prec)
    for n in range(1, prec):
        factor = [1] + [0] * (n - 1) + [-1]
        prod = prod * QSeries.from_coefficients(factor, prec=prec)
    p = prod.inverse()
    assert p.coefficients(0, 21) == [
        1,
        1,
        2,
        3,
        5,
        7,
        11,
        15,
        22,
        30,
        42,
        56,
        77,
        101,
        135,
        176,
        231,
        297,
        385,
        490,
        627,
    ]
    assert p[100] == 190569292


# ---------------------------------------------------------------------------
# Inflation f(q) -> f(q^d)
# ---------------------------------------------------------------------------


def test_inflate_spreads_coefficients_and_precision() -> None:
    # common practice: f(d tau) has q-expansion sum a_n q^(dn) + O(q^(d prec)).
    s = QSeries.from_coefficients([3, Fraction(1, 2), 0, -7], offset=-1, prec=3)
    t = s.inflate(3)
    assert t.valuation == -3
    assert t.prec == 9
    expected = {-3: 3, 0: Fraction(1, 2), 3: 0, 6: -7}
    for n in range(-5, 9):
        assert t[n] == expected.get(n, 0)
    with pytest.raises(PrecisionError):
        t[9]
    assert s.inflate(1).prec == 3
    assert s.inflate(1).first_difference(s, -1, 3) is None


def test_inflate_commutes_with_multiplication() -> None:
    # common practice: (fg)(q^d) = f(q^d) g(q^d).
    rng = random.Random(99)
    for _ in range(20):
        a, _, va, pa = random_series(rng)
        b, _, vb, pb = random_series(rng)
        d = rng.randint(2, 4)
        lhs = (a * b).inflate(d)
        rhs = a.inflate(d) * b.inflate(d)
        assert lhs.prec == rhs.prec == d * min(va + pb, vb + pa)
        assert lhs.first_difference(rhs, d * (va + vb), lhs.prec) is None


# ---------------------------------------------------------------------------
# first_difference
# ---------------------------------------------------------------------------


def test_first_difference() -> None:
    # common practice: the least exponent where two expansions differ.
    a = QSeries.from_coefficients([1, 2, 3, 4, 5, 6], prec=6)
    b = QSeries.from_coefficients([1, 2, 3, 9, 5, 7], prec=6)
    assert a.first_difference(b, 0, 6) == 3
    assert a.first_difference(b, 4, 6) == 5
    assert a.first_difference(a, 0, 6) is None
    c = QSeries.from_coefficients([1, 2, 3], prec=3)
    assert a.first_difference(c, 0, 3) is None
    with pytest.raises(PrecisionError):
        a.first_difference(c, 0, 4)
