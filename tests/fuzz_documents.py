"""Random and malformed manuscripts for the robustness fuzz test (and bench/fuzz.py).

A document is made of claim-language fragments, hostile numbers, broken brackets and
stray tags; whatever comes out, a check must end with exit status 0, 1 or 2, within its
budget, and with no ``internal`` error.
"""

from __future__ import annotations

from hypothesis import strategies as st

ATOMS = [
    "E_4",
    "E_6",
    "E_{12}",
    "\\Delta",
    "j",
    "\\eta(\\tau)",
    "\\theta",
    "q",
    "\\sigma_3(n)",
    "\\tau(n)",
    "r_4(n)",
    "p(n)",
    "E_2",
    "D E_4",
    "[E_4, E_6]_1",
    "\\theta_3",
    "1",
    "240",
    "\\frac{1}{240}",
    "9999999999999999999999",
    "10^{9}",
    "2^{2^{2^{2^{2}}}}",
    "\\cdots",
    "O(q^{5})",
    "(",
    ")",
    "{",
    "}",
    "\\pmod{0}",
    "\\pmod{7}",
    "\\quad (n \\geq 1)",
    "\\in M_4(\\Gamma_0(1))",
    "\\text{for all }\\tau\\in\\mathbb H",
    "\\mathbf{E}_4",
    "E_12",
    "&",
    "\\\\",
    "\\ne",
    "\\equiv",
    "'",
    "\\sum_{d \\mid n} d^3",
]
OPS = [" + ", " - ", " ", " \\cdot ", "^{2}", "^{-1}", " = ", "/", "^"]
TAGS = ["%@claim\n", "%@claim name=x weight=4\n", "% @claim\n", "%@claim weight={99999999999999}\n", ""]
DISPLAYS = [("\\[ ", " \\]\n"), ("\\begin{align}\n", "\n\\end{align}\n"), ("$$", "$$\n"), ("\\begin{eqnarray}", "")]


@st.composite
def claim_text(draw: st.DrawFn) -> str:
    n = draw(st.integers(min_value=1, max_value=12))
    parts = []
    for _ in range(n):
        parts.append(draw(st.sampled_from(ATOMS)))
        parts.append(draw(st.sampled_from(OPS)))
    return "".join(parts[:-1])


@st.composite
def documents(draw: st.DrawFn) -> str:
    blocks = []
    for _ in range(draw(st.integers(min_value=0, max_value=3))):
        tag = draw(st.sampled_from(TAGS))
        opener, closer = draw(st.sampled_from(DISPLAYS))
        blocks.append(tag + opener + draw(claim_text()) + closer)
    if draw(st.booleans()):
        blocks.append(draw(st.text(max_size=40)))
    return "".join(blocks)
