r"""Checks of theta series of quadratic forms (verifier.forms.theta) against outside sources.

Each expected value names its source beside it: docs/method.md#theta-quadratic-forms, #sums-of-squares and the
references given
there (Iwaniec, *Topics in Classical Automorphic Forms*, Thm 10.9; Miyake, *Modular Forms*,
§4.9; Schoeneberg, *Elliptic Modular Functions*, Ch. IX; Hardy–Wright, *An Introduction to the
Theory of Numbers*, Thms 278 and 386; Grosswald, *Representations of Integers as Sums of
Squares*), a brute-force count written here, independent numerics (mpmath) or exact linear
algebra (sympy), or ``from memory``.
"""

from __future__ import annotations

import itertools
import random
from fractions import Fraction

import mpmath
import pytest
import sympy
from verifier.forms.eisenstein import eisenstein_series
from verifier.forms.theta import QuadraticForm, parse_matrix, sum_of_squares_form
from verifier.numbers import QuadraticCharacter

# ---------------------------------------------------------------------------
# Helpers written independently of the module under test
# ---------------------------------------------------------------------------


def chi_minus_3(d: int) -> int:
    """(-3/d): 0 on multiples of 3, +1 on d = 1 mod 3, -1 on d = 2 mod 3 (from memory)."""
    return (0, 1, -1)[d % 3]


def chi_minus_4(d: int) -> int:
    """(-4/d): 0 on even d, +1 on d = 1 mod 4, -1 on d = 3 mod 4 (from memory)."""
    return (0, 1, 0, -1)[d % 4]


def divisors(n: int) -> list[int]:
    """Positive divisors of n >= 1 by trial division."""
    return [d for d in range(1, n + 1) if n % d == 0]


def q_value(gram: list[list[int]], x: tuple[int, ...]) -> int:
    """x^T A x / 2 computed naively."""
    n = len(gram)
    twice = sum(gram[i][j] * x[i] * x[j] for i in range(n) for j in range(n))
    assert twice % 2 == 0
    return twice // 2


def box_count(gram: list[list[int]], count: int) -> list[int]:
    """r_Q(m) for m < count by enumerating a box that contains every vector with Q(x) < count.

    On the ellipsoid x^T A x <= 2X the largest x_i^2 is 2X (A^{-1})_ii (from memory: the
    Cauchy–Schwarz inequality for the inner product A), which bounds the box.
    """
    inverse = sympy.Matrix(gram).inv()
    radii = [int(sympy.floor(sympy.sqrt(2 * count * inverse[i, i]))) for i in range(len(gram))]
    counts = [0] * count
    for x in itertools.product(*(range(-r, r + 1) for r in radii)):
        value = q_value(gram, x)
        if value < count:
            counts[value] += 1
    return counts


def form(rows: list[list[int]]) -> QuadraticForm:
    """The QuadraticForm with the given Gram rows."""
    return QuadraticForm.from_rows(rows)


def cartan_matrix(nodes: int, edges: list[tuple[int, int]]) -> list[list[int]]:
    """2 I - (adjacency matrix) of a simply laced Dynkin diagram (from memory)."""
    matrix = [[2 if i == j else 0 for j in range(nodes)] for i in range(nodes)]
    for i, j in edges:
        matrix[i][j] = matrix[j][i] = -1
    return matrix


# E_8: a chain of seven nodes with an eighth attached to the third (from memory); it is the
# even unimodular lattice of rank 8, and the test below checks det = 1.
E8_GRAM = cartan_matrix(8, [(0, 1), (1, 2), (2, 3), (3, 4), (4, 5), (5, 6), (2, 7)])
# D_4: one central node joined to three others (from memory).
D4_GRAM = cartan_matrix(4, [(0, 1), (1, 2), (1, 3)])
A2_GRAM = [[2, -1], [-1, 2]]

# ---------------------------------------------------------------------------
# 1. Parsing matrices
# ---------------------------------------------------------------------------


@pytest.mark.parametrize(
    ("text", "expected"),
    [
        (r"\begin{pmatrix}2&1\\1&2\end{pmatrix}", [[2, 1], [1, 2]]),
        (r"\begin{bmatrix} 2 & -1 \\ -1 & 2 \end{bmatrix}", [[2, -1], [-1, 2]]),
        (r"\begin{matrix}4\end{matrix}", [[4]]),
        ("\\begin{pmatrix}\n  2 & 0 \\\\\n  0 & 2 \\\\\n\\end{pmatrix}", [[2, 0], [0, 2]]),  # trailing \\
        (r"\begin{pmatrix}2&- 1\\{-1}&+2\end{pmatrix}", [[2, -1], [-1, 2]]),
        (r"\begin{pmatrix}2&1\\[2pt]1&2\end{pmatrix}", [[2, 1], [1, 2]]),
        (r"  \begin{pmatrix}2&1&0\\1&2&1\end{pmatrix}  ", [[2, 1, 0], [1, 2, 1]]),  # not square: validate()'s job
    ],
)
def test_parse_matrix_accepts(text: str, expected: list[list[int]]) -> None:
    # Source: the LaTeX matrix environments (from memory); the accepted syntax is our own.
    assert parse_matrix(text) == expected


@pytest.mark.parametrize(
    ("text", "fragment"),
    [
        (r"\begin{pmatrix}2&1\\1\end{pmatrix}", "row 2 has 1 entries"),
        (r"\begin{pmatrix}2&x\\1&2\end{pmatrix}", "not an integer"),
        (r"\begin{pmatrix}2&1.5\\1.5&2\end{pmatrix}", "not an integer"),
        (r"\begin{pmatrix}2&\frac12\\1&2\end{pmatrix}", "not an integer"),
        (r"\begin{pmatrix}2&\\1&2\end{pmatrix}", "not an integer"),
        (r"\begin{pmatrix}2&1\\\\1&2\end{pmatrix}", "row 2 is empty"),
        (r"\begin{pmatrix}\end{pmatrix}", "empty"),
        (r"\begin{vmatrix}2&1\\1&2\end{vmatrix}", "unsupported environment"),
        (r"\begin{pmatrix}2&1\\1&2\end{bmatrix}", "closed by"),
        ("2 & 1 \\\\ 1 & 2", "expected a matrix"),
        (r"\begin{pmatrix}\begin{matrix}2\end{matrix}\end{pmatrix}", "nested"),
    ],
)
def test_parse_matrix_rejects(text: str, fragment: str) -> None:
    # Source: our own error contract (a message string instead of an exception).
    result = parse_matrix(text)
    assert isinstance(result, str)
    assert fragment in result


def test_parsed_matrix_builds_a_form() -> None:
    rows = parse_matrix(r"\begin{pmatrix}2&1\\1&2\end{pmatrix}")
    assert isinstance(rows, list)
    assert form(rows).level == 3  # docs/method.md#theta-quadratic-forms: x^2 + xy + y^2 has level 3


# ---------------------------------------------------------------------------
# 2. Validation
# ---------------------------------------------------------------------------


@pytest.mark.parametrize(
    ("gram", "fragment"),
    [
        ([[1, 0], [0, 2]], "odd"),  # docs/method.md#theta-quadratic-forms: a Gram matrix has even diagonal
        ([[2, 1], [0, 2]], "not symmetric"),
        ([[2, 3], [3, 2]], "not positive definite"),  # det -5: indefinite
        ([[-2, 0], [0, -2]], "not positive definite"),  # negative definite
        ([[2, 2], [2, 2]], "singular"),  # det 0
        ([[2, 1, 1], [1, 2, 1], [1, 1, 2], [0, 0, 0]], "not square"),
        ([[2, 1], [1, 2, 0]], "not square"),
        ([], "empty"),
    ],
)
def test_validate_rejects(gram: list[list[int]], fragment: str) -> None:
    # Source: Sylvester's criterion for positive definiteness (from memory).
    problem = form(gram).validate()
    assert problem is not None
    assert fragment in problem


def test_invalid_form_has_no_invariants() -> None:
    bad = form([[2, 3], [3, 2]])
    with pytest.raises(ValueError):
        _ = bad.level
    with pytest.raises(ValueError):
        bad.representation_numbers(5)


def test_basic_invariants() -> None:
    # docs/method.md#theta-quadratic-forms: 2s variables give weight s; odd dimension gives half-integral weight.
    a2 = form(A2_GRAM)
    assert a2.validate() is None
    assert (a2.dimension, a2.weight, a2.determinant) == (2, Fraction(1), 3)
    three = sum_of_squares_form(3)
    assert three.weight == Fraction(3, 2)
    assert three.character is None  # odd dimension: no character attached (documented)
    assert three.level == 4  # theta^3 lives on Gamma_0(4) (docs/method.md#theta-quadratic-forms, odd case)
    assert sum_of_squares_form(4).gram == ((2, 0, 0, 0), (0, 2, 0, 0), (0, 0, 2, 0), (0, 0, 0, 2))
    with pytest.raises(ValueError):
        sum_of_squares_form(0)


# ---------------------------------------------------------------------------
# 3. Level and character: the list of docs/method.md#theta-quadratic-forms
# ---------------------------------------------------------------------------

# (description, Gram matrix, level, discriminant D of the character chi_D; 1 = trivial).
# Levels from the rule of docs/method.md#theta-quadratic-forms (least N with N A^{-1} integral, even
# diagonal); D comes from the formula ((-1)^s det A / d) stated there
# (Iwaniec Thm 10.9, Miyake Cor. 4.9.5): x^2 + 3y^2 has det 12, (-12/d) = chi_{-3}(d) on d prime
# to 6; x^2 + y^2 + 2z^2 + 2w^2 has det 64, a square; D_4 has det 4, a square.
SECTION_5_2_FORMS = [
    ("x^2+y^2", [[2, 0], [0, 2]], 4, -4),
    ("x^2+xy+y^2", [[2, 1], [1, 2]], 3, -3),
    ("x^2+xy+2y^2", [[2, 1], [1, 4]], 7, -7),
    ("x^2+2y^2", [[2, 0], [0, 4]], 8, -8),
    ("x^2+3y^2", [[2, 0], [0, 6]], 12, -3),
    ("x^2+5y^2", [[2, 0], [0, 10]], 20, -20),
    ("2x^2+2xy+3y^2", [[4, 2], [2, 6]], 20, -20),
    ("four squares", [[2, 0, 0, 0], [0, 2, 0, 0], [0, 0, 2, 0], [0, 0, 0, 2]], 4, 1),
    ("x^2+y^2+2z^2+2w^2", [[2, 0, 0, 0], [0, 2, 0, 0], [0, 0, 4, 0], [0, 0, 0, 4]], 8, 1),
    ("x^2+y^2+z^2+3w^2", [[2, 0, 0, 0], [0, 2, 0, 0], [0, 0, 2, 0], [0, 0, 0, 6]], 12, 12),
    ("x^2+xy+y^2+z^2+w^2", [[2, 1, 0, 0], [1, 2, 0, 0], [0, 0, 2, 0], [0, 0, 0, 2]], 12, 12),
    ("D_4", D4_GRAM, 2, 1),
]


@pytest.mark.parametrize(("name", "gram", "level", "disc"), SECTION_5_2_FORMS, ids=[f[0] for f in SECTION_5_2_FORMS])
def test_section_5_2_level_and_character(name: str, gram: list[list[int]], level: int, disc: int) -> None:
    q = form(gram)
    assert q.validate() is None
    assert q.level == level
    character = q.character
    assert character is not None
    assert character == QuadraticCharacter.from_integer(disc)
    assert character.disc == disc


def test_e8_is_unimodular_level_one() -> None:
    # From memory: E_8 is the even unimodular lattice of rank 8, so det 1, level 1, trivial character.
    e8 = form(E8_GRAM)
    assert e8.validate() is None
    assert e8.determinant == 1
    assert e8.level == 1
    assert e8.character is not None
    assert e8.character.is_trivial


# ---------------------------------------------------------------------------
# 4. Classical theta series
# ---------------------------------------------------------------------------


def test_a2_divisor_formula() -> None:
    # docs/method.md#theta-quadratic-forms: theta_{A_2} = 1 + 6 sum_n (sum_{d|n} chi_{-3}(d)) q^n.
    count = 300
    r = form(A2_GRAM).representation_numbers(count)
    assert r[0] == 1
    for n in range(1, count):
        assert r[n] == 6 * sum(chi_minus_3(d) for d in divisors(n)), n
    # Both Gram matrices of x^2 + xy + y^2 give the same series (x -> -x swaps them).
    assert form([[2, 1], [1, 2]]).representation_numbers(count) == r


def test_d4_first_coefficients() -> None:
    # From memory: theta_{D_4} = 1 + 24 q + 24 q^2 + 96 q^3 + 24 q^4 + 144 q^5 + ...
    # (r(n) = 24 sigma(odd part of n)).  Confirmed here by brute force in the classical model
    # D_4 = {x in Z^4 : x_1 + ... + x_4 even} with Q(x) = |x|^2 / 2 (from memory).
    expected = [1, 24, 24, 96, 24, 144]
    model = [0] * 6
    for x in itertools.product(range(-3, 4), repeat=4):
        norm = sum(v * v for v in x)
        if sum(x) % 2 == 0 and norm < 12:
            model[norm // 2] += 1
    assert model == expected
    assert form(D4_GRAM).representation_numbers(6) == expected
    assert box_count(D4_GRAM, 6) == expected


def test_d4_odd_part_sigma() -> None:
    # From memory: r_{D_4}(n) = 24 * sigma(m) with m the odd part of n, checked to n < 200.
    r = form(D4_GRAM).representation_numbers(200)
    for n in range(1, 200):
        m = n
        while m % 2 == 0:
            m //= 2
        assert r[n] == 24 * sum(divisors(m)), n


def test_e8_theta_is_e4() -> None:
    # docs/method.md#theta-quadratic-forms: theta_{E_8} = E_4 (both in M_4(SL_2(Z))); compared to q^199.
    prec = 200
    theta = form(E8_GRAM).series(prec)
    assert theta.prec == prec
    assert (theta - eisenstein_series(4, prec)).is_zero()
    assert [int(theta[n]) for n in range(4)] == [1, 240, 2160, 6720]  # 240 sigma_3(n), from memory


def test_two_squares() -> None:
    # docs/method.md#sums-of-squares, Hardy–Wright Thm 278: r_2(n) = 4 sum_{d|n} chi_{-4}(d); level 4, chi_{-4} (§5.2).
    q = sum_of_squares_form(2)
    assert q.level == 4
    assert q.character == QuadraticCharacter.from_integer(-4)
    r = q.representation_numbers(1000)
    assert r[0] == 1
    for n in range(1, 1000):
        assert r[n] == 4 * sum(chi_minus_4(d) for d in divisors(n)), n


def test_jacobi_four_square_theorem() -> None:
    # Jacobi's four-square theorem (docs/method.md#sums-of-squares, Hardy–Wright Thm 386):
    # r_4(n) = 8 sum_{d | n, 4 does not divide d} d; level 4, trivial character (docs/method.md#theta-quadratic-forms).
    count = 3000
    q = sum_of_squares_form(4)
    assert q.level == 4
    assert q.character is not None
    assert q.character.is_trivial
    r = q.representation_numbers(count)
    sums = [0] * count  # sieve of sum_{d | n, 4 does not divide d} d
    for d in range(1, count):
        if d % 4:
            for n in range(d, count, d):
                sums[n] += d
    assert r[0] == 1
    assert r[1:] == [8 * s for s in sums[1:]]


def test_six_and_eight_squares() -> None:
    # docs/method.md#sums-of-squares (Grosswald): r_6(n) = 16 sum chi_{-4}(n/d) d^2 - 4 sum chi_{-4}(d) d^2 and
    # r_8(n) = 16 sum_{d|n} (-1)^{n+d} d^3.
    count = 150
    r6 = sum_of_squares_form(6).representation_numbers(count)
    r8 = sum_of_squares_form(8).representation_numbers(count)
    for n in range(1, count):
        ds = divisors(n)
        assert r6[n] == 16 * sum(chi_minus_4(n // d) * d * d for d in ds) - 4 * sum(chi_minus_4(d) * d * d for d in ds)
        assert r8[n] == 16 * sum((-1) ** (n + d) * d**3 for d in ds)


def test_three_squares_is_theta_cubed() -> None:
    # docs/method.md#sums-of-squares: sum r_3(n) q^n = theta^3 with theta = sum_{n in Z} q^{n^2} (#theta-nome); the
    # cube is expanded here by brute force over a box (3 * 20^2 > 400).
    prec = 400
    cube = [0] * prec
    for x in itertools.product(range(-20, 21), repeat=3):
        norm = sum(v * v for v in x)
        if norm < prec:
            cube[norm] += 1
    assert sum_of_squares_form(3).representation_numbers(prec) == cube


# ---------------------------------------------------------------------------
# 5. Brute force on random forms
# ---------------------------------------------------------------------------


def random_forms(seed: int, wanted: int) -> list[list[list[int]]]:
    """Random positive-definite Gram matrices with small entries, dimensions cycling through 1..5."""
    rng = random.Random(seed)
    found: list[list[list[int]]] = []
    while len(found) < wanted:
        n = len(found) % 5 + 1
        gram = [[0] * n for _ in range(n)]
        for i in range(n):
            gram[i][i] = rng.choice([2, 4, 6, 8])
            for j in range(i):
                gram[i][j] = gram[j][i] = rng.randint(-3, 3)
        if sympy.Matrix(gram).is_positive_definite:
            found.append(gram)
    return found


# Enough vectors to be a real test, few enough for a quick naive box enumeration.
BOX_COUNT = {1: 60, 2: 60, 3: 30, 4: 16, 5: 8}


@pytest.mark.parametrize("gram", random_forms(seed=20240611, wanted=15), ids=str)
def test_representation_numbers_match_box_enumeration(gram: list[list[int]]) -> None:
    # Source: naive enumeration of a bounding box (box_count above) and sympy for positivity.
    q = form(gram)
    assert q.validate() is None
    count = BOX_COUNT[len(gram)]
    assert q.representation_numbers(count) == box_count(gram, count)


@pytest.mark.parametrize("gram", random_forms(seed=7, wanted=10), ids=str)
def test_level_is_least_admissible(gram: list[list[int]]) -> None:
    # docs/method.md#theta-quadratic-forms: least N >= 1 with N A^{-1} integral with even diagonal; found by search with
    # sympy.
    inverse = sympy.Matrix(gram).inv()
    n = len(gram)

    def admissible(level: int) -> bool:
        scaled = inverse * level
        integral = all(scaled[i, j].is_integer for i in range(n) for j in range(n))
        return integral and all(scaled[i, i] % 2 == 0 for i in range(n))

    expected = next(level for level in itertools.count(1) if admissible(level))
    q = form(gram)
    assert q.level == expected
    assert q.determinant == sympy.Matrix(gram).det()


def test_validate_agrees_with_sympy_on_random_symmetric_matrices() -> None:
    # Source: sympy's is_positive_definite on symmetric matrices with even diagonal.
    rng = random.Random(3)
    for _ in range(200):
        n = rng.randint(1, 4)
        gram = [[0] * n for _ in range(n)]
        for i in range(n):
            gram[i][i] = rng.choice([-2, 0, 2, 4, 6])
            for j in range(i):
                gram[i][j] = gram[j][i] = rng.randint(-4, 4)
        assert (form(gram).validate() is None) == bool(sympy.Matrix(gram).is_positive_definite), gram


# ---------------------------------------------------------------------------
# 6. The transformation law, numerically
# ---------------------------------------------------------------------------


def evaluate(coefficients: list[int], tau: mpmath.mpc) -> mpmath.mpc:
    """sum_n r(n) e^{2 pi i n tau} from the exact coefficients (truncation error is tiny here)."""
    q = mpmath.exp(2j * mpmath.pi * tau)
    return mpmath.polyval(list(reversed(coefficients)), q)


@pytest.mark.parametrize(
    ("gram", "d"),
    [
        (A2_GRAM, 2),  # chi_{-3}(2) = -1
        (A2_GRAM, -1),  # chi_{-3}(-1) = -1, and d < 0
        ([[2, 0], [0, 2]], 3),  # chi_{-4}(3) = -1
        ([[2, 0], [0, 2]], 5),  # chi_{-4}(5) = +1
        ([[2, 1], [1, 4]], 3),  # chi_{-7}(3) = -1
        (D4_GRAM, 3),  # weight 2, trivial character
    ],
)
def test_transformation_law_numerically(gram: list[list[int]], d: int) -> None:
    # docs/method.md#characters, #theta-quadratic-forms (Iwaniec Thm 10.9): for gamma = (a b; c d) in Gamma_0(N),
    # theta_Q(gamma tau) = chi(d) (c tau + d)^k theta_Q(tau).  Evaluated with mpmath.
    mpmath.mp.dps = 30
    q = form(gram)
    level, k = q.level, int(q.weight)
    character = q.character
    assert character is not None
    c = level
    a = pow(d, -1, c)
    b = (a * d - 1) // c
    assert a * d - b * c == 1
    # tau near the cusp -d/c, so that tau and gamma tau both have imaginary part about 1/c.
    tau = mpmath.mpc(mpmath.mpf(-d) / c + mpmath.mpf("0.013"), mpmath.mpf(1) / c)
    gamma_tau = (a * tau + b) / (c * tau + d)
    coefficients = q.representation_numbers(12 * c + 60)
    lhs = evaluate(coefficients, gamma_tau)
    rhs = character(d) * (c * tau + d) ** k * evaluate(coefficients, tau)
    assert abs(lhs - rhs) < mpmath.mpf(10) ** -20 * abs(lhs)
    if character(d) == -1:
        # Control: the law with the character left out fails, so the check has teeth.
        assert abs(lhs + rhs) > mpmath.mpf(10) ** -3 * abs(lhs)


def test_fricke_involution_two_squares() -> None:
    # From memory (Poisson summation): theta(-1/(4 tau)) = sqrt(-2 i tau) theta(tau) for
    # theta = sum q^{n^2}; squaring, theta_{x^2+y^2}(-1/(4 tau)) = -2 i tau theta_{x^2+y^2}(tau).
    mpmath.mp.dps = 30
    coefficients = sum_of_squares_form(2).representation_numbers(200)
    tau = mpmath.mpc("0.11", "0.47")
    lhs = evaluate(coefficients, -1 / (4 * tau))
    rhs = -2j * tau * evaluate(coefficients, tau)
    assert abs(lhs - rhs) < mpmath.mpf(10) ** -20 * abs(lhs)
