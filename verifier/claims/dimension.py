"""Dimensions: ``\\dim M_k(\\Gamma_0(N)) = d`` and ``\\dim S_k(...) = d`` (docs/method.md#claim-dimension).

Decided by the dimension formula (docs/method.md#dimension-gamma0): genus, elliptic points
and cusps of Gamma_0(N), from :mod:`verifier.prove.groups`.
"""

from __future__ import annotations

from dataclasses import dataclass
from typing import Any

from verifier.claims.kind import ParsedClaim, Reading, Unread, certified
from verifier.claims.membership import read_space, space_dict
from verifier.parse.spaces import SpaceSpec
from verifier.prove import certificate, groups
from verifier.prove.outcome import Outcome
from verifier.prove.prover import Prover

KINDS = ("dimension",)


@dataclass
class DimensionReading(Reading):
    """``\\dim spec = stated``."""

    spec: SpaceSpec
    stated: int


def read(claim: ParsedClaim, /) -> DimensionReading | Unread | None:
    """``\\dim M_k(...) = d``: the space read, the stated dimension kept."""
    if claim.space is None or claim.space.kind != "dimension":
        return None
    spec = read_space(claim)
    if isinstance(spec, Unread):
        return spec
    assert spec is not None and claim.space.value is not None
    return DimensionReading(spec, claim.space.value, kind="dimension")


def decide(reading: DimensionReading, prover: Prover, /) -> Outcome:
    """The dimension formula's value compared with the stated one (no series are needed)."""
    return decide_dimension(reading.spec, reading.stated)


def certify(outcome: Outcome, /) -> dict[str, Any] | None:
    """The space and the invariants of the group the formula used."""
    return certified(outcome)


def decide_dimension(spec: SpaceSpec, stated: int) -> Outcome:
    """Decide ``\\dim spec = stated`` by the dimension formula (docs/method.md#dimension-gamma0)."""
    space = space_dict(spec)
    k = spec.weight
    if spec.group_kind != "Gamma0" or (spec.character is not None and not spec.character.is_trivial):
        return Outcome(
            "error",
            "dimension",
            "dimensions are known here only for Gamma_0(N) with the trivial character",
            space,
            code="unsupported",
        )
    if k.denominator != 1 or k < 0:
        return Outcome(
            "error", "dimension", "dimensions are known here only for integral weight k >= 0", space, code="unsupported"
        )
    kk = int(k)
    dim = groups.dim_cusp(kk, spec.level) if spec.cusp else groups.dim_modular(kk, spec.level)
    what = f"dim {spec.text()}"
    verdict = "proved" if dim == stated else "refuted"
    g = groups.genus(spec.level)
    e2, e3 = groups.elliptic_points(spec.level)
    einf = groups.cusp_count(spec.level)
    msg = f"{what} = {dim} (genus {g}, {e2} and {e3} elliptic points of order 2 and 3, {einf} cusps)"
    if verdict == "refuted":
        msg = f"{what} is {dim}, not {stated} (genus {g}, elliptic points {e2}, {e3}, {einf} cusps)"
    cert = certificate.dimension(
        space,
        {"weight": kk, "level": spec.level, "cusp_forms": spec.cusp},
        dim,
        {"index": groups.index_gamma0(spec.level), "elliptic_points": [e2, e3], "cusps": einf, "genus": g},
    )
    return Outcome(verdict, "dimension", msg, space, "dimension-formula", None, 0, certificate=cert)
