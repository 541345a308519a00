"""The stages depend on each other in one direction only (DEVELOPERS.md, "Layers").

scan and parse read text and know nothing of forms or proofs; the forms know nothing of proofs
or claims; shared integer arithmetic lives in ``verifier/numbers.py``, which imports no stage.
Imports are read from the source with ``ast`` (nothing is imported to check them).
"""

from __future__ import annotations

import ast
from pathlib import Path

import pytest

PACKAGE = Path(__file__).resolve().parent.parent / "verifier"

# stage -> the stages it must not import
FORBIDDEN = {
    "scan": ("forms", "prove", "elaborate", "claims", "arith", "api", "report"),
    "parse": ("forms", "prove", "elaborate", "claims", "arith", "api", "report"),
    "forms": ("prove", "claims", "api", "report", "elaborate"),
    "numbers.py": ("scan", "parse", "forms", "prove", "elaborate", "claims", "arith", "api", "report"),
}


def imported_modules(path: Path) -> list[str]:
    tree = ast.parse(path.read_text(encoding="utf-8"))
    out = []
    for node in ast.walk(tree):
        if isinstance(node, ast.ImportFrom) and node.module:
            out.append(node.module)
            out.extend(f"{node.module}.{a.name}" for a in node.names)
        elif isinstance(node, ast.Import):
            out.extend(a.name for a in node.names)
    return out


@pytest.mark.parametrize("stage", sorted(FORBIDDEN))
def test_stage_imports_point_one_way(stage: str) -> None:
    files = [PACKAGE / stage] if stage.endswith(".py") else sorted((PACKAGE / stage).rglob("*.py"))
    assert files
    bad = []
    for f in files:
        for module in imported_modules(f):
            parts = module.split(".")
            if parts[0] == "verifier" and len(parts) > 1 and parts[1] in FORBIDDEN[stage]:
                bad.append(f"{f.relative_to(PACKAGE)} imports {module}")
    assert not bad, bad
