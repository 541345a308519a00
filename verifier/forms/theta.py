"""Theta series of positive-definite integral quadratic forms (docs/method.md#theta-quadratic-forms, #sums-of-squares).

A form is given by its Gram matrix ``A``: a symmetric, positive-definite integer matrix
with even diagonal, and ``Q(x) = x^T A x / 2``, which is then integer valued on ``Z^n``.
(For ``Q = sum_{i <= j} a_ij x_i x_j`` take ``A_ii = 2 a_ii`` and ``A_ij = A_ji = a_ij``.)
Its theta series

    theta_Q(tau) = sum_{x in Z^n} q^{Q(x)} = sum_{m >= 0} r_Q(m) q^m

is, for ``n = 2s`` variables, a modular form of weight ``s`` on ``Gamma_0(N)`` with character
``d -> ((-1)^s det A / d)`` (a Kronecker symbol), where the level ``N`` is the least positive
integer such that ``N A^{-1}`` is integral with even diagonal.  For odd ``n`` the weight is
half-integral; such forms get a level and a series here but no character yet.

Counting representations
------------------------
``r_Q(m)`` for ``m < X`` is computed exactly from the LDL^T decomposition of ``A``.  Write
``A_k`` for the leading ``k x k`` block, ``d_k = det A_k`` (all ``> 0`` by positivity) and split a
vector ``p in R^k`` as ``(p', t)`` with ``t`` its last coordinate.  Completing the square,

    p^T A_k p / 2 = (p' + w_k t)^T A_{k-1} (p' + w_k t) / 2 + s_k t^2 / 2,

where ``w_k = A_{k-1}^{-1} (column k of A_k above the diagonal)`` and ``s_k = d_k / d_{k-1}``
(these are a column of ``L`` and an entry of ``D`` in ``A = L D L^T``).  Hence a vector of
value ``< X`` has ``s_k t^2 < 2X``: this is the Fincke--Pohst bound, applied level by level,
here with exact rational arithmetic so that no vector is lost to rounding.

Plain enumeration visits every vector, and there are far too many (``E_8`` has about
``10^11`` vectors with ``Q(x) < 200``).  But the inner sum only depends on the *coset*
of the shifted vector modulo ``Z^{k-1}``.  For ``c in Q^k`` put
``Theta_k(c) := sum_{x in Z^k} q^{(x + c)^T A_k (x + c) / 2}``; then, writing ``c = (c_<, c_k)``,

    Theta_k(c) = sum_{t in c_k + Z, s_k t^2 < 2X} q^{s_k t^2 / 2} Theta_{k-1}(c_< + w_k t)  + O(q^X),

and ``Theta_{k-1}`` only depends on its argument modulo ``Z^{k-1}``.

Every shift that occurs is the orthogonal projection of a vector of ``Z^n`` onto the span
of the first ``k`` basis vectors; its inner products with those basis vectors are entries of
``A x``, hence integers, so the shift lies in the dual lattice ``A_k^{-1} Z^k``.  There are
therefore at most ``d_k`` distinct cosets at level ``k``, and each ``Theta_k(c)`` is computed
once (memoised) as a truncated polynomial; the sums above become a few FLINT polynomial
products.  Moreover on one coset all values are congruent modulo 1: with ``z = A_k c``
integral, ``(x + c)^T A_k (x + c) / 2 = x^T A_k x / 2 + x^T z + c^T A_k c / 2`` and the first
two terms are integers (even diagonal).  So ``Theta_k(c) = q^{nu(c)} P(q)`` with
``nu(c) = frac(c^T A_k c / 2)`` and ``P`` an integer polynomial, which is how it is stored.
"""

from __future__ import annotations

import math
import re
from dataclasses import dataclass
from fractions import Fraction
from typing import Any

from flint import fmpz_poly

from verifier.numbers import QuadraticCharacter
from verifier.series.qseries import QSeries

Matrix = tuple[tuple[int, ...], ...]

# ---------------------------------------------------------------------------
# Parsing a LaTeX matrix
# ---------------------------------------------------------------------------

_ENVIRONMENT = re.compile(
    r"^\s*\\begin\s*\{(?P<env>[a-zA-Z]+\*?)\}(?P<body>.*)\\end\s*\{(?P<end>[a-zA-Z]+\*?)\}\s*$", re.S
)
_ACCEPTED_ENVIRONMENTS = ("pmatrix", "bmatrix", "matrix")
# A row break ``\\``, possibly with a spacing argument such as ``\\[2pt]``.
_ROW_BREAK = re.compile(r"\\\\(?:\s*\[[^\]]*\])?")
_INTEGER = re.compile(r"^[+-]?\d+$")


def parse_matrix(text: str) -> list[list[int]] | str:
    r"""Read ``\begin{pmatrix} 2 & 1 \\ 1 & 2 \end{pmatrix}`` into a list of integer rows.

    ``pmatrix``, ``bmatrix`` and ``matrix`` are accepted (``vmatrix`` denotes a determinant
    and is refused).  Rows are separated by ``\\`` (a trailing one is allowed), entries by
    ``&``; each entry must be an integer, optionally signed and in braces, with any spaces.
    Returns an error message (a ``str``) instead of raising when the text is malformed.
    """
    match = _ENVIRONMENT.match(text)
    if match is None:
        return "expected a matrix written as \\begin{pmatrix} ... \\end{pmatrix}"
    env, end = match.group("env"), match.group("end")
    if env != end:
        return f"\\begin{{{env}}} is closed by \\end{{{end}}}"
    if env not in _ACCEPTED_ENVIRONMENTS:
        return f"unsupported environment {env!r}: use pmatrix, bmatrix or matrix"
    body = match.group("body")
    if "\\begin" in body or "\\end" in body:
        return "nested environments are not allowed inside a Gram matrix"
    raw_rows = _ROW_BREAK.split(body)
    # A trailing ``\\`` before ``\end`` leaves an empty last row; drop it.
    if raw_rows and not raw_rows[-1].strip():
        raw_rows.pop()
    if not raw_rows:
        return "the matrix is empty"
    rows: list[list[int]] = []
    for i, raw in enumerate(raw_rows, start=1):
        if not raw.strip():
            return f"row {i} is empty"
        row: list[int] = []
        for j, entry in enumerate(raw.split("&"), start=1):
            token = re.sub(r"\s+", "", entry)
            if token.startswith("{") and token.endswith("}"):
                token = token[1:-1]
            if not _INTEGER.match(token):
                shown = entry.strip() or "(empty)"
                return f"entry {shown!r} in row {i}, column {j} is not an integer"
            row.append(int(token))
        if rows and len(row) != len(rows[0]):
            return f"row {i} has {len(row)} entries but row 1 has {len(rows[0])}"
        rows.append(row)
    return rows


# ---------------------------------------------------------------------------
# Exact linear algebra
# ---------------------------------------------------------------------------


def _leading_minors(a: Matrix) -> list[int]:
    """``[d_0, d_1, ..., d_n]`` with ``d_k`` the determinant of the leading ``k x k`` block.

    Fraction-free (Bareiss) elimination without pivoting: after step ``k`` the pivot is
    exactly ``d_{k+1}``, every intermediate quotient being exact.  If some ``d_k`` is 0 the
    elimination cannot continue; the remaining minors are then reported as 0 (the caller
    only uses them to test positivity, which has already failed).
    """
    n = len(a)
    m = [list(row) for row in a]
    minors = [1]
    previous = 1
    for k in range(n):
        pivot = m[k][k]
        minors.append(pivot)
        if pivot == 0:
            minors.extend([0] * (n - k - 1))
            break
        for i in range(k + 1, n):
            for j in range(k + 1, n):
                m[i][j] = (m[i][j] * pivot - m[i][k] * m[k][j]) // previous
        previous = pivot
    return minors


def _determinant(a: Matrix) -> int:
    """Exact determinant by Fraction Gaussian elimination with pivoting."""
    n = len(a)
    m = [[Fraction(x) for x in row] for row in a]
    det = Fraction(1)
    for k in range(n):
        pivot_row = next((i for i in range(k, n) if m[i][k] != 0), None)
        if pivot_row is None:
            return 0
        if pivot_row != k:
            m[k], m[pivot_row] = m[pivot_row], m[k]
            det = -det
        det *= m[k][k]
        for i in range(k + 1, n):
            factor = m[i][k] / m[k][k]
            if factor:
                for j in range(k, n):
                    m[i][j] -= factor * m[k][j]
    assert det.denominator == 1
    return int(det)


def _inverse(a: Matrix) -> list[list[Fraction]]:
    """Exact inverse of a nonsingular integer matrix (Gauss--Jordan over Q)."""
    n = len(a)
    m = [[Fraction(x) for x in row] + [Fraction(int(i == j)) for j in range(n)] for i, row in enumerate(a)]
    for k in range(n):
        pivot_row = next(i for i in range(k, n) if m[i][k] != 0)
        m[k], m[pivot_row] = m[pivot_row], m[k]
        inv_pivot = 1 / m[k][k]
        m[k] = [x * inv_pivot for x in m[k]]
        for i in range(n):
            if i != k and m[i][k]:
                factor = m[i][k]
                m[i] = [x - factor * y for x, y in zip(m[i], m[k], strict=True)]
    return [row[n:] for row in m]


def _solve(a: Matrix, k: int, rhs: list[int]) -> tuple[Fraction, ...]:
    """Solve ``A_k w = rhs`` exactly, ``A_k`` the (nonsingular) leading ``k x k`` block."""
    block: Matrix = tuple(tuple(row[:k]) for row in a[:k])
    inv = _inverse(block)
    return tuple(sum((inv[i][j] * rhs[j] for j in range(k)), Fraction(0)) for i in range(k))


# ---------------------------------------------------------------------------
# Quadratic forms
# ---------------------------------------------------------------------------


@dataclass(frozen=True)
class QuadraticForm:
    """The form ``Q(x) = x^T A x / 2`` with Gram matrix ``A = gram``.

    Construction does not check anything; call :meth:`validate` (the arithmetic properties
    raise ``ValueError`` on an invalid matrix).
    """

    gram: Matrix

    @classmethod
    def from_rows(cls, rows: list[list[int]] | Matrix) -> QuadraticForm:
        """Build from any sequence of integer rows (e.g. the output of :func:`parse_matrix`)."""
        return cls(tuple(tuple(int(x) for x in row) for row in rows))

    # -- validity ---------------------------------------------------------------
    def validate(self) -> str | None:
        """``None`` if ``gram`` is a valid Gram matrix, else a message saying what is wrong.

        Requirements: square, nonempty, symmetric, even diagonal (so that ``Q`` is integer
        valued) and positive definite.  Positivity is decided exactly by Sylvester's
        criterion: all leading principal minors are positive.
        """
        a = self.gram
        n = len(a)
        if n == 0:
            return "the Gram matrix is empty"
        for i, row in enumerate(a, start=1):
            if len(row) != n:
                return f"the Gram matrix is not square (row {i} has {len(row)} entries, expected {n})"
        for i in range(n):
            for j in range(i + 1, n):
                if a[i][j] != a[j][i]:
                    return (
                        f"the Gram matrix is not symmetric: entry ({i + 1},{j + 1}) is {a[i][j]} "
                        f"but entry ({j + 1},{i + 1}) is {a[j][i]}"
                    )
        for i in range(n):
            if a[i][i] % 2:
                return (
                    f"diagonal entry ({i + 1},{i + 1}) = {a[i][i]} is odd; a Gram matrix has even diagonal "
                    "(for Q = sum a_ij x_i x_j use A_ii = 2 a_ii)"
                )
        minors = _leading_minors(a)
        for k in range(1, n + 1):
            if minors[k] <= 0:
                kind = "singular" if _determinant(a) == 0 else "not positive definite"
                return f"the Gram matrix is {kind} (leading {k}x{k} minor is {minors[k]})"
        return None

    def _checked(self) -> None:
        problem = self.validate()
        if problem is not None:
            raise ValueError(problem)

    # -- invariants -------------------------------------------------------------
    @property
    def dimension(self) -> int:
        """Number of variables ``n``."""
        return len(self.gram)

    @property
    def weight(self) -> Fraction:
        """Weight ``n/2`` of the theta series."""
        return Fraction(self.dimension, 2)

    @property
    def determinant(self) -> int:
        """``det A`` (exact)."""
        return _determinant(self.gram)

    @property
    def level(self) -> int:
        """Least ``N >= 1`` with ``N A^{-1}`` integral and with even diagonal (docs/method.md#theta-quadratic-forms).

        The admissible ``N`` form a subgroup of ``Z`` (both conditions are additive) that
        contains ``2 det A`` (``2 det A * A^{-1} = 2 adj A``), so the level is the lcm of the
        denominators of the off-diagonal entries of ``A^{-1}`` and of the diagonal entries
        of ``A^{-1} / 2``.
        """
        self._checked()
        inv = _inverse(self.gram)
        n = self.dimension
        level = 1
        for i in range(n):
            for j in range(n):
                entry = inv[i][j] / 2 if i == j else inv[i][j]
                level = math.lcm(level, entry.denominator)
        return level

    @property
    def character_modulus(self) -> int | None:
        """``(-1)^s det A`` for ``n = 2s`` variables (``None`` for odd ``n``).

        This is the discriminant-like integer whose Kronecker symbol ``(D / d)`` is the
        character of the theta series.  For ``2s`` variables it is ``= 0 or 1 mod 4``.
        """
        self._checked()
        n = self.dimension
        if n % 2:
            return None
        sign = -1 if (n // 2) % 2 else 1
        return sign * self.determinant

    @property
    def character(self) -> QuadraticCharacter | None:
        """Nebentypus ``d -> ((-1)^s det A / d)`` of ``theta_Q`` for ``n = 2s`` variables.

        ``QuadraticCharacter.from_integer`` returns the primitive character, which agrees with
        the Kronecker symbol on every ``d`` prime to ``2 det A``.  That covers all ``d`` prime
        to ``N``: ``det(N A^{-1}) = N^n / det A`` is an integer, so every prime of ``det A``
        divides ``N``; and if ``N`` is odd then ``det A`` is odd and ``(-1)^s det A = 1 mod 4``
        (the discriminant of an even form in ``2s`` variables is ``0`` or ``1 mod 4``), in which
        case the agreement holds for even ``d`` as well.

        For an odd number of variables the weight ``n/2`` is half-integral and the
        transformation law involves the theta multiplier (docs/method.md#half-integral-weight); no character is
        attached to such forms yet, and ``None`` is returned.
        """
        modulus = self.character_modulus
        if modulus is None:
            return None
        return QuadraticCharacter.from_integer(modulus)

    # -- representation numbers -------------------------------------------------
    def value(self, x: list[int] | tuple[int, ...]) -> int:
        """``Q(x) = x^T A x / 2`` (an integer, since the diagonal is even)."""
        a = self.gram
        n = self.dimension
        total = sum(a[i][i] * x[i] * x[i] for i in range(n)) // 2
        total += sum(a[i][j] * x[i] * x[j] for i in range(n) for j in range(i + 1, n))
        return total

    def representation_numbers(self, count: int) -> list[int]:
        """``[r_Q(0), ..., r_Q(count - 1)]``, ``r_Q(m) = #{x in Z^n : Q(x) = m}``, exactly.

        See the module docstring for the method (exact LDL^T bounds with memoisation over
        cosets of the dual lattice).
        """
        self._checked()
        if count <= 0:
            return []
        return _ThetaCounter(self.gram, count).run()

    def series(self, prec: int) -> QSeries:
        """``theta_Q + O(q^prec)`` with exact coefficients."""
        return QSeries.from_coefficients(list(self.representation_numbers(prec)), 0, prec)


def sum_of_squares_form(s: int) -> QuadraticForm:
    """``x_1^2 + ... + x_s^2``: Gram matrix ``2 I_s``; its theta series is ``theta^s``.

    See docs/method.md#sums-of-squares.
    """
    if s < 1:
        raise ValueError("a sum of squares needs at least one variable")
    return QuadraticForm(tuple(tuple(2 if i == j else 0 for j in range(s)) for i in range(s)))


# A coset c + Z^k of level k, stored as the integer vector z = d_k c reduced modulo d_k
# (c lies in the dual lattice A_k^{-1} Z^k = adj(A_k) Z^k / d_k, so z is integral).
Coset = tuple[int, ...]
# Up to this many shifted copies are added one by one; beyond it a FLINT product is cheaper.
_FEW_SHIFTS = 8


class _ThetaCounter:
    """Coset thetas ``Theta_k(c)``, each computed once, to the precision its uses require.

    The polynomial ``P_c`` stored for a coset satisfies ``Theta_k(c) = q^{nu(c)} P_c(q)``
    with ``nu(c) = frac(c^T A_k c / 2)``.  In the recursion a term ``q^{s_k t^2 / 2}
    Theta_{k-1}(c')`` becomes ``q^m P_{c'}`` with the integer ``m = s_k t^2 / 2 + nu(c') - nu(c)``
    (integral because all values on the coset ``c`` agree with ``nu(c)`` modulo 1, and
    ``m >= 0`` because it is ``> -1``).  So if ``P_c`` is wanted to length ``L`` (exponents
    ``< L``), only the ``t`` with ``m < L`` matter, and ``P_{c'}`` is wanted to length ``L - m``.

    Pass 1 (:meth:`_plan`) walks the levels from ``n`` down to 1 and records, for every coset
    that occurs, its edges ``(c', m)`` and the largest length needed; pass 2 (:meth:`_evaluate`)
    builds the polynomials from level 0 upwards.  Cosets reached only through large ``m``
    thus cost little, which matters when ``d_k`` (the bound on the number of cosets at level
    ``k``) is large.

    All arithmetic is on integers.  With ``c = z / d_k`` and ``T = z_k + j d_k`` (so that
    ``t = T / d_k`` runs over ``c_k + Z``):

    * ``s_k t^2 / 2 = T^2 / (2 d_k d_{k-1})``, so the bound ``s_k t^2 / 2 < L`` reads
      ``T^2 < 2 d_k d_{k-1} L`` (exact Fincke--Pohst range for ``T``);
    * ``w_k = W / d_{k-1}`` with ``W = adj(A_{k-1}) a_k`` integral, and the child coset
      ``c' = c_{<k} + w_k t`` has ``z' = d_{k-1} c' = (d_{k-1} z_{<k} + W T) / d_k``, an integer
      vector by the dual-lattice argument of the module docstring;
    * ``nu(c) = (z^T A_k z mod 2 d_k^2) / (2 d_k^2)`` is kept as its numerator.
    """

    def __init__(self, gram: Matrix, count: int) -> None:
        self.a = gram
        self.n = len(gram)
        self.count = count
        # d_k: leading principal minors; s_k = d_k / d_{k-1} is the k-th entry of D in A = L D L^T.
        self.d = _leading_minors(gram)
        # W_k = d_{k-1} A_{k-1}^{-1} a_k, a_k the part of column k above the diagonal.
        self.w: list[tuple[int, ...]] = [(), ()]
        for k in range(2, self.n + 1):
            solution = _solve(gram, k - 1, [gram[i][k - 1] for i in range(k - 1)])
            scaled = [x * self.d[k - 1] for x in solution]
            assert all(x.denominator == 1 for x in scaled)
            self.w.append(tuple(int(x) for x in scaled))
        # Per level: coset -> length needed, coset -> numerator of nu, coset -> {child: [m, ...]}.
        self.need: list[dict[Coset, int]] = [{} for _ in range(self.n + 1)]
        self.nus: list[dict[Coset, int]] = [{} for _ in range(self.n + 1)]
        self.edges: list[dict[Coset, dict[Coset, list[int]]]] = [{} for _ in range(self.n + 1)]

    def nu_numerator(self, k: int, z: Coset) -> int:
        """``z^T A_k z mod 2 d_k^2``: the numerator of ``nu(c)`` over ``2 d_k^2``."""
        a = self.a
        total = sum(a[i][i] * z[i] * z[i] for i in range(k))
        total += 2 * sum(a[i][j] * z[i] * z[j] for i in range(k) for j in range(i + 1, k))
        return total % (2 * self.d[k] ** 2)

    def run(self) -> list[int]:
        """``r_Q(m)`` for ``m < X``: the coefficients of ``Theta_n(0)``."""
        top: Coset = (0,) * self.n
        self.need[self.n][top] = self.count
        self.nus[self.n][top] = 0
        for k in range(self.n, 0, -1):
            for z, length in self.need[k].items():
                self.edges[k][z] = self._plan(k, z, length)
        poly = self._evaluate()[top]
        coeffs = [int(x) for x in poly.coeffs()]
        return (coeffs + [0] * self.count)[: self.count]

    def _plan(self, k: int, z: Coset, length: int) -> dict[Coset, list[int]]:
        """Edges ``c' -> [m, ...]`` of the coset ``z`` at level ``k``, wanted to ``length``.

        Also raises the length needed of each child ``c'`` to ``length - m``.
        """
        d_k, d_prev, w_k = self.d[k], self.d[k - 1], self.w[k]
        nu_c = self.nus[k][z]
        children_need, children_nu = self.need[k - 1], self.nus[k - 1]
        # T ranges over z_k + d_k Z with T^2 < 2 d_k d_{k-1} L, i.e. |T| <= t_max.
        t_max = math.isqrt(2 * d_k * d_prev * length - 1)
        last = z[k - 1]
        j_low = -((t_max + last) // d_k)  # least j with last + j d_k >= -t_max
        j_high = (t_max - last) // d_k  # largest j with last + j d_k <= t_max
        # m = T^2/(2 d_k d_{k-1}) + nu'/(2 d_{k-1}^2) - nu/(2 d_k^2), over the denominator below.
        den = 2 * d_k * d_k * d_prev * d_prev
        edges: dict[Coset, list[int]] = {}
        for j in range(j_low, j_high + 1):
            big_t = last + j * d_k
            child_list = []
            for i in range(k - 1):
                num = d_prev * z[i] + w_k[i] * big_t
                assert num % d_k == 0, "shifts must lie in the dual lattice"
                child_list.append((num // d_k) % d_prev)
            child = tuple(child_list)
            nu_child = children_nu.get(child)
            if nu_child is None:
                nu_child = children_nu[child] = self.nu_numerator(k - 1, child)
            num = big_t * big_t * d_k * d_prev + nu_child * d_k * d_k - nu_c * d_prev * d_prev
            assert num % den == 0, "coset values must agree modulo 1"
            m = num // den
            if m >= length:
                continue
            edges.setdefault(child, []).append(m)
            if children_need.get(child, 0) < length - m:
                children_need[child] = length - m
        return edges

    def _evaluate(self) -> dict[Coset, Any]:
        """Build ``P_c`` to its needed length for every planned coset, level 0 upwards."""
        below: dict[Coset, Any] = {(): fmpz_poly([1])}
        for k in range(1, self.n + 1):
            here: dict[Coset, Any] = {}
            for c, length in self.need[k].items():
                total = fmpz_poly([])
                for child, shifts in self.edges[k][c].items():
                    # sum_t q^{m_t} P_{c'} truncated to the length: a few shifted copies, or
                    # (when many t lead to the same child) one product with the sparse factor.
                    inner = below[child]
                    if len(shifts) <= _FEW_SHIFTS:
                        for m in shifts:
                            total += inner.left_shift(m).truncate(length) if m else inner.truncate(length)
                    else:
                        coeffs = [0] * (max(shifts) + 1)
                        for m in shifts:
                            coeffs[m] += 1
                        total += fmpz_poly(coeffs).mul_low(inner, length)
                here[c] = total
            below = here
        return below
