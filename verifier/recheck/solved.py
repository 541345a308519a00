"""Re-checking solved unknowns (``solve=``, method ``linear-algebra``).

The certificate gives the claim with the solution put in (``instance``, a Sturm or valence
certificate, re-checked in full by :mod:`.check`), and the sides with every unknown 0 and
with one unknown 1 (``family``).  The claim is affine in its unknowns (qreferee checks this
before solving), so its difference of sides is L(a) = L_0 + sum a_i (L_i - L_0).  The
re-checker confirms:

* the instance holds (its own certificate);
* the instance is the member of the family at the stated solution: L(instance) =
  L_0 + sum a_i (L_i - L_0) on every exponent through the instance's bound;
* when the solution is claimed unique, the columns L_i - L_0 are linearly independent,
  seen on their coefficients through that bound (by exact Gaussian elimination): two
  solutions a, b would give sum (a_i - b_i)(L_i - L_0) = 0, so a = b.
"""

from __future__ import annotations

from fractions import Fraction
from typing import Any

from verifier.recheck.graded import Unsupported
from verifier.recheck.series import Series
from verifier.recheck.sexpr import parse


def _difference(record: dict[str, Any], stop: int) -> Series:
    from verifier.recheck.check import side_series

    left = side_series(parse(str(record["left"]["expr"])), stop)
    right = side_series(parse(str(record["right"]["expr"])), stop)
    return left - right


def rank(rows: list[list[Fraction]]) -> int:
    """The rank of a matrix over Q, by Gaussian elimination."""
    m = [r[:] for r in rows]
    r = 0
    cols = len(m[0]) if m else 0
    for c in range(cols):
        pivot = next((i for i in range(r, len(m)) if m[i][c] != 0), None)
        if pivot is None:
            continue
        m[r], m[pivot] = m[pivot], m[r]
        for i in range(r + 1, len(m)):
            if m[i][c] != 0:
                f = m[i][c] / m[r][c]
                m[i] = [a - f * b for a, b in zip(m[i], m[r], strict=True)]
        r += 1
    return r


def recheck_solved(cert: dict[str, Any], reasons: list[str], notes: list[str]) -> None:
    """Append to ``reasons`` what does not hold up in a ``linear-algebra`` certificate."""
    from verifier.recheck.check import CONFIRMED, recheck

    instance = cert["instance"]
    if instance.get("method") not in ("sturm", "valence"):
        raise Unsupported(f"the claim at the solution is proved by {instance.get('method')!r}, not by a bound")
    done = recheck(instance)
    if done.status != CONFIRMED:
        reasons.extend(f"the claim at the solution: {r}" for r in done.reasons or [done.status])
        return
    unknowns = list(cert["unknowns"])
    solution = [Fraction(str(v)) for v in cert["solution"]]
    family = cert["family"]
    units = family["units"]
    if not (len(unknowns) == len(solution) == len(units)):
        reasons.append(f"{len(unknowns)} unknowns, {len(solution)} values and {len(units)} unit sides")
        return
    stop = int(instance.get("bound", 0)) + 1
    at = _difference(instance, stop)
    zero = _difference(family["zero"], stop)
    columns = [_difference(u, stop) - zero for u in units]
    lo = min([at.lo, zero.lo] + [c.lo for c in columns])
    combined = zero
    for a, c in zip(solution, columns, strict=True):
        combined = combined + c.scale(a)
    for n in range(lo, stop):
        if combined[n] != at[n]:
            reasons.append(
                f"the claim at the stated solution is not the family's member there: at q^{n}, "
                f"{at[n]} against {combined[n]}"
            )
            break
    r = rank([c.window(lo, stop) for c in columns])
    if cert.get("unique"):
        if r < len(unknowns):
            reasons.append(
                f"the solution is said to be unique, but the {len(unknowns)} columns have rank {r} through q^{stop - 1}"
            )
        else:
            notes.append(f"the solution is unique: {len(unknowns)} independent columns through q^{stop - 1}")
    elif r == len(unknowns):
        reasons.append("the certificate says the solutions form a family, but the columns are independent")
    else:
        notes.append(f"a family of solutions: the columns have rank {r} < {len(unknowns)}")
