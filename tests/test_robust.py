"""Hardening: nothing silent, hostile documents end in clear errors, ordinary phrasing is read."""

from __future__ import annotations

import io
import json
import stat
import subprocess
import sys
import time
import zipfile
from fractions import Fraction
from pathlib import Path

import pytest
from verifier.api import check_text
from verifier.arith import terms as t
from verifier.arith.values import Values, squares
from verifier.cli import main
from verifier.diagnostics import CODES, EXAMPLES, explain
from verifier.scan import scan_text
from verifier.screen import screen


def run(*args: str, cwd: Path) -> subprocess.CompletedProcess[str]:
    return subprocess.run(
        [sys.executable, "-m", "verifier", *args], cwd=cwd, capture_output=True, text=True, timeout=120
    )


def claim(body: str, options: str = "") -> str:
    return f"%@claim {options}\n\\[ {body} \\]\n"


def verdicts(text: str, **kw: float) -> list[tuple[str, str | None]]:
    report = check_text(text, **kw)  # type: ignore[arg-type]
    return [(c.verdict, c.outcome.code) for c in report.claims]


# -- 1. never report success after checking nothing ------------------------------------------


def test_no_claims_warns_and_exits_1(tmp_path: Path) -> None:
    (tmp_path / "plain.tex").write_text("An untagged \\[ E_4^2 = E_6 \\]\n", encoding="utf-8")
    proc = run("check", "plain.tex", cwd=tmp_path)
    assert proc.returncode == 1
    assert "[no-claims]" in proc.stdout and "--untagged" in proc.stdout
    screened = run("screen", "plain.tex", cwd=tmp_path)
    assert screened.returncode == 1 and "screen --untagged" in screened.stdout


def test_binary_file_is_unreadable(tmp_path: Path) -> None:
    (tmp_path / "b.tex").write_bytes(bytes(range(256)) * 4)
    proc = run("check", "b.tex", "--format", "json", cwd=tmp_path)
    assert proc.returncode == 2
    assert [d["code"] for d in json.loads(proc.stdout)["diagnostics"]] == ["unreadable"]


def test_non_utf8_included_file_is_unreadable(tmp_path: Path) -> None:
    (tmp_path / "part.tex").write_bytes("caf\xe9\n".encode("latin-1") + claim("E_4^2 = E_8").encode())
    (tmp_path / "main.tex").write_text("\\input{part}\n", encoding="utf-8")
    proc = run("check", "main.tex", "--format", "json", cwd=tmp_path)
    assert proc.returncode == 2
    data = json.loads(proc.stdout)
    assert [d["code"] for d in data["diagnostics"]] == ["unreadable"]
    assert [c["verdict"] for c in data["claims"]] == ["proved"]  # the rest is still read


@pytest.mark.parametrize(
    ("text", "markdown"),
    [
        ("% @claim\n\\[ E_4^2 = E_8 \\]\n", False),
        ("%@Claim\n\\[ E_4^2 = E_8 \\]\n", False),
        ("%@claims\n\\[ E_4^2 = E_8 \\]\n", False),
        ("%@ claim\n\\[ E_4^2 = E_8 \\]\n", False),
        ("<!-- @Claim -->\n$$E_4^2 = E_8$$\n", True),
        ("<!-- @ claim -->\n$$E_4^2 = E_8$$\n", True),
    ],
)
def test_near_miss_tags_warn(text: str, markdown: bool) -> None:
    doc = scan_text(text, markdown=markdown)
    warnings = [d for d in doc.diagnostics if d.code == "near-miss-tag"]
    assert len(warnings) == 1 and "@claim" in warnings[0].message


def test_exact_tags_and_code_examples_do_not_warn() -> None:
    assert scan_text("%@claim\n\\[ E_4^2 = E_8 \\]\n").diagnostics == []
    assert scan_text("<!--@claim-->\n$$E_4^2 = E_8$$\n", markdown=True).diagnostics == []  # read as a tag
    assert scan_text("```\n<!-- @Claim -->\n```\n", markdown=True).diagnostics == []


def test_summary_counts_problems_outside_claims(tmp_path: Path) -> None:
    (tmp_path / "m.tex").write_text(claim("E_4^2 = E_8") + "\\input{missing}\n", encoding="utf-8")
    proc = run("check", "m.tex", cwd=tmp_path)
    assert proc.returncode == 2
    assert "1 problem outside claims (1 error)" in proc.stdout.splitlines()[-2]


def test_long_input_name_is_a_clear_error(tmp_path: Path) -> None:
    (tmp_path / "m.tex").write_text(claim("E_4^2 = E_8") + "\\input{" + "x" * 300 + "}\n", encoding="utf-8")
    proc = run("check", "m.tex", "--format", "json", cwd=tmp_path)
    assert proc.returncode == 2, proc.stderr
    assert [d["code"] for d in json.loads(proc.stdout)["diagnostics"]] == ["include-missing"]


@pytest.mark.parametrize(
    "args",
    [
        ["check", "--jobs", "0"],
        ["check", "--jobs", "-2"],
        ["check", "--max-terms", "0"],
        ["check", "--max-seconds", "-1"],
        ["check", "--max-seconds", "nan"],
        ["screen", "--max-ratio", "0.5"],
        ["screen", "--max-files", "0"],
        ["watch", "--debounce", "-1"],
    ],
)
def test_bad_numbers_on_the_command_line(args: list[str], capsys: pytest.CaptureFixture[str]) -> None:
    with pytest.raises(SystemExit) as exc:
        main([*args, "x.tex"])
    assert exc.value.code == 2
    assert "must be" in capsys.readouterr().err


# -- 4. ordinary phrasing ---------------------------------------------------------------------


@pytest.mark.parametrize(
    "qualifier",
    [
        "\\quad\\text{for all }\\tau\\in\\mathbb H",
        "\\qquad (\\tau\\in\\mathbb{H})",
        ", \\quad \\text{for } \\mathrm{Im}\\,\\tau > 0",
    ],
)
def test_domain_qualifiers_are_not_claims(qualifier: str) -> None:
    report = check_text(claim("E_4^2 = E_8 " + qualifier))
    assert [c.verdict for c in report.claims] == ["proved"]  # E_4^2 = E_8: dim M_8 = 1 (common practice)
    assert "where tau lives" in report.claims[0].reading


def test_eqnarray_bold_names_and_hints() -> None:
    text = (
        "%@claim\n\\begin{eqnarray*}\nE_4^2 &=& E_8 \\\\\n"
        "\\mathbf{E}_4 \\mathrm{E}_6 &=& \\boldsymbol{E}_{10}\n\\end{eqnarray*}\n"
    )
    assert verdicts(text) == [("proved", None), ("proved", None)]  # dim M_8 = dim M_10 = 1 (common practice)
    assert verdicts(claim("\\boldsymbol\\Delta = \\Delta")) == [("proved", None)]
    report = check_text(claim("E_12 = E_{12}"))
    assert "E_{12}" in report.claims[0].outcome.hint


def test_explain_gives_an_example_and_a_fix_for_every_code() -> None:
    assert set(EXAMPLES) == set(CODES)
    for code in CODES:
        text = explain(code)
        assert text is not None and "example:" in text and "fix:" in text


def test_suggestion_corrects_the_written_factor() -> None:
    # 1728 Delta = E_4^3 - E_6^2 (Serre, A Course in Arithmetic, VII.3.3): 1/864 should read 1/1728.
    report = check_text(claim("\\frac{1}{864}(E_4^3 - E_6^2) = \\Delta"))
    assert report.claims[0].verdict == "refuted"
    assert report.claims[0].outcome.suggestion == "holds with 1/1728 in place of 1/864"


# -- 6. archives ----------------------------------------------------------------------------


def test_bad_members_are_left_out_alone(tmp_path: Path) -> None:
    archive = tmp_path / "sub.zip"
    with zipfile.ZipFile(archive, "w") as z:
        z.writestr(
            "paper.tex", "\\documentclass{article}\n\\begin{document}\n" + claim("E_4^2 = E_8") + "\\end{document}\n"
        )
        link = zipfile.ZipInfo("link.tex")
        link.external_attr = (stat.S_IFLNK | 0o777) << 16
        z.writestr(link, "/etc/passwd")
        z.writestr("/abs/evil.tex", "x")
        inner = io.BytesIO()
        with zipfile.ZipFile(inner, "w") as zi:
            zi.writestr("a.tex", "x")
        z.writestr("figures.zip", inner.getvalue())
    result = screen(archive)
    assert [c.verdict for c in result.report.claims] == ["proved"]
    left = [d.message for d in result.report.diagnostics if d.code == "archive-member"]
    assert len(left) == 3
    assert any("'link.tex'" in m and "symbolic link" in m for m in left)
    assert any("'/abs/evil.tex'" in m and "absolute" in m for m in left)
    assert any("'figures.zip'" in m and "not opened" in m for m in left)


# -- 7. hostile documents -------------------------------------------------------------------


@pytest.mark.parametrize(
    "body",
    [
        "E_4^{2^{2^{2^{2^{2}}}}} = E_8",
        "E_4^{2^{2^{2^{2^{2^{2^{2}}}}}}} = E_8",
        "9" * 5000 + " E_4 = E_4",
        "E_4 = \\frac{" + "9" * 3000 + "}{2} E_4",
        "[E_4, E_6]_{99999999} = 0",
        "-(" * 400 + "E_4" + ")" * 400 + " = E_4",
    ],
)
def test_sizes_are_bounded_before_computing(body: str) -> None:
    start = time.perf_counter()
    assert verdicts(claim(body), max_seconds=5) == [("error", "too-large")]
    assert time.perf_counter() - start < 5


@pytest.mark.parametrize("n", [1000, 10000])
def test_long_sums_are_read(n: int) -> None:
    body = " + ".join(["E_4"] * n) + f" = {n} E_4"
    assert verdicts(claim(body)) == [("proved", None)]
    wrong = " + ".join(["E_4"] * n) + f" = {n + 1} E_4"
    assert verdicts(claim(wrong))[0][0] == "refuted"


def test_long_products_and_chains_are_read() -> None:
    assert verdicts(claim(" ".join(["E_4"] * 300) + " = E_4^{300}")) == [("proved", None)]
    assert verdicts(claim(" = ".join(["E_4"] * 200))) == [("proved", None)] * 199


def test_values_at_huge_n_are_computed_by_formula() -> None:
    # r_4(10^9) = 24 sigma(5^9) (Jacobi's four-square theorem, Grosswald ch. 3), with sigma(5^9) = (5^10 - 1)/4.
    expected = 24 * (5**10 - 1) // 4
    report = check_text(claim(f"r_4(10^{{9}}) = {expected}"))
    assert report.claims[0].verdict == "proved"
    report = check_text(claim("p(10^{9}) = 1"))
    assert report.claims[0].verdict == "refuted"  # p(n) grows like exp(pi sqrt(2n/3)) (Hardy-Ramanujan)
    hard = "7" * 300
    for body in (f"\\tau({hard}) = 1", f"\\sigma_3({hard}) = 1", "r_3(10^{9}) = 1", "p(10^{15}) = 1"):
        assert verdicts(claim(body), max_seconds=20) == [("error", "too-large")], body


def _fun(name: str, index: int | None) -> t.Fun:
    return t.Fun(name, name, index, t.Var("n", "n"))


@pytest.mark.parametrize("s", [1, 2, 4, 8])
def test_square_formulas_agree_with_theta_series(s: int) -> None:
    # Jacobi's formulas for r_2, r_4, r_8 (Grosswald, Representations of Integers as Sums of
    # Squares, chapters 2, 3 and 9) against the coefficients of theta^s.
    values = Values()
    for n in range(1, 400):
        assert squares(s, n) == values.value(_fun("r", s), {"n": n}), (s, n)


def test_tau_and_sigma_by_factorisation_agree_with_direct_values(monkeypatch: pytest.MonkeyPatch) -> None:
    import verifier.arith.values as v

    direct = Values()
    ns = [2**5 * 3**2, 720, 1001, 2**10, 3**6 * 5, 997 * 2]
    expected = {n: (direct.value(_fun("tau", None), {"n": n}), direct.value(_fun("sigma", 5), {"n": n})) for n in ns}
    monkeypatch.setattr(v, "MAX_SERIES_N", 1000)  # force the multiplicative path for n > 1000 ...
    monkeypatch.setattr(v, "DIRECT_BITS", 1)  # ... and the factorisation path for sigma
    by_formula = Values()
    for n in ns:
        got = (by_formula.value(_fun("tau", None), {"n": n}), by_formula.value(_fun("sigma", 5), {"n": n}))
        assert got == expected[n], n
    # p(100) = 190569292 (MacMahon's table in Hardy and Ramanujan, 1918)
    assert Values().value(_fun("p", None), {"n": 100}) == Fraction(190569292)


def test_zero_modulus_is_a_clear_error() -> None:
    assert verdicts(claim("\\tau(n) \\equiv \\sigma_{11}(n) \\pmod{0}")) == [("error", "syntax")]


def test_time_budget_holds_while_reading() -> None:
    body = " + ".join(["\\sigma_3(n)"] * 20000) + " = 20000\\sigma_3(n)"
    start = time.perf_counter()
    result = verdicts(claim(body), max_seconds=0.5)
    assert result == [("error", "time-budget")]
    assert time.perf_counter() - start < 10


def test_huge_levels_and_options_end_quickly() -> None:
    start = time.perf_counter()
    level = "9" * 15
    # dim M_4(Gamma_0(N)) is far from 1 at this level (the dimension grows like N/3, Diamond-Shurman 3.9).
    assert verdicts(claim(f"\\dim M_4(\\Gamma_0({level})) = 1"), max_seconds=5) == [("refuted", None)]
    assert verdicts(claim(f"E_4 \\in M_4(\\Gamma_0({level}))"), max_seconds=5) == [("error", "budget")]
    assert verdicts(claim("E_4 \\in M_4(\\Gamma_0(" + "9" * 60 + "))"), max_seconds=5) == [("error", "syntax")]
    assert verdicts(claim("E_4^2 = E_8", "weight={" + "9" * 5000 + "}")) == [("error", "bad-option")]
    assert time.perf_counter() - start < 5


def test_divisors_from_the_factorisation_match_the_definition() -> None:
    from verifier import numbers

    for n in range(1, 500):
        assert numbers.divisors(n) == [d for d in range(1, n + 1) if n % d == 0]  # the definition
        assert numbers.prime_factors(n) == [p for p in numbers.divisors(n) if p > 1 and numbers.divisors(p) == [1, p]]
