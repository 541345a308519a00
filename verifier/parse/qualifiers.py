"""Text shapes read around the claim grammar: a case distinction, a Gram-matrix definition.

These are recognised on the text before the grammar sees it (a ``cases`` environment is no
relation at all; a matrix is no expression of the grammar).  Offsets are those of the text
given, so every diagnostic keeps its file:line:column.
"""

from __future__ import annotations

import re
from dataclasses import dataclass

_CASES = re.compile(r"\\begin\s*\{d?cases\*?\}")
_MATRIX_DEFINE = re.compile(r"^\s*([A-Za-z](?:_\{?\w+\}?)?|\\[A-Za-z]+)\s*=\s*(\\begin\s*\{[bp]?matrix\}.*)$", re.S)


def cases_at(text: str) -> int | None:
    """The offset of a ``cases`` environment in a row (a piecewise definition), or None."""
    found = _CASES.search(text)
    return None if found is None else found.start()


@dataclass(frozen=True)
class MatrixDefinition:
    """``Q = \\begin{pmatrix}...\\end{pmatrix}``: a name given to a Gram matrix."""

    name: str
    matrix: str  # the matrix as written, from \begin on
    at: int  # offset of the matrix in the definition's text


def matrix_definition(text: str) -> MatrixDefinition | None:
    """A definition whose right side is a matrix environment, or None."""
    m = _MATRIX_DEFINE.match(text)
    if m is None:
        return None
    return MatrixDefinition(m.group(1), m.group(2), m.start(2))
