#!/usr/bin/env python
"""Speed benchmarks for qreferee, reported as ratios against same-process baselines.

    python bench/run.py            # sizes 10^3, 10^4, 10^5; large manuscript
    python bench/run.py --quick    # sizes 10^3, 10^4; smaller manuscript (about 30 s)

Sections (see bench/README.md for what each figure means):

1. q-series engine: the same arithmetic done by ``verifier.series.QSeries``, by
   python-flint directly (the floor) and by schoolbook pure Python.  All three must
   agree coefficient for coefficient before any figure is printed.
2. Scan and parse throughput on a synthetic manuscript generated in memory, against
   one ``re.finditer`` pass over the claim tags.
3. The whole pipeline (``verifier.api.check_text``) on a synthetic manuscript, when
   that entry point is importable.

Nothing here is a pass/fail threshold: absolute seconds depend on the machine, the
ratios are what to compare between runs.  The script exits non-zero only when a
result is wrong (the implementations disagree, a claim fails to parse) or a section
crashes.
"""

from __future__ import annotations

import argparse
import gc
import random
import re
import sys
import time
import traceback
from collections.abc import Callable
from dataclasses import dataclass
from fractions import Fraction
from pathlib import Path
from typing import Any

# Make ``import verifier`` work from a plain checkout too (the venv has it editable).
_REPO = Path(__file__).resolve().parent.parent
if str(_REPO) not in sys.path:
    sys.path.insert(0, str(_REPO))

from flint import fmpq, fmpq_poly, fmpz, fmpz_poly  # noqa: E402
from verifier.forms.delta import delta_series  # noqa: E402
from verifier.forms.eisenstein import eisenstein_series  # noqa: E402
from verifier.series.qseries import QSeries  # noqa: E402

perf = time.perf_counter


class Mismatch(AssertionError):
    """Two implementations disagree on a coefficient: a correctness failure."""


class OverBudget(Exception):
    """The pure-Python baseline ran past its time budget."""


# ---------------------------------------------------------------------------------
# Timing helpers
# ---------------------------------------------------------------------------------


def run_once(fn: Callable[[], Any]) -> tuple[Any, float]:
    """Run ``fn`` once with the garbage collector off; return (result, seconds)."""
    gc.collect()
    gc.disable()
    try:
        t0 = perf()
        result = fn()
        return result, perf() - t0
    finally:
        gc.enable()


def best_time(fn: Callable[[], Any], first: float, min_total: float, max_runs: int) -> float:
    """Best of several runs; ``first`` is the time of a run already made.

    Repeats only while the runs so far took less than ``min_total`` seconds, so slow
    cases are timed once and fast ones several times.
    """
    best, total, runs = first, first, 1
    while total < min_total and runs < max_runs:
        _, t = run_once(fn)
        best = min(best, t)
        total += t
        runs += 1
    return best


def best_pair(
    fa: Callable[[], Any], first_a: float, fb: Callable[[], Any], first_b: float, min_total: float, max_runs: int
) -> tuple[float, float]:
    """Like :func:`best_time` for two functions, alternating their runs so that a change
    in machine load during the measurement affects both alike."""
    best_a, best_b, total, runs = first_a, first_b, first_a + first_b, 1
    while total < min_total and runs < max_runs:
        _, ta = run_once(fa)
        _, tb = run_once(fb)
        best_a, best_b = min(best_a, ta), min(best_b, tb)
        total += ta + tb
        runs += 1
    return best_a, best_b


def fmt_s(t: float | None) -> str:
    if t is None:
        return "skipped"
    if t >= 100:
        return f"{t:.0f}"
    if t >= 1:
        return f"{t:.2f}"
    if t >= 0.01:
        return f"{t:.3f}"
    return f"{t:.2e}"


def fmt_ratio(r: float | None) -> str:
    if r is None:
        return "-"
    if r >= 100:
        return f"{r:.0f}x"
    if r >= 10:
        return f"{r:.1f}x"
    return f"{r:.2f}x"


# ---------------------------------------------------------------------------------
# Section 1: the three implementations of the same series arithmetic
# ---------------------------------------------------------------------------------
#
# Every workload returns a dict  name -> value; each value is turned into a window
# (the coefficients of q^lo .. q^(hi-1) as an fmpq_poly) outside the timed region and
# the windows of the three implementations are compared with ==.

# Known values, independent of all three implementations.
TAU = {1: 1, 2: -24, 3: 252, 4: -1472, 5: 4830, 6: -6048, 7: -16744}
J_COEFFS = {-1: 1, 0: 744, 1: 196884, 2: 21493760, 3: 864299970}


def window_series(s: QSeries, lo: int, hi: int) -> Any:
    """Coefficients of q^lo .. q^(hi-1) of an engine series."""
    if s.prec < hi:
        raise Mismatch(f"engine series known only below q^{s.prec}, needed below q^{hi}")
    if s.offset < lo:
        raise Mismatch(f"engine series has a term q^{s.offset} below the expected start q^{lo}")
    p = s.poly.left_shift(s.offset - lo) if s.offset > lo else s.poly
    return p.truncate(hi - lo)


def window_poly(p: Any, origin: int, lo: int, hi: int) -> Any:
    """Coefficients of q^lo .. q^(hi-1) of a flint polynomial whose x^0 stands for q^origin."""
    if origin > lo:
        p = p.left_shift(origin - lo)
    elif origin < lo:
        p = p.right_shift(lo - origin)
    return fmpq_poly(p).truncate(hi - lo)


def window_list(c: list[Any], origin: int, lo: int, hi: int) -> Any:
    """Coefficients of q^lo .. q^(hi-1) of a list whose entry 0 stands for q^origin."""
    if len(c) + origin < hi:
        raise Mismatch(f"pure-Python list known only below q^{len(c) + origin}, needed below q^{hi}")
    if any(isinstance(x, Fraction) for x in c):
        poly = fmpq_poly([fmpq(x.numerator, x.denominator) if isinstance(x, Fraction) else fmpq(x) for x in c])
    else:
        poly = fmpq_poly(fmpz_poly(c))
    return window_poly(poly, origin, lo, hi)


def compare(name: str, size: int, windows: dict[str, dict[str, Any]]) -> None:
    """All implementations present in ``windows`` must give identical coefficients."""
    impls = list(windows)
    ref = impls[0]
    for other in impls[1:]:
        for key, want in windows[ref].items():
            got = windows[other][key]
            if got != want:
                n = next((i for i in range(max(want.length(), got.length())) if got[i] != want[i]), None)
                raise Mismatch(f"{name} at size {size}: {other} and {ref} differ in {key} (first at index {n})")


# -- engine --------------------------------------------------------------------------


def engine_build(n: int) -> dict[str, QSeries]:
    return {
        "E4": eisenstein_series(4, n),
        "E6": eisenstein_series(6, n),
        "E12": eisenstein_series(12, n),
        "D": delta_series(n),
    }


def engine_eisenstein(x: dict[str, QSeries]) -> dict[str, QSeries]:
    e43 = x["E4"] ** 3
    e62 = x["E6"] ** 2
    diff = e43 - e62
    return {
        "E4^3-E6^2": diff,
        "E4^3-E6^2-1728D": diff - x["D"].scale(1728),
        "441E4^3+250E6^2-691E12": e43.scale(441) + e62.scale(250) - x["E12"].scale(691),
    }


def engine_delta(x: dict[str, QSeries]) -> dict[str, QSeries]:
    d = x["D"]
    return {"D^2": d**2, "D^3": d**3, "E4*D": x["E4"] * d}


def engine_j(x: dict[str, QSeries]) -> dict[str, QSeries]:
    return {"j": x["E4"] ** 3 / x["D"]}


# -- python-flint directly -------------------------------------------------------------


def _pentagonal(n: int) -> list[int]:
    """prod_{m>=1} (1 - q^m) mod q^n, coefficient list (Euler's pentagonal theorem)."""
    c = [0] * n
    k = 0
    while k * (3 * k - 1) // 2 < n:
        sign = -1 if k % 2 else 1
        for e in {k * (3 * k - 1) // 2, k * (3 * k + 1) // 2}:
            if e < n:
                c[e] = sign
        k += 1
    return c


def flint_build(n: int) -> dict[str, Any]:
    def sigma(r: int) -> Any:
        return fmpz_poly([0] + [fmpz(m).divisor_sigma(r) for m in range(1, n)])

    one = fmpz_poly([1])
    euler = fmpz_poly(_pentagonal(n - 1))
    return {
        "E4": 240 * sigma(3) + one,
        "E6": -504 * sigma(5) + one,
        "691E12": 65520 * sigma(11) + 691 * one,  # 691*E_12 has integer coefficients
        "D": euler.pow_trunc(24, n - 1).left_shift(1),
    }  # Delta = q prod (1-q^m)^24


def flint_eisenstein(x: dict[str, Any], n: int) -> dict[str, Any]:
    e43 = x["E4"].pow_trunc(3, n)
    e62 = x["E6"].mul_low(x["E6"], n)
    diff = e43 - e62
    return {
        "E4^3-E6^2": diff,
        "E4^3-E6^2-1728D": diff - 1728 * x["D"],
        "441E4^3+250E6^2-691E12": 441 * e43 + 250 * e62 - x["691E12"],
    }


def flint_delta(x: dict[str, Any], n: int) -> dict[str, Any]:
    d = x["D"]
    return {"D^2": d.mul_low(d, n), "D^3": d.pow_trunc(3, n), "E4*D": x["E4"].mul_low(d, n)}


def flint_inverse(f: Any, n: int) -> Any:
    """1/f mod x^n for an integer f with f(0) = 1, by Newton iteration g <- g(2 - fg)."""
    g = fmpz_poly([1])
    two = fmpz_poly([2])
    k = 1
    while k < n:
        k = min(2 * k, n)
        g = g.mul_low(two - f.mul_low(g, k), k)
    return g


def flint_j(x: dict[str, Any], n: int) -> dict[str, Any]:
    # j = E4^3 / Delta = q^-1 * E4^3 / (Delta/q); Delta/q is known to n - 1 terms.
    m = n - 1
    e43 = x["E4"].pow_trunc(3, m)
    return {"j": e43.mul_low(flint_inverse(x["D"].right_shift(1), m), m)}


# -- pure Python -----------------------------------------------------------------------


def py_mul(a: list[Any], b: list[Any], n: int, deadline: float) -> list[Any]:
    """The first ``n`` coefficients of a*b: schoolbook convolution, skipping zeros of a."""
    c: list[Any] = [0] * n
    lb = len(b)
    for i in range(min(len(a), n)):
        ai = a[i]
        if not ai:
            continue
        if perf() > deadline:
            raise OverBudget
        for j in range(min(lb, n - i)):
            c[i + j] += ai * b[j]
    return c


def py_inverse(a: list[Any], n: int, deadline: float) -> list[Any]:
    """The first ``n`` coefficients of 1/a (a[0] != 0): b_m = -(sum_{k>=1} a_k b_{m-k}) / a_0."""
    inv0: Any = Fraction(1) / a[0]
    if inv0.denominator == 1:
        inv0 = int(inv0)
    b = [inv0]
    la = len(a)
    for m in range(1, n):
        if perf() > deadline:
            raise OverBudget
        s = 0
        for k in range(1, min(m, la - 1) + 1):
            s += a[k] * b[m - k]
        b.append(-s * inv0)
    return b


def py_bernoulli(k: int) -> Fraction:
    """B_k with B_1 = -1/2, from sum_{j<=m} C(m+1, j) B_j = 0."""
    bs = [Fraction(1)]
    for m in range(1, k + 1):
        s = Fraction(0)
        binom = 1
        for j in range(m):
            s += binom * bs[j]
            binom = binom * (m + 1 - j) // (j + 1)
        bs.append(-s / (m + 1))
    return bs[k]


def py_sigma(r: int, n: int) -> list[int]:
    """[0, sigma_r(1), ..., sigma_r(n-1)] by a divisor sieve."""
    s = [0] * n
    for d in range(1, n):
        dr = d**r
        for m in range(d, n, d):
            s[m] += dr
    return s


def py_eisenstein_list(k: int, n: int) -> list[Any]:
    c = Fraction(-2 * k) / py_bernoulli(k)
    coef: Any = int(c) if c.denominator == 1 else c
    return [1] + [coef * s for s in py_sigma(k - 1, n)[1:]]


def py_build(n: int, deadline: float) -> dict[str, list[Any]]:
    euler = _pentagonal(n - 1)
    body = [1] + [0] * (n - 2)
    for _ in range(24):  # multiplying by the sparse Euler product beats squaring dense lists
        body = py_mul(euler, body, n - 1, deadline)
    return {
        "E4": py_eisenstein_list(4, n),
        "E6": py_eisenstein_list(6, n),
        "E12": py_eisenstein_list(12, n),
        "D": [0, *body],
    }


def py_eisenstein(x: dict[str, list[Any]], n: int, deadline: float) -> dict[str, list[Any]]:
    e4, e6 = x["E4"], x["E6"]
    e43 = py_mul(py_mul(e4, e4, n, deadline), e4, n, deadline)
    e62 = py_mul(e6, e6, n, deadline)
    diff = [a - b for a, b in zip(e43, e62, strict=True)]
    return {
        "E4^3-E6^2": diff,
        "E4^3-E6^2-1728D": [a - 1728 * d for a, d in zip(diff, x["D"], strict=True)],
        "441E4^3+250E6^2-691E12": [441 * a + 250 * b - 691 * c for a, b, c in zip(e43, e62, x["E12"], strict=True)],
    }


def py_delta(x: dict[str, list[Any]], n: int, deadline: float) -> dict[str, list[Any]]:
    d = x["D"]
    d2 = py_mul(d, d, n, deadline)
    return {"D^2": d2, "D^3": py_mul(d2, d, n, deadline), "E4*D": py_mul(d, x["E4"], n, deadline)}


def py_j(x: dict[str, list[Any]], n: int, deadline: float) -> dict[str, list[Any]]:
    m = n - 1
    e4 = x["E4"]
    e43 = py_mul(py_mul(e4, e4, m, deadline), e4, m, deadline)
    inv = py_inverse(x["D"][1:], m, deadline)
    return {"j": py_mul(inv, e43, m, deadline)}


# -- the workloads ------------------------------------------------------------------------


@dataclass
class Workload:
    label: str
    # name -> (lo, hi) window of each output, as a function of the size n
    windows: Callable[[int], dict[str, tuple[int, int]]]
    engine: Callable[[Any, int], Any]
    flint: Callable[[Any, int], Any]
    pure: Callable[[Any, int, float], Any]
    # name -> origin (exponent of entry 0) of flint / pure outputs
    origins: Callable[[int], dict[str, int]]


def _w_full(names: tuple[str, ...]) -> Callable[[int], dict[str, tuple[int, int]]]:
    return lambda n: {k: (0, n) for k in names}


WORKLOADS = [
    Workload(
        "(0) build E4,E6,E12,D",
        _w_full(("E4", "E6", "D")),
        lambda x, n: engine_build(n),
        lambda x, n: flint_build(n),
        lambda x, n, dl: py_build(n, dl),
        lambda n: {"E4": 0, "E6": 0, "D": 0},
    ),
    Workload(
        "(a) E4^3-E6^2, E12 rel",
        _w_full(("E4^3-E6^2", "E4^3-E6^2-1728D", "441E4^3+250E6^2-691E12")),
        lambda x, n: engine_eisenstein(x),
        flint_eisenstein,
        py_eisenstein,
        lambda n: dict.fromkeys(("E4^3-E6^2", "E4^3-E6^2-1728D", "441E4^3+250E6^2-691E12"), 0),
    ),
    Workload(
        "(b) D^2, D^3, E4*D",
        _w_full(("D^2", "D^3", "E4*D")),
        lambda x, n: engine_delta(x),
        flint_delta,
        py_delta,
        lambda n: {"D^2": 0, "D^3": 0, "E4*D": 0},
    ),
    Workload(
        "(c) j = E4^3/D", lambda n: {"j": (-1, n - 2)}, lambda x, n: engine_j(x), flint_j, py_j, lambda n: {"j": -1}
    ),
]


def windows_of(
    outputs: dict[str, Any], want: dict[str, tuple[int, int]], origins: dict[str, int] | None, kind: str
) -> dict[str, Any]:
    out = {}
    for key, (lo, hi) in want.items():
        value = outputs[key]
        if kind == "engine":
            out[key] = window_series(value, lo, hi)
        elif kind == "flint":
            assert origins is not None
            out[key] = window_poly(value, origins[key], lo, hi)
        else:
            assert origins is not None
            out[key] = window_list(value, origins[key], lo, hi)
    return out


def known_values(size: int, engine_out: dict[str, dict[str, Any]]) -> None:
    """Checks against published values, independent of the three implementations."""
    d = engine_out["(0) build E4,E6,E12,D"]["D"]
    for m, t in TAU.items():
        if m < size and d[m] != t:
            raise Mismatch(f"tau({m}) = {d[m]}, expected {t}")
    diff = engine_out["(a) E4^3-E6^2, E12 rel"]
    for key in ("E4^3-E6^2-1728D", "441E4^3+250E6^2-691E12"):
        if not diff[key].is_zero():
            raise Mismatch(f"{key} is not 0 to q^{size}")
    j = engine_out["(c) j = E4^3/D"]["j"]
    for m, c in J_COEFFS.items():
        if m < j.prec and j[m] != c:
            raise Mismatch(f"j coefficient of q^{m} is {j[m]}, expected {c}")


def section_engine(sizes: list[int], pure_budget: float, pure_total: float, min_total: float) -> list[tuple[Any, ...]]:
    print("== 1. q-series engine vs python-flint directly vs pure Python ==")
    print("   (all three agree coefficient for coefficient before any time is printed;")
    print(f"    pure Python is skipped where it would run past {pure_budget:g} s, predicted from the")
    print(
        "    previous size by quadratic scaling, or where it actually runs past that"
        + (f";\n    at most {pure_total:g} s of pure Python in all)" if pure_total < float("inf") else ")")
    )
    header = (
        f"{'size':>7}  {'workload':<24}{'engine s':>10}{'flint s':>10}{'eng/flint':>10}"
        f"{'pure-py s':>11}{'pure/eng':>10}"
    )
    print(header)
    print("-" * len(header))
    rows: list[tuple[Any, ...]] = []
    pure_last: dict[str, tuple[int, float]] = {}
    pure_dead: set[str] = set()
    pure_spent = 0.0
    for n in sizes:
        engine_inputs: Any = None
        flint_inputs: Any = None
        pure_inputs: Any = None
        engine_outputs: dict[str, dict[str, Any]] = {}
        for w in WORKLOADS:
            want = w.windows(n)
            origins = w.origins(n)

            def e_fn(w: Workload = w, x: Any = engine_inputs, n: int = n) -> Any:
                return w.engine(x, n)

            def f_fn(w: Workload = w, x: Any = flint_inputs, n: int = n) -> Any:
                return w.flint(x, n)

            e_out, e_first = run_once(e_fn)
            f_out, f_first = run_once(f_fn)
            windows = {
                "engine": windows_of(e_out, want, None, "engine"),
                "flint": windows_of(f_out, want, origins, "flint"),
            }
            compare(w.label, n, windows)  # before any repeated timing
            engine_outputs[w.label] = e_out
            t_e, t_f = best_pair(e_fn, e_first, f_fn, f_first, 2 * min_total, 25)

            if w.label.startswith("(0)"):
                engine_inputs, flint_inputs = e_out, f_out
                # The pure-Python inputs are the flint ones as Python numbers, so a skipped
                # pure build does not block the later pure workloads.
                pure_inputs = {
                    "E4": [int(c) for c in f_out["E4"].coeffs()],
                    "E6": [int(c) for c in f_out["E6"].coeffs()],
                    "E12": [Fraction(int(c), 691) for c in f_out["691E12"].coeffs()],
                    "D": [int(c) for c in f_out["D"].coeffs()],
                }
                for key in ("E4", "E6", "D"):
                    pure_inputs[key] += [0] * (n - len(pure_inputs[key]))

            t_p: float | None = None
            prev = pure_last.get(w.label)
            predicted = prev[1] * (n / prev[0]) ** 2 if prev else 0.0
            allowed = min(pure_budget, pure_total - pure_spent)
            if w.label not in pure_dead and predicted <= allowed:
                try:
                    t_start = perf()
                    p_out, t_p = run_once(lambda w=w, x=pure_inputs, n=n, a=allowed: w.pure(x, n, perf() + a))
                except OverBudget:
                    pure_dead.add(w.label)
                    t_p = None
                else:
                    windows["pure"] = windows_of(p_out, want, origins, "pure")
                    compare(w.label, n, windows)
                    pure_last[w.label] = (n, t_p)
                    del p_out
                finally:
                    pure_spent += perf() - t_start
            else:
                pure_dead.add(w.label)
            r_ef = t_e / t_f if t_f > 0 else None
            r_pe = t_p / t_e if t_p is not None and t_e > 0 else None
            print(
                f"{n:>7}  {w.label:<24}{fmt_s(t_e):>10}{fmt_s(t_f):>10}{fmt_ratio(r_ef):>10}"
                f"{fmt_s(t_p):>11}{fmt_ratio(r_pe):>10}",
                flush=True,
            )
            rows.append((n, w.label, t_e, t_f, t_p))
            del e_out, f_out, windows
        known_values(n, engine_outputs)
        engine_inputs = flint_inputs = pure_inputs = None  # free the large series before the next size
        engine_outputs = {}
    return rows


# ---------------------------------------------------------------------------------
# Section 2: scan and parse a large synthetic manuscript
# ---------------------------------------------------------------------------------

PREAMBLE = r"""\documentclass{article}
\usepackage{amsmath}
\newcommand{\Eis}[1]{E_{#1}}
\newcommand{\disc}{\Delta}
\newcommand{\cusp}[1][12]{\Delta}
\newcommand{\jinv}{\frac{E_4^3}{\Delta}}
\begin{document}
"""

WORDS = (
    "the",
    "form",
    "modular",
    "weight",
    "level",
    "space",
    "we",
    "observe",
    "that",
    "series",
    "coefficient",
    "expansion",
    "identity",
    "follows",
    "from",
    "dimension",
    "cusp",
    "Hecke",
    "operator",
    "eigenform",
    "hence",
    "by",
    "comparing",
    "terms",
    "so",
    "is",
    "a",
    "of",
    "in",
)


def _sigma(r: int, m: int) -> int:
    return sum(d**r for d in range(1, m + 1) if m % d == 0)


def _expansion(k: int, terms: int, tail: str, rng: random.Random) -> str:
    const = {4: 240, 6: -504, 8: 480, 10: -264}[k]
    parts = ["1"]
    for m in range(1, terms):
        c = const * _sigma(k - 1, m)
        parts.append(
            f"{'-' if c < 0 else '+'} {abs(c)}q" + (f"^{m}" if m < 10 and m > 1 else f"^{{{m}}}" if m >= 10 else "")
        )
    macro = rng.random() < 0.3
    name = f"\\Eis{{{k}}}" if macro else (f"E_{k}" if k < 10 else f"E_{{{k}}}")
    end = r"\cdots" if tail == "dots" else f"O(q^{{{terms}}})"
    return f"{name} = {' '.join(parts)} + {end}"


def _claim_rows(rng: random.Random) -> list[str]:
    """One to four rows of identities (mostly true, as a manuscript would have)."""
    pool = [
        lambda: "E_4^2 = E_8",
        lambda: r"\Eis{4}\Eis{6} = \Eis{10}",
        lambda: "E_6 E_8 = E_{14}",
        lambda: "E_4 E_{10} = E_{14}",
        lambda: "691E_{12} = 441E_4^3 + 250E_6^2",
        lambda: r"E_4^3 - E_6^2 = 1728\Delta",
        lambda: r"\frac{1}{1728}\left(\Eis{4}^3 - \Eis{6}^2\right) = \disc",
        lambda: r"\Delta = q - 24q^2 + 252q^3 - 1472q^4 + 4830q^5 + O(q^6)",
        lambda: r"\jinv = q^{-1} + 744 + 196884q + O(q^2)",
        lambda: r"E_4 \cdot \disc = q + 216q^2 + O(q^3)",
        lambda: _expansion(rng.choice((4, 6, 8, 10)), rng.randint(3, 12), rng.choice(("dots", "O")), rng),
    ]
    return [rng.choice(pool)() for _ in range(rng.choice((1, 1, 1, 2, 3, 4)))]


def _prose(rng: random.Random) -> str:
    out = []
    for _ in range(rng.randint(1, 3)):
        words = [rng.choice(WORDS) for _ in range(rng.randint(30, 90))]
        words[0] = words[0].capitalize()
        for _ in range(rng.randint(0, 3)):
            words.insert(
                rng.randrange(len(words)),
                rng.choice(
                    (
                        "$E_4$",
                        "$\\Delta(\\tau)$",
                        "$q = e^{2\\pi i\\tau}$",
                        "$M_k(\\mathrm{SL}_2(\\mathbb{Z}))$",
                        "100\\%",
                    )
                ),
            )
        out.append(" ".join(words) + ".")
        if rng.random() < 0.15:
            out.append("% an ordinary comment, not a tag")
        if rng.random() < 0.1:  # an untagged display the scanner must skip
            out.append("\\begin{equation}\n  \\dim M_{12} = 2\n\\end{equation}")
    return "\n\n".join(out)


def synthetic_manuscript(claims: int, seed: int = 12) -> tuple[str, int, int]:
    """A LaTeX manuscript with ``claims`` tagged blocks; returns (text, blocks, rows)."""
    rng = random.Random(seed)
    parts = [PREAMBLE]
    total_rows = 0
    for i in range(claims):
        if i % 50 == 0:
            parts.append(f"\\section{{Part {i // 50 + 1}}}\n")
        parts.append(_prose(rng))
        rows = _claim_rows(rng)
        total_rows += len(rows)
        opts = rng.choice(("", "", f" name=c{i}"))
        if len(rows) == 1 and rng.random() < 0.6:
            env = rng.choice(("equation", "equation*"))
            end = rng.choice(("", ".", ",", f" \\label{{eq:{i}}}"))
            body = f"  {rows[0]}{end}"
        else:
            env = rng.choice(("align", "align*"))
            body = " \\\\\n".join("  " + r.replace(" = ", " &= ", 1) for r in rows)
            if rng.random() < 0.3:
                body += r" \nonumber"
        parts.append(f"%@claim{opts}\n\\begin{{{env}}}\n{body}\n\\end{{{env}}}")
    parts.append("\\end{document}\n")
    return "\n\n".join(parts), claims, total_rows


TAG_BASELINE = re.compile(r"^[ \t]*%@claim(?![A-Za-z]).*$", re.M)


def regex_baseline(text: str) -> int:
    return sum(1 for _ in TAG_BASELINE.finditer(text))


def scan_and_parse(text: str, cold: bool = False) -> tuple[int, int, int, float, float]:
    """(blocks, rows, parse failures, scan seconds, parse seconds).

    ``cold``: every row is parsed afresh, bypassing the per-process memo of parses (a manuscript
    whose rows are all distinct); otherwise repeated rows are parsed once, as in a real run.
    """
    from verifier.parse import grammar
    from verifier.parse.grammar import ParseFailure, parse_claim
    from verifier.scan import scan_text
    from verifier.scan.document import ClaimBlock

    grammar._parse_memo.cache_clear()
    gc.collect()
    gc.disable()
    try:
        t0 = perf()
        doc = scan_text(text, "synthetic.tex")
        t1 = perf()
        blocks = rows = failures = 0
        for item in doc.items:
            if isinstance(item, ClaimBlock):
                blocks += 1
                for row in item.rows:
                    rows += 1
                    parsed = (
                        grammar._parse_text(row.text.text, "relation", frozenset())
                        if cold
                        else parse_claim(row.text.text)
                    )
                    if isinstance(parsed, ParseFailure):
                        failures += 1
        t2 = perf()
    finally:
        gc.enable()
    return blocks, rows, failures, t1 - t0, t2 - t1


def section_scan(claim_counts: list[int]) -> bool:
    from verifier.parse.grammar import parse_claim

    print("\n== 2. scan + parse throughput on a synthetic manuscript ==")
    print("   (ratio = scan+parse seconds / one re.finditer pass over the %@claim tags, same text;")
    print("    cold/s = claims per second with every row parsed afresh, as if no two rows were alike)")
    parse_claim("E_4^2 = E_8")  # build the parser once, outside the timings
    header = (
        f"{'blocks':>7}{'rows':>7}{'MB':>7}{'scan s':>9}{'parse s':>9}{'claims/s':>10}"
        f"{'cold/s':>9}{'MB/s':>8}{'regex s':>10}{'vs regex':>10}"
    )
    print(header)
    print("-" * len(header))
    ok = True
    per_claim: list[float] = []
    for count in claim_counts:
        text, want_blocks, want_rows = synthetic_manuscript(count)
        mb = len(text.encode("utf-8")) / 1e6
        tags, t_re_first = run_once(lambda text=text: regex_baseline(text))
        t_re = best_time(lambda text=text: regex_baseline(text), t_re_first, 0.05, 20)
        blocks, rows, failures, t_scan, t_parse = scan_and_parse(text)
        total = t_scan + t_parse
        _, _, _, t_scan_cold, t_parse_cold = scan_and_parse(text, cold=True)
        cold = rows / (t_scan_cold + t_parse_cold)
        if tags != want_blocks or blocks != want_blocks or rows != want_rows or failures:
            ok = False
            print(
                f"   WRONG: generated {want_blocks} blocks / {want_rows} rows; regex saw {tags} tags, "
                f"scanner {blocks} blocks / {rows} rows, {failures} rows failed to parse"
            )
        print(
            f"{blocks:>7}{rows:>7}{mb:>7.2f}{fmt_s(t_scan):>9}{fmt_s(t_parse):>9}{rows / total:>10.0f}"
            f"{cold:>9.0f}{mb / total:>8.2f}{fmt_s(t_re):>10}{fmt_ratio(total / t_re):>10}",
            flush=True,
        )
        per_claim.append(total / rows)
    if len(per_claim) > 1:
        growth = per_claim[-1] / per_claim[0]
        print(
            f"   time per claim grows {growth:.2f}x from {claim_counts[0]} to {claim_counts[-1]} blocks "
            f"(1.00x = linear scaling)"
        )
    return ok


# ---------------------------------------------------------------------------------
# Section 3: the whole pipeline
# ---------------------------------------------------------------------------------


def section_pipeline(claims: int) -> bool:
    print("\n== 3. whole pipeline: verifier.api.check_text on a synthetic manuscript ==")
    try:
        from verifier.api import check_text
    except ImportError as exc:
        # TODO: enable once verifier.api.check_text exists; nothing to time until then.
        print(f"   TODO: verifier.api.check_text is not importable yet ({exc}); section skipped")
        return True
    text, _, want_rows = synthetic_manuscript(claims, seed=34)
    mb = len(text.encode("utf-8")) / 1e6
    tags, t_re_first = run_once(lambda: regex_baseline(text))
    t_re = best_time(lambda: regex_baseline(text), t_re_first, 0.05, 20)
    _, _, _, t_scan, t_parse = scan_and_parse(text)
    report, t_all = run_once(lambda: check_text(text, "synthetic.tex"))
    results = getattr(report, "claims", None)
    summary = getattr(report, "summary", None)
    n_results = len(results) if results is not None else 0
    header = f"{'blocks':>7}{'results':>9}{'MB':>7}{'total s':>9}{'claims/s':>10}{'vs scan+parse':>15}{'vs regex':>10}"
    print(header)
    print("-" * len(header))
    per_s = n_results / t_all if t_all > 0 and n_results else 0.0
    print(
        f"{tags:>7}{n_results:>9}{mb:>7.2f}{fmt_s(t_all):>9}{per_s:>10.0f}"
        f"{fmt_ratio(t_all / (t_scan + t_parse)):>15}{fmt_ratio(t_all / t_re):>10}",
        flush=True,
    )
    if summary is not None:
        print(f"   verdicts: {summary}  (the generator writes {want_rows} rows; a row holds one or more claims)")
    return True


def _flint_eta(exps: dict[int, int], n: int) -> Any:
    """prod_delta prod_m (1 - q^(delta m))^r mod q^n, straight in python-flint (the baseline)."""
    base = fmpz_poly(_pentagonal(n))
    inv = flint_inverse(base, n)
    out = fmpz_poly([1])
    for delta, r in exps.items():
        factor = (base if r > 0 else inv).truncate((n - 1) // delta + 1)
        out = out.mul_low(factor.inflate(delta).pow_trunc(abs(r), n), n)
    return out


def section_level(quick: bool) -> bool:
    print("\n== 4. a level-N eta-quotient identity: the whole pipeline vs the same series in python-flint ==")
    from verifier.api import check_text

    # Jacobi's identity theta_3^4 = theta_2^4 + theta_4^4 in eta form (Whittaker-Watson, Ch. XXI;
    # docs/method.md#theta-nome), with tau -> d tau so that it
    # lives on Gamma_0(4d), raised to the power e: weight 2e, Sturm bound floor(2e m_0(4d)/12).
    cases = [(250, 1), (300, 3)] if quick else [(250, 1), (300, 3), (1000, 3)]
    check_text("%@claim\n\\[ E_4^2 = E_8 \\]\n", "warm-up.tex")  # grammar and imports, once
    header = f"{'level':>7}{'weight':>8}{'bound':>7}{'pipeline s':>12}{'flint s':>10}{'pipeline/flint':>16}  verdict"
    print(header)
    print("-" * len(header))
    for d, e in cases:
        lhs = f"\\theta({d}\\tau)^{{{4 * e}}}"
        first_term = f"\\frac{{\\eta({d}\\tau)^8}}{{\\eta({2 * d}\\tau)^4}}"
        term = f"{first_term} + 16\\frac{{\\eta({4 * d}\\tau)^8}}{{\\eta({2 * d}\\tau)^4}}"
        text = f"%@claim\n\\[ {lhs} = \\left({term}\\right)^{{{e}}} \\]\n"
        report, first = run_once(lambda text=text: check_text(text, "level.tex"))
        t_pipe = best_time(lambda text=text: check_text(text, "level.tex"), first, 0.2, 5)
        claim = report.claims[0]
        bound = claim.outcome.bound or 0
        n = bound + 1

        def baseline(d: int = d, e: int = e, n: int = n) -> bool:
            theta = _flint_eta({2 * d: 5, d: -2, 4 * d: -2}, n).pow_trunc(4 * e, n)
            a = _flint_eta({d: 8, 2 * d: -4}, n)
            b = _flint_eta({4 * d: 8, 2 * d: -4}, n)
            b = fmpz_poly([0] * d + [16 * c for c in b.coeffs()]).truncate(n)  # q^d offset of the second term
            return bool(theta == (a + b).pow_trunc(e, n))

        same, first_flint = run_once(baseline)
        t_flint = best_time(baseline, first_flint, 0.2, 5)
        if not same:
            raise Mismatch(f"level {4 * d}: the baseline does not confirm the identity")
        weight = claim.outcome.space["weight"] if claim.outcome.space else "?"
        print(
            f"{4 * d:>7}{weight:>8}{bound:>7}{fmt_s(t_pipe):>12}{fmt_s(t_flint):>10}"
            f"{fmt_ratio(t_pipe / t_flint):>16}  {claim.verdict}",
            flush=True,
        )
        if claim.verdict != "proved":
            raise Mismatch(f"level {4 * d}: expected proved, got {claim.verdict}: {claim.outcome.message}")
    return True


# ---------------------------------------------------------------------------------
# Section 5: start-up, one heavy claim beside light ones, and several processes
# ---------------------------------------------------------------------------------


def _jacobi(d: int) -> str:
    """theta(d tau)^4 in eta form (Jacobi's four squares, Rademacher, Topics, ch. 7)."""
    return f"\\frac{{\\eta({2 * d}\\tau)^{{20}}}}{{\\eta({d}\\tau)^8\\eta({4 * d}\\tau)^8}}"


def _mixed_claim(d: int, e: int) -> str:
    """(theta(tau) theta(d tau))^(4e) against its eta form: weight 4e on Gamma_0(4d), real work."""
    rhs = f"\\left({_jacobi(1)}\\right)^{{{e}}}\\left({_jacobi(d)}\\right)^{{{e}}}"
    return f"%@claim\n\\[ \\theta(\\tau)^{{{4 * e}}}\\theta({d}\\tau)^{{{4 * e}}} = {rhs} \\]\n"


def _folder_manuscript(i: int, quick: bool) -> str:
    """Manuscript i of the folder: ordinary claims plus level-N identities of its own."""
    text, _, _ = synthetic_manuscript(30 if quick else 60, seed=500 + i)
    levels = (211 + 10 * i, 223 + 10 * i) if quick else (401 + 10 * i, 409 + 10 * i, 419 + 10 * i)
    extra = "".join(_mixed_claim(d, 2 if quick else 3) for d in levels)
    return text.replace("\\end{document}", extra + "\\end{document}")


_LAST_CPU = 0.0  # CPU seconds of the last _run_cli process and its workers


def _children_cpu() -> float:
    import resource

    usage = resource.getrusage(resource.RUSAGE_CHILDREN)
    return usage.ru_utime + usage.ru_stime


def _run_cli(args: list[str], env: dict[str, str]) -> tuple[float, str]:
    """Wall seconds of one ``python -m verifier ARGS`` process, and its standard output."""
    import subprocess

    global _LAST_CPU
    cpu0, t0 = _children_cpu(), perf()
    done = subprocess.run([sys.executable, "-m", "verifier", *args], capture_output=True, text=True, env=env)
    wall = perf() - t0
    _LAST_CPU = _children_cpu() - cpu0
    if done.returncode not in (0, 1, 2):
        raise Mismatch(f"qreferee {' '.join(args[:2])} exited with {done.returncode}: {done.stderr[-300:]}")
    return wall, done.stdout


def _spin(n: int) -> int:
    total = 0
    for i in range(n):
        total += i * i
    return total


def _capacity(n: int) -> float:
    """How much faster n processes finish n equal pure-Python loops than one process does,
    now: the parallel capacity this machine offers at the moment (n on an idle machine)."""
    import multiprocessing

    if n <= 1:
        return 1.0
    size = 1_500_000
    t0 = perf()
    for _ in range(n):
        _spin(size)
    serial = perf() - t0
    t0 = perf()
    with multiprocessing.get_context("fork").Pool(n) as pool:
        pool.map(_spin, [size] * n)
    return serial / (perf() - t0)


def _claims_without_timing(out: str) -> list[Any]:
    import json

    return [{k: v for k, v in c.items() if k != "seconds"} for c in json.loads(out)["claims"]]


def section_processes(quick: bool) -> bool:
    import json
    import os
    import subprocess
    import tempfile

    print("\n== 6. start-up, a heavy claim beside a light one, several processes ==")
    # The verdict cache is off: every run must decide every claim, or --jobs would be timed against the cache.
    env = {**os.environ, "PYTHONPATH": str(_REPO), "QREFEREE_NO_CACHE": "1"}
    cores = len(os.sched_getaffinity(0)) if hasattr(os, "sched_getaffinity") else (os.cpu_count() or 1)
    load = os.getloadavg()[0] if hasattr(os, "getloadavg") else float("nan")
    print(f"   {cores} cores; load average {load:.2f} before this section (other work slows the parallel figures)")

    # (a) start-up: qreferee --version against a bare interpreter, best of several.
    def bare() -> float:
        t0 = perf()
        subprocess.run([sys.executable, "-c", "pass"], check=True)
        return perf() - t0

    t_bare = min(bare() for _ in range(5))
    t_version = min(_run_cli(["--version"], env)[0] for _ in range(5))
    print(
        f"   (a) qreferee --version: {t_version * 1000:.0f} ms (target <= 150 ms); bare python {t_bare * 1000:.0f} ms; "
        f"ratio {fmt_ratio(t_version / t_bare)}"
    )

    with tempfile.TemporaryDirectory(prefix="qreferee-bench-") as tmp:
        folder = Path(tmp)
        # (b) a 300-claim manuscript, start-up included.
        text, _, _ = synthetic_manuscript(300, seed=77)
        big = folder / "three-hundred.tex"
        big.write_text(text, encoding="utf-8")
        t_big, out = _run_cli(["check", str(big), "--format", "json"], env)
        report = json.loads(out)
        print(
            f"   (b) a manuscript of 300 tagged blocks ({len(report['claims'])} claims), one process, start-up "
            f"included: {t_big:.2f} s (target < 2 s); {t_big / t_version:.1f}x the start-up alone"
        )

        # (c) a light claim alone and beside a weight-48 claim on Gamma_0(1430).
        light = f"%@claim name=light\n\\[ \\theta(\\tau)^4 = {_jacobi(1)} \\]\n"
        heavy = "%@claim name=heavy\n\\[ E_4(1430\\tau)^{6} E_6(2\\tau)^4 = E_6(2\\tau)^4 E_4(1430\\tau)^{6} \\]\n"
        alone = folder / "light.tex"
        alone.write_text(light, encoding="utf-8")
        beside = folder / "heavy-and-light.tex"
        beside.write_text(heavy + light, encoding="utf-8")
        seconds = {}
        for path in (alone, beside):
            _, out = _run_cli(["check", str(path), "--format", "json"], env)
            for c in json.loads(out)["claims"]:
                if c["verdict"] != "proved":
                    raise Mismatch(f"{c['name']}: expected proved, got {c['verdict']}")
                seconds[(path.name, c["name"])] = c["seconds"]
        t_alone, t_beside = seconds[("light.tex", "light")], seconds[("heavy-and-light.tex", "light")]
        print(
            f"   (c) the level-4 claim alone {t_alone * 1000:.1f} ms, after the weight-48 level-1430 claim "
            f"{t_beside * 1000:.1f} ms (ratio {fmt_ratio(t_beside / t_alone)}; the heavy claim itself "
            f"{seconds[('heavy-and-light.tex', 'heavy')]:.2f} s)"
        )

        # (d) a folder of 20 manuscripts and (e) one long manuscript, with --jobs 1, 2, all cores.
        paths = []
        for i in range(20):
            path = folder / f"m{i:02d}.tex"
            path.write_text(_folder_manuscript(i, quick), encoding="utf-8")
            paths.append(str(path))
        long_text, _, _ = synthetic_manuscript(100 if quick else 200, seed=91)
        extra = "".join(_mixed_claim(d, 2) for d in range(201, 401 if quick else 801, 10))
        long_doc = folder / "long.tex"
        long_doc.write_text(long_text.replace("\\end{document}", extra + "\\end{document}"), encoding="utf-8")
        counts = sorted({1, 2, cores})
        for label, files in (("(d) 20 manuscripts", paths), ("(e) one manuscript", [str(long_doc)])):
            header = (
                f"{'jobs':>6}{'wall s':>9}{'cpu s':>8}{'speed-up':>10}{'per core':>10}{'capacity':>10}{'vs cap':>8}"
            )
            print(f"   {label}, start-up included:")
            print("   " + header)
            base_wall, base_claims = 0.0, None
            for n in counts:
                capacity = _capacity(n)
                wall, out = _run_cli(["check", *files, "--format", "json", "--jobs", str(n)], env)
                capacity = (capacity + _capacity(n)) / 2  # the machine's capacity around the run
                claims = _claims_without_timing(out)
                if base_claims is None:
                    base_wall, base_claims = wall, claims
                elif claims != base_claims:
                    raise Mismatch(f"--jobs {n} gives another report than --jobs 1")
                speed = base_wall / wall
                print(
                    f"   {n:>6}{wall:>9.2f}{_LAST_CPU:>8.2f}{fmt_ratio(speed):>10}{speed / n:>10.2f}"
                    f"{fmt_ratio(capacity):>10}{speed / capacity:>8.2f}",
                    flush=True,
                )
            print(
                f"   ({len(base_claims or [])} claims; same report with every --jobs; target per core >= 0.70 on idle "
                "cores; capacity = what n processes of a pure-Python loop gain right now, vs cap = speed-up / capacity)"
            )
    return True


# ---------------------------------------------------------------------------------


# ---------------------------------------------------------------------------------
# Section 5: the independent re-check against the check itself
# ---------------------------------------------------------------------------------


def section_recheck() -> bool:
    """Time ``check`` and ``recheck`` of the sample manuscripts; the ratio should stay <= 5."""
    import json as _json

    from verifier.api import check_path
    from verifier.recheck.check import FAILED
    from verifier.recheck.run import recheck_report

    print("\n== 5. independent re-check of the sample manuscripts, against the check ==")
    samples = [_REPO / "sample_docs" / "paper.tex", _REPO / "sample_docs" / "note.md"]

    def check_all() -> list[dict[str, Any]]:
        # A fresh run each time (each check_path has its own atom table), as the command does.
        return [_json.loads(_json.dumps(check_path(p).to_dict())) for p in samples]

    def recheck_all(reports: list[dict[str, Any]]) -> list[Any]:
        return [recheck_report(r) for r in reports]

    reports, t_check_first = run_once(check_all)
    done, t_re_first = run_once(lambda: recheck_all(reports))
    t_check, t_re = best_pair(check_all, t_check_first, lambda: recheck_all(reports), t_re_first, 1.0, 10)
    counts = {"confirmed": 0, "not-rechecked": 0, "recheck-failed": 0}
    for d in done:
        for status in counts:
            counts[status] += d.count(status)
    header = f"{'check s':>9}{'recheck s':>11}{'recheck/check':>15}   certificates"
    print(header)
    print("-" * len(header))
    print(f"{fmt_s(t_check):>9}{fmt_s(t_re):>11}{fmt_ratio(t_re / t_check):>15}   {counts}", flush=True)
    if counts["recheck-failed"]:
        raise Mismatch(f"{counts['recheck-failed']} certificate(s) of the sample manuscripts failed the re-check")
    assert FAILED == "recheck-failed"
    return True


# ---------------------------------------------------------------------------------
# Section 7: the language server
# ---------------------------------------------------------------------------------


def _lsp_latency(path: Path, edits: list[tuple[str, str]], repeats: int) -> tuple[float, list[float], list[str]]:
    """(seconds to the first diagnostics after opening, seconds from each didChange to its diagnostics, logs)."""
    import asyncio

    from lsprotocol import types
    from pygls.lsp.client import LanguageClient

    async def run() -> tuple[float, list[float], list[str]]:
        client = LanguageClient("qreferee-bench", "1")
        published: asyncio.Queue[float] = asyncio.Queue()
        logs: list[str] = []

        @client.feature(types.TEXT_DOCUMENT_PUBLISH_DIAGNOSTICS)
        def on_diagnostics(ls: Any, params: types.PublishDiagnosticsParams) -> None:
            published.put_nowait(perf())

        @client.feature(types.WINDOW_LOG_MESSAGE)
        def on_log(ls: Any, params: types.LogMessageParams) -> None:
            logs.append(params.message)

        await client.start_io(sys.executable, "-m", "verifier", "lsp", "--no-cache", "--debounce", "0")
        await client.initialize_async(types.InitializeParams(capabilities=types.ClientCapabilities()))
        client.initialized(types.InitializedParams())
        await asyncio.sleep(3.0)  # let the worker process load the engine, as it does while an author reads
        uri, text = path.as_uri(), path.read_text(encoding="utf-8")
        t0 = perf()
        client.text_document_did_open(types.DidOpenTextDocumentParams(types.TextDocumentItem(uri, "latex", 1, text)))
        opened = await asyncio.wait_for(published.get(), 600) - t0
        latencies = []
        version = 1
        for i in range(repeats):
            old, new = edits[i % len(edits)]
            text = text.replace(old, new, 1)
            version += 1
            t0 = perf()
            client.text_document_did_change(
                types.DidChangeTextDocumentParams(
                    types.VersionedTextDocumentIdentifier(version=version, uri=uri),
                    [types.TextDocumentContentChangeWholeDocument(text)],
                )
            )
            latencies.append(await asyncio.wait_for(published.get(), 600) - t0)
            await asyncio.sleep(0.2)
        await client.shutdown_async(None)
        client.exit(None)
        await client.stop()
        return opened, latencies, logs

    return asyncio.run(run())


def section_lsp(claims: int) -> bool:
    print(f"\n== 7. language server: didChange -> published diagnostics, one-claim edit, {claims}-block paper ==")
    print("   (ratio = median latency / one cold 'check' of the same paper in this process; target <= 0.1x)")
    try:
        import pygls  # noqa: F401
    except ImportError:
        print("   pygls is not installed (pip install 'qreferee[lsp]'); section skipped")
        return True
    import statistics
    import tempfile

    from verifier.api import check_path

    text, _, _ = synthetic_manuscript(claims, seed=56)
    # Each edit writes a new wrong coefficient into one claim (so the server has something new to publish).
    anchor = "E_6 E_8 = E_{14}"
    if anchor not in text:
        print("   WRONG: the generated paper has no claim to edit")
        return False
    edits = [(anchor if k == 1 else f"{k}{anchor}", f"{k + 1}{anchor}") for k in range(1, 7)]
    with tempfile.TemporaryDirectory() as folder:
        path = Path(folder) / "paper.tex"
        path.write_text(text, encoding="utf-8")
        check_path(path)  # load the engine and the parser outside the timing
        report, cold = run_once(lambda: check_path(path))
        opened, latencies, logs = _lsp_latency(path, edits, 6)
    median = statistics.median(latencies)
    rechecked = [m for m in logs if "1 block checked" in m]
    print(f"   cold check: {fmt_s(cold)} for {len(report.claims)} claims; first diagnostics: {fmt_s(opened)}")
    print(
        f"   didChange -> diagnostics: median {fmt_s(median)} (min {fmt_s(min(latencies))}, "
        f"max {fmt_s(max(latencies))}, {len(latencies)} edits; debounce 0)"
    )
    print(f"   ratio to the cold check: {fmt_ratio(median / cold)}   (the default --debounce adds 0.3 s)")
    if len(rechecked) < len(latencies):
        print(f"   WRONG: expected each edit to re-check one block; the server said: {logs[-3:]}")
        return False


def _flint_product(exps: dict[int, int], count: int) -> Any:
    """The bare FLINT computation of prod f_delta^{r_delta} to ``count`` terms (the baseline)."""
    out = fmpz_poly([1])
    for delta, r in sorted(exps.items()):
        m = -(-count // delta)
        base = fmpz_poly(_pentagonal(m))
        if r < 0:
            base = flint_inverse(base, m)
        if abs(r) > 1:
            base = base.pow_trunc(abs(r), m)
        if delta > 1:
            base = base.inflate(delta).truncate(count)
        out = out.mul_low(base, count)
    return out


def section_progression(quick: bool) -> bool:
    """Progression claims (U_m): proof and refutation time against the bare FLINT computation."""
    from verifier.claims.products import Mono
    from verifier.claims.progression import Claim, decide

    print("\n== 8. progression claims a(mn+t), proved by U_m, against bare FLINT coefficients ==")
    big = 5 * 2903  # b-type product f_{14515}^9 / f_1: a(5n+4) = 0 mod 5, target bound >= 10^4
    cases: list[tuple[str, Claim, str, dict[int, int], int]] = [
        ("p(11n+6) = 0 mod 11 (proof)", Claim("p(11n+6)", {1: -1}, 11, 6, None, 11), "proved", {1: -1}, 0),
        (
            f"a(5n+4) = 0 mod 5, F = f_{big}^9/f_1 (proof)",
            Claim("a(5n+4)", {1: -1, big: 9}, 5, 4, None, 5),
            "proved",
            {1: -1, big: 9},
            0,
        ),
        (
            "p(5n+4) identity + q^10000 (refutation)",
            Claim(
                "p(5n+4)",
                {1: -1},
                5,
                4,
                (Mono.make(Fraction(5), Fraction(0), {5: 5, 1: -6}), Mono.make(Fraction(1), Fraction(10_000), {})),
            ),
            "refuted",
            {1: -1},
            5 * 10_000 + 5,
        ),
    ]
    header = f"{'claim':<44}{'verdict':>9}{'bound':>8}{'qreferee s':>12}{'FLINT s':>10}{'ratio':>9}"
    print(header)
    print("-" * len(header))
    for label, claim, expected, exps, length in cases:
        outcome, t_first = run_once(lambda c=claim: decide(c))
        if outcome.verdict != expected:
            raise Mismatch(f"{label}: {outcome.verdict}, expected {expected}")
        count = length or claim.m * ((outcome.bound or 0) + 1) + claim.t + 1
        _, t_base_first = run_once(lambda e=exps, n=count: _flint_product(e, n))
        t_ours, t_base = best_pair(
            lambda c=claim: decide(c),
            t_first,
            lambda e=exps, n=count: _flint_product(e, n),
            t_base_first,
            0.3 if quick else 1.0,
            3 if quick else 5,
        )
        print(
            f"{label:<44}{outcome.verdict:>9}{outcome.bound or 0:>8}{fmt_s(t_ours):>12}{fmt_s(t_base):>10}"
            f"{fmt_ratio(t_ours / t_base):>9}",
            flush=True,
        )
    return _progression_expansions(quick)


def _inverse_then_product(exps: dict[int, int], count: int) -> Any:
    """The previous expansion (before the Newton division): a full Newton inverse of the
    denominator, each step multiplying only by the error terms, then one product with the numerator."""
    from verifier.forms.eta import EtaQuotient

    top, bottom = EtaQuotient.of(exps).product_parts(count)
    g = fmpz_poly([1])
    k = 1
    while k < count:
        n = min(2 * k, count)
        err = bottom.truncate(n).mul_low(g, n).right_shift(k)
        g -= g.mul_low(err, n - k).left_shift(k)
        k = n
    return g.truncate(count).mul_low(top, count)


def _progression_expansions(quick: bool) -> bool:
    """Exact coefficients of products of f_k (the direct computation behind refutations).

    Three computations of the same polynomial in one process: qreferee's
    (``EtaQuotient.product_poly``, a Newton division), the previous method (inverse, then
    product) and the bare FLINT baseline (invert f_1, raise, multiply).
    """
    from verifier.forms.eta import EtaQuotient

    size = 10**4 if quick else 10**5
    products: list[tuple[str, dict[int, int]]] = [
        ("1/f_1 (p(n))", {1: -1}),
        ("f_2/f_1^2 (overpartitions)", {1: -2, 2: 1}),
        ("f_4/f_1 (4-regular)", {1: -1, 4: 1}),
        ("f_5^5/f_1^6", {1: -6, 5: 5}),
        ("f_4^5/(f_1^4 f_8^2)", {1: -4, 4: 5, 8: -2}),
    ]
    header = (
        f"{'exact expansion to q^' + str(size):<36}{'qreferee s':>11}{'before s':>10}{'FLINT s':>9}"
        f"{'/before':>9}{'/FLINT':>8}{'CPU s':>7}"
    )
    print()
    print(header)
    print("-" * len(header))
    for label, exps in products:
        c0 = time.process_time()
        ours, t_first = run_once(lambda e=exps: EtaQuotient.of(e).product_poly(size))
        cpu = time.process_time() - c0
        before, t_before_first = run_once(lambda e=exps: _inverse_then_product(e, size))
        base, t_base_first = run_once(lambda e=exps: _flint_product(e, size))
        if ours != base or before != base:
            raise Mismatch(f"{label}: the expansion differs from the FLINT baseline")
        t_ours, t_before = best_pair(
            lambda e=exps: EtaQuotient.of(e).product_poly(size),
            t_first,
            lambda e=exps: _inverse_then_product(e, size),
            t_before_first,
            0.3 if quick else 1.0,
            3 if quick else 5,
        )
        t_ours2, t_base = best_pair(
            lambda e=exps: EtaQuotient.of(e).product_poly(size),
            t_first,
            lambda e=exps: _flint_product(e, size),
            t_base_first,
            0.3 if quick else 1.0,
            3 if quick else 5,
        )
        t_ours = min(t_ours, t_ours2)
        print(
            f"{label:<36}{fmt_s(t_ours):>11}{fmt_s(t_before):>10}{fmt_s(t_base):>9}"
            f"{fmt_ratio(t_ours / t_before):>9}{fmt_ratio(t_ours / t_base):>8}{fmt_s(cpu):>7}",
            flush=True,
        )
    return True


# ---------------------------------------------------------------------------------
# Section 9: how much of the test manuscripts is read and decided
# ---------------------------------------------------------------------------------


def section_reading() -> bool:
    """The figure of merit of reading: the house-style corpus against its brute-force truth, then
    every test manuscript (decided = proved or refuted)."""
    styles = _reading_styles()
    manuscripts = _reading_manuscripts()
    return bool(styles is not False and manuscripts is not False)


def _reading_manuscripts() -> bool:
    """Claims decided (proved or refuted) against those left unproven or in error, per manuscript."""
    from verifier.api import check_path

    print("\n== 9b. reading: claims decided (proved or refuted) in each test manuscript ==")
    files = sorted(
        p
        for folder in ("manuscripts", "idiom")
        for p in (_REPO / "tests" / "data" / folder).glob("*")
        if p.suffix in (".tex", ".md")
    )
    header = f"{'manuscript':<28}{'claims':>7}{'proved':>8}{'refuted':>9}{'unproven':>10}{'error':>7}{'decided':>9}"
    print(header)
    print("-" * len(header))
    total: dict[str, int] = {"proved": 0, "refuted": 0, "unproven": 0, "error": 0}
    for path in files:
        counts = {v: 0 for v in total}
        for claim in check_path(path).claims:
            counts[claim.verdict] += 1
        n = sum(counts.values())
        for v in total:
            total[v] += counts[v]
        share = (counts["proved"] + counts["refuted"]) / n if n else 0.0
        print(
            f"{path.parent.name + '/' + path.name:<28}{n:>7}{counts['proved']:>8}{counts['refuted']:>9}"
            f"{counts['unproven']:>10}{counts['error']:>7}{share:>9.0%}"
        )
    n = sum(total.values())
    share = (total["proved"] + total["refuted"]) / n if n else 0.0
    print(
        f"{'all':<28}{n:>7}{total['proved']:>8}{total['refuted']:>9}{total['unproven']:>10}{total['error']:>7}"
        f"{share:>9.0%}",
        flush=True,
    )
    return True


def _reading_styles() -> bool:
    """The reading corpus of tests/data/manuscripts/styles: decided claims per house style, and no wrong verdict."""
    tests = Path(__file__).resolve().parent.parent / "tests"
    sys.path.insert(0, str(tests))
    import corpus_reading
    import corpus_truth

    print(
        "\n== 9. reading: claims of the house-style corpus decided (proved + refuted), against a brute-force truth =="
    )
    truth = corpus_truth.expected()
    header = (
        f"{'style':<14}{'claims':>7}{'decided':>9}{'share':>8}{'error':>7}{'unproven':>9}{'no claim':>9}{'wrong':>7}"
    )
    print(header)
    print("-" * len(header))
    total, decided, wrong = 0, 0, 0
    sums: dict[str, int] = {}
    for style in corpus_truth.STYLES:
        t = corpus_reading.tally(truth, corpus_reading.verdicts(style), style)
        total += t.total
        decided += t.decided
        wrong += len(t.wrong)
        for k, v in t.counts.items():
            sums[k] = sums.get(k, 0) + v
        print(
            f"{style:<14}{t.total:>7}{t.decided:>9}{t.decided / max(t.total, 1):>8.0%}{t.counts.get('error', 0):>7}"
            f"{t.counts.get('unproven', 0):>9}{t.counts.get('missing', 0):>9}{len(t.wrong):>7}"
        )
        for line in t.wrong:
            print(f"   WRONG: {line}")
    print(
        f"{'all':<14}{total:>7}{decided:>9}{decided / max(total, 1):>8.0%}{sums.get('error', 0):>7}"
        f"{sums.get('unproven', 0):>9}{sums.get('missing', 0):>9}{wrong:>7}"
    )
    if wrong:
        raise Mismatch(f"{wrong} wrong verdicts on the reading corpus")
    return True


def main(argv: list[str] | None = None) -> int:
    ap = argparse.ArgumentParser(description=__doc__.splitlines()[0])
    ap.add_argument("--quick", action="store_true", help="sizes 10^3 and 10^4 only, smaller manuscript (~30 s)")
    ap.add_argument(
        "--pure-budget",
        type=float,
        default=None,
        help="seconds allowed for one pure-Python cell (default 20, or 15 with --quick)",
    )
    ap.add_argument(
        "--pure-total",
        type=float,
        default=None,
        help="seconds allowed for all pure-Python cells together (default unlimited, 15 with --quick)",
    )
    ap.add_argument(
        "--skip",
        default="",
        help=(
            "comma-separated sections to skip: engine, scan, pipeline, level, recheck, processes, lsp, progression, "
            "reading"
        ),
    )
    args = ap.parse_args(argv)
    quick = args.quick
    skip = {s.strip() for s in args.skip.split(",") if s.strip()}
    sizes = [10**3, 10**4] if quick else [10**3, 10**4, 10**5]
    pure_budget = args.pure_budget if args.pure_budget is not None else (15.0 if quick else 20.0)
    pure_total = args.pure_total if args.pure_total is not None else (15.0 if quick else float("inf"))
    print(f"qreferee benchmarks ({'quick' if quick else 'full'}); python {sys.version.split()[0]}")
    start = perf()
    ok = True
    sections: list[tuple[str, Callable[[], Any]]] = [
        ("engine", lambda: section_engine(sizes, pure_budget, pure_total, 0.15 if quick else 0.5)),
        ("scan", lambda: section_scan([500, 2000] if quick else [2000, 8000])),
        ("pipeline", lambda: section_pipeline(150 if quick else 600)),
        ("level", lambda: section_level(quick)),
        ("recheck", section_recheck),
        ("processes", lambda: section_processes(quick)),
        ("lsp", lambda: section_lsp(300)),
        ("progression", lambda: section_progression(quick)),
        ("reading", section_reading),
    ]
    for name, run in sections:
        if name in skip:
            continue
        try:
            result = run()
            if result is False:
                ok = False
        except Mismatch as exc:
            print(f"   WRONG RESULT: {exc}")
            ok = False
        except Exception:
            print(f"   section {name} crashed:")
            traceback.print_exc(limit=4)
            ok = False
    print(f"\ntotal wall time {perf() - start:.1f} s")
    return 0 if ok else 1


if __name__ == "__main__":
    sys.exit(main())
