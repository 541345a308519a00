"""``--format html``: one self-contained page, parsed back with ``html.parser``.

Checks that every claim has its section (source, verdict, certificate, and for
refutations the coefficient table with the differing rows marked), that the page loads
nothing from anywhere, and that the author's text is escaped everywhere.
"""

from __future__ import annotations

import subprocess
import sys
from dataclasses import dataclass, field
from html.parser import HTMLParser
from importlib import resources
from pathlib import Path

import pytest
from verifier import check_path, check_text
from verifier.api import ClaimResult, Report
from verifier.location import Location
from verifier.prove.prover import Outcome
from verifier.report import html
from verifier.report.coefficients import coefficient_table

REPO = Path(__file__).resolve().parent.parent
SAMPLES = REPO / "sample_docs"
VOID = {"meta", "br", "hr", "img", "link", "input", "col", "area", "base", "source", "wbr"}


@dataclass
class Element:
    tag: str
    attrs: dict[str, str]
    parent: Element | None
    children: list[Element | str] = field(default_factory=list)

    def text(self) -> str:
        return "".join(c if isinstance(c, str) else c.text() for c in self.children)

    def classes(self) -> set[str]:
        return set(self.attrs.get("class", "").split())

    def find_all(self, tag: str, cls: str | None = None) -> list[Element]:
        out: list[Element] = []
        for c in self.children:
            if isinstance(c, Element):
                if c.tag == tag and (cls is None or cls in c.classes()):
                    out.append(c)
                out.extend(c.find_all(tag, cls))
        return out


class Tree(HTMLParser):
    """A strict little DOM: every non-void element must be closed in order."""

    def __init__(self) -> None:
        super().__init__(convert_charrefs=True)
        self.root = Element("#root", {}, None)
        self.current = self.root
        self.ids: dict[str, Element] = {}

    def handle_starttag(self, tag: str, attrs: list[tuple[str, str | None]]) -> None:
        element = Element(tag, {k: v or "" for k, v in attrs}, self.current)
        self.current.children.append(element)
        if "id" in element.attrs:
            assert element.attrs["id"] not in self.ids, f"duplicate id {element.attrs['id']}"
            self.ids[element.attrs["id"]] = element
        if tag not in VOID:
            self.current = element

    def handle_endtag(self, tag: str) -> None:
        assert self.current.tag == tag, f"</{tag}> closes <{self.current.tag}>"
        assert self.current.parent is not None
        self.current = self.current.parent

    def handle_data(self, data: str) -> None:
        self.current.children.append(data)


def parse(page: str) -> Tree:
    tree = Tree()
    tree.feed(page)
    tree.close()
    assert tree.current is tree.root, "every element is closed"
    return tree


def squash(text: str) -> str:
    return " ".join(text.split())


def sample_report() -> Report:
    report = Report()
    for name in ("paper.tex", "note.md"):
        r = check_path(SAMPLES / name)
        report.claims += r.claims
        report.diagnostics += r.diagnostics
        report.files += r.files
    return report


@pytest.fixture(scope="module")
def samples() -> tuple[Report, Tree]:
    report = sample_report()
    return report, parse(html.render(report))


def test_every_claim_has_its_section(samples: tuple[Report, Tree]) -> None:
    report, tree = samples
    sections = tree.root.find_all("section", "claim")
    assert len(sections) == len(report.claims)
    for i, (c, section) in enumerate(zip(report.claims, sections, strict=True), start=1):
        assert section.attrs["id"] == f"claim-{i}"
        assert f"v-{c.verdict}" in section.classes()
        (source,) = section.find_all("pre", "source")[:1]
        assert source.text() == c.source
        assert any(b.text() == c.verdict for b in section.find_all("span", "badge"))
        (verdict,) = section.find_all("p", "verdict")
        assert squash(c.outcome.message) in squash(verdict.text())
        assert section.find_all("p", "math"), "the claim is also typeset"
        where = section.find_all("p", "where")[0].text()
        assert f"{c.location.file}:{c.location.line}:{c.location.column}" in where
        if c.outcome.code:
            assert c.outcome.code in section.text()
        if c.outcome.space:
            dl = section.find_all("dl", "certificate")[0]
            terms = [e.text() for e in dl.find_all("dt")]
            values = [e.text() for e in dl.find_all("dd")]
            for key, value in c.outcome.space.items():
                assert values[terms.index(key)] == str(value)
            assert values[terms.index("method")] == str(c.outcome.method)
            assert values[terms.index("coefficients compared")] == str(c.outcome.terms_compared)
        if c.outcome.components:
            (table,) = section.find_all("table", "components")
            assert len(table.find_all("tbody")[0].find_all("tr")) == len(c.outcome.components)


def test_refutations_show_coefficients_with_the_difference_marked(samples: tuple[Report, Tree]) -> None:
    report, tree = samples
    refuted = [c for c in report.claims if c.verdict == "refuted" and c.outcome.first_difference]
    assert len(refuted) >= 5
    for c in refuted:
        section = tree.ids[f"claim-{report.claims.index(c) + 1}"]
        (table,) = section.find_all("table", "coefficients")
        rows = [[td.text() for td in tr.find_all("td")] for tr in table.find_all("tbody")[0].find_all("tr")]
        marked = [tr for tr in table.find_all("tr", "differs")]
        fd = c.outcome.first_difference
        assert fd is not None
        first = marked[0].find_all("td")
        assert [td.text() for td in first[:3]] == [str(fd["n"]), fd["left"], fd["right"]]
        assert len(rows) == len(coefficient_table(c) or [])
        for row in rows:
            assert (row[1] != row[2]) == row[3].startswith("≠")


def test_summary_and_overview(samples: tuple[Report, Tree]) -> None:
    report, tree = samples
    summary = tree.ids["summary-title"].parent
    assert summary is not None
    text = squash(summary.text())
    for verdict, n in report.summary.items():
        assert f"{n} {verdict}" in text
    overview = summary.find_all("table", "overview")[0].find_all("tbody")[0].find_all("tr")
    assert len(overview) == len(report.claims)
    for tr in overview:
        for a in tr.find_all("a"):
            assert a.attrs["href"].lstrip("#") in tree.ids


def test_self_contained(samples: tuple[Report, Tree]) -> None:
    report, tree = samples
    page = html.render(report)
    assert not tree.root.find_all("script") and not tree.root.find_all("link") and not tree.root.find_all("img")
    for tag in ("a", "iframe", "object", "embed", "form", "source", "video", "audio"):
        for e in tree.root.find_all(tag):
            for attr in ("href", "src", "data", "action"):
                assert not e.attrs.get(attr, "#").startswith(("http", "//", "data:", "javascript:")), e.attrs
    (style,) = tree.root.find_all("style")
    assert "url(" not in style.text() and "@import" not in style.text()
    assert "@media print" in style.text()
    assert tree.root.find_all("meta")[0].attrs.get("charset") == "utf-8"
    assert "http://" not in page.replace("http://www.w3.org", "")
    assert "https://" not in page


def test_author_text_is_escaped() -> None:
    evil = "<script>alert(1)</script>"
    text = (
        "%@claim name=<b>bold</b>\n"
        f"\\[ E_4 = {evil} \\]\n"
        "%@claim\n"
        "\\[ E_4^2 = E_8 \\label{<img src=x onerror=alert(2)>} \\]\n"
        "\\input{<iframe>}\n"
    )
    report = check_text(text, "x<y>.tex")
    page = html.render(report)
    tree = parse(page)
    for tag in ("script", "b", "img", "iframe"):
        assert not tree.root.find_all(tag), tag
    assert evil in tree.root.text()
    assert "<b>bold</b>" in tree.root.text()
    assert "x<y>.tex" in tree.root.find_all("title")[0].text()


def test_math_html_escapes_and_typesets() -> None:
    out = str(html.math_html("\\frac{E_4^3 - E_6^2}{1728} = \\Delta <b>x</b> \\foo{\\&}"))
    assert not parse(out).root.find_all("b") and "&lt;" in out and "&amp;" in out
    assert '<span class="fr">' in out and "<sup>3</sup>" in out and "Δ" in out
    parse(out)  # well formed
    deep = str(html.math_html("{" * 5000 + "x" + "^{" * 3000))
    parse(deep)


def _claim(outcome: Outcome) -> ClaimResult:
    loc = Location("t.tex", 3, 4)
    return ClaimResult(loc, Location("t.tex", 3, 20), "made-up", None, "E_4 = E_6", outcome, 0.01)


def test_single_difference_table_and_suggestion() -> None:
    outcome = Outcome(
        "refuted",
        "equality",
        "coefficients of q^1 differ: left 240, right -504",
        first_difference={"n": 1, "left": "240", "right": "-504"},
    )
    outcome.table = []
    outcome.suggestion = "E_4 = E_4 <ok>"
    c = _claim(outcome)
    assert coefficient_table(c) == [("1", "240", "-504")]
    tree = parse(html.render(Report(claims=[c], files=["t.tex"])))
    (table,) = tree.root.find_all("table", "coefficients")
    (row,) = table.find_all("tr", "differs")
    assert [td.text() for td in row.find_all("td")[:3]] == ["1", "240", "-504"]
    (suggestion,) = tree.root.find_all("pre", "suggestion")
    assert suggestion.text() == "E_4 = E_4 <ok>"


def test_full_table_is_preferred() -> None:
    outcome = Outcome("refuted", "prefix", "m", first_difference={"n": "25/24", "left": "1", "right": "2"})
    outcome.table = [["1/24", "1", "1"], ["25/24", "1", "2"]]
    assert coefficient_table(_claim(outcome)) == [("1/24", "1", "1"), ("25/24", "1", "2")]
    assert coefficient_table(_claim(Outcome("proved", "equality", "m"))) is None


def test_diagnostics_section(tmp_path: Path) -> None:
    (tmp_path / "m.tex").write_text("\\input{absent}\n%@claim\n\\[ E_4^2 = E_8 \\]\n", encoding="utf-8")
    report = check_path(tmp_path / "m.tex")
    tree = parse(html.render(report))
    section = tree.ids["diagnostics-title"].parent
    assert section is not None and "include-missing" in section.text()


def test_templates_are_package_data() -> None:
    folder = resources.files("verifier.report") / "templates"
    assert (folder / "report.html.j2").is_file() and (folder / "report.css").is_file()


def test_cli_html_and_lazy_imports(tmp_path: Path) -> None:
    out = tmp_path / "report.html"
    proc = subprocess.run(
        [sys.executable, "-m", "verifier", "check", "sample_docs/note.md", "--format", "html", "-o", str(out)],
        cwd=REPO,
        capture_output=True,
        text=True,
        timeout=120,
    )
    assert proc.returncode == 2 and proc.stdout == ""
    tree = parse(out.read_text(encoding="utf-8"))
    # One section per claim, as many as the JSON report of the same file has claims.
    expected = len(check_path(REPO / "sample_docs" / "note.md").claims)
    assert len(tree.root.find_all("section", "claim")) == expected
    probe = (
        "import sys; from verifier import cli; "
        "code = cli.main(['check', 'sample_docs/note.md']); "
        "assert 'jinja2' not in sys.modules, 'jinja2 loaded for text output'; print(code)"
    )
    proc = subprocess.run([sys.executable, "-c", probe], cwd=REPO, capture_output=True, text=True, timeout=120)
    assert proc.stdout.strip().endswith("2"), proc.stderr
