"""The LaTeX package qreferee.sty: visible tags that typeset nothing, read by the scanner like comment tags.

Mathematics used (only to see that the claims are decided as usual): E_4^2 = E_8 and
E_4 E_6 = E_10, since dim M_8 = dim M_10 = 1 on SL2(Z) (Serre, A Course in Arithmetic,
VII.3.2); E_4 E_6 = E_12 is false (the weights differ).
"""

from __future__ import annotations

import shutil
import subprocess
from pathlib import Path

import pytest
from verifier.annotate import strip_annotations
from verifier.api import check_path, check_text
from verifier.latex import STY_PATH
from verifier.scan import scan_text
from verifier.scan.document import ClaimBlock, DefineTag

PAPER = r"""\documentclass{article}
\usepackage{amsmath}
\usepackage@OPTION@{qreferee}
\begin{document}
An invented note on the Quillmoor forms.
\qrclaim[name=e8, weight=8]
\begin{equation}\label{eq:e8}
  E_4(\tau)^2 = E_8(\tau).
\end{equation}
Next a definition and a claim about it.
\qrdefine{F = E_4 E_6}
\qrclaim[name=f]
\[ F = E_{10} \]
A tag without options:
\qrclaim
\[ E_4 E_6 = E_{12} \]
A commented-out tag is no tag:
% \qrclaim[name=ghost]
\[ E_4 = E_6 \]
The end.
\end{document}
"""


def paper(option: str = "") -> str:
    return PAPER.replace("@OPTION@", option)


def scan(text: str) -> list[ClaimBlock | DefineTag]:
    return scan_text(text, "doc.tex").items


def test_the_scanner_reads_command_tags_like_comment_tags() -> None:
    items = scan(paper())
    blocks = [i for i in items if isinstance(i, ClaimBlock)]
    defines = [i for i in items if isinstance(i, DefineTag)]
    assert [b.options for b in blocks] == [{"name": "e8", "weight": "8"}, {"name": "f"}, {}]
    assert [(b.tag.line, b.tag.column) for b in blocks] == [(6, 1), (12, 1), (15, 1)]
    assert [b.environment for b in blocks] == ["equation", "\\[", "\\["]
    assert len(defines) == 1 and defines[0].text is not None and defines[0].text.text == "F = E_4 E_6"
    comment = scan(paper().replace("\\qrclaim[name=e8, weight=8]", "%@claim name=e8 weight=8"))
    assert next(b.options for b in comment if isinstance(b, ClaimBlock)) == blocks[0].options


def test_claims_tagged_by_command_are_decided() -> None:
    report = check_text(paper(), "doc.tex")
    assert [(c.name, c.verdict) for c in report.claims] == [("e8", "proved"), ("f", "proved"), (None, "refuted")]
    assert report.claims[0].label == "eq:e8"


@pytest.mark.parametrize(
    ("text", "count"),
    [
        ("\\qrclaim [group={\\Gamma_0(4)}, name=t]\n\\[ \\theta^4 = \\theta_3^4 \\]\n", 1),  # a space, braces
        ("\\qrclaim[name=a]\\[ E_4^2 = E_8 \\]\n", 1),  # on the display's line
        ("\\newcommand\\qrclaim[1][]{}\n\\[ E_4 = E_6 \\]\n", 0),  # defining the command is no tag
        ("\\providecommand{\\qrclaim}[1][]{}\n\\[ E_4 = E_6 \\]\n", 0),
        ("\\qrclaimed \\[ E_4 = E_6 \\]\n", 0),  # another command
    ],
)
def test_command_tag_variants(text: str, count: int) -> None:
    assert sum(isinstance(i, ClaimBlock) for i in scan(text)) == count


def test_command_tag_problems() -> None:
    unclosed = scan_text("\\qrclaim[name=a\n\\[ E_4^2 = E_8 \\]\n", "doc.tex")
    assert [d.code for d in unclosed.diagnostics] == ["bad-option"]
    no_braces = scan_text("\\qrdefine F = E_4\n", "doc.tex")
    assert [d.code for d in no_braces.diagnostics] == ["bad-define"]
    report = check_text("\\qrclaim[name=lonely]\nNo display follows.\n", "doc.tex")
    (claim,) = report.claims
    assert (claim.outcome.code, claim.source) == ("orphan-tag", "\\qrclaim[name=lonely]")
    report = check_text("\\qrclaim[colour=red]\n\\[ E_4^2 = E_8 \\]\n", "doc.tex")
    assert report.claims[0].outcome.code == "unknown-option"


def test_annotated_copy_places_notes_after_command_tagged_displays(tmp_path: Path) -> None:
    from verifier.annotate import annotate

    text = paper()
    report = check_text(text, "doc.tex")
    copy = annotate(text, report, "doc.tex", markdown=False)
    assert strip_annotations(copy, False) == text
    lines = copy.splitlines()
    assert "qrefereeNote{proved}" in lines[8]  # the line of \end{equation}
    assert "qrefereeNote{refuted}" in lines[15]


def _pdflatex(folder: Path, name: str) -> str:
    proc = subprocess.run(
        ["pdflatex", "-interaction=nonstopmode", "-halt-on-error", name],
        cwd=folder,
        capture_output=True,
        text=True,
        timeout=180,
    )
    assert proc.returncode == 0, proc.stdout[-2000:]
    pdf = folder / name.replace(".tex", ".pdf")
    text = subprocess.run(["pdftotext", str(pdf), "-"], capture_output=True, text=True, timeout=60, check=True)
    return text.stdout


needs_tex = pytest.mark.skipif(
    shutil.which("pdflatex") is None or shutil.which("pdftotext") is None, reason="pdflatex/pdftotext not installed"
)


@needs_tex
def test_a_document_using_the_package_compiles_and_shows_no_tag(tmp_path: Path) -> None:
    shutil.copy(STY_PATH, tmp_path / "qreferee.sty")
    (tmp_path / "paper.tex").write_text(paper(), encoding="utf-8")
    shown = _pdflatex(tmp_path, "paper.tex")
    assert "Quillmoor" in shown and "The end." in shown
    assert "name=" not in shown and "weight=" not in shown and "E_4" not in shown
    report = check_path(tmp_path / "paper.tex")
    assert [c.verdict for c in report.claims] == ["proved", "proved", "refuted"]


@needs_tex
def test_the_show_option_prints_the_tags(tmp_path: Path) -> None:
    shutil.copy(STY_PATH, tmp_path / "qreferee.sty")
    (tmp_path / "draft.tex").write_text(paper("[show]"), encoding="utf-8")
    shown = _pdflatex(tmp_path, "draft.tex")
    assert "name=e8" in shown and "define F = E_4" in shown
    assert "ghost" not in shown


def test_the_package_ships_inside_the_python_package() -> None:
    assert STY_PATH.is_file() and STY_PATH.parent.parent.name == "verifier"
    assert "\\ProvidesPackage{qreferee}" in STY_PATH.read_text(encoding="utf-8")
