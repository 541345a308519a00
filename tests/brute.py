"""Brute-force q-series for the tests, independent of qreferee: plain Python integers only.

Each function is schoolbook arithmetic on lists of coefficients, so the tests can compare the
tool's verdicts against values it did not compute.
"""

from __future__ import annotations


def eta_product(exps: dict[int, int], count: int) -> list[int]:
    """Coefficients of q^0..q^(count-1) of prod_delta prod_{k >= 1} (1 - q^{delta k})^{r_delta},
    by repeated multiplication and division by (1 - q^j)."""
    c = [1] + [0] * (count - 1)
    for delta, r in exps.items():
        for j in range(delta, count, delta):
            for _ in range(abs(r)):
                if r > 0:
                    for i in range(count - 1, j - 1, -1):
                        c[i] -= c[i - j]
                else:
                    for i in range(j, count):
                        c[i] += c[i - j]
    return c


def tau_list(count: int) -> list[int]:
    """tau(0..count-1) (tau(0) = 0) from Delta = q prod (1 - q^n)^24 (Jacobi's product formula)."""
    return [0, *eta_product({1: 24}, count - 1)] if count > 1 else [0][:count]
