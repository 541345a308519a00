"""The stages depend on each other in one direction only (DEVELOPERS.md, "Layers").

scan and parse read text and know nothing of forms or proofs; the forms know nothing of proofs
or claims; shared integer arithmetic lives in ``verifier/numbers.py``, which imports no stage.
Every kind of claim is read, decided and certified by one module of ``verifier/claims/``
(DEVELOPERS.md, "Adding a kind of claim"): ``prove/`` is the engine below the kinds and
imports none of them, and ``api.py`` orchestrates without reading claim text or deciding.
Imports and definitions are read from the source with ``ast`` (nothing is imported to check them).
"""

from __future__ import annotations

import ast
import json
from pathlib import Path

import pytest

PACKAGE = Path(__file__).resolve().parent.parent / "verifier"

# stage -> the stages it must not import
FORBIDDEN = {
    "scan": ("forms", "prove", "elaborate", "claims", "arith", "api", "report"),
    "parse": ("forms", "prove", "elaborate", "claims", "arith", "api", "report"),
    "forms": ("prove", "claims", "api", "report", "elaborate"),
    "prove": ("claims", "api", "report"),
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


CLAIMS = PACKAGE / "claims"
STEPS = ("read", "decide", "certify")


def _top_level_functions(path: Path) -> dict[str, ast.FunctionDef]:
    tree = ast.parse(path.read_text(encoding="utf-8"))
    return {n.name: n for n in tree.body if isinstance(n, ast.FunctionDef)}


def _registry() -> tuple[dict[str, str], list[str]]:
    """The registry of verifier/claims/kinds.py as module names: (KINDS, ORDER)."""
    tree = ast.parse((CLAIMS / "kinds.py").read_text(encoding="utf-8"))
    kinds: dict[str, str] = {}
    order: list[str] = []
    for node in tree.body:
        if isinstance(node, ast.AnnAssign) and isinstance(node.target, ast.Name):
            if node.target.id == "KINDS" and isinstance(node.value, ast.Dict):
                for k, v in zip(node.value.keys, node.value.values, strict=True):
                    assert isinstance(k, ast.Constant) and isinstance(v, ast.Name)
                    kinds[str(k.value)] = v.id
            if node.target.id == "ORDER" and isinstance(node.value, ast.Tuple):
                order = [e.id for e in node.value.elts if isinstance(e, ast.Name)]
    return kinds, order


def test_every_kind_of_the_report_has_its_module_in_claims() -> None:
    schema = json.loads((PACKAGE / "schema" / "report.schema.json").read_text(encoding="utf-8"))
    enums = [
        d["enum"]
        for d in _walk_json(schema)
        if isinstance(d, dict) and isinstance(d.get("enum"), list) and "membership" in d["enum"]
    ]
    assert enums, "the schema's enumeration of kinds"
    kinds, order = _registry()
    assert set(kinds) == set(enums[0])
    assert set(kinds.values()) <= set(order), "every registered kind is offered claims"
    for module in order:
        path = CLAIMS / f"{module}.py"
        assert path.exists(), module
        defined = _top_level_functions(path)
        missing = [step for step in STEPS if step not in defined]
        assert not missing, f"claims/{module}.py lacks {missing}"


def _walk_json(node: object) -> list[object]:
    out: list[object] = [node]
    if isinstance(node, dict):
        for v in node.values():
            out.extend(_walk_json(v))
    elif isinstance(node, list):
        for v in node:
            out.extend(_walk_json(v))
    return out


def _returns_outcome(fn: ast.FunctionDef) -> bool:
    r = fn.returns
    text = ast.unparse(r) if r is not None else ""
    return "Outcome" in text.split(" | ") or text == "Outcome"


def test_only_claims_modules_decide_a_kind() -> None:
    # A top-level decide...() that returns an Outcome is a decision of a kind: it lives in claims/.
    # (The engine in prove/ returns its own decisions, or is the Prover's method.)
    bad = []
    for f in sorted(PACKAGE.rglob("*.py")):
        if f.is_relative_to(CLAIMS):
            continue
        for name, fn in _top_level_functions(f).items():
            if name.startswith("decide") and _returns_outcome(fn):
                bad.append(f"{f.relative_to(PACKAGE)}: {name}")
    assert not bad, bad


def test_api_orchestrates_without_reading_or_deciding() -> None:
    api = PACKAGE / "api.py"
    modules = imported_modules(api)
    assert "re" not in modules, "api.py reads no claim text with regular expressions"
    deciders = [m for m in modules if m.rsplit(".", 1)[-1].startswith(("decide", "read_", "parse_space"))]
    assert not deciders, deciders
    kind_modules = {f"verifier.claims.{m}" for m in _registry()[1]}
    assert not kind_modules & set(modules), "api.py reaches the kinds through claims/kinds.py only"
    engine = [m for m in modules if m.startswith("verifier.prove.")]
    allowed = {
        "verifier.prove.evaluate",
        "verifier.prove.evaluate.AtomTable",
        "verifier.prove.prover",
        "verifier.prove.prover.DEFAULT_MAX_TERMS",
        "verifier.prove.prover.Outcome",
        "verifier.prove.prover.Prover",
    }
    assert set(engine) <= allowed, set(engine) - allowed
