"""A soundness campaign: random identities true by construction, and their small mutations.

A random linear combination of products of level-one and level-N generators of one weight is
set equal to an equivalent rearrangement of itself (terms and factors permuted, a coefficient
split in two, a common factor taken out, a power written as a product).  Such a claim is true
whatever the generators are, so its truth does not rest on qreferee.  Mutating one place of
one side (a coefficient, the argument d of f(d tau), an exponent, a sign) changes that side by
a nonzero amount, because every generator is a nonzero series and a product of nonzero
series is nonzero; so every mutation is false.

Properties (the contract of the tool):
* a true claim is ``proved`` (all of these are in reach of the Sturm bound), never ``refuted``;
* a mutated claim is never ``proved``; if the mutation keeps the weight, it is ``refuted``
  with a witness;
* the ``\\neq`` versions behave the other way round.

The default profile keeps CI fast; ``QREFEREE_HYPOTHESIS=large`` runs a long campaign
(see DEVELOPERS.md).
"""

from __future__ import annotations

import random
from dataclasses import dataclass, replace
from fractions import Fraction

import pytest
from hypothesis import given
from hypothesis import strategies as st
from verifier import check_text


@dataclass(frozen=True)
class Gen:
    """A generator: ``name(d tau)``, of weight ``weight``, with the scales ``d`` it may take."""

    name: str
    weight: int
    scales: tuple[int, ...]


# Holomorphic modular forms on Gamma_0(N) for N | 12 (weights: Serre, A Course in Arithmetic,
# ch. VII; f(d tau) has level d N: common practice; eta(tau)^8 eta(2 tau)^8 in S_8(Gamma_0(2)):
# Köhler, Eta Products and Theta Series Identities, §1.6, from memory; theta^4 in M_2(Gamma_0(4)):
# common practice).
GENERATORS = (
    Gen("E_4", 4, (1, 2, 3)),
    Gen("E_6", 6, (1, 2)),
    Gen("\\Delta", 12, (1,)),
    Gen("\\theta", 0, (1, 2)),  # weight 1/2; used as theta^4 (weight 2) only, see Factor.tex
    Gen("ETA8", 8, (1,)),
)


@dataclass(frozen=True)
class Factor:
    gen: Gen
    scale: int
    power: int

    @property
    def weight(self) -> int:
        return (2 if self.gen.name == "\\theta" else self.gen.weight) * self.power

    def tex(self, as_product: bool = False) -> str:
        if self.gen.name == "ETA8":
            base = "\\eta(\\tau)^{8}\\eta(2\\tau)^{8}"
            return base if self.power == 1 else "\\left(" + base + f"\\right)^{{{self.power}}}"
        arg = "" if self.scale == 1 else f"({self.scale}\\tau)"
        power = 4 * self.power if self.gen.name == "\\theta" else self.power
        if self.gen.name == "\\theta":
            arg = "(\\tau)" if self.scale == 1 else f"({self.scale}\\tau)"
        if as_product and power > 1:
            return "".join(self.gen.name + arg for _ in range(power))
        return f"{self.gen.name}{arg}" + ("" if power == 1 else f"^{{{power}}}")


@dataclass(frozen=True)
class Term:
    coefficient: Fraction
    factors: tuple[Factor, ...]


def tex_coefficient(c: Fraction, first: bool) -> str:
    sign = "-" if c < 0 else ("" if first else "+")
    a = abs(c)
    if a == 1:
        return sign
    body = str(a.numerator) if a.denominator == 1 else f"\\frac{{{a.numerator}}}{{{a.denominator}}}"
    return f"{sign} {body}"


def tex_sum(terms: list[Term], rng: random.Random | None = None) -> str:
    parts = []
    for i, t in enumerate(terms):
        factors = list(t.factors)
        if rng is not None:
            rng.shuffle(factors)
        body = "".join(f.tex(as_product=rng is not None and rng.random() < 0.3) for f in factors)
        parts.append(f"{tex_coefficient(t.coefficient, i == 0)}{body}")
    return " ".join(parts)


def monomials(weight: int) -> list[tuple[Factor, ...]]:
    """Every product of generators (with their scales) of exactly this weight, up to order."""
    atoms = [(g, d) for g in GENERATORS for d in g.scales]
    out: list[tuple[Factor, ...]] = []

    def walk(start: int, left: int, acc: list[Factor]) -> None:
        if left == 0:
            out.append(tuple(acc))
            return
        for i in range(start, len(atoms)):
            g, d = atoms[i]
            w = 2 if g.name == "\\theta" else g.weight
            for p in range(1, left // w + 1):
                walk(i + 1, left - w * p, [*acc, Factor(g, d, p)])

    walk(0, weight, [])
    return out


MONOMIALS = {w: monomials(w) for w in (8, 12)}
coefficients = st.fractions(min_value=-50, max_value=50, max_denominator=9).filter(lambda x: x != 0)


@st.composite
def identities(draw: st.DrawFn) -> tuple[list[Term], int]:
    weight = draw(st.sampled_from(sorted(MONOMIALS)))
    chosen = draw(st.lists(st.sampled_from(MONOMIALS[weight]), min_size=1, max_size=4, unique=True))
    terms = [Term(draw(coefficients), m) for m in chosen]
    seed = draw(st.integers(0, 2**32 - 1))
    return terms, seed


def rearranged(terms: list[Term], rng: random.Random) -> str:
    """An equivalent form: terms permuted, one coefficient split, factors shuffled or expanded."""
    pieces = list(terms)
    rng.shuffle(pieces)
    k = rng.randrange(len(pieces))
    t = pieces[k]
    split = Fraction(rng.randint(-7, 7), rng.randint(1, 5))
    if split not in (0, t.coefficient):
        pieces[k : k + 1] = [replace(t, coefficient=split), replace(t, coefficient=t.coefficient - split)]
    return tex_sum(pieces, rng)


def verdict(left: str, right: str, rel: str = "=") -> tuple[str, str]:
    (c,) = check_text(f"%@claim\n\\[ {left} {rel} {right} \\]\n").claims
    return c.verdict, c.outcome.message


@given(identities())
def test_a_rearrangement_is_proved(case: tuple[list[Term], int]) -> None:
    terms, seed = case
    left, right = tex_sum(terms), rearranged(terms, random.Random(seed))
    v, message = verdict(left, right)
    assert v == "proved", (left, right, message)
    v, message = verdict(left, right, "\\neq")
    assert v == "refuted", (left, right, message)


def mutate(terms: list[Term], rng: random.Random) -> tuple[list[Term], bool]:
    """One small change that makes the sum differ; and whether the weight is kept."""
    k = rng.randrange(len(terms))
    t = terms[k]
    what = rng.choice(["coefficient", "sign", "scale", "exponent"])
    if what == "coefficient":
        delta = Fraction(rng.choice([-3, -2, -1, 1, 2, 3]), rng.randint(1, 4))
        new = replace(t, coefficient=t.coefficient + delta)
        if new.coefficient == 0:
            new = replace(t, coefficient=t.coefficient * 2)
        return [*terms[:k], new, *terms[k + 1 :]], True
    if what == "sign":
        return [*terms[:k], replace(t, coefficient=-t.coefficient), *terms[k + 1 :]], True
    i = rng.randrange(len(t.factors))
    f = t.factors[i]
    if what == "scale" and f.gen.name != "ETA8":
        # f(d tau) -> f(d' tau): E_k(d tau) and E_k(d' tau) differ (their first nonconstant
        # terms sit at q^d and q^d'), and so do theta(d tau), theta(d' tau).
        scale = f.scale + rng.randint(1, 3)
        factors = (*t.factors[:i], replace(f, scale=scale), *t.factors[i + 1 :])
        return [*terms[:k], replace(t, factors=factors), *terms[k + 1 :]], True
    factors = (*t.factors[:i], replace(f, power=f.power + 1), *t.factors[i + 1 :])
    return [*terms[:k], replace(t, factors=factors), *terms[k + 1 :]], False


@given(identities(), st.integers(0, 2**32 - 1))
def test_a_mutation_is_never_proved(case: tuple[list[Term], int], seed: int) -> None:
    terms, shape = case
    rng = random.Random(seed)
    mutated, same_weight = mutate(terms, rng)
    left, right = tex_sum(mutated), rearranged(terms, random.Random(shape))
    v, message = verdict(left, right)
    assert v != "proved", (left, right, message)
    if same_weight:
        assert v == "refuted", (left, right, message)
    v, message = verdict(left, right, "\\neq")
    assert v != "refuted", (left, right, message)
    if same_weight:
        assert v == "proved", (left, right, message)


# -- Progressions: one residue, the modulus or the step mutated ------------------------------
# Ramanujan's congruences p(5n+4) = 0 (mod 5), p(7n+5) = 0 (mod 7), p(11n+6) = 0 (mod 11)
# (Ramanujan 1919; Hardy, Ramanujan, ch. VI) are proved; a mutation of one number is false, as a
# brute-force count of partitions in the test confirms before the tool is asked.
RAMANUJAN = ((5, 4), (7, 5), (11, 6))


def _partitions(n: int) -> list[int]:
    p = [1] + [0] * n
    for part in range(1, n + 1):
        for m in range(part, n + 1):
            p[m] += p[m - part]
    return p


PARTITIONS = _partitions(400)


@given(st.sampled_from(RAMANUJAN), st.sampled_from(["t+1", "t-1", "modulus", "step"]))
def test_a_mutated_ramanujan_congruence_is_never_proved(case: tuple[int, int], how: str) -> None:
    m, t = case
    modulus = m
    if how == "t+1":
        t += 1
    elif how == "t-1":
        t -= 1
    elif how == "modulus":
        modulus = m * m  # p(5n+4) is not always 0 mod 25 (p(4) = 5), and so on
    else:
        m += 1
    false_somewhere = any(PARTITIONS[m * n + t] % modulus for n in range((400 - t) // m + 1))
    assert false_somewhere  # the mutation is false, by direct count
    (c,) = check_text(f"%@claim\n\\[ p({m}n+{t}) \\equiv 0 \\pmod{{{modulus}}} \\]\n").claims
    assert c.verdict == "refuted", c.outcome.message
    fd = c.outcome.first_difference
    assert fd is not None and PARTITIONS[m * int(fd["n"]) + t] % modulus == int(fd["left"]) % modulus != 0


@pytest.mark.parametrize("case", RAMANUJAN)
def test_ramanujan_congruences_are_proved(case: tuple[int, int]) -> None:
    m, t = case
    assert all(PARTITIONS[m * n + t] % m == 0 for n in range((400 - t) // m + 1))
    (c,) = check_text(f"%@claim\n\\[ p({m}n+{t}) \\equiv 0 \\pmod{{{m}}} \\]\n").claims
    assert c.verdict == "proved", c.outcome.message
