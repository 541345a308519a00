"""The verdict on one claim, and the rule that no verdict of difference comes without a witness.

Every decision of qreferee ends in an :class:`Outcome`.  The outcome enforces, in this one
place, the contract that makes a verdict of *difference* trustworthy:

* for a claim between two sides (an identity of forms, a printed expansion, an arithmetic
  identity, a value, a congruence), ``refuted`` for ``=`` or ``\\equiv`` and ``proved`` for
  ``\\neq`` assert that the two sides differ.  Such a verdict stands only with a
  :class:`Witness`: a concrete exponent n, in the author's own exponents, and the two exact
  values the sides have there, which must differ (modulo the modulus, for a congruence);
* any other attempt to say "differ" is turned into ``unproven`` with code ``no-witness``
  and the original reason kept in the message.

The check runs when an outcome is built and again whenever its verdict, kind, relation or
witness is changed later, so that no path, present or future, can skip it.

Claims about a single form (membership, dimension, eigenform) and ``solve`` claims are
outside this rule: their refutations rest on computed invariants (a weight, an order at a
cusp, a dimension, an inconsistent linear system), not on two sides compared at one
exponent.
"""

from __future__ import annotations

from dataclasses import dataclass, field
from fractions import Fraction
from typing import Any

from verifier.numbers import prime_factors

# Kinds of claims that compare two sides coefficient by coefficient.
TWO_SIDED = frozenset({"equality", "inequality", "prefix", "arithmetic", "value", "congruence"})
# Kinds whose claim may have no running variable (a value such as tau(5) mod 5): then the
# witness is the pair of values itself.
WITHOUT_EXPONENT = frozenset({"value", "congruence"})
_WATCHED = frozenset({"verdict", "kind", "relation", "first_difference"})


def frac_str(x: Fraction) -> str:
    """An exact rational as ``a`` or ``a/b``."""
    return str(x.numerator) if x.denominator == 1 else f"{x.numerator}/{x.denominator}"


def differ_modulo(a: Fraction, b: Fraction, modulus: int | None) -> bool:
    """Whether a and b differ (modulo ``modulus`` when given, for rationals integral at it).

    A difference that is not integral at every prime of the modulus is not 0 modulo it.
    """
    if modulus is None:
        return a != b
    diff = a - b
    if any(diff.denominator % p == 0 for p in prime_factors(abs(modulus))):
        return True
    return diff.numerator % modulus != 0


@dataclass(frozen=True)
class Witness:
    """An exponent n (the author's) with the two exact values of the sides there."""

    n: int | Fraction | None
    left: Fraction
    right: Fraction
    modulus: int | None = None

    def differs(self) -> bool:
        """Whether the two values differ (as residues, for a congruence)."""
        return differ_modulo(self.left, self.right, self.modulus)

    def to_dict(self) -> dict[str, Any]:
        """The JSON form: ``{"n", "left", "right"}`` and ``"modulus"`` for congruences."""
        n: int | str | None
        if self.n is None:
            n = None
        elif isinstance(self.n, Fraction) and self.n.denominator != 1:
            n = frac_str(self.n)
        else:
            n = int(self.n)
        out: dict[str, Any] = {"n": n, "left": frac_str(self.left), "right": frac_str(self.right)}
        if self.modulus is not None:
            out["modulus"] = self.modulus
        return out

    @classmethod
    def from_dict(cls, d: Any) -> Witness | None:
        """Read back :meth:`to_dict`; None when the data are not exact numbers."""
        if not isinstance(d, dict):
            return None
        try:
            raw = d.get("n")
            n: int | Fraction | None
            if raw is None:
                n = None
            elif isinstance(raw, bool):
                return None
            elif isinstance(raw, int):
                n = raw
            else:
                n = Fraction(str(raw))
            left, right = Fraction(str(d["left"])), Fraction(str(d["right"]))
            modulus = d.get("modulus")
            if modulus is not None and (not isinstance(modulus, int) or isinstance(modulus, bool) or modulus == 0):
                return None
        except (KeyError, ValueError, ZeroDivisionError, TypeError):
            return None
        return cls(n, left, right, modulus)


@dataclass
class Outcome:
    """The verdict on one claim and everything that supports it."""

    verdict: str  # proved | refuted | unproven | error
    kind: str  # equality | inequality | prefix | arithmetic | value | congruence | membership | ...
    message: str
    space: dict[str, Any] | None = None
    method: str | None = None
    bound: int | None = None
    terms_compared: int = 0
    # The witness of a difference as JSON ({"n", "left", "right"}); see the module docstring.
    first_difference: dict[str, Any] | None = None
    components: list[dict[str, Any]] = field(default_factory=list)
    code: str | None = None
    hint: str = ""
    # For refutations: coefficients around the first difference, rows [n, left, right]
    # (exact values as strings, n as the author writes exponents).
    table: list[list[Any]] = field(default_factory=list)
    suggestion: str | None = None  # a corrected claim, when one is known
    relation: str = "="  # "=" (also for congruences) or "!="
    # For proved claims: the certificate as data (see :mod:`verifier.prove.certificate`).
    certificate: dict[str, Any] | None = None
    # For progression claims proved by U_m: multiplier, form, target space, coefficients
    # compared (see :mod:`verifier.claims.progression`).
    progression: dict[str, Any] | None = None

    def __post_init__(self) -> None:
        if self.kind == "inequality":
            object.__setattr__(self, "relation", "!=")
        self._enforce()
        object.__setattr__(self, "_sealed", True)

    def __setattr__(self, name: str, value: Any) -> None:
        object.__setattr__(self, name, value)
        if name in _WATCHED and getattr(self, "_sealed", False):
            self._enforce()

    @property
    def witness(self) -> Witness | None:
        """The witness of a difference, read back from ``first_difference``."""
        return Witness.from_dict(self.first_difference)

    def asserts_difference(self) -> bool:
        """Whether this verdict says that the two sides of the claim differ."""
        if self.kind not in TWO_SIDED:
            return False
        if self.relation == "!=":
            return self.verdict == "proved"
        return self.verdict == "refuted"

    def _enforce(self) -> None:
        if not self.asserts_difference():
            return
        w = self.witness
        problem = None
        if w is None:
            problem = "no coefficient with two different exact values was produced"
        elif w.n is None and self.kind not in WITHOUT_EXPONENT:
            problem = "the witness names no exponent"
        elif not w.differs():
            problem = "the witness's two values do not differ"
        if problem is None:
            return
        object.__setattr__(self, "verdict", "unproven")
        object.__setattr__(self, "code", "no-witness")
        object.__setattr__(self, "first_difference", None)
        object.__setattr__(self, "table", [])
        object.__setattr__(self, "suggestion", None)
        object.__setattr__(self, "message", f"no verdict: {problem} ({self.message})")
        object.__setattr__(
            self, "hint", "qreferee says two sides differ only at an exponent where it computed both values"
        )
