"""Annotated copies (``qreferee check FILE --annotate OUT``) and writing output files.

Checks that every claim of the main file gets a note next to its display, that the
insertions are exactly removable (byte for byte, by :func:`strip_annotations` and by the
one-line procedures documented in ``verifier/annotate.py``), that LaTeX copies keep every
line number and compile with a real pdflatex, and that no output is ever written over an
input.
"""

from __future__ import annotations

import json
import os
import re
import shutil
import stat
import subprocess
import sys
from pathlib import Path

import pytest
from verifier import check_path
from verifier.annotate import (
    LATEX_CLOSE,
    LATEX_OPEN,
    MARKDOWN_MARK,
    MARKDOWN_STRIP,
    AlreadyAnnotated,
    annotate,
    strip_annotations,
    tex_escape,
    tt_escape,
)
from verifier.api import Report

from report_contract import validate_report

REPO = Path(__file__).resolve().parent.parent
SAMPLES = REPO / "sample_docs"
IN_CI = bool(os.environ.get("CI"))
NOTE = re.compile(r"\\qrefereeNote\{([a-z]+)\}")
MD_NOTE = re.compile(r"\*\*qreferee: ([a-z]+)\*\*")


def run(*args: str, cwd: Path) -> subprocess.CompletedProcess[str]:
    return subprocess.run(
        [sys.executable, "-m", "verifier", *args], cwd=cwd, capture_output=True, text=True, timeout=180
    )


def annotated(path: Path) -> tuple[str, str, Report]:
    """(source, annotated copy, report) through the library, as the command does it."""
    source = path.read_bytes().decode("utf-8", errors="surrogateescape")
    report = check_path(path)
    markdown = path.suffix == ".md"
    return source, annotate(source, report, report.files[0], markdown), report


def tool(name: str) -> str | None:
    """Path of an external program; in CI (env CI set) its absence is a failure, not a skip."""
    found = shutil.which(name)
    if found is None and IN_CI:
        pytest.fail(f"{name} is required in CI")
    return found


# ---------------------------------------------------------------------------
# The sample manuscripts
# ---------------------------------------------------------------------------


FIXTURES = [
    SAMPLES / "paper.tex",
    SAMPLES / "note.md",
    REPO / "tests" / "data" / "scan" / "environments.tex",
    REPO / "tests" / "data" / "scan" / "note.md",
    *sorted((REPO / "tests" / "data" / "manuscripts").glob("*.tex")),
]


@pytest.mark.parametrize("path", FIXTURES, ids=lambda p: f"{p.parent.name}/{p.name}")
def test_samples_round_trip_and_every_claim_is_noted(path: Path) -> None:
    name = path.name
    source, copy, report = annotated(path)
    markdown = name.endswith(".md")
    assert copy != source
    assert strip_annotations(copy, markdown) == source
    notes = (MD_NOTE if markdown else NOTE).findall(copy)
    # Every claim once, in reading order, with its verdict (the summary adds no claim note).
    assert notes == [c.verdict for c in report.claims]
    if not markdown:
        assert copy.count("\n") == source.count("\n"), "LaTeX copies keep every line number"
        for number, (a, b) in enumerate(zip(source.split("\n"), copy.split("\n"), strict=True), start=1):
            if a != b:
                assert b.startswith(a[: b.index(LATEX_OPEN)]), number
    else:
        for line in copy.splitlines():
            if line not in source.splitlines():
                assert MARKDOWN_MARK in line


def test_latex_note_follows_its_display_on_the_same_line() -> None:
    _source, copy, report = annotated(SAMPLES / "paper.tex")
    lines = copy.split("\n")
    for c in report.claims:
        # The note of a claim sits on the first line at or after the claim that closes a display.
        after = next(i for i in range(c.location.line - 1, len(lines)) if LATEX_OPEN in lines[i])
        line = lines[after]
        head = line[: line.index(LATEX_OPEN)]
        assert re.search(r"(\\end\{[a-z*]+\}|\\\]|\$\$)$", head), line
        assert f"{{{c.verdict}}}" in line


def test_markdown_note_is_a_blockquote_under_the_block() -> None:
    _source, copy, report = annotated(SAMPLES / "note.md")
    lines = copy.splitlines()
    groups: list[list[str]] = []
    i = 0
    while i < len(lines):
        if lines[i].startswith("> ") and MARKDOWN_MARK in lines[i] and "summary" not in lines[i]:
            # Pandoc needs a blank line before a blockquote and after it (or the next
            # paragraph is drawn into it): a blank line, the notes, a comment line, a blank line.
            assert lines[i - 1] == "", lines[i - 1]
            assert lines[i - 2].rstrip().endswith(("$$", "```")), lines[i - 2]
            group = []
            while lines[i].startswith(">") and MARKDOWN_MARK in lines[i]:
                group.append(lines[i])
                i += 1
            assert lines[i] == MARKDOWN_MARK, "a comment line ends the blockquote"
            assert lines[i + 1] == "", "and a blank line"
            groups.append(group)
        i += 1
    noted = [(MD_NOTE.search(line)[1], line) for group in groups for line in group]  # type: ignore[index]
    assert [v for v, _ in noted] == [c.verdict for c in report.claims]
    for c, (_, line) in zip(report.claims, noted, strict=True):
        assert f"`{c.name}: " in line or f"`{c.name}, link " in line
    # The chain E_6 E_8 = E_14 = E_4 E_10 is one block with two claims: two list items,
    # each saying which link it is.
    (chain,) = [g for g in groups if "e14-chain" in g[0]]
    assert len(chain) == 2 and all(line.startswith("> - ") for line in chain)
    assert "link 1 of 2 (" in chain[0] and "link 2 of 2 (" in chain[1]
    # Only printable ASCII in the notes (no emoji: a default LaTeX engine cannot set them).
    assert all(" " <= ch <= "~" for line in lines if MARKDOWN_MARK in line for ch in line)


def test_summary_counts_claims() -> None:
    _, copy, report = annotated(SAMPLES / "paper.tex")
    s = report.summary
    assert f"{len(report.claims)} claims: {s['proved']} proved, {s['refuted']} refuted" in copy
    summary_line = next(line for line in copy.split("\n") if "qrefereeSummary{" in line and "\\end{document}" in line)
    assert summary_line.endswith("\\end{document}")


def test_preamble_gets_xcolor_and_prefixed_macros_only() -> None:
    _source, copy, _ = annotated(SAMPLES / "paper.tex")
    setup = next(line for line in copy.split("\n") if "\\begin{document}" in line)
    assert setup.endswith(LATEX_CLOSE + "\\begin{document}")
    assert "\\usepackage{xcolor}" in setup
    defined = re.findall(r"\\providecommand\{\\([A-Za-z]+)\}", setup)
    assert defined and all(name.startswith("qreferee") for name in defined)
    assert all(n.startswith("qreferee") for n in re.findall(r"\\definecolor\{([^}]*)\}", setup))
    assert "\\newcommand" not in setup and "\\renewcommand" not in setup


# ---------------------------------------------------------------------------
# Tricky inputs
# ---------------------------------------------------------------------------

DOC = (
    "\\documentclass{article}\n"
    "\\usepackage{amsmath}\n"
    "\\begin{document}\n"
    "%@claim name=true\n"
    "\\[ E_4^2 = E_8 \\] and the text goes on\n"
    "%@claim name=false\n"
    "\\begin{align}\n"
    "  E_4 E_6 &= E_{12} \\\\\n"
    "  E_4 E_{10} &= E_{14}\n"
    "\\end{align}%\n"
    "%@claim name=mixed\n"
    "$$ E_4 + E_6 = E_{10} $$\n"
    "%@claim name=orphan\n"
    "no display here\n"
    "\\end{document}\n"
)


def _check_text(tmp_path: Path, name: str, data: bytes) -> tuple[str, str, Report]:
    path = tmp_path / name
    path.write_bytes(data)
    return annotated(path)


def test_every_kind_of_display_and_orphans_in_summary(tmp_path: Path) -> None:
    source, copy, report = _check_text(tmp_path, "d.tex", DOC.encode())
    assert strip_annotations(copy, False) == source
    lines = copy.split("\n")
    assert lines[4].startswith("\\[ E_4^2 = E_8 \\]" + LATEX_OPEN)
    assert lines[4].endswith(LATEX_CLOSE + " and the text goes on")
    assert lines[9].startswith("\\end{align}" + LATEX_OPEN) and lines[9].endswith(LATEX_CLOSE + "%")
    assert NOTE.findall(lines[9]) == ["refuted", "proved"]
    assert NOTE.findall(lines[11]) == ["error"]
    # The orphan tag has no display: its error goes in the summary before \end{document}.
    assert "qrefereeSummary" in lines[14] and NOTE.findall(lines[14]) == ["error"]
    assert {c.name for c in report.claims} == {"true", "false", "false.2", "mixed", "orphan"}


def test_crlf_is_kept(tmp_path: Path) -> None:
    data = DOC.replace("\n", "\r\n").encode()
    _source, copy, _ = _check_text(tmp_path, "crlf.tex", data)
    assert strip_annotations(copy, False).encode() == data
    assert copy.count("\r\n") == data.count(b"\r\n") and "\n" not in copy.replace("\r\n", "")


def test_fragment_without_preamble_or_final_newline(tmp_path: Path) -> None:
    data = "\ufeff% a part\n%@claim name=last\n\\[ E_4 E_6 = E_{10} \\]".encode()
    _source, copy, report = _check_text(tmp_path, "part.tex", data)
    assert [c.verdict for c in report.claims] == ["proved"]
    assert strip_annotations(copy, False).encode() == data
    assert copy.startswith("\ufeff" + LATEX_OPEN), "definitions at the start, after the byte-order mark"
    assert "\\usepackage" not in copy, "no preamble: no package added"
    assert copy.endswith("\\]" + copy[copy.rindex(LATEX_OPEN) :])
    assert not copy.endswith("\n")


def test_undecodable_bytes_survive(tmp_path: Path) -> None:
    data = DOC.replace("\\begin{document}\n", "\\begin{document}\n% caf\xe9 in Latin-1\n").encode("latin-1")
    (tmp_path / "l1.tex").write_bytes(data)
    proc = run("check", "l1.tex", "--annotate", "out.tex", cwd=tmp_path)
    assert proc.returncode == 2, proc.stderr  # the mixed-weight claim
    copy = (tmp_path / "out.tex").read_bytes()
    assert b"caf\xe9" in copy
    text = copy.decode("utf-8", errors="surrogateescape")
    assert strip_annotations(text, False).encode("utf-8", errors="surrogateescape") == data


def test_xcolor_already_loaded_is_not_loaded_again(tmp_path: Path) -> None:
    doc = DOC.replace("\\usepackage{amsmath}", "\\usepackage{amsmath}\n\\usepackage[dvipsnames]{xcolor}")
    _, copy, _ = _check_text(tmp_path, "x.tex", doc.encode())
    assert "\\usepackage{xcolor}" not in copy


def test_commented_out_display_is_not_a_target(tmp_path: Path) -> None:
    doc = DOC.replace("\\end{document}", "% \\[ E_4 = E_4 \\]\n\\end{document}")
    source, copy, _ = _check_text(tmp_path, "c.tex", doc.encode())
    assert "% \\[ E_4 = E_4 \\]\n" in copy
    assert strip_annotations(copy, False) == source


def test_input_files_are_counted_not_annotated(tmp_path: Path) -> None:
    (tmp_path / "part.tex").write_text("%@claim name=inside\n\\[ E_4 E_6 = E_{12} \\]\n", encoding="utf-8")
    main = DOC.replace("\\end{document}", "\\input{part}\n\\end{document}")
    (tmp_path / "main.tex").write_text(main, encoding="utf-8")
    part_before = (tmp_path / "part.tex").read_bytes()
    proc = run("check", "main.tex", "--annotate", "out/main.tex", cwd=tmp_path)
    assert proc.returncode == 2, proc.stderr  # out/ does not exist: cannot write
    assert "cannot write" in proc.stderr
    (tmp_path / "out").mkdir()
    proc = run("check", "main.tex", "--annotate", "out/main.tex", cwd=tmp_path)
    assert proc.returncode == 2 and proc.stderr == ""
    copy = (tmp_path / "out" / "main.tex").read_text(encoding="utf-8")
    assert "inside" not in copy  # the claim of part.tex is not noted in the main file...
    assert "1 of them in other files (part.tex)" in copy  # ...but counted
    assert (tmp_path / "part.tex").read_bytes() == part_before
    assert not (tmp_path / "out" / "part.tex").exists()
    assert strip_annotations(copy, False) == main


MD = (
    "# Note\n"
    "\n"
    "<!-- @claim name=one -->\n"
    "$$ E_4^2 = E_8 $$\n"
    "Text right after the block.\n"
    "\n"
    "```\n"
    "<!-- @claim name=example -->\n"
    "$$ E_4 = E_6 $$\n"
    "```\n"
    "\n"
    "<!-- @claim name=fenced -->\n"
    "```math\n"
    "E_4 E_6 = E_{12}\n"
    "```\n"
    "\n"
    "<!-- @claim name=orphan -->\n"
    "no math\n"
    "\n"
    "<!-- @claim name=last -->\n"
    "$$\n"
    "E_6 E_8 = E_{14} = E_4 E_{10}\n"
    "$$"
)


@pytest.mark.parametrize("eol", ["\n", "\r\n"])
@pytest.mark.parametrize("final", [True, False])
def test_markdown_tricky(tmp_path: Path, eol: str, final: bool) -> None:
    text = MD.replace("\n", eol) + (eol if final else "")
    source, copy, report = _check_text(tmp_path, "n.md", text.encode())
    assert strip_annotations(copy, True) == source
    assert "example" not in "".join(line for line in copy.splitlines() if MARKDOWN_MARK in line)
    # Notes in reading order; the orphan tag has no block, so its error comes last, in the summary.
    verdicts = {c.name: c.verdict for c in report.claims}
    assert MD_NOTE.findall(copy) == [verdicts[n] for n in ("one", "fenced", "last", "last.2", "orphan")]
    assert verdicts["orphan"] == "error" and verdicts["last"] == verdicts["last.2"] == "proved"
    if eol == "\n":
        assert verdicts["fenced"] == "refuted"
    lines = copy.split(eol) if final else copy.replace("\r\n", "\n").split("\n")
    assert lines[4] == "" and lines[5].startswith("> ") and lines[6] == MARKDOWN_MARK and lines[7] == ""
    assert lines[8] == "Text right after the block."
    if final:
        assert copy.endswith(MARKDOWN_MARK + eol) and eol in copy and copy.count(eol) == copy.count("\n")
    else:
        assert copy.endswith(MARKDOWN_MARK) and not copy.endswith("\n")
    assert {c.name for c in report.claims} >= {"one", "fenced", "orphan", "last", "last.2"}


def test_already_annotated_is_refused(tmp_path: Path) -> None:
    _source, copy, report = annotated(SAMPLES / "paper.tex")
    with pytest.raises(AlreadyAnnotated):
        annotate(copy, report, report.files[0], False)
    (tmp_path / "a.tex").write_text(copy, encoding="utf-8")
    proc = run("check", "a.tex", "--annotate", "b.tex", cwd=tmp_path)
    assert proc.returncode == 2 and "already contains qreferee annotations" in proc.stderr
    assert not (tmp_path / "b.tex").exists()


def test_escaping_keeps_spans_closed() -> None:
    nasty = "\\iffalse</qreferee>\\fi {}$&#^_%~<>| \u0393\u2260 caf\u00e9 \U0001d53c\nnext"
    for escaped in (tex_escape(nasty), tt_escape(nasty)):
        assert LATEX_CLOSE not in escaped and "\n" not in escaped and escaped.isascii()
        assert "%" not in escaped.replace("\\%", "").replace("\\char37{}", "")
        assert escaped.count("{") == escaped.count("}")


# ---------------------------------------------------------------------------
# The documented one-line procedures restore the source too
# ---------------------------------------------------------------------------


def test_perl_procedure_restores_latex(tmp_path: Path) -> None:
    perl = tool("perl")
    if perl is None:
        pytest.skip("perl not installed")
    for data in (DOC.encode(), DOC.replace("\n", "\r\n").encode(), (SAMPLES / "paper.tex").read_bytes()):
        path = tmp_path / "p.tex"
        path.write_bytes(data)
        _, copy, _ = annotated(path)
        (tmp_path / "copy.tex").write_bytes(copy.encode())
        proc = subprocess.run(
            [perl, "-pe", r"s{\\iffalse<qreferee>\\fi.*?\\iffalse</qreferee>\\fi\{\}}{}g", "copy.tex"],
            cwd=tmp_path,
            capture_output=True,
            check=True,
        )
        assert proc.stdout == data


def test_perl_procedure_restores_markdown(tmp_path: Path) -> None:
    # The one-line procedure documented in verifier/annotate.py.
    perl = tool("perl")
    if perl is None:
        pytest.skip("perl not installed")
    for data in ((SAMPLES / "note.md").read_bytes(), (MD + "\n").replace("\n", "\r\n").encode()):
        path = tmp_path / "n.md"
        path.write_bytes(data)
        _, copy, _ = annotated(path)
        (tmp_path / "copy.md").write_bytes(copy.encode())
        proc = subprocess.run([perl, "-0777", "-pe", MARKDOWN_STRIP, "copy.md"], cwd=tmp_path, capture_output=True)
        assert proc.returncode == 0, proc.stderr
        assert proc.stdout == data


# ---------------------------------------------------------------------------
# The command line: never over an input, always atomically
# ---------------------------------------------------------------------------


def test_cli_annotate_writes_the_copy(tmp_path: Path) -> None:
    shutil.copy(SAMPLES / "paper.tex", tmp_path / "paper.tex")
    proc = run("check", "paper.tex", "--annotate", "checked.tex", "--format", "json", cwd=tmp_path)
    assert proc.returncode == 2, proc.stderr
    assert proc.stdout.startswith("{")  # the report still goes to stdout
    validate_report(json.loads(proc.stdout))
    copy = (tmp_path / "checked.tex").read_text(encoding="utf-8")
    assert strip_annotations(copy, False) == (SAMPLES / "paper.tex").read_text(encoding="utf-8")
    assert sorted(p.name for p in tmp_path.iterdir()) == ["checked.tex", "paper.tex"], "no temporary file left"


@pytest.mark.parametrize("flag", ["--annotate", "-o", "--output"])
def test_cli_refuses_to_write_over_an_input(tmp_path: Path, flag: str) -> None:
    shutil.copy(SAMPLES / "note.md", tmp_path / "note.md")
    (tmp_path / "sub").mkdir()
    os.symlink(tmp_path / "note.md", tmp_path / "link.md")
    os.link(tmp_path / "note.md", tmp_path / "hard.md")
    before = (tmp_path / "note.md").read_bytes()
    for target in ("note.md", "sub/../note.md", str(tmp_path / "note.md"), "link.md", "hard.md"):
        proc = run("check", "note.md", flag, target, cwd=tmp_path)
        assert proc.returncode == 2, (target, proc.stderr)
        assert "refusing to write" in proc.stderr
        assert proc.stdout == ""
    assert (tmp_path / "note.md").read_bytes() == before


def test_cli_refuses_to_write_over_an_input_file(tmp_path: Path) -> None:
    (tmp_path / "part.tex").write_text("%@claim\n\\[ E_4^2 = E_8 \\]\n", encoding="utf-8")
    (tmp_path / "main.tex").write_text("\\input{part}\n", encoding="utf-8")
    for flag in ("--annotate", "-o"):
        proc = run("check", "main.tex", flag, "part.tex", cwd=tmp_path)
        assert proc.returncode == 2 and "refusing to write part.tex" in proc.stderr
    assert (tmp_path / "part.tex").read_text(encoding="utf-8") == "%@claim\n\\[ E_4^2 = E_8 \\]\n"


def test_cli_annotate_needs_one_file_and_distinct_outputs(tmp_path: Path) -> None:
    proc = run("check", str(SAMPLES / "paper.tex"), str(SAMPLES / "note.md"), "--annotate", "x.tex", cwd=tmp_path)
    assert proc.returncode == 2 and "exactly one" in proc.stderr
    proc = run("check", str(SAMPLES / "note.md"), "--annotate", "x.md", "-o", "x.md", cwd=tmp_path)
    assert proc.returncode == 2 and "same file" in proc.stderr
    assert list(tmp_path.iterdir()) == []


@pytest.mark.parametrize("fmt", ["text", "json", "html", "sarif"])
def test_cli_output_file_replaces_stdout(tmp_path: Path, fmt: str) -> None:
    out = tmp_path / f"report.{fmt}"
    out.write_text("old", encoding="utf-8")
    out.chmod(0o640)
    proc = run("check", str(SAMPLES / "note.md"), "--format", fmt, "-o", str(out), cwd=tmp_path)
    assert proc.returncode == 2 and proc.stdout == "" and proc.stderr == ""
    direct = run("check", str(SAMPLES / "note.md"), "--format", fmt, cwd=tmp_path)
    written = out.read_text(encoding="utf-8")
    if fmt in ("text", "json"):
        assert written == direct.stdout or fmt == "json"  # json differs only in timings
    assert written.strip() and written != "old"
    assert stat.S_IMODE(out.stat().st_mode) == 0o640, "an existing file keeps its permissions"
    assert sorted(p.name for p in tmp_path.iterdir()) == [out.name]


def test_plugin_subcommands_are_optional(monkeypatch: pytest.MonkeyPatch) -> None:
    from verifier import cli

    monkeypatch.setattr(cli, "PLUGIN_MODULES", ("verifier.no_such_module", *cli.PLUGIN_MODULES))
    parser = cli.build_parser()
    assert parser.parse_args(["check", "x.tex"]).command == "check"
    assert cli.main(["explain", "mixed-weight"]) == 0


def test_plugin_subcommand_is_dispatched(monkeypatch: pytest.MonkeyPatch, tmp_path: Path) -> None:
    import types

    from verifier import cli

    calls: list[str] = []
    plugin = types.ModuleType("verifier_test_plugin")

    def register(subparsers: object) -> None:
        p = subparsers.add_parser("ping")  # type: ignore[attr-defined]
        p.add_argument("word")
        p.set_defaults(func=lambda args: calls.append(args.word) or 7)

    plugin.register = register  # type: ignore[attr-defined]
    monkeypatch.setitem(sys.modules, "verifier_test_plugin", plugin)
    monkeypatch.setattr(cli, "PLUGIN_MODULES", ("verifier_test_plugin",))
    assert cli.main(["ping", "hello"]) == 7
    assert calls == ["hello"]


# ---------------------------------------------------------------------------
# A real pdflatex compiles the annotated copies
# ---------------------------------------------------------------------------

needs_pdflatex = pytest.mark.skipif(
    shutil.which("pdflatex") is None and not IN_CI, reason="pdflatex not installed (CI installs it)"
)


def pdflatex(folder: Path, name: str) -> str:
    proc = subprocess.run(
        ["pdflatex", "-interaction=nonstopmode", "-halt-on-error", "-no-shell-escape", name],
        cwd=folder,
        capture_output=True,
        text=True,
        timeout=180,
    )
    log = (folder / name).with_suffix(".log").read_text(encoding="latin-1")
    assert proc.returncode == 0, log[-3000:]
    assert not re.search(r"^! ", log, re.M), log[-3000:]
    return log


def compiles(folder: Path, name: str) -> bool:
    proc = subprocess.run(
        ["pdflatex", "-interaction=nonstopmode", "-halt-on-error", "-no-shell-escape", name],
        cwd=folder,
        capture_output=True,
        timeout=180,
    )
    return proc.returncode == 0


@needs_pdflatex
def test_annotated_paper_compiles_and_shows_every_note(tmp_path: Path) -> None:
    _, copy, report = annotated(SAMPLES / "paper.tex")
    (tmp_path / "paper.tex").write_text(copy, encoding="utf-8")
    log = pdflatex(tmp_path, "paper.tex")
    assert "Font shape" not in log, "every character of a note exists in the fonts used"
    pdf = tmp_path / "paper.pdf"
    assert pdf.stat().st_size > 10_000
    pdftotext = tool("pdftotext")
    if pdftotext is not None:
        text = subprocess.run([pdftotext, str(pdf), "-"], capture_output=True, text=True, check=True).stdout
        shown = re.findall(r"qreferee: (proved|refuted|unproven|error)", text)
        assert sorted(shown) == sorted(c.verdict for c in report.claims)
        assert "qreferee summary:" in text
        assert "459481/427729" in text  # a witness, legible in the PDF
    pdftoppm = tool("pdftoppm")
    if pdftoppm is not None:
        subprocess.run(
            [pdftoppm, "-r", "60", "-f", "2", "-l", "2", "-png", "paper.pdf", "page"], cwd=tmp_path, check=True
        )
        (page,) = tmp_path.glob("page-*2.png")
        assert page.read_bytes().startswith(b"\x89PNG")


@needs_pdflatex
def test_annotated_documents_compile(tmp_path: Path) -> None:
    # Every display kind, text after a closer, an orphan in the summary, CRLF line ends.
    for name, text in (("d.tex", DOC), ("crlf.tex", DOC.replace("\n", "\r\n"))):
        (tmp_path / "src.tex").write_text(text, encoding="utf-8", newline="")
        _, copy, _ = annotated(tmp_path / "src.tex")
        (tmp_path / name).write_text(copy, encoding="utf-8", newline="")
        pdflatex(tmp_path, name)
    # Every environment the scanner reads, and the test manuscripts (with the packages they need):
    # when the source compiles, the copy compiles.
    for fixture in (REPO / "tests" / "data" / "scan" / "environments.tex", *FIXTURES[4:]):
        text = fixture.read_text(encoding="utf-8").replace(
            "\\documentclass{article}", "\\documentclass{article}\\usepackage{amsmath,amssymb}"
        )
        (tmp_path / "src.tex").write_text(text, encoding="utf-8")
        if not compiles(tmp_path, "src.tex"):
            assert fixture.parent.name == "manuscripts", fixture  # a test manuscript need not be a paper
            continue
        _, copy, _ = annotated(tmp_path / "src.tex")
        (tmp_path / "fixture.tex").write_text(copy, encoding="utf-8")
        pdflatex(tmp_path, "fixture.tex")
    # xcolor already loaded with options by the author.
    (tmp_path / "src.tex").write_text(
        DOC.replace("\\begin{document}", "\\usepackage[table]{xcolor}\n\\begin{document}")
    )
    _, copy, _ = annotated(tmp_path / "src.tex")
    (tmp_path / "x.tex").write_text(copy, encoding="utf-8")
    pdflatex(tmp_path, "x.tex")


@needs_pdflatex
def test_annotated_part_compiles_inside_a_main_file(tmp_path: Path) -> None:
    part = "%@claim name=p\n\\[ E_4 E_6 = E_{10} \\]"  # no preamble, no final newline
    (tmp_path / "src.tex").write_text(part, encoding="utf-8")
    _, copy, _ = annotated(tmp_path / "src.tex")
    (tmp_path / "part.tex").write_text(copy, encoding="utf-8")
    for preamble in ("", "\\usepackage{color}\n"):
        (tmp_path / "main.tex").write_text(
            f"\\documentclass{{article}}\n{preamble}\\begin{{document}}\nBefore.\n\\input{{part}}\nAfter.\n\\end{{document}}\n"
        )
        pdflatex(tmp_path, "main.tex")
