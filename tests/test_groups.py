"""Checks of the group invariants of Gamma_0(N) and Gamma_1(N) against outside sources.

Expected values are quoted from published sources (named beside each check; the formulas are
collected in docs/method.md#groups), or recomputed here by brute force, independently of ``verifier.prove.groups``:
orbits of
(c : d) -> (c : c + d) on P^1(Z/N), root counts of x^2 + 1 and x^2 + x + 1 mod N, and counts of
primitive vectors in (Z/N)^2.
"""

from __future__ import annotations

import math
from fractions import Fraction

import pytest
from verifier.prove.groups import (
    Cusp,
    cusp_count,
    cusps,
    dim_cusp,
    dim_modular,
    elliptic_points,
    genus,
    index_gamma0,
    index_gamma1,
    index_gamma1_projective,
    sturm_bound,
    sturm_bound_gamma1,
)

# ---------------------------------------------------------------------------
# Brute force on P^1(Z/N), written without the module under test
# ---------------------------------------------------------------------------


def p1_classes(n: int) -> tuple[dict[tuple[int, int], int], list[tuple[int, int]]]:
    """Points of P^1(Z/N): pairs (c, d) mod N with gcd(c, d, N) = 1 up to units of Z/N.

    Returns the map pair -> class id and one representative per class. These classes are the
    cosets Gamma_0(N) gamma, read off from the bottom row of gamma.
    """
    units = [u for u in range(n) if math.gcd(u, n) == 1] if n > 1 else [0]
    cls: dict[tuple[int, int], int] = {}
    reps: list[tuple[int, int]] = []
    for c in range(n):
        for d in range(n):
            if math.gcd(math.gcd(c, d), n) != 1 or (c, d) in cls:
                continue
            for u in units:
                cls[(u * c % n, u * d % n)] = len(reps)
            reps.append((c, d))
    return cls, reps


def cusp_orbits(n: int) -> tuple[dict[tuple[int, int], int], list[tuple[int, int]]]:
    """Orbits of the translation (c : d) -> (c : c + d) on P^1(Z/N).

    Right multiplication by [[1, 1], [0, 1]] sends the bottom row (c, d) to (c, c + d); the
    orbits are the cusps of Gamma_0(N), and an orbit's length is the cusp's width.
    Returns the map class id -> orbit id and, per orbit, (gcd(c, N), length).
    """
    cls, reps = p1_classes(n)
    orbit_of: dict[int, int] = {}
    orbits: list[tuple[int, int]] = []
    for start, (c, d) in enumerate(reps):
        if start in orbit_of:
            continue
        length = 0
        cc, dd = c, d
        while True:
            k = cls[(cc % n, dd % n)]
            if k in orbit_of:
                break
            orbit_of[k] = len(orbits)
            length += 1
            dd += cc
        orbits.append((math.gcd(c, n), length))
    return orbit_of, orbits


def p1_point_of_cusp(cusp: Cusp, n: int) -> tuple[int, int]:
    """The bottom row (den, y) of a matrix [[num, b], [den, y]] in SL2(Z), reduced mod N."""
    num, den = cusp.numerator, cusp.denominator
    # num * y - b * den = 1; y is fixed modulo den, which changes (den, y) only along a T-orbit.
    y = 0 if den == 1 else pow(num, -1, den)
    assert (num * y - 1) % den == 0
    return den % n, y % n


def brute_index_gamma1(n: int) -> int:
    """#{(c, d) in (Z/N)^2 : gcd(c, d, N) = 1}: the bottom rows of the cosets Gamma_1(N) gamma."""
    return sum(1 for c in range(n) for d in range(n) if math.gcd(math.gcd(c, d), n) == 1)


def brute_index_gamma1_projective(n: int) -> int:
    """The same vectors up to sign: the cosets of +-Gamma_1(N) in SL2(Z), i.e. of its image in PSL2(Z)."""
    seen: set[tuple[int, int]] = set()
    count = 0
    for c in range(n):
        for d in range(n):
            if math.gcd(math.gcd(c, d), n) != 1 or (c, d) in seen:
                continue
            seen.add((c, d))
            seen.add((-c % n, -d % n))
            count += 1
    return count


# ---------------------------------------------------------------------------
# Indices
# ---------------------------------------------------------------------------


def test_index_gamma0_table() -> None:
    # docs/method.md#index; Diamond–Shurman §1.2 and Exercise 1.2.3 (from memory).
    assert [index_gamma0(n) for n in range(1, 13)] == [1, 3, 4, 6, 6, 12, 8, 12, 12, 18, 12, 24]


def test_index_gamma0_counts_p1() -> None:
    # docs/method.md#index: m_0(N) = #P^1(Z/N) (brute force above).
    for n in range(1, 60):
        assert index_gamma0(n) == len(p1_classes(n)[1]), n


def test_index_gamma1_brute_force() -> None:
    # docs/method.md#index: [SL2(Z) : Gamma_1(N)] = N^2 prod (1 - p^-2); the brute-force count of primitive
    # vectors mod N is independent of that formula.
    for n in range(1, 60):
        assert index_gamma1(n) == brute_index_gamma1(n), n
        assert index_gamma1_projective(n) == brute_index_gamma1_projective(n), n


def test_index_gamma1_values() -> None:
    # docs/method.md#index: bar m_1(1) = 1, bar m_1(2) = 3 (-I lies in Gamma_1(N) only for N <= 2);
    # docs/method.md#gamma1-bound: bar m_1(13) = 84 (from the genus-2, 12-cusp curve X_1(13)).
    assert index_gamma1_projective(1) == 1
    assert index_gamma1_projective(2) == 3
    assert index_gamma1_projective(13) == 84
    # [SL2(Z) : Gamma_1(N)] for N = 1..12 (from memory; also the brute force above).
    assert [index_gamma1(n) for n in range(1, 13)] == [1, 3, 8, 12, 24, 24, 48, 48, 72, 72, 120, 96]
    for n in range(3, 100):
        assert index_gamma1(n) == 2 * index_gamma1_projective(n)


# ---------------------------------------------------------------------------
# Cusps
# ---------------------------------------------------------------------------


def test_cusp_count_table() -> None:
    # docs/method.md#cusps; Diamond–Shurman §3.8 (from memory).
    expected = [1, 2, 2, 3, 2, 4, 2, 4, 4, 4, 2, 6]
    assert [cusp_count(n) for n in range(1, 13)] == expected
    assert [len(cusps(n)) for n in range(1, 13)] == expected


def test_cusp_widths_small_levels() -> None:
    # Widths h(c/d) = N / gcd(d^2, N) (docs/method.md#cusps; Diamond–Shurman §3.8, from memory), worked by hand.
    assert cusps(1) == [Cusp(1, 1, 1)]
    assert cusps(4) == [Cusp(0, 1, 4), Cusp(1, 2, 1), Cusp(1, 4, 1)]
    assert cusps(9) == [Cusp(0, 1, 9), Cusp(1, 3, 1), Cusp(2, 3, 1), Cusp(1, 9, 1)]
    assert [(c.denominator, c.width) for c in cusps(12)] == [(1, 12), (2, 3), (3, 4), (4, 3), (6, 1), (12, 1)]


def test_cusp_widths_sum_to_index() -> None:
    # docs/method.md#cusps: the widths add up to m_0(N); the list has epsilon_inf(N) entries.
    for n in range(1, 200):
        cs = cusps(n)
        assert sum(c.width for c in cs) == index_gamma0(n), n
        assert len(cs) == cusp_count(n), n
        assert cs[-1] == Cusp(1, n, 1), n  # infinity last, width 1
        for c in cs:
            assert n % c.denominator == 0 and math.gcd(c.numerator, c.denominator) == 1, (n, c)


def test_cusps_against_orbits() -> None:
    # docs/method.md#cusps: the orbits of (c : d) -> (c : c + d) on P^1(Z/N) are the cusps. Check that the
    # listed cusps lie in pairwise different orbits, that they exhaust them, and that each width is
    # the orbit length; also the orbit count per gcd(c, N) = d is phi(gcd(d, N/d)).
    for n in range(1, 60):
        cls, _ = p1_classes(n)
        orbit_of, orbits = cusp_orbits(n)
        hit = [orbit_of[cls[p1_point_of_cusp(c, n)]] for c in cusps(n)]
        assert sorted(hit) == list(range(len(orbits))), n
        for c, k in zip(cusps(n), hit, strict=True):
            assert orbits[k] == (c.denominator, c.width), (n, c)
        for d in range(1, n + 1):
            if n % d == 0:
                g = math.gcd(d, n // d)
                phi = sum(1 for a in range(g) if math.gcd(a, g) == 1)
                assert sum(1 for dd, _ in orbits if dd == d) == phi, (n, d)


# ---------------------------------------------------------------------------
# Elliptic points and genus
# ---------------------------------------------------------------------------


def test_elliptic_points_root_counts() -> None:
    # docs/method.md#elliptic-points-genus (common practice, N < 400): epsilon_2 = #{x mod N : x^2 + 1 = 0}, epsilon_3 =
    # #{x : x^2 + x + 1 = 0}.
    for n in range(1, 400):
        e2 = sum(1 for x in range(n) if (x * x + 1) % n == 0)
        e3 = sum(1 for x in range(n) if (x * x + x + 1) % n == 0)
        assert elliptic_points(n) == (e2, e3), n


def test_genus_lists() -> None:
    # docs/method.md#elliptic-points-genus; Diamond–Shurman Thm 3.1.1 (from memory): among N < 60, g_0(N) = 0 exactly
    # for
    # these N and g_0(N) = 1 exactly for those.
    genus0 = {1, 2, 3, 4, 5, 6, 7, 8, 9, 10, 12, 13, 16, 18, 25}
    genus1 = {11, 14, 15, 17, 19, 20, 21, 24, 27, 32, 36, 49}
    assert {n for n in range(1, 60) if genus(n) == 0} == genus0
    assert {n for n in range(1, 60) if genus(n) == 1} == genus1


def test_invariants_table() -> None:
    # docs/method.md#dimension-gamma0: (m_0, epsilon_2, epsilon_3, epsilon_inf, g) for N = 1..12.
    expected = [
        (1, 1, 1, 1, 0),
        (3, 1, 0, 2, 0),
        (4, 0, 1, 2, 0),
        (6, 0, 0, 3, 0),
        (6, 2, 0, 2, 0),
        (12, 0, 0, 4, 0),
        (8, 0, 2, 2, 0),
        (12, 0, 0, 4, 0),
        (12, 0, 0, 4, 0),
        (18, 2, 0, 4, 0),
        (12, 0, 0, 2, 1),
        (24, 0, 0, 6, 0),
    ]
    got = [(index_gamma0(n), *elliptic_points(n), cusp_count(n), genus(n)) for n in range(1, 13)]
    assert got == expected


# ---------------------------------------------------------------------------
# Dimensions
# ---------------------------------------------------------------------------

# docs/method.md#dimension-gamma0; Diamond–Shurman Thm 3.5.1 and Fig. 3.4 (from memory). Rows for N = 1..12.
DIM_TABLE: dict[tuple[str, int], list[int]] = {
    ("M", 2): [0, 1, 1, 2, 1, 3, 1, 3, 3, 3, 2, 5],
    ("S", 2): [0, 0, 0, 0, 0, 0, 0, 0, 0, 0, 1, 0],
    ("M", 4): [1, 2, 2, 3, 3, 5, 3, 5, 5, 7, 4, 9],
    ("S", 4): [0, 0, 0, 0, 1, 1, 1, 1, 1, 3, 2, 3],
    ("M", 6): [1, 2, 3, 4, 3, 7, 5, 7, 7, 9, 6, 13],
    ("S", 6): [0, 0, 1, 1, 1, 3, 3, 3, 3, 5, 4, 7],
}


@pytest.mark.parametrize(("space", "k"), list(DIM_TABLE))
def test_dimension_table(space: str, k: int) -> None:
    dim = dim_modular if space == "M" else dim_cusp
    assert [dim(k, n) for n in range(1, 13)] == DIM_TABLE[(space, k)]


def test_dimension_extra_values() -> None:
    # docs/method.md#dimension-gamma0: dim S_12(1) = 1, dim S_2(11) = 1, dim S_2(23) = dim S_2(37) = 2, dim S_2(48) = 3.
    assert dim_cusp(12, 1) == 1
    assert dim_cusp(2, 11) == 1
    assert dim_cusp(2, 23) == 2
    assert dim_cusp(2, 37) == 2
    assert dim_cusp(2, 48) == 3


def test_level_one_cusp_dimensions() -> None:
    # docs/method.md#dimension-level-one; Serre, A Course in Arithmetic, VII §3.2 (from memory): dim S_k for k = 12, 14,
    # ..., 26.
    assert [dim_cusp(k, 1) for k in range(12, 27, 2)] == [1, 0, 1, 1, 1, 1, 2, 1]


# ---------------------------------------------------------------------------
# Sturm bounds
# ---------------------------------------------------------------------------


def test_sturm_bounds() -> None:
    # docs/method.md#sturm-bound sample values (Sturm 1987): B(1, 12) = 1, B(4, 2) = 1, B(11, 2) = 2, B(4, 1) = 0.
    assert sturm_bound(12, 1) == 1
    assert sturm_bound(2, 4) == 1
    assert sturm_bound(2, 11) == 2
    assert sturm_bound(1, 4) == 0
    # docs/method.md#gamma1-bound: at level 13, weight 2 the Gamma_0 bound is 2 and the Gamma_1 bound floor(2 * 84 / 12)
    # = 14.
    assert sturm_bound(2, 13) == 2
    assert sturm_bound_gamma1(2, 13) == 14
    # Half-integral weight is accepted as a Fraction: floor(5/2 * 3 / 12) = 0, floor(13/2 * 24 / 12) = 13.
    assert sturm_bound_gamma1(Fraction(5, 2), 2) == 0
    assert sturm_bound_gamma1(Fraction(13, 2), 7) == 13
    # The Gamma_1 bound is never smaller (bar m_1(N) = m_0(N) phi(N) / 2 >= m_0(N) for N >= 3).
    for n in range(1, 100):
        for k in range(1, 13):
            assert sturm_bound_gamma1(k, n) >= sturm_bound(k, n), (n, k)
