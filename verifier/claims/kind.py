"""What every kind of claim implements: read the parsed claim, decide it, certify the verdict.

One module under ``verifier/claims/`` per kind of claim (``verifier/claims/kinds.py`` lists
them).  Each module has the same three functions (:class:`ClaimKind`):

* ``read(claim)``: the kind's reading of one parsed claim (:class:`ParsedClaim`): a
  :class:`Reading` when it is a claim of this kind, an :class:`Unread` when it is
  one but cannot be read (the claim becomes an ``error``), and None when it is not of this
  kind (the next kind is tried, in the order of ``verifier/claims/kinds.py``);
* ``decide(reading, prover)``: the verdict, an :class:`~verifier.prove.outcome.Outcome` (run
  later, within the claim's time budget, possibly in another process);
* ``certify(outcome)``: the certificate of a proved outcome as the report gives it.

``verifier/api.py`` only orchestrates: it makes the parsed claims of each row, asks the kinds
in their order, and runs the decisions within the budgets.
"""

from __future__ import annotations

from collections.abc import Mapping
from dataclasses import dataclass, field
from typing import Any, Protocol

from verifier.elaborate.elaborator import Elaborator
from verifier.parse import ast
from verifier.prove.certificate import minimal
from verifier.prove.outcome import Outcome
from verifier.prove.prover import Prover
from verifier.scan.text import MappedText

Residues = tuple[str, tuple[int, ...]]  # (t, listed values) of a residue set after a claim


@dataclass
class ParsedClaim:
    """One claim as the grammar read it: a relation ``left rel right`` or a claim about a space.

    ``text`` is the row the spans point into; ``options`` are the tag's options; ``modulus``
    and ``start_n`` come from the row's qualifiers (``\\pmod M``, ``(n \\ge 1)``) or the tag,
    ``residues`` from a residue set after the claim; ``letter`` is the author's letter for q,
    when the claim was written in another one.  ``memo`` keeps work that several kinds share
    (the two sides elaborated once).
    """

    text: MappedText
    elaborator: Elaborator
    options: Mapping[str, str]
    left: ast.Node | None = None
    right: ast.Node | None = None
    rel: str = "="
    space: ast.SpaceClaim | None = None
    modulus: int | None = None
    start_n: int | None = None
    residues: Residues | None = None
    n_class: ast.NClass | None = None  # the class of n the claim is stated on (docs/method.md#classes-of-n)
    letter: str | None = None
    relation_kind: str = "equality"  # equality or inequality, from the relation as written
    memo: dict[str, Any] = field(default_factory=dict)

    @property
    def sides(self) -> tuple[ast.Node, ast.Node]:
        """The two sides of a relation."""
        assert self.left is not None and self.right is not None, "a claim about a space has no sides"
        return self.left, self.right

    @property
    def shown(self) -> str:
        """The relation as the parser saw it (after the author's macros were expanded)."""
        left, right = self.sides
        return " ".join(self.text.text[left.span[0] : right.span[1]].split())


@dataclass(frozen=True)
class Unread:
    """A claim of a kind that cannot be read: the claim's verdict is ``error``.

    ``at`` is an offset in the claim's text (None: where the claim starts); ``at_tag``
    puts the error at the tag instead (a tag option that cannot be read).
    """

    kind: str
    code: str
    message: str
    hint: str = ""
    at: int | None = None
    at_tag: bool = False


@dataclass(kw_only=True)
class Reading:
    """What a claim says, as its kind read it (each kind's subclass adds its own fields)."""

    kind: str  # the report's kind of the claim
    shown: str = ""  # the claim as read, for the report ("" when there is nothing to show)

    @property
    def crash_kind(self) -> str:
        """The kind an internal error of this claim is reported under."""
        return self.kind

    def over_budget(self, prover: Prover) -> str:
        """What to add to the message of a claim stopped by the time budget ("" for nothing)."""
        return ""

    def suggest(self, prover: Prover) -> str | None:
        """A corrected claim, tried after a refutation of an equality (None: none)."""
        return None


class ClaimKind(Protocol):
    """The three steps every kind module implements (module-level functions)."""

    def read(self, claim: ParsedClaim, /) -> Reading | Unread | None: ...

    def decide(self, reading: Any, prover: Prover, /) -> Outcome: ...

    def certify(self, outcome: Outcome, /) -> dict[str, Any] | None: ...


def certified(outcome: Outcome) -> dict[str, Any] | None:
    """The certificate a decision attached to a proved outcome, else the minimal one (None unless proved)."""
    if outcome.verdict != "proved":
        return None
    if outcome.certificate is not None:
        return outcome.certificate
    return minimal(outcome.method, outcome.kind, outcome.space, outcome.bound)
