"""``check --proof-tex``: a LaTeX paragraph per proved claim, citing the theorems used, and
a file that pdflatex compiles; and the ``certificate`` field of the JSON report."""

from __future__ import annotations

import json
import shutil
import subprocess
import sys
from pathlib import Path

import pytest
from verifier import check_text
from verifier.recheck.sexpr import parse
from verifier.report import proof_tex

MANUSCRIPT = r"""
%@claim
\begin{equation}\label{eq:e8}
E_4^2 = E_8
\end{equation}

%@claim name=quotient
\[ \frac{\eta(\tau)^{16}\eta(4\tau)^8}{\eta(2\tau)^{24}}
   + 16\,\frac{\eta(\tau)^8\eta(4\tau)^{16}}{\eta(2\tau)^{24}} = 1 \]

%@claim
\[ \partial_4 E_4 = -\frac{1}{3}E_6 \]

%@claim
\[ E_4 = 1 + 240q + 2160q^2 + \cdots \]

%@claim
\[ E_4^2 = E_{12} \]
"""
# E_4^2 = E_8 (dim M_8 = 1): Serre, A Course in Arithmetic, VII.3 (from memory); the level-4
# identity: Koehler, Eta Products and Theta Series Identities, 2011 (from memory); Ramanujan's
# theta_4 E_4 = -E_6/3: Zagier, "Elliptic modular forms and their applications" (from memory).


def test_paragraphs_and_bibliography() -> None:
    tex = proof_tex.render(check_text(MANUSCRIPT, "m.tex"))
    assert "Both sides of \\eqref{eq:e8} lie in $M_{8}(\\mathrm{SL}_2(\\mathbb{Z}))$" in tex
    assert "Sturm bound is 0" in tex
    assert tex.count("\\paragraph{") == 4  # the refuted E_4^2 = E_12 gets none
    for key in ("sturm", "valence", "ligozat", "newman", "kaneko-zagier"):
        assert f"\\bibitem{{{key}}}" in tex and f"\\cite{{{key}}}" in tex
    assert "LNM~1240" in tex  # Sturm 1987
    assert "\\texttt{quotient}" in tex


MORE_KINDS = r"""
%@claim
\begin{equation}\label{eq:p5}
\sum_{n\ge0} p(5n+4)q^n = 5\frac{f_5^5}{f_1^6}
\end{equation}

%@claim
\[ p(11n+6) \equiv 0 \pmod{11} \]

%@claim
\[ \tau(n) \equiv n\sigma_3(n) \pmod 7 \]

%@claim
\[ \eta(\tau)^2\eta(11\tau)^2 \in S_2(\Gamma_0(11)) \]

%@claim
\[ \dim S_{12}(\Gamma_0(11)) = 10 \]
"""
# Ramanujan's identity for p(5n+4) and his congruence mod 11 (Hardy, Ramanujan, Ch. VI);
# tau(n) = n sigma_3(n) mod 7 (Swinnerton-Dyer, LNM 350, 1973; from memory); eta(tau)^2 eta(11tau)^2
# spans S_2(Gamma_0(11)) and dim S_12(Gamma_0(11)) = 10 (Diamond and Shurman, Thm 3.5.1; from memory).


def test_paragraphs_for_progressions_congruences_membership_and_dimension() -> None:
    report = check_text(MORE_KINDS, "k.tex")
    assert [c.verdict for c in report.claims] == ["proved"] * 5
    tex = proof_tex.render(report)
    # Each kind gets its own argument, typeset, never the report's plain message.
    assert "$E = \\eta(\\tau)^{5}$ and $h(\\tau) = \\eta(\\tau)^{-1} \\eta(5\\tau)^{5}$" in tex
    assert "so the two forms are equal by Sturm's theorem \\cite{sturm}, which is \\eqref{eq:p5}" in tex
    assert "of $U_{11}h$ vanish modulo $11$" in tex
    assert "Modulo $7$: $E_2$ is replaced by $E_8$" in tex
    assert "by the multipliers $E_6$ (congruent to $1$ modulo $7$)" in tex
    assert "it lies in $S_{2}(\\Gamma_0(11))$ as claimed" in tex
    assert "genus 1, 2 cusps" in tex and "gives 10" in tex
    assert "docs/method.md" not in tex and "(u-operator)" not in tex
    for key in ("atkin-lehner", "serre-padic", "swinnerton-dyer", "diamond-shurman", "ligozat"):
        assert f"\\bibitem{{{key}}}" in tex


GROUPED = r"""
%@claim
\[ p(5n+t) \equiv 0 \pmod 5 \quad (t \in \{4, 9\}) \]

%@claim
\[ p(n) \equiv 0 \pmod 7 \quad (n \equiv 5 \pmod 7) \]

%@claim
\[ \frac{f_2^5}{f_1^2f_4^2} = \frac{f_8^5}{f_4^2f_{16}^2} + 2q\frac{f_{16}^2}{f_8} \]

%@define f_k = (q^k;q^k)_\infty
%@claim
\[ f_1^2 \equiv f_2 \pmod 2 \]
"""
# Ramanujan's congruences (Hardy, Ramanujan, Ch. VI); phi(q) = phi(q^4) + 2q psi(q^8) (Hirschhorn, The
# Power of q, Ch. 1, from memory); f_1^2 = f_2 (mod 2) as (1 - x)^2 = 1 - x^2 (mod 2) (common practice).


def test_paragraphs_for_grouped_progressions_and_products_modulo_p() -> None:
    # Regression: a residue set or a dissection (a record of components) crashed --proof-tex.
    report = check_text(GROUPED, "g.tex")
    assert [c.verdict for c in report.claims] == ["proved"] * 4, [c.outcome.message for c in report.claims]
    tex = proof_tex.render(report)
    assert "the claim is one congruence for each listed class" in tex.replace("The claim", "the claim")
    assert "which is the class $a(5n+4)$" in tex and "which is the class $a(5n+9)$" in tex
    assert "$n_0 + 7n$ with $n \\ge 0$ and $n_0 \\in \\{5\\}$, so the claim is about $a(7n+5)$" in tex
    assert "one for each class" in tex
    assert "with $\\tau \\mapsto 12\\tau$ and $q^{-1}$ divided out of both" in tex
    assert "the coefficient of $q^n$ of each side is that of $q^{12n+1}$" in tex
    assert "the two sides are congruent modulo $2$ to one and the same series" in tex


def test_escaping() -> None:
    assert proof_tex.escape("a_b & 50% #1 {x} ~ \\ ≥") == ("a\\_b \\& 50\\% \\#1 \\{x\\} $\\sim$ $\\backslash$ $\\geq$")


@pytest.mark.skipif(shutil.which("pdflatex") is None, reason="pdflatex is not installed (CI installs it)")
def test_the_file_compiles_with_pdflatex(tmp_path: Path) -> None:
    src = tmp_path / "m.tex"
    src.write_text(MANUSCRIPT + MORE_KINDS + GROUPED)
    out = tmp_path / "proofs.tex"
    run = subprocess.run(
        [sys.executable, "-m", "verifier", "check", str(src), "--proof-tex", str(out)], capture_output=True, text=True
    )
    assert run.returncode == 1, run.stderr  # the refuted claim
    latex = subprocess.run(
        ["pdflatex", "-interaction=nonstopmode", "-halt-on-error", out.name],
        cwd=tmp_path,
        capture_output=True,
        text=True,
        timeout=120,
    )
    assert latex.returncode == 0, latex.stdout[-2000:]
    assert (tmp_path / "proofs.pdf").stat().st_size > 0


def test_every_proved_claim_has_a_certificate() -> None:
    data = json.loads(json.dumps(check_text(MANUSCRIPT, "m.tex").to_dict()))
    for claim in data["claims"]:
        cert = claim["certificate"]
        if claim["verdict"] != "proved":
            assert cert is None
            continue
        assert cert["format"] == 1 and cert["method"] == claim["method"]
        for side in ("left", "right"):
            parse(cert[side]["expr"])  # the expression language reads back
    e8 = data["claims"][0]["certificate"]
    assert e8["left"]["expr"] == "(^ (E 4 1) 2)" and e8["right"]["expr"] == "(E 8 1)"
    assert e8["space"] == {"weight": "8", "level": 1, "character": 1, "proof_weight": "8", "cleared_weight": "0"}
    assert e8["coefficients"]["values"] == ["1"]


def test_a_proof_on_a_class_of_n_says_so() -> None:
    # tau(n) = 0 mod 23 when (n/23) = -1 (Serre, Bourbaki 355, 1969, from memory): the paragraph must
    # not say the congruence holds for every n, only on the class, and cite the twisting it rests on.
    text = "%@claim\n\\[ \\tau(n) \\equiv 0 \\pmod{23} \\quad \\text{for } \\left(\\frac{n}{23}\\right) = -1 \\]\n"
    report = check_text(text, "c.tex")
    assert [c.verdict for c in report.claims] == ["proved"]
    tex = proof_tex.render(report)
    assert "holds for every $n \\geq 1$ of that class" in tex
    assert "holds for every $n$." not in tex
    assert "twists by the quadratic characters modulo $23$" in tex and "\\bibitem{ono}" in tex
    assert "Chinese remainder" not in tex  # one prime power
