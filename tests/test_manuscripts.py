"""Whole manuscripts with their expected verdicts written beside each tag.

Each ``%@claim`` line in ``tests/data/manuscripts/*.tex`` ends with a remark
``% expect: VERDICT [n]; VERDICT [n]...`` (one entry per claim the tag produces, n the
first differing exponent of a refutation).  The identities are the classical level-one
relations of docs/method.md#eisenstein, #delta-eta-j (Serre, *A Course in Arithmetic*, Ch. VII;
Ramanujan's tau table, 1916) with deliberate errors; 3617 E_16 = 1617 E_4^4 + 2000 E_4 E_6^2
is from memory (it follows from dim M_16 = 2 and the first two coefficients).
"""

from __future__ import annotations

import re
from pathlib import Path

import pytest
from verifier import check_path

MANUSCRIPTS = sorted((Path(__file__).parent / "data" / "manuscripts").glob("*.tex"))
_TAG = re.compile(r"^%@claim\s+name=(\S+).*% expect: (.+)$", re.M)


def expectations(path: Path) -> dict[str, tuple[str, int | None]]:
    out: dict[str, tuple[str, int | None]] = {}
    for m in _TAG.finditer(path.read_text(encoding="utf-8")):
        name = m.group(1)
        for k, entry in enumerate(m.group(2).split(";")):
            words = entry.split()
            key = name if k == 0 else f"{name}.{k + 1}"
            out[key] = (words[0], int(words[1]) if len(words) > 1 else None)
    return out


@pytest.mark.parametrize("path", MANUSCRIPTS, ids=lambda p: p.name)
def test_every_verdict_is_the_expected_one(path: Path) -> None:
    expected = expectations(path)
    report = check_path(path)
    got = {
        c.name: (c.verdict, c.outcome.first_difference["n"] if c.outcome.first_difference else None)
        for c in report.claims
    }
    # Only refutations promise an exponent; a proved \neq also carries one.
    for name, (verdict, n) in expected.items():
        assert name in got, f"claim {name} missing"
        assert got[name][0] == verdict, f"{name}: {report.claims[list(got).index(name)].outcome.message}"
        if n is not None:
            assert got[name][1] == n, name
    assert set(got) == set(expected)
    assert len(report.claims) >= 30
