"""``screen --untagged`` reads untagged displays the way tagged claims are read (docs/method.md#layout,
#author-definitions, #derivatives): separators, equivalences, environments, the author's definitions
and the Serre derivative on quasimodular forms.

Mathematics: E_4^2 = E_8 and E_4 E_6 = E_10 (dim M_8 = dim M_10 = 1, Serre, *A Course in
Arithmetic*, Ch. VII §3.2); theta_1 E_2 = -E_4/12 follows from Ramanujan's D E_2 = (E_2^2 - E_4)/12
(Ramanujan 1916), checked in tests/test_serre_quasimodular.py against sympy.
"""

from __future__ import annotations

from pathlib import Path

from verifier import screen

PAPER = r"""\documentclass{article}
\begin{document}
We write $F := E_4 E_6$ and $G \coloneqq E_4^2$ throughout.
\begin{equation}\label{eq:pair}
  G = E_8 ,\qquad F = E_{10}
\end{equation}
\[ E_4^2 = E_8 \iff E_4 E_6 = E_{10} \]
\begin{alignat}{2}
  \partial_1 E_2 &= -\tfrac{1}{12} E_4 &\qquad F &= -E_{10} \label{eq:wrong}
\end{alignat}
The set of $n$ with $n \geq 1$ is not a claim, nor is
\[ x^2 + y^2 = 1 . \]
\end{document}
"""


def test_untagged_displays_use_the_new_reading(tmp_path: Path) -> None:
    main = tmp_path / "paper.tex"
    main.write_text(PAPER, encoding="utf-8")
    result = screen.screen(main, untagged=True)
    got = [(c.name, c.verdict) for c in result.report.claims]
    assert got == [
        ("untagged:eq:pair", "proved"),
        ("untagged:eq:pair", "proved"),
        ("untagged:line-7", "proved"),
        ("untagged:line-7", "proved"),
        ("untagged:line-9", "proved"),  # its own column of the alignat row; the label is on the other
        ("untagged:eq:wrong", "refuted"),
    ]
    assert all(result.untagged)
    refuted = result.report.claims[-1]
    w = refuted.outcome.first_difference
    # F = E_4 E_6 has constant term 1 (Serre Ch. VII §4.2); -E_10 has -1.
    assert w is not None and (w["n"], int(w["left"]), int(w["right"])) == (0, 1, -1)


COEFFICIENTS = r"""\documentclass{article}
\begin{document}
Let $f_k := (q^k;q^k)_\infty$.
\[ \tau(n) \equiv \sigma_{11}(n) \pmod{691} \]
\[ \sum_{(x,y,z,w)\in\mathbb Z^4} q^{x^2+y^2+z^2+w^2} = 1 + 8q + 24q^2 + 32q^3 + 24q^4 + \cdots \]
\[ \sum_{n\ge0} \overline{p}(n)q^n = \frac{f_2}{f_1^2} \]
\[ p(5n+4) \equiv 0 \pmod 5 \]
\[ \dim S_{12}(\Gamma_0(11)) = 2 \]
Ordinary mathematics that is not read as a claim:
\[ p(n) = n^2 + 1 \]
\[ \sum_{n\ge1} \frac{1}{n^2} = \frac{\pi^2}{6} \]
\end{document}
"""


def test_untagged_coefficient_claims_lattice_sums_and_dimensions(tmp_path: Path) -> None:
    # Ramanujan's tau(n) = sigma_11(n) mod 691 and p(5n+4) = 0 mod 5 (Ramanujan 1916, 1919); Jacobi's
    # r_4(n) = 8 sum_{d | n, 4 not | d} d gives 8, 24, 32, 24 (Hardy and Wright, Thm 386); the
    # overpartitions have generating function (-q;q)_inf/(q;q)_inf = f_2/f_1^2 (Corteel and Lovejoy,
    # Trans. AMS 356 (2004), from memory); dim S_12(Gamma_0(11)) is 10, not 2 (Diamond and Shurman,
    # Thm 3.5.1). A bare p(n) is not taken for the partition function in an untagged display.
    main = tmp_path / "paper.tex"
    main.write_text(COEFFICIENTS, encoding="utf-8")
    result = screen.screen(main, untagged=True)
    got = [(c.location.line, c.verdict) for c in result.report.claims]
    assert got == [(4, "proved"), (5, "proved"), (6, "proved"), (7, "proved"), (8, "refuted")]
