"""The named forms of the claim language: their spellings, types and series.

An atom is a family key, a scale (``tau -> scale * tau``) and parameters:

* ``E2, E4, ...`` -- Eisenstein series E_k (docs/method.md#eisenstein); ``Delta`` (docs/method.md#delta-eta-j);
* ``eta`` -- an eta quotient ``prod eta(delta tau)^r``; parameters are the pairs
  ``(delta, r)`` with *rational* delta (the scale is folded into delta), so that Jacobi's
  thetas in the nome ``e^{pi i tau}`` (which involve ``eta(tau/2)``) are eta quotients too;
* ``theta`` -- the theta series of a quadratic form; parameters are the Gram matrix;
* ``utheta`` -- a unary theta series sum_{n in Z} psi(n) n^nu q^{n^2} with psi quadratic;
  parameters ``(kernel of psi, nu)`` (docs/method.md#unary-theta).

Before a claim is proved it is rescaled so that every delta, scale and exponent is an
integer (docs/method.md#eta-offset); the functions below that ask for a level expect that.

Adding a family: its spellings in :func:`lookup`, and its weight, level, character,
cusp orders and series in the functions below.
"""

from __future__ import annotations

import re
from dataclasses import dataclass
from fractions import Fraction
from typing import Any

from verifier.series.qseries import QSeries

MAX_EISENSTEIN_WEIGHT = 5000
_EIS = re.compile(r"^E_(?:\{\s*(\d+)\s*\}|(\d))$")
_ETA_SUB = re.compile(r"^\\eta_(?:\{\s*(\d+)\s*\}|(\d))$")
_THETA = re.compile(r"^\\(?:theta|vartheta)(?:_(?:\{\s*(\w+)\s*\}|(\w)))?$")
_BIG_THETA = re.compile(r"^\\Theta_(?:\{\s*(\w+)\s*\}|(\w))$")

EtaParams = tuple[tuple[Fraction, int], ...]

# theta(tau) = sum q^{n^2} = eta(2tau)^5 / (eta(tau)^2 eta(4tau)^2), and its relatives in
# the nome q = e^{2 pi i tau} (docs/method.md#theta-nome): (factor, eta exponents).
_THETA_Q: dict[str, tuple[int, dict[int, int]]] = {
    "3": (1, {1: -2, 2: 5, 4: -2}),  # sum q^{n^2}
    "4": (1, {1: 2, 2: -1}),  # sum (-1)^n q^{n^2}
    "2": (2, {2: -1, 4: 2}),  # sum q^{(n+1/2)^2}, offset q^{1/4}
}


@dataclass(frozen=True)
class AtomInfo:
    """What a name denotes: family key, parameters, weight, E_2-depth, constant factor."""

    key: str
    weight: Fraction
    depth: int = 0
    params: tuple[Any, ...] = ()
    factor: Fraction = Fraction(1)


@dataclass(frozen=True)
class Unknown:
    """Why a name is not a known form, with a hint."""

    message: str
    hint: str


SERIES_ONLY = "series"  # q-series compared by coefficients only (verifier.forms.series_only)


class NotModular(Exception):
    """An atom is modular for no Gamma_0(N) (the message says which condition fails)."""


def eta_params(mapping: dict[Fraction, int] | dict[int, int]) -> EtaParams:
    """Canonical parameters of an eta quotient: sorted (delta, r), r != 0."""
    return tuple(sorted((Fraction(d), r) for d, r in mapping.items() if r))


def lookup(
    name: str, nome: Fraction = Fraction(1), matrices: dict[str, Any] | None = None
) -> AtomInfo | Unknown | None:
    """The atom named ``name``; None when the name is not a built-in at all.

    ``nome`` is 1 for q = e^{2 pi i tau} and 1/2 for Jacobi's nome e^{pi i tau}: it changes
    what the Jacobi thetas mean (docs/method.md#theta-nome).
    """
    m = _EIS.match(name)
    if m:
        k = int(m.group(1) or m.group(2))
        if k < 2 or k % 2:
            return Unknown(
                f"E_{k} is not defined: Eisenstein series E_k have even weight k >= 2 at level one",
                "write E_2, E_4, E_6, ...",
            )
        if k > MAX_EISENSTEIN_WEIGHT:
            return Unknown(f"E_{k} exceeds the weight limit {MAX_EISENSTEIN_WEIGHT}", "")
        return AtomInfo(f"E{k}", Fraction(k), 1 if k == 2 else 0)
    if name == "\\Delta":
        return AtomInfo("Delta", Fraction(12))
    if name == "\\eta":
        return AtomInfo("eta", Fraction(1, 2), params=eta_params({1: 1}))
    m = _ETA_SUB.match(name)
    if m:
        delta = int(m.group(1) or m.group(2))
        if delta < 1:
            return Unknown("eta_0 is not defined", "write \\eta_{d} with d >= 1 for eta(d tau)")
        return AtomInfo("eta", Fraction(1, 2), params=eta_params({delta: 1}))
    m = _THETA.match(name)
    if m:
        sub = m.group(1) or m.group(2)
        if sub is None:
            factor, exps = _THETA_Q["3"]
            return _eta_info(exps, factor, Fraction(1))
        if sub in _THETA_Q:
            factor, exps = _THETA_Q[sub]
            return _eta_info(exps, factor, nome)
        if matrices and sub in matrices:
            return _theta_info(matrices[sub])
        if sub == "1":
            return Unknown("theta_1 vanishes at z = 0 and is not a form in tau", "use theta_2, theta_3 or theta_4")
        return Unknown(f"unknown theta {name}", f"define a Gram matrix {sub} first, or use theta_2, theta_3, theta_4")
    m = _BIG_THETA.match(name)
    if m:
        sub = m.group(1) or m.group(2)
        if matrices and sub in matrices:
            return _theta_info(matrices[sub])
        return Unknown(f"{name}: no Gram matrix {sub} is defined", f"add %@define {sub} = \\begin{{pmatrix}}...")
    return None


def _eta_info(exps: dict[int, int], factor: int, nome: Fraction) -> AtomInfo:
    params = eta_params({Fraction(d) * nome: r for d, r in exps.items()})
    return AtomInfo("eta", Fraction(sum(exps.values()), 2), params=params, factor=Fraction(factor))


def _theta_info(form: Any) -> AtomInfo:
    return AtomInfo("theta", form.weight, params=(form.gram,))


# -- properties of atoms (after rescaling: integral scales and deltas) -------------------
def eta_quotient(params: EtaParams) -> Any:
    """The :class:`verifier.forms.eta.EtaQuotient` of integral parameters."""
    from verifier.forms.eta import EtaQuotient

    return EtaQuotient.of({int(d): r for d, r in params})


def quadratic_form(params: tuple[Any, ...]) -> Any:
    """The :class:`verifier.forms.theta.QuadraticForm` of a theta atom."""
    from verifier.forms.theta import QuadraticForm

    return QuadraticForm(params[0])


def offset(key: str, params: tuple[Any, ...]) -> Fraction:
    """Exponent of the q-power in front of an eta quotient (s/24); 0 for other families."""
    if key == "eta":
        return sum((d * r for d, r in params), Fraction(0)) / 24
    return Fraction(0)


def level(key: str, scale: int, params: tuple[Any, ...]) -> int:
    """The least N for which the atom is modular on Gamma_0(N) (raises :class:`NotModular`)."""
    if key == SERIES_ONLY:
        raise NotModular("a q-series with no known modular interpretation (docs/method.md#series-only)")
    if key == "eta":
        eq = eta_quotient(params)
        n = eq.least_level()
        if n is None:
            raise NotModular(eq.modularity_failure() or "no level satisfies the eta-quotient conditions")
        return int(n)
    if key == "theta":
        return int(quadratic_form(params).level) * scale
    if key == "utheta":
        from verifier.forms import unary_theta

        return unary_theta.level(params[0], params[1], scale)
    if key == "Echar":
        from verifier.numbers import QuadraticCharacter

        _, psi, phi = params
        return QuadraticCharacter(psi).conductor * QuadraticCharacter(phi).conductor * scale
    return scale


def character(key: str, scale: int, params: tuple[Any, ...], at_level: int) -> Any:
    """The character (a :class:`QuadraticCharacter`) at level ``at_level``."""
    from verifier.numbers import QuadraticCharacter

    if key == SERIES_ONLY:
        raise NotModular("a q-series with no known modular interpretation (docs/method.md#series-only)")
    if key == "eta":
        return eta_quotient(params).character(at_level)
    if key == "Echar":
        _, psi, phi = params
        return QuadraticCharacter(psi) * QuadraticCharacter(phi)
    if key == "utheta":
        from verifier.forms import unary_theta

        return unary_theta.character(params[0], params[1], scale)
    if key == "theta":
        form = quadratic_form(params)
        chi = form.character
        if chi is None:
            raise NotModular("theta series of odd rank are not supported yet")
        if scale != 1 and form.dimension % 2:
            chi = chi * QuadraticCharacter.from_integer(scale)
        return chi
    return QuadraticCharacter(1)


def cusp_orders(key: str, params: tuple[Any, ...], at_level: int, scale: int = 1) -> dict[int, Fraction] | None:
    """Orders at the cusps c/d (keyed by d) of the atom at ``scale`` (tau -> scale*tau).

    Eta quotients carry their scales in ``params`` (Ligozat's formula); Delta(d tau) is
    eta(d tau)^24 by Jacobi's product formula, so it has the orders of that eta quotient.
    None: holomorphic (order >= 0) at every cusp.
    """
    if key == "eta":
        return {int(d): Fraction(v) for d, v in eta_quotient(params).orders(at_level).items()}
    if key == "Delta":
        return cusp_orders("eta", ((scale, 24),), at_level)
    return None


def build_series(key: str, params: tuple[Any, ...], prec: int) -> QSeries:
    """Exact q-expansion of the atom at scale 1, to precision ``prec``."""
    if key == SERIES_ONLY:
        from verifier.forms.series_only import build

        return build(params, prec)
    if key == "Delta":
        from verifier.forms.delta import delta_series

        return delta_series(prec)
    if key == "eta":
        eq = eta_quotient(params)
        off = offset(key, params)
        assert off.denominator == 1, "eta quotients are rescaled to integral offsets before use"
        return QSeries(eq.product_series(max(prec - int(off), 0)).poly, int(off), prec)
    if key == "theta":
        series: QSeries = quadratic_form(params).series(prec)
        return series
    if key == "utheta":
        from verifier.forms import unary_theta

        return unary_theta.series(params[0], params[1], prec)
    if key == "Echar":
        from verifier.forms.eisenstein_chars import eisenstein_character_series
        from verifier.numbers import QuadraticCharacter

        k, psi, phi = params
        return eisenstein_character_series(k, QuadraticCharacter(psi), QuadraticCharacter(phi), prec)
    if key.startswith("E"):
        from verifier.forms.eisenstein import eisenstein_series

        return eisenstein_series(int(key[1:]), prec)
    raise KeyError(key)


def atom_label(key: str, scale: int = 1, params: tuple[Any, ...] = ()) -> str:
    """How an atom is written in messages."""
    if key == "eta":
        return " ".join(f"eta({d}tau)^{r}" if d != 1 else f"eta(tau)^{r}" for d, r in params)
    if key == SERIES_ONLY:
        return "series(" + str(params[0]) + ")"
    if key == "utheta":
        from verifier.forms import unary_theta

        return unary_theta.label(params[0], params[1], scale)
    base = {"Delta": "Delta", "theta": "Theta_Q"}.get(key, f"E_{key[1:]}")
    return base if scale == 1 else f"{base}({scale}tau)"
