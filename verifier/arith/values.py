"""Exact values of arithmetic expressions, computed from the definitions.

This evaluator is independent of the generating-function translation: it gives the
witness of every refutation (the first n and both values), and it cross-checks every
proof (a proof whose direct values disagree is reported as an internal inconsistency,
never as proved).  Conventions (docs/method.md#arithmetic-functions): sigma_k(x) = tau(x) = r_s(x) =
p(x) = 0 unless x is a positive integer (r_s(0) = p(0) = 1).
"""

from __future__ import annotations

import math
from fractions import Fraction
from typing import Any

from flint import fmpz

from verifier.arith import terms as t
from verifier.arith.factor import divisors, factorisation
from verifier.limits import number_text
from verifier.numbers import kronecker

MAX_VALUE_BITS = 1_000_000
MAX_SERIES_N = 50_000  # beyond this n, tau, r_s and coefficients need a formula (no series to n)
DIRECT_BITS = 64  # sigma, phi and mu of larger n go through a factorisation with bounded effort


class NotEvaluable(Exception):
    """The expression has no value here (a free variable, an infinite sum, a huge power)."""

    code = "unsupported"


class TooLargeValue(NotEvaluable):
    """The value exists but computing it is beyond the budget (a huge n, an unfactorable n)."""

    code = "too-large"


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
                raise TooLargeValue(f"{e.text} is too large to compute")
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
            found = divisors(int(target))
            if found is None:
                big = number_text(int(target))
                raise TooLargeValue(f"the divisors of {big} in {e.text} cannot be listed in the budget")
            for d in found:
                total += self.value(e.body, {**env, e.var: d})
            return total
        assert e.upper is not None
        lo, hi = self.value(e.lower, env), self.value(e.upper, env)
        if lo.denominator != 1 or hi.denominator != 1:
            raise NotEvaluable(f"non-integral limits in {e.text}")
        if hi - lo > 100_000:
            raise TooLargeValue(f"{e.text} has too many terms to compute")
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
        if e.name in ("sigma", "phi", "mu") and n == 0:
            return Fraction(0)
        if e.name in ("sigma", "phi", "mu") and n.bit_length() > DIRECT_BITS:
            return Fraction(_multiplicative(e.name, e.index or 0, n, e.text))
        if e.name == "sigma":
            return Fraction(int(fmpz(n).divisor_sigma(e.index or 0)))
        if e.name == "phi":
            return Fraction(int(fmpz(n).euler_phi()))
        if e.name == "mu":
            return Fraction(int(fmpz(n).moebius_mu()))
        if e.name == "p":
            # Hardy-Ramanujan: log p(n) ~ pi sqrt(2n/3); FLINT uses Rademacher's series.
            if 3.7 * math.isqrt(n) > MAX_VALUE_BITS:
                raise TooLargeValue(f"p({number_text(n)}) has more than {MAX_VALUE_BITS} bits; it is not computed")
            return Fraction(int(fmpz(n).partitions_p()))
        if n > MAX_SERIES_N:
            return Fraction(self._by_formula(e, n))
        return self._coefficient(e, n)

    def _by_formula(self, e: t.Fun, n: int) -> int:
        """tau(n) and r_s(n) at an n beyond the series budget, where a formula exists."""
        if e.name == "tau":
            factors = _factors_or_refuse(n, e.text)
            value = 1
            for p, k in factors:
                value *= self._tau_prime_power(p, k, e)
                _check_value_bits(value, e.text)
            return value
        if e.name == "r" and e.index is not None:
            found = squares(e.index, n)
            if found is not None:
                return found
            raise TooLargeValue(
                f"{e.text} at n = {number_text(n)}: no divisor-sum formula for sums of {e.index} squares, and "
                f"expanding the series to n is beyond the budget of {MAX_SERIES_N} coefficients"
            )
        raise TooLargeValue(
            f"{e.text} at n = {number_text(n)} needs that many coefficients, more than the budget of {MAX_SERIES_N}"
        )

    def _tau_prime_power(self, p: int, k: int, e: t.Fun) -> int:
        """tau(p^k) from tau(p) by tau(p^{j+1}) = tau(p) tau(p^j) - p^11 tau(p^{j-1}).

        (Hecke's relations; Serre, A Course in Arithmetic, chapter VII, section 5.)
        """
        if p > MAX_SERIES_N:
            raise TooLargeValue(
                f"{e.text}: tau({number_text(p)}) at the prime {number_text(p)} needs that many coefficients of Delta, "
                f"more than the budget of {MAX_SERIES_N}"
            )
        tp = int(self._coefficient(t.Fun("tau", "tau", None, t.Num("1", Fraction(1))), p))
        prev, cur = 1, tp
        for _ in range(k - 1):
            prev, cur = cur, tp * cur - p**11 * prev
            _check_value_bits(cur, e.text)
        return cur

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
        if e.name == "pbar":
            # sum pbar(n) q^n = prod (1 + q^n) / (1 - q^n) = f_2 / f_1^2 = eta(2 tau) / eta(tau)^2
            # (Corteel and Lovejoy, "Overpartitions", Trans. AMS 356 (2004), §1).
            return EtaQuotient.of({2: 1, 1: -2}).series(prec)
        if e.name == "coef":
            if self._series_of is None:
                raise NotEvaluable("coefficients of defined forms are not available here")
            return self._series_of(e.form, prec)
        raise NotEvaluable(f"unknown function {e.name}")


def _factors_or_refuse(n: int, text: str) -> list[tuple[int, int]]:
    factors = factorisation(n)
    if factors is None:
        raise TooLargeValue(f"{text}: {number_text(n)} cannot be factored within the budget")
    return factors


def _check_value_bits(value: int, text: str) -> None:
    if value.bit_length() > MAX_VALUE_BITS:
        raise TooLargeValue(f"{text} has more than {MAX_VALUE_BITS} bits; it is not computed")


def _multiplicative(name: str, k: int, n: int, text: str) -> int:
    """sigma_k(n), phi(n) or mu(n) from the factorisation of n (for n too large to factor blindly)."""
    if name == "sigma" and k * n.bit_length() > MAX_VALUE_BITS:
        raise TooLargeValue(f"{text} at n = {number_text(n)} has more than {MAX_VALUE_BITS} bits; it is not computed")
    factors = _factors_or_refuse(n, text)
    value = 1
    for p, e in factors:
        if name == "sigma":
            value *= e + 1 if k == 0 else (p ** (k * (e + 1)) - 1) // (p**k - 1)
        elif name == "phi":
            value *= (p - 1) * p ** (e - 1)
        else:
            value *= 0 if e > 1 else -1
    return value


def squares(s: int, n: int) -> int | None:
    """r_s(n) for n >= 1 by Jacobi's formulas for s = 1, 2, 4, 8, else None.

    r_2(n) = 4 sum_{d | n} chi_{-4}(d); r_4(n) = 8 sum_{d | n, 4 does not divide d} d;
    r_8(n) = 16 sum_{d | n} (-1)^{n+d} d^3 (Grosswald, Representations of Integers as Sums
    of Squares, Springer 1985, chapters 2, 3 and 9).
    """
    if s == 0:
        return 0
    if s == 1:
        root = math.isqrt(n)
        return 2 if root * root == n else 0
    if s not in (2, 4, 8):
        return None
    factors = _factors_or_refuse(n, f"r_{s}(n)")
    odd = [(p, e) for p, e in factors if p != 2]
    two = next((e for p, e in factors if p == 2), 0)
    if s == 2:
        value = 4
        for p, e in odd:
            if p % 4 == 3:
                if e % 2:
                    return 0
            else:
                value *= e + 1
        return value
    k = 1 if s == 4 else 3
    sigma_odd = 1
    for p, e in odd:
        sigma_odd *= (p ** (k * (e + 1)) - 1) // (p**k - 1)
    if s == 4:
        return 8 * sigma_odd if two == 0 else 24 * sigma_odd
    if two == 0:
        return 16 * sigma_odd
    # n even: sum over d | n of (-1)^d d^3 = sigma_3(n) - 2 sigma_3(odd part of n).
    sigma_n: int = sigma_odd * (2 ** (3 * (two + 1)) - 1) // 7
    return int(16 * (sigma_n - 2 * sigma_odd))
