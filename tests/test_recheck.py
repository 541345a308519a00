"""The independent re-checker (``qreferee recheck``): it confirms the certificates of the
sample manuscripts, catches every kind of broken certificate, says which claims it does not
re-check, imports nothing from the main pipeline, and computes its series correctly."""

from __future__ import annotations

import ast
import copy
import json
import subprocess
import sys
from fractions import Fraction
from pathlib import Path
from typing import Any

import pytest
from verifier import check_path, check_text
from verifier.recheck import arith, atoms
from verifier.recheck.check import CONFIRMED, FAILED, NOT_RECHECKED, recheck
from verifier.recheck.run import EXIT_FAILED, recheck_report

REPO = Path(__file__).resolve().parent.parent
SAMPLES = REPO / "sample_docs"
RECHECK = REPO / "verifier" / "recheck"
CHECKED = (
    "sturm",
    "valence",
    "expansion",
    "witness",
    "sturm-congruence",
    "cusp-orders",
    "dimension-formula",
    "computation",
    "linear-algebra",
    "u-operator",
)

# Identities whose truth is classical (the source beside each).
MANUSCRIPT = r"""
%@claim
\begin{equation}\label{eq:e12}
E_{12} = \frac{441}{691}E_4^3 + \frac{250}{691}E_6^2
\end{equation}

%@claim
\[ \theta(\tau)^4 = \frac{\eta(\tau)^8}{\eta(2\tau)^4} + 16\,\frac{\eta(4\tau)^8}{\eta(2\tau)^4} \]

%@claim
\[ \frac{\eta(\tau)^{16}\eta(4\tau)^8}{\eta(2\tau)^{24}}
   + 16\,\frac{\eta(\tau)^8\eta(4\tau)^{16}}{\eta(2\tau)^{24}} = 1 \]

%@claim
\[ \partial_4 E_4 = -\frac{1}{3}E_6 \]

%@claim
\[ E_4 = 1 + 240q + 2160q^2 + 6720q^3 + \cdots \]

%@claim
\[ E_2^2 \neq E_4 \]
"""
# E_12 = (441 E_4^3 + 250 E_6^2)/691: Serre, A Course in Arithmetic, VII.4 (from memory).
# theta^4 as eta quotients (Jacobi's four-square identity in eta form) and the weight-0
# identity at level 4: Koehler, Eta Products and Theta Series Identities, 2011 (from memory).
# theta_4 E_4 = -E_6/3 (Ramanujan's differential equation): Zagier, "Elliptic modular forms
# and their applications", Prop. 15 (from memory).  E_4 coefficients 240 sigma_3(n): common practice.


@pytest.fixture(scope="module")
def report() -> dict[str, Any]:
    data: dict[str, Any] = json.loads(json.dumps(check_text(MANUSCRIPT, "m.tex").to_dict()))
    return data


def _cert(report: dict[str, Any], index: int) -> dict[str, Any]:
    claim = report["claims"][index]
    assert claim["verdict"] == "proved", claim["message"]
    return copy.deepcopy(claim["certificate"])


def test_every_certificate_of_the_manuscript_is_confirmed(report: dict[str, Any]) -> None:
    methods = []
    for claim in report["claims"]:
        assert claim["verdict"] == "proved", claim["message"]
        result = recheck(claim["certificate"])
        assert result.status == CONFIRMED, (claim["source"], result.reasons)
        methods.append(claim["certificate"]["method"])
    assert set(methods) == {"sturm", "valence", "expansion", "witness"}


def test_sample_manuscripts_are_confirmed_or_named_as_not_rechecked() -> None:
    for name in ("paper.tex", "note.md"):
        data = json.loads(json.dumps(check_path(SAMPLES / name).to_dict()))
        done = recheck_report(data)
        proved = [c for c in data["claims"] if c["verdict"] == "proved"]
        assert len(done.entries) == len(proved)
        for claim, result in done.entries:
            assert result.status != FAILED, (claim["source"], result.reasons)
            if claim["certificate"]["method"] in CHECKED:
                assert result.status == CONFIRMED, (claim["source"], result.reasons)
            else:
                assert result.status == NOT_RECHECKED and result.reasons


def _broken(cert: dict[str, Any]) -> list[str]:
    result = recheck(cert)
    assert result.status == FAILED, result
    assert result.reasons
    return result.reasons


@pytest.mark.parametrize("index", [0, 1])
def test_a_lowered_bound_is_caught(report: dict[str, Any], index: int) -> None:
    cert = _cert(report, index)
    cert["bound"] -= 1
    cert["pieces"][-1]["bound"] -= 1
    assert any("bound" in r for r in _broken(cert))


def test_a_raised_bound_is_caught(report: dict[str, Any]) -> None:
    cert = _cert(report, 0)
    cert["bound"] += 1
    assert any("bound" in r for r in _broken(cert))


def test_an_altered_coefficient_is_caught(report: dict[str, Any]) -> None:
    for index in (0, 4):  # a Sturm proof and a printed expansion
        cert = _cert(report, index)
        values = cert["coefficients"]["values"]
        values[1] = str(Fraction(values[1]) + 1)
        assert any("coefficient" in r for r in _broken(cert))
    cert = _cert(report, 0)
    cert["coefficients"]["sha256"] = "0" * 64
    assert any("hash" in r for r in _broken(cert))


def test_an_altered_constant_in_a_side_is_caught(report: dict[str, Any]) -> None:
    cert = _cert(report, 0)
    cert["right"]["expr"] = cert["right"]["expr"].replace("441/691", "441/619")
    assert any("cleared difference" in r for r in _broken(cert))


def test_an_altered_printed_coefficient_is_caught(report: dict[str, Any]) -> None:
    cert = _cert(report, 4)
    cert["right"]["expr"] = cert["right"]["expr"].replace("2160", "2161")
    assert any("differ" in r for r in _broken(cert))


@pytest.mark.parametrize("index", [0, 1, 2])
def test_an_altered_level_is_caught(report: dict[str, Any], index: int) -> None:
    cert = _cert(report, index)
    cert["space"]["level"] = 2 * cert["space"]["level"]
    assert any("level" in r for r in _broken(cert))


def test_an_altered_character_is_caught(report: dict[str, Any]) -> None:
    cert = _cert(report, 1)
    cert["space"]["character"] = -1
    assert any("character" in r for r in _broken(cert))
    cert = _cert(report, 1)
    cert["pieces"][0]["character"] = -1
    assert any("character" in r for r in _broken(cert))


@pytest.mark.parametrize("index", [0, 1, 3])
def test_an_altered_weight_is_caught(report: dict[str, Any], index: int) -> None:
    cert = _cert(report, index)
    cert["space"]["weight"] = str(Fraction(cert["space"]["weight"]) + 2)
    assert any("weight" in r for r in _broken(cert))


def test_an_altered_method_or_cusp_order_is_caught(report: dict[str, Any]) -> None:
    cert = _cert(report, 2)
    assert cert["method"] == "valence"
    cert["cusp_order_bounds"] = {k: "5" for k in cert["cusp_order_bounds"]}
    assert any("order bound" in r for r in _broken(cert))
    cert = _cert(report, 2)
    cert["method"] = "sturm"
    assert any("method" in r for r in _broken(cert))


def test_an_altered_witness_is_caught(report: dict[str, Any]) -> None:
    cert = _cert(report, 5)
    cert["witness"]["n"] = 0  # E_2^2 and E_4 agree at q^0
    assert any("no difference" in r for r in _broken(cert))


def test_constructs_it_does_not_implement_are_named() -> None:
    cert = {
        "format": 1,
        "method": "sturm",
        "relation": "=",
        "left": {"expr": "(series 0123456789ab 1)", "truncation": None},
        "right": {"expr": "(series 0123456789ab 1)", "truncation": None},
        "space": {"weight": "4", "level": 1, "character": 1},
        "pieces": [],
        "bound": 0,
        "index": 1,
    }
    result = recheck(cert)
    assert result.status == NOT_RECHECKED and "series" in result.reasons[0]
    assert recheck({"format": 1, "method": "cusp-orders"}).status == NOT_RECHECKED
    assert recheck({"format": 7}).status == NOT_RECHECKED
    assert recheck("nonsense").status == FAILED


def test_the_rechecker_imports_nothing_from_the_pipeline() -> None:
    for path in RECHECK.glob("*.py"):
        tree = ast.parse(path.read_text())
        for node in ast.walk(tree):
            names = []
            if isinstance(node, ast.Import):
                names = [a.name for a in node.names]
            elif isinstance(node, ast.ImportFrom):
                names = [node.module or ""]
            for name in names:
                top = name.split(".")[0]
                assert top not in ("flint", "sympy"), (path, name)
                if top == "verifier":
                    assert name.startswith("verifier.recheck"), (path, name)


# -- the re-checker's own mathematics, against outside sources ---------------------------
def test_index_and_sturm_bound() -> None:
    # [SL2(Z):Gamma_0(N)] for N = 1..12: OEIS A001615 (1, 3, 4, 6, 6, 12, 8, 12, 12, 18, 12, 24).
    assert [arith.index_gamma0(n) for n in range(1, 13)] == [1, 3, 4, 6, 6, 12, 8, 12, 12, 18, 12, 24]
    # Sturm bound of M_12(SL2(Z)) is 1 (dimension 2): common practice.
    assert arith.sturm_bound(Fraction(12), 1) == 1


def test_bernoulli_and_eisenstein() -> None:
    # B_12 = -691/2730 and B_4 = -1/30: Abramowitz-Stegun, Table 23.2.
    assert arith.bernoulli(12) == Fraction(-691, 2730)
    assert arith.bernoulli(4) == Fraction(-1, 30)
    # E_6 = 1 - 504 q - 16632 q^2 - 122976 q^3: Serre, A Course in Arithmetic, VII.4 (from memory).
    assert atoms.eisenstein(6, 4).window(0, 4) == [1, -504, -16632, -122976]


def test_eta_theta_and_partitions() -> None:
    # tau(n), n = 1..7: OEIS A000594.
    delta = atoms.eta_quotient([(1, 24)], 8)
    assert delta.window(1, 8) == [1, -24, 252, -1472, 4830, -6048, -16744]
    # p(n), n = 0..9: OEIS A000041.
    assert atoms.partitions(10).window(0, 10) == [1, 1, 2, 3, 5, 7, 11, 15, 22, 30]
    # Representations by x^2 + xy + y^2 (Gram [[2,1],[1,2]]), n = 0..7: OEIS A004016.
    assert atoms.theta([[2, 1], [1, 2]], 8).window(0, 8) == [1, 6, 0, 6, 6, 0, 0, 12]


def test_ligozat_and_newman() -> None:
    # eta(tau)^2 eta(11 tau)^2 is a cusp form on Gamma_0(11) with order 1 at both cusps
    # (Ligozat 1975; the weight-2 newform of level 11): from memory.
    pairs = [(1, 2), (11, 2)]
    assert arith.eta_least_level(pairs) == 11
    assert arith.eta_conditions(pairs, 11) is None
    assert arith.ligozat_order(pairs, 11, 1) == 1 and arith.ligozat_order(pairs, 11, 11) == 1
    # eta(tau)^8 eta(2 tau)^8 lies on Gamma_0(2) with trivial character: Koehler 2011 (from memory).
    assert arith.eta_kernel([(1, 8), (2, 8)]) == 1


# -- the command line ----------------------------------------------------------------------
def _run(*args: str, cwd: Path) -> subprocess.CompletedProcess[str]:
    return subprocess.run([sys.executable, "-m", "verifier", *args], capture_output=True, text=True, cwd=cwd)


def test_cli_recheck(tmp_path: Path, report: dict[str, Any]) -> None:
    good = tmp_path / "good.json"
    good.write_text(json.dumps(report))
    run = _run("recheck", str(good), cwd=tmp_path)
    assert run.returncode == 0, run.stdout + run.stderr
    assert "6 confirmed" in run.stdout
    bad = copy.deepcopy(report)
    bad["claims"][0]["certificate"]["space"]["level"] = 3
    broken = tmp_path / "bad.json"
    broken.write_text(json.dumps(bad))
    run = _run("recheck", str(broken), "--format", "json", cwd=tmp_path)
    assert run.returncode == EXIT_FAILED
    data = json.loads(run.stdout)
    assert data["summary"]["recheck-failed"] == 1
    assert data["rechecks"][0]["status"] == "recheck-failed"
    (tmp_path / "junk.json").write_text("{")
    assert _run("recheck", str(tmp_path / "junk.json"), cwd=tmp_path).returncode == 2


def test_cli_check_with_recheck(tmp_path: Path) -> None:
    src = tmp_path / "m.tex"
    src.write_text(MANUSCRIPT)
    run = _run("check", str(src), "--recheck", cwd=tmp_path)
    assert run.returncode == 0, run.stdout + run.stderr
    assert "recheck: 6 confirmed, 0 not rechecked, 0 failed" in run.stdout
    run = _run("check", str(src), "--recheck", "--format", "json", cwd=tmp_path)
    assert run.returncode == 0
    assert json.loads(run.stdout)["summary"]["proved"] == 6
    assert "6 confirmed" in run.stderr


def test_hecke_operators_are_rechecked() -> None:
    # T_2 Delta = tau(2) Delta = -24 Delta (Ramanujan; Serre, A Course in Arithmetic, VII.5) and
    # T_3 E_4 = sigma_3(3) E_4 = 28 E_4 (eigenvalues of Eisenstein series: common practice).
    text = "%@claim\n\\[ T_2 \\Delta = -24\\Delta \\]\n\n%@claim\n\\[ T_3 E_4 = 28 E_4 \\]\n"
    data = json.loads(json.dumps(check_text(text, "h.tex").to_dict()))
    for claim in data["claims"]:
        assert claim["verdict"] == "proved", claim["message"]
        assert recheck(claim["certificate"]).status == CONFIRMED
        cert = copy.deepcopy(claim["certificate"])
        cert["right"]["expr"] = cert["right"]["expr"].replace("24", "23").replace("28", "27")
        assert recheck(cert).status == FAILED
