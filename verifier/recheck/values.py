"""Re-computing values of arithmetic functions (certificates of method ``computation``).

Every function is computed from its definition, by other means than the main engine:
sigma_k, phi and mu from the factorisation of n; tau(n) as a coefficient of Delta = eta^24
(Euler's pentagonal series, schoolbook powers); r_s(n) by counting the integer points on the
sphere, one coordinate at a time; r_Q(n) by counting lattice points; p(n) by the partition
recurrence; overpartitions from eta(2 tau) / eta(tau)^2 (Corteel and Lovejoy,
"Overpartitions", Trans. AMS 356 (2004), §1); coefficients of a form from the re-checker's
own series.  Conventions (docs/method.md#arithmetic-functions): sigma_k(x) = tau(x) =
r_s(x) = p(x) = 0 unless x is a positive integer, r_s(0) = p(0) = 1.
"""

from __future__ import annotations

import math
from fractions import Fraction
from functools import lru_cache
from typing import Any

from verifier.recheck import arith
from verifier.recheck.atoms import TooLarge, eta_quotient, partitions, theta
from verifier.recheck.graded import Unsupported, _gram, _int
from verifier.recheck.series import Series
from verifier.recheck.sexpr import parse

MAX_N = 3000  # the largest argument whose value needs a series (tau, r_s, p, coefficients)
MAX_TERMS = 100_000  # the most terms of a finite sum
MAX_SQUARES = 20_000  # the largest n whose r_s(n) is counted


def kronecker(a: int, n: int) -> int:
    """(a/n) for every integer n: (a/0) = [a = +-1], (a/-1) = sign a, multiplicative in n."""
    if n == 0:
        return 1 if a in (1, -1) else 0
    sign = -1 if n < 0 and a < 0 else 1
    return sign * arith.kronecker(a, abs(n))


@lru_cache(maxsize=4096)
def _squares(s: int, n: int) -> int:
    """#{x in Z^s : x_1^2 + ... + x_s^2 = n}, by the last coordinate."""
    if s == 0:
        return 1 if n == 0 else 0
    total, x = 0, 0
    while x * x <= n:
        total += (1 if x == 0 else 2) * _squares(s - 1, n - x * x)
        x += 1
    return total


class Values:
    """Evaluates arithmetic expressions (the certificate's arithmetic language)."""

    def __init__(self) -> None:
        self._series: dict[str, Series] = {}

    def value(self, tree: Any, env: dict[str, int]) -> Fraction:
        """The exact value of an expression with the variables of ``env``."""
        if isinstance(tree, Fraction):
            return tree
        if not isinstance(tree, list) or not tree or not isinstance(tree[0], str):
            raise Unsupported(f"unreadable arithmetic expression {tree!r}")
        head, args = tree[0], tree[1:]
        if head == "var":
            if args[0] not in env:
                raise ValueError(f"the variable {args[0]} has no value")
            return Fraction(env[args[0]])
        if head in ("+", "-", "*", "/") and len(args) == 2:
            a, b = self.value(args[0], env), self.value(args[1], env)
            if head == "+":
                return a + b
            if head == "-":
                return a - b
            if head == "*":
                return a * b
            return a / b
        if head == "^" and len(args) == 2:
            base, e = self.value(args[0], env), self.value(args[1], env)
            if e.denominator != 1 or abs(e) > 10_000:
                raise Unsupported(f"the power {e} is not a small integer")
            return base ** int(e)
        if head == "sum-divisors" and len(args) == 3:
            x = self.value(args[1], env)
            if x.denominator != 1 or x <= 0:
                return Fraction(0)
            return sum((self.value(args[2], {**env, args[0]: d}) for d in arith.divisors(int(x))), Fraction(0))
        if head == "sum-range" and len(args) == 4:
            lo, hi = self.value(args[1], env), self.value(args[2], env)
            if lo.denominator != 1 or hi.denominator != 1 or hi - lo > MAX_TERMS:
                raise Unsupported("a finite sum with non-integral limits or too many terms")
            return sum((self.value(args[3], {**env, args[0]: m}) for m in range(int(lo), int(hi) + 1)), Fraction(0))
        return self._function(head, args, env)

    def _function(self, head: str, args: list[Any], env: dict[str, int]) -> Fraction:
        x = self.value(args[-1], env)
        integral = x.denominator == 1
        n = int(x) if integral else 0
        if head == "chi" and len(args) == 2:
            return Fraction(kronecker(_int(args[0], "a discriminant"), n)) if integral else Fraction(0)
        if not integral or n < 0:
            return Fraction(0)
        if head == "sigma" and len(args) == 2:
            k = _int(args[0], "the index of sigma")
            if n == 0:
                return Fraction(0)
            if k == 0:
                return Fraction(math.prod(e + 1 for e in arith.factor(n).values()))
            return Fraction(arith.sigma(k, n))
        if head in ("phi", "mu") and len(args) == 1:
            if n == 0:
                return Fraction(0)
            if head == "phi":
                return Fraction(arith.totient(n))
            f = arith.factor(n)
            return Fraction(0 if any(e > 1 for e in f.values()) else (-1) ** len(f))
        if head == "r" and len(args) == 2:
            s = _int(args[0], "the number of squares")
            if s < 0 or s > 64 or n > MAX_SQUARES:
                raise Unsupported(f"r_{s}({n}) is too large for the re-checker")
            return Fraction(_squares(s, n))
        if n > MAX_N:
            raise TooLarge(f"the argument {n} needs more than {MAX_N} coefficients of a series")
        if head == "tau" and len(args) == 1:
            return self._coefficient("tau", lambda prec: eta_quotient([(1, 24)], prec), n)
        if head == "p" and len(args) == 1:
            return self._coefficient("p", partitions, n)
        if head == "pbar" and len(args) == 1:
            return self._coefficient("pbar", lambda prec: eta_quotient([(1, -2), (2, 1)], prec), n)
        if head == "rQ" and len(args) == 2:
            gram = _gram(args[0])
            return self._coefficient(repr(gram), lambda prec: theta(gram, prec), n)
        if head == "coef" and len(args) == 2:
            return self._coefficient(repr(args[0]), lambda prec: _form_series(args[0], prec), n)
        raise Unsupported(f"unknown arithmetic function {head}")

    def _coefficient(self, key: str, build: Any, n: int) -> Fraction:
        have = self._series.get(key)
        if have is None or have.prec <= n:
            have = build(max(2 * n + 2, 16) if n < MAX_N // 2 else n + 1)
            self._series[key] = have
        return have[n]


def _form_series(tree: Any, prec: int) -> Series:
    """The q-expansion of a form expression, known below q^prec."""
    from verifier.recheck.check import side_series

    return side_series(tree, prec)


def recheck_values(cert: dict[str, Any], reasons: list[str], notes: list[str]) -> None:
    """Append to ``reasons`` what does not hold up in a ``computation`` certificate."""
    data = cert["arithmetic"]
    trees = [parse(str(data[s])) for s in ("left", "right")]
    var = data.get("variable")
    env: dict[str, int] = {}
    if var is not None:
        if data.get("n") is None:
            reasons.append("the certificate names a variable but no value for it")
            return
        env[str(var)] = int(data["n"])
    elif data.get("n") is not None:
        reasons.append("the certificate gives a value of n but no variable")
    ev = Values()
    mine = [ev.value(t, env) for t in trees]
    for name, value in zip(("left", "right"), mine, strict=True):
        stated = Fraction(str(data[f"{name}_value"]))
        if stated != value:
            reasons.append(f"{name} side: certificate {data[f'{name}_value']}, recomputed {_text(value)}")
    modulus = cert.get("modulus")
    a, b = mine
    if modulus is not None:
        m = int(modulus)
        diff = a - b
        # a = b (mod m) for rationals: the difference has a numerator divisible by m and a
        # denominator prime to m (common practice).
        equal = diff.numerator % m == 0 and math.gcd(diff.denominator, m) == 1
    else:
        equal = a == b
    relation = cert.get("relation")
    if relation == "=" and not equal:
        what = f" modulo {modulus}" if modulus is not None else ""
        reasons.append(f"the sides are {_text(a)} and {_text(b)}, which differ{what}")
    elif relation == "!=" and equal:
        reasons.append(f"the sides are both {_text(a)}: no difference")
    elif relation not in ("=", "!="):
        reasons.append(f"unknown relation {relation!r}")
    where = f" at {var} = {env[str(var)]}" if var is not None else ""
    notes.append(f"recomputed{where}: left {_text(a)}, right {_text(b)}")


def _text(x: Fraction) -> str:
    return str(x.numerator) if x.denominator == 1 else f"{x.numerator}/{x.denominator}"
