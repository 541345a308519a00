"""Annotated copies of whole papers, notes that typeset their mathematics, and Markdown
copies that common Markdown tools render.

The identities in the manuscripts are only vehicles (E_4^2 = E_8, E_4 E_6 = E_10 and
E_4 E_10 = E_14: dim M_8 = dim M_10 = dim M_14 = 1, Serre, *A Course in Arithmetic*,
ch. VII §3.2; E_6^2 != E_12 since their q-coefficients -1008 and 65520/691 differ,
ibid. §4.2).  What is checked is where the notes go, what they say, that the copies can be
stripped back to the sources byte for byte, and that they compile.
"""

from __future__ import annotations

import os
import re
import shutil
import subprocess
import sys
import zipfile
from pathlib import Path

import pytest
from verifier import check_path
from verifier.annotate import MARKDOWN_MARK, annotate, annotate_paper, paper_copies, strip_annotations
from verifier.report.tex_message import message_tex, reading_tex

REPO = Path(__file__).resolve().parent.parent
SUBMISSION = REPO / "sample_docs" / "submission"
NOTE_MD = REPO / "sample_docs" / "note.md"
IN_CI = bool(os.environ.get("CI"))
NOTE = re.compile(r"\\qrefereeNote\{([a-z]+)\}")


def run(*args: str, cwd: Path) -> subprocess.CompletedProcess[str]:
    return subprocess.run(
        [sys.executable, "-m", "verifier", *args], cwd=cwd, capture_output=True, text=True, timeout=180
    )


def tool(name: str) -> str | None:
    """Path of an external program; in CI its absence is a failure, not a skip."""
    found = shutil.which(name)
    if found is None and IN_CI:
        pytest.fail(f"{name} is required in CI (.ci/run installs it)")
    return found


MAIN = r"""\documentclass{article}
\usepackage{amsmath}
\begin{document}
Main text.
%@claim name=main-one
\[ E_4^2 = E_8 \]
\input{parts/first}
\include{second}
\end{document}
"""
FIRST = r"""Some text in a part.
%@claim name=first
\begin{align}
  E_4 E_6 &= E_{10} = E_6 E_4 \\
  E_6^2 &= E_{12}
\end{align}
%@claim name=orphan
no display after this tag
"""
SECOND = "%@claim name=second\n\\[ E_4 E_{10} = E_{14} \\]"  # no final newline


def _paper(folder: Path) -> Path:
    (folder / "parts").mkdir(parents=True)
    (folder / "main.tex").write_text(MAIN, encoding="utf-8")
    (folder / "parts" / "first.tex").write_text(FIRST, encoding="utf-8")
    (folder / "second.tex").write_text(SECOND, encoding="utf-8")
    return folder / "main.tex"


def test_every_file_of_a_paper_gets_its_own_annotated_copy(tmp_path: Path) -> None:
    main = _paper(tmp_path / "src")
    proc = run("check", "src/main.tex", "--annotate", "out/", cwd=tmp_path)
    assert proc.returncode == 2, proc.stderr  # the orphan tag is an error
    out = tmp_path / "out"
    written = sorted(p.relative_to(out).as_posix() for p in out.rglob("*") if p.is_file())
    assert written == ["main.tex", "parts/first.tex", "second.tex"]
    report = check_path(main)
    for rel in written:
        source = (main.parent / rel).read_text(encoding="utf-8")
        copy = (out / rel).read_text(encoding="utf-8")
        assert strip_annotations(copy, False) == source, rel
        assert copy.count("\n") == source.count("\n"), "line numbers are kept in every file"
        placed = [c.verdict for c in report.claims if Path(c.location.file).name == Path(rel).name]
        noted = NOTE.findall(copy)
        if rel == "main.tex":
            # The main file: its own claim, then the summary with the orphan of parts/first.tex.
            assert noted[0] == placed[0] and "\\qrefereeSummary{" in copy
            assert "not marked here" not in copy
            assert "orphan" in copy and "first.tex" in copy
        elif rel == "parts/first.tex":
            assert noted == [c for c in placed[:-1]]  # the orphan is in the main summary
            assert "\\qrefereeSummary{" not in copy
        else:
            assert noted == placed and "\\qrefereeSummary{" not in copy
    assert (main.parent / "parts" / "first.tex").read_text(encoding="utf-8") == FIRST  # sources untouched


def test_folder_copies_never_overwrite_the_sources(tmp_path: Path) -> None:
    _paper(tmp_path / "src")
    before = {p: p.read_bytes() for p in (tmp_path / "src").rglob("*.tex")}
    proc = run("check", "src/main.tex", "--annotate", "src/", cwd=tmp_path)
    assert proc.returncode == 2 and "refusing to write" in proc.stderr
    assert {p: p.read_bytes() for p in (tmp_path / "src").rglob("*.tex")} == before
    assert not list((tmp_path / "src").glob(".*.tmp"))


def test_an_annotated_source_is_refused(tmp_path: Path) -> None:
    main = _paper(tmp_path / "src")
    report = check_path(main)
    texts = {name: Path(name).read_text(encoding="utf-8") for name in report.files}
    copies = annotate_paper(texts, report)
    (Path(report.files[1])).write_text(copies[report.files[1]], encoding="utf-8")
    proc = run("check", "src/main.tex", "--annotate", "out/", cwd=tmp_path)
    assert proc.returncode == 2 and "already contains qreferee annotations" in proc.stderr
    assert not (tmp_path / "out").exists()


def test_screen_writes_the_copies_at_their_paths_in_the_submission(tmp_path: Path) -> None:
    archive = tmp_path / "submission.zip"
    with zipfile.ZipFile(archive, "w") as z:
        for p in SUBMISSION.rglob("*.tex"):
            z.write(p, p.relative_to(SUBMISSION.parent).as_posix())
    proc = run("screen", "submission.zip", "--annotate", "checked", cwd=tmp_path)
    assert proc.returncode in (0, 1), proc.stderr
    out = tmp_path / "checked" / "submission"
    for p in SUBMISSION.rglob("*.tex"):
        copy = (out / p.relative_to(SUBMISSION)).read_text(encoding="utf-8")
        assert strip_annotations(copy, False) == p.read_text(encoding="utf-8")
    report = check_path(SUBMISSION / "main.tex")
    noted = [v for p in sorted(out.rglob("*.tex")) for v in NOTE.findall(p.read_text(encoding="utf-8"))]
    assert sorted(noted) == sorted(c.verdict for c in report.claims)


# -- the notes' mathematics --------------------------------------------------------------


@pytest.mark.parametrize(
    ("message", "expected"),
    [
        # Spaces, groups and characters in the notation of the trade (common practice).
        (
            "equal in M_4(Gamma_0(2), dim 2): Sturm bound 1",
            r"equal in $M_{4}(\Gamma_0(2))$ (dimension 2): Sturm bound 1",
        ),
        ("equal in M_8(SL2(Z), dim 1)", r"equal in $M_{8}(\mathrm{SL}_2(\mathbf{Z}))$ (dimension 1)"),
        ("in M_1(Gamma_0(3), chi_{-3})", r"in $M_{1}(\Gamma_0(3), \chi_{-3})$"),
        (
            "coefficients of q^3 differ: left 1, right 459481/427729",
            "coefficients of $q^{3}$ differ: left 1, right 459481/427729",
        ),
        (
            "the printed coefficients q^{-1}..q^3 are exact",
            r"the printed coefficients $q^{-1}, \dots, q^{3}$ are exact",
        ),
        ("weight 0 x E_2^2 to q^0", "weight 0 x $E_2^2$ to $q^{0}$"),
        ("orders >= 1", r"orders $\geq$ 1"),
        # Text quoted from a manuscript is set verbatim in the typewriter font.
        (r"weight 12 (720\Delta) & 50%", r"weight 12 \texttt{(720\char92{}Delta)} \& 50\%"),
    ],
)
def test_messages_typeset_their_mathematics(message: str, expected: str) -> None:
    assert message_tex(message) == expected


def test_readings_are_typeset_only_when_safe() -> None:
    assert reading_tex(r"E_{14} = E_4 E_{10}") == r"$E_{14} = E_4 E_{10}$"
    unsafe = (r"a & b", r"x \\ y", r"\end{align}", r"{E_4", r"E_4}", "50% off", r"\label{x}", "$x$")
    for reading in (*unsafe, r"\iffalse E_4", r"E_4 \fi", r"\csname x\endcsname", r"\def\x{1}"):
        assert reading_tex(reading) is None, reading


def test_latex_notes_use_math_and_name_each_link_of_a_chain(tmp_path: Path) -> None:
    main = _paper(tmp_path)
    report = check_path(main)
    copy = annotate_paper({n: Path(n).read_text(encoding="utf-8") for n in report.files}, report)[report.files[1]]
    assert r"$M_{10}(\mathrm{SL}_2(\mathbf{Z}))$ (dimension 1)" in copy
    assert "M_10(SL2(Z)" not in copy and r"\texttt{equal" not in copy
    assert r"link 1 of 2 ($E_4 E_6 = E_{10}$)" in copy
    assert r"link 2 of 2 ($E_{10} = E_6 E_4$)" in copy
    refuted = next(c for c in report.claims if c.verdict == "refuted")
    assert refuted.link is None and "link" not in NOTE.split(copy)[-1].split("qrefereeNote")[0]


needs_pdflatex = pytest.mark.skipif(
    shutil.which("pdflatex") is None and not IN_CI, reason="pdflatex not installed (CI installs it)"
)


@needs_pdflatex
def test_the_copy_of_a_paper_compiles_as_a_whole(tmp_path: Path) -> None:
    main = _paper(tmp_path / "src")
    report = check_path(main)
    out = tmp_path / "out"
    for rel, data in paper_copies(report, main.parent).items():
        (out / rel).parent.mkdir(parents=True, exist_ok=True)
        (out / rel).write_bytes(data)
    proc = subprocess.run(
        ["pdflatex", "-interaction=nonstopmode", "-halt-on-error", "-no-shell-escape", "main.tex"],
        cwd=out,
        capture_output=True,
        text=True,
        timeout=180,
    )
    log = (out / "main.log").read_text(encoding="latin-1")
    assert proc.returncode == 0, log[-3000:]
    assert "Font shape" not in log and "unavailable in encoding" not in log
    pdftotext = tool("pdftotext")
    if pdftotext is not None:
        text = subprocess.run([pdftotext, "main.pdf", "-"], cwd=out, capture_output=True, text=True, check=True).stdout
        shown = re.findall(r"qreferee: (proved|refuted|unproven|error)", " ".join(text.split()))
        assert sorted(shown) == sorted(c.verdict for c in report.claims)


# -- Markdown copies ----------------------------------------------------------------------


def _md_copy(tmp_path: Path) -> Path:
    source = NOTE_MD.read_bytes().decode("utf-8")
    report = check_path(NOTE_MD)
    path = tmp_path / "note.md"
    path.write_text(annotate(source, report, report.files[0], True), encoding="utf-8")
    return path


def test_markdown_notes_are_plain_ascii_between_blank_lines(tmp_path: Path) -> None:
    lines = _md_copy(tmp_path).read_text(encoding="utf-8").split("\n")
    for i, line in enumerate(lines):
        if MARKDOWN_MARK not in line:
            continue
        assert all(" " <= ch <= "~" for ch in line), line  # no emoji, nothing a LaTeX engine lacks
        if i and MARKDOWN_MARK not in lines[i - 1]:
            assert lines[i - 1] == "", "a blank line before each group of notes"
        if i + 1 < len(lines) and MARKDOWN_MARK not in lines[i + 1]:
            assert lines[i + 1] == "", "and after it"


def test_pandoc_keeps_the_text_after_a_note_out_of_the_note(tmp_path: Path) -> None:
    pandoc = tool("pandoc")
    if pandoc is None:
        pytest.skip("pandoc not installed (CI installs it)")

    def html(path: Path) -> str:
        proc = subprocess.run([pandoc, "-f", "markdown", "-t", "html", str(path)], capture_output=True, text=True)
        assert proc.returncode == 0, proc.stderr
        return proc.stdout

    def words(fragment: str) -> list[str]:
        return re.sub(r"<!--.*?-->|<[^>]+>", " ", fragment, flags=re.S).split()

    copy = html(_md_copy(tmp_path))
    quotes = re.findall(r"<blockquote>(.*?)</blockquote>", copy, re.S)
    # Every note is inside a blockquote, and nothing of the manuscript is: without the
    # blockquotes the copy reads word for word as the source.
    assert sum(len(re.findall(r"qreferee: (?:proved|refuted|unproven|error)", q)) for q in quotes) == len(
        check_path(NOTE_MD).claims
    )
    outside = re.sub(r"<blockquote>.*?</blockquote>", " ", copy, flags=re.S)
    assert "qreferee" not in outside
    assert words(outside) == words(html(NOTE_MD))


def test_pandoc_renders_the_markdown_copy_to_pdf(tmp_path: Path) -> None:
    pandoc, pdftotext = tool("pandoc"), tool("pdftotext")
    if pandoc is None or pdftotext is None or shutil.which("pdflatex") is None:
        pytest.skip("pandoc, pdftotext and pdflatex are needed (CI installs them)")
    copy = _md_copy(tmp_path)
    proc = subprocess.run(
        [pandoc, str(copy), "--pdf-engine=pdflatex", "-o", str(tmp_path / "note.pdf")],
        capture_output=True,
        text=True,
        timeout=300,
    )
    assert proc.returncode == 0, proc.stderr[-3000:]
    text = subprocess.run([pdftotext, str(tmp_path / "note.pdf"), "-"], capture_output=True, text=True).stdout
    shown = re.findall(r"qreferee: (proved|refuted|unproven|error)", " ".join(text.split()))
    assert sorted(shown) == sorted(c.verdict for c in check_path(NOTE_MD).claims)


def test_a_markdown_manuscript_in_folder_mode_and_a_suggestion_said_once(tmp_path: Path) -> None:
    shutil.copy(NOTE_MD, tmp_path / "note.md")
    proc = run("check", "note.md", "--annotate", "out/", cwd=tmp_path)
    assert proc.returncode == 2, proc.stderr
    copy = (tmp_path / "out" / "note.md").read_text(encoding="utf-8")
    assert strip_annotations(copy, True) == NOTE_MD.read_text(encoding="utf-8")
    for c in check_path(NOTE_MD).claims:
        if c.outcome.suggestion:
            assert copy.count(c.outcome.suggestion) == 1, c.outcome.suggestion
