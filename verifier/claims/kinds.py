"""The registry of claim kinds: the report's ``kind`` -> the module that reads, decides and certifies it.

A relation is offered to the kinds in :data:`ORDER`; the first whose ``read`` does not return
None takes it.  Claims about spaces (``\\in``, ``\\dim``, "is an eigenform") are offered the same
way.  Before any kind reads a relation, :func:`prepare` settles what all of them share: the
modulus of a congruence, a statement of the nome (no claim), and another letter for q.
"""

from __future__ import annotations

from verifier.claims import (
    coefficients,
    congruence,
    dimension,
    eigenform,
    expansion,
    identity,
    membership,
    progression,
    solve,
    value,
)
from verifier.claims.kind import ClaimKind, ParsedClaim, Reading, Unread
from verifier.elaborate.idiom import nome_letter, substitute
from verifier.parse import ast
from verifier.parse.grammar import MAX_MODULUS_DIGITS

# The report's kind -> its module.  Progressions report the kinds of what they claim
# (arithmetic, congruence, or equality for a dissection), whose certify is the same.
KINDS: dict[str, ClaimKind] = {
    "equality": identity,
    "inequality": identity,
    "prefix": expansion,
    "membership": membership,
    "dimension": dimension,
    "eigenform": eigenform,
    "arithmetic": coefficients,
    "congruence": congruence,
    "value": value,
    "solve": solve,
}

# The order in which the kinds are offered a claim (the first that reads it takes it).
ORDER: tuple[ClaimKind, ...] = (
    membership,
    dimension,
    eigenform,
    progression,
    congruence,
    value,
    coefficients,
    solve,
    expansion,
    identity,
)


def read(claim: ParsedClaim) -> tuple[ClaimKind, Reading] | Unread:
    """The kind that takes ``claim`` and its reading, or why it cannot be read."""
    if claim.space is None:
        problem = prepare(claim)
        if problem is not None:
            return problem
    for kind in ORDER:
        found = kind.read(claim)
        if isinstance(found, Unread):
            return found
        if found is not None:
            return kind, found
    raise AssertionError("the identity kind reads every relation")  # pragma: no cover


def prepare(claim: ParsedClaim) -> Unread | None:
    """What every kind of relation shares, settled once (``claim`` is updated in place)."""
    left, right = claim.sides
    claim.relation_kind = kind = "equality" if claim.rel == "=" else "inequality"
    modulus = claim.modulus
    if claim.rel == "≡" and modulus is None:
        return Unread("congruence", "syntax", "a congruence needs its modulus", "write \\pmod{M}")
    if modulus is not None and modulus <= 0:
        return Unread(
            "congruence",
            "too-large" if modulus < 0 else "syntax",
            f"the modulus has more than {MAX_MODULUS_DIGITS} digits" if modulus < 0 else "the modulus is 0",
            "a congruence needs a modulus of at least 1",
        )
    if modulus is not None and claim.rel == "=":
        claim.rel = "≡"
    elaborator = claim.elaborator
    forms, matrices = elaborator.definitions, elaborator.matrices
    if _states_the_nome(left, right, claim.text.text):
        return Unread(
            kind,
            "unsupported-notation",
            "q = e^{2\\pi i\\tau} states the variable of the expansions; it is qreferee's own convention, not a claim",
            "remove the tag from this statement (e^{2\\pi i n\\tau} in claims is read as q^n)",
        )
    # A claim written in another letter for q (\prod (1 - x^n)) is read with that letter as q.
    letter = nome_letter((left, right), set(forms) | set(matrices))
    if letter is not None:
        claim.left, claim.right = (substitute(n, {letter: ast.Name(n.span, "q")}) for n in (left, right))
        claim.letter = letter
    return None


def _states_the_nome(left: ast.Node, right: ast.Node, text: str) -> bool:
    """``q = e^{2 pi i tau}`` (either way round): the author names the variable."""
    for a, b in ((left, right), (right, left)):
        written = text[b.span[0] : b.span[1]].lstrip()
        if (
            isinstance(a, ast.Name)
            and a.text == "q"
            and a.arg is None
            and written.startswith(("e^", "\\exp"))
            and isinstance(b, ast.Power)
            and isinstance(b.base, ast.Name)
            and b.base.text == "q"
        ):
            return True
    return False
