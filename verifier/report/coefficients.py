"""The coefficients of both sides of a claim around the place where they differ.

The prover fills ``Outcome.table`` (rows ``[n, left, right]``, exact values as strings,
``n`` as the author writes exponents) for refutations and for the witness of a proved
``\\neq``.  Without a table, the single first difference is a one-row table.
"""

from __future__ import annotations

from dataclasses import dataclass
from typing import Any

from verifier.api import ClaimResult


@dataclass(frozen=True)
class Row:
    """One exponent: the coefficient of q^n on each side."""

    n: str
    left: str
    right: str

    @property
    def differs(self) -> bool:
        """True when the two coefficients are different (values are canonical exact strings)."""
        return self.left != self.right


def coefficient_table(claim: ClaimResult) -> list[tuple[str, str, str]] | None:
    """Rows ``(n, left, right)`` of the claim's coefficient table, or None when there is none."""
    rows = table_rows(claim)
    return [(r.n, r.left, r.right) for r in rows] if rows else None


def table_rows(claim: ClaimResult) -> list[Row]:
    """The coefficient table as :class:`Row` objects (empty when there is none)."""
    outcome = claim.outcome
    table: Any = getattr(outcome, "table", None)
    rows: list[Row] = []
    if isinstance(table, list):
        for entry in table:
            if isinstance(entry, list | tuple) and len(entry) == 3:
                rows.append(Row(str(entry[0]), str(entry[1]), str(entry[2])))
    if rows:
        return rows
    fd = outcome.first_difference
    if isinstance(fd, dict) and {"n", "left", "right"} <= set(fd):
        return [Row(str(fd["n"]), str(fd["left"]), str(fd["right"]))]
    return []
