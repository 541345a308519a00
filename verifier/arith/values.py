"""Exact values of arithmetic expressions, computed from the definitions.

This evaluator is independent of the generating-function translation: it gives the
witness of every refutation (the first n and both values), and it cross-checks every
proof (a proof whose direct values disagree is reported as an internal inconsistency,
never as proved).  Conventions (docs/method.md#arithmetic-functions): sigma_k(x) = tau(x) = r_s(x) =
p(x) = 0 unless x is a positive integer (r_s(0) = p(0) = 1).
"""

from __future__ import annotations

from fractions import Fraction
from typing import Any

from flint import fmpz

from verifier.arith import terms as t
from verifier.forms.characters import kronecker

MAX_VALUE_BITS = 1_000_000


class NotEvaluable(Exception):
    """The expression has no value here (a free variable, an infinite sum, a huge power)."""


class Values:
    """Evaluates expressions; caches series of tau, r_s and defined forms."""

    def __init__(self, series_of: Any = None) -> None:
        # series_of(form_expr, prec) -> QSeries: exact q-expansion of a typed form expression.
        self._series_of = series_of
        self._series: dict[tuple[Any, ...], Any] = {}

    def value(self, e: t.A, env: dict[str, int]) -> Fraction:
        """The exact value of ``e`` with the variables of ``env``."""
        if isinstance(e, t.Num):
            return e.value
        if isinstance(e, t.Var):
            if e.name not in env:
                raise NotEvaluable(f"the variable {e.name} has no value")
            return Fraction(env[e.name])
        if isinstance(e, t.Bin):
            a, b = self.value(e.left, env), self.value(e.right, env)
            if e.op == "+":
                return a + b
            if e.op == "-":
                return a - b
            if e.op == "*":
                return a * b
            if b == 0:
                raise NotEvaluable(f"division by zero in {e.text}")
            return a / b
        if isinstance(e, t.Pow):
            base, exp = self.value(e.base, env), self.value(e.exponent, env)
            if exp.denominator != 1:
                raise NotEvaluable(f"a fractional power in {e.text}")
            if abs(exp) * max(abs(base.numerator), abs(base.denominator), 2).bit_length() > MAX_VALUE_BITS:
                raise NotEvaluable(f"{e.text} is too large to compute")
            if base == 0 and exp < 0:
                raise NotEvaluable(f"0 to a negative power in {e.text}")
            return base ** int(exp)
        if isinstance(e, t.Fun):
            return self._function(e, self.value(e.arg, env))
        if isinstance(e, t.Sum):
            return self._sum(e, env)
        raise NotEvaluable(type(e).__name__)

    def _sum(self, e: t.Sum, env: dict[str, int]) -> Fraction:
        total = Fraction(0)
        if e.kind == "divides":
            target = self.value(e.lower, env)
            if target.denominator != 1 or target <= 0:
                return total
            for d in _divisors(int(target)):
                total += self.value(e.body, {**env, e.var: d})
            return total
        assert e.upper is not None
        lo, hi = self.value(e.lower, env), self.value(e.upper, env)
        if lo.denominator != 1 or hi.denominator != 1:
            raise NotEvaluable(f"non-integral limits in {e.text}")
        if hi - lo > 100_000:
            raise NotEvaluable(f"{e.text} has too many terms to compute")
        for m in range(int(lo), int(hi) + 1):
            total += self.value(e.body, {**env, e.var: m})
        return total

    def _function(self, e: t.Fun, x: Fraction) -> Fraction:
        integral = x.denominator == 1
        n = int(x) if integral else 0
        if e.name == "chi":
            assert e.index is not None
            return Fraction(kronecker(e.index, n)) if integral else Fraction(0)
        if not integral or n < 0:
            return Fraction(0)
        if e.name == "sigma":
            return Fraction(int(fmpz(n).divisor_sigma(e.index or 0))) if n > 0 else Fraction(0)
        if e.name == "phi":
            return Fraction(int(fmpz(n).euler_phi())) if n > 0 else Fraction(0)
        if e.name == "mu":
            return Fraction(int(fmpz(n).moebius_mu())) if n > 0 else Fraction(0)
        if e.name == "p":
            return Fraction(int(fmpz(n).partitions_p()))
        return self._coefficient(e, n)

    def _coefficient(self, e: t.Fun, n: int) -> Fraction:
        key = (e.name, e.index, e.form)
        series = self._series.get(key)
        if series is None or series.prec <= n:
            prec = max(2 * n + 2, 64)
            series = self._build(e, prec)
            self._series[key] = series
        return Fraction(series[n])

    def _build(self, e: t.Fun, prec: int) -> Any:
        from verifier.forms.delta import delta_series
        from verifier.forms.eta import EtaQuotient

        if e.name == "tau":
            return delta_series(prec)
        if e.name == "r":
            theta = EtaQuotient.of({2: 5, 1: -2, 4: -2}).series(prec)
            return theta ** int(e.index or 0)
        if e.name == "rQ":
            return e.form.series(prec)
        if e.name == "coef":
            if self._series_of is None:
                raise NotEvaluable("coefficients of defined forms are not available here")
            return self._series_of(e.form, prec)
        raise NotEvaluable(f"unknown function {e.name}")


def _divisors(n: int) -> list[int]:
    small = [d for d in range(1, int(n**0.5) + 1) if n % d == 0]
    return sorted(set(small + [n // d for d in small]))
