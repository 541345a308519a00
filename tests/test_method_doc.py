"""The method notes (docs/method.md) and every reference to them.

The project documents its own mathematics in docs/method.md, one anchored section per topic.
These tests check that the notes cover what they must, that every ``docs/method.md#anchor``
cited by code, messages, tests and docs exists, that ``qreferee explain`` and the HTML report
link to existing sections, that the notes are shipped inside the wheel, and that nothing in
the project points at a reference users do not have.
"""

from __future__ import annotations

import io
import re
import tomllib
from contextlib import redirect_stdout
from pathlib import Path

import pytest
from verifier import check_text, cli, method
from verifier.diagnostics import CODES
from verifier.prove import groups
from verifier.report import html

REPO = Path(__file__).resolve().parent.parent
DOC = REPO / "docs" / "method.md"
SECTIONS = method.parse(DOC.read_text(encoding="utf-8"))
# Where the project may cite the notes (the same places that must not cite anything else).
SCANNED = ["verifier", "tests", "bench", "grammar", "sample_docs", "docs", "README.md", "DEVELOPERS.md"]
SUFFIXES = {".py", ".md", ".tex", ".lark", ".j2", ".toml", ".txt"}
# ``docs/method.md#a, #b and #c``: the first anchor, and further ones in the same file.
_CITED = re.compile(r"method\.md#([a-z0-9-]+)")
_FURTHER = re.compile(r"(?<![\w&/\"'{])#([a-z][a-z0-9]*(?:-[a-z0-9]+)*)\b")


def _project_files() -> list[Path]:
    out: list[Path] = []
    for name in SCANNED:
        root = REPO / name
        if root.is_file():
            out.append(root)
        elif root.is_dir():
            out += [p for p in sorted(root.rglob("*")) if p.is_file() and p.suffix in SUFFIXES]
    return out


# ---------------------------------------------------------------------------
# The notes themselves
# ---------------------------------------------------------------------------


def test_anchors_are_unique_and_each_opens_a_section() -> None:
    text = DOC.read_text(encoding="utf-8")
    anchors = re.findall(r'<a id="([a-z0-9-]+)"></a>', text)
    assert len(anchors) == len(set(anchors))
    assert list(SECTIONS) == anchors
    for sec in SECTIONS.values():
        assert sec.title != sec.anchor, f"{sec.anchor} has no heading after its anchor"


def test_internal_links_resolve() -> None:
    targets = re.findall(r"\]\(#([a-z0-9-]+)\)", DOC.read_text(encoding="utf-8"))
    assert targets
    assert sorted(set(targets) - set(SECTIONS)) == []


# The topics the notes must cover: conventions, theorems, and one section per claim kind.
REQUIRED = [
    "q-expansions",
    "eisenstein",
    "e2",
    "delta-eta-j",
    "theta-nome",
    "characters",
    "half-integral-weight",
    "valence-formula",
    "sturm-bound",
    "poles-at-cusps",
    "eta-modularity",
    "ligozat",
    "weight-one-half",
    "dimension-gamma0",
    "dimension-characters",
    "quasimodular",
    "congruences-sturm",
    "congruence-weights",
    "congruence-e2",
    "claim-identity",
    "claim-expansion",
    "claim-membership",
    "claim-dimension",
    "claim-eigenform",
    "claim-arithmetic",
    "claim-congruence",
    "claim-value",
    "claim-solve",
    "witness",
    "references",
]


@pytest.mark.parametrize("anchor", REQUIRED)
def test_required_section_exists(anchor: str) -> None:
    assert anchor in SECTIONS
    assert SECTIONS[anchor].plain_text()


@pytest.mark.parametrize(
    ("anchor", "needle"),
    [
        ("sturm-bound", "Sturm"),
        ("valence-formula", "Serre"),
        ("eta-modularity", "Newman"),
        ("eta-modularity", "Gordon"),
        ("ligozat", "Ligozat"),
        ("weight-one-half", "Serre and"),
        ("weight-one-half", "Stark"),
        ("dimension-characters", "Cohen and J. Oesterlé"),
        ("half-integral-weight", "Shimura"),
        ("congruence-e2", "E_{p+1}"),
    ],
)
def test_theorems_name_their_published_source(anchor: str, needle: str) -> None:
    assert needle in SECTIONS[anchor].text


def test_witness_section_names_the_enforcing_class() -> None:
    text = SECTIONS["witness"].text
    assert "verifier/prove/outcome.py" in text and "no-witness" in text


def test_sturm_examples_in_the_notes_match_the_code() -> None:
    # The sample values of docs/method.md#sturm-bound, each floor(k m_0(N) / 12) by hand
    # (Sturm 1987): m_0(1) = 1, m_0(4) = 6, m_0(11) = 12.
    text = SECTIONS["sturm-bound"].text
    for (n, k), b in {(1, 12): 1, (4, 2): 1, (11, 2): 2}.items():
        assert f"B({n}, {k}) = {b}" in text
        assert groups.sturm_bound(k, n) == b


# ---------------------------------------------------------------------------
# Every citation resolves
# ---------------------------------------------------------------------------


def test_every_cited_anchor_exists() -> None:
    missing: list[str] = []
    cited = 0
    for path in _project_files():
        if path == Path(__file__).resolve() or path.suffix == ".css":
            continue
        text = path.read_text(encoding="utf-8", errors="replace")
        if "method.md" not in text:
            continue
        anchors = set(_CITED.findall(text))
        if path != DOC:
            anchors |= set(_FURTHER.findall(text))
        cited += len(anchors)
        missing += [f"{path.relative_to(REPO)}: #{a}" for a in sorted(anchors - set(SECTIONS))]
    assert cited > 50
    assert missing == []


def test_nothing_points_at_a_private_reference() -> None:
    # Built from pieces so that this file does not match its own search.
    forbidden = ("MATH" + ".md", "shared" + "/")
    hits = [
        f"{path.relative_to(REPO)}: {word}"
        for path in _project_files()
        for word in forbidden
        if word in path.read_text(encoding="utf-8", errors="replace")
    ]
    assert hits == []


def test_developer_guide_points_at_the_notes() -> None:
    assert "docs/method.md" in (REPO / "DEVELOPERS.md").read_text(encoding="utf-8")


@pytest.mark.parametrize("table", [method.FOR_CODE, method.FOR_KIND, method.FOR_METHOD], ids=["code", "kind", "method"])
def test_lookup_tables_name_existing_sections(table: dict[str, str]) -> None:
    assert sorted(set(table.values()) - set(SECTIONS)) == []


def test_codes_with_a_section_are_documented_codes() -> None:
    assert sorted(set(method.FOR_CODE) - set(CODES)) == []


# ---------------------------------------------------------------------------
# qreferee explain
# ---------------------------------------------------------------------------


def _explain(code: str) -> tuple[int, str]:
    out = io.StringIO()
    with redirect_stdout(out):
        rc = cli.main(["explain", code])
    return rc, out.getvalue()


@pytest.mark.parametrize("code", sorted(method.FOR_CODE))
def test_explain_links_an_existing_section(code: str) -> None:
    rc, out = _explain(code)
    assert rc == 0
    links = _CITED.findall(out)
    assert links == [method.FOR_CODE[code]]
    assert SECTIONS[links[0]].title in out  # the section title is printed beside the path


def test_explain_prints_where_the_notes_are() -> None:
    found = method.path()
    assert found is not None and found.read_text(encoding="utf-8") == DOC.read_text(encoding="utf-8")
    _, out = _explain("not-modular")
    assert str(found) in out


def test_explain_without_a_section_prints_no_link() -> None:
    rc, out = _explain("syntax")
    assert rc == 0 and "method.md" not in out


def test_explain_list_stays_one_line_per_code() -> None:
    out = io.StringIO()
    with redirect_stdout(out):
        cli.main(["explain"])
    assert len(out.getvalue().splitlines()) == len(CODES)


# ---------------------------------------------------------------------------
# The HTML report
# ---------------------------------------------------------------------------

DOCUMENT = r"""
%@claim
\[ E_4^2 = E_8 \]
%@claim
\[ E_4 = 1 + 240q + 2160q^2 + \cdots \]
%@claim
\[ E_4 E_6 = E_{12} \]
%@claim
\[ \eta(\tau)^2\eta(11\tau)^2 \in S_2(\Gamma_0(11)) \]
%@claim
\[ \dim M_4(\Gamma_0(5)) = 3 \]
"""


def test_html_links_resolve_inside_the_page_and_to_the_notes() -> None:
    # E_4^2 = E_8, E_4's expansion and E_4 E_6 != E_12 (their q-coefficients are -264 and
    # 65520/691): Serre, A Course in Arithmetic, Ch. VII §4. eta^2 eta_11^2 spans S_2(Gamma_0(11))
    # (Martin 1996). dim M_4(Gamma_0(5)) = 3 (Diamond–Shurman Thm 3.5.1).
    report = check_text(DOCUMENT, "links.tex")
    page = html.render(report)
    hrefs = set(re.findall(r'href="#([^"]+)"', page))
    ids = set(re.findall(r'id="([^"]+)"', page))
    assert sorted(hrefs - ids) == []
    linked = {h.removeprefix("method-") for h in hrefs if h.startswith("method-")}
    kinds = {c.outcome.kind for c in report.claims}
    assert {"equality", "prefix", "membership", "dimension"} <= kinds
    assert {method.FOR_KIND[k] for k in kinds} <= linked
    assert "sturm-bound" in linked  # the certificate's method
    for anchor in linked:
        assert anchor in SECTIONS
        # The page carries the section's own text, with its reference.
        assert f"{method.DOC}#{anchor}" in page
        first_line = SECTIONS[anchor].plain_text().splitlines()[0]
        assert html.escape(first_line) in page


def test_html_without_the_notes_prints_references_without_links(monkeypatch: pytest.MonkeyPatch) -> None:
    monkeypatch.setattr(method, "sections", dict)
    page = html.render(check_text(DOCUMENT, "links.tex"))
    assert 'href="#method-' not in page
    assert "docs/method.md#claim-identity" in page


# ---------------------------------------------------------------------------
# Packaging: an installed qreferee carries the notes where verifier.method looks
# ---------------------------------------------------------------------------


def test_wheel_ships_the_notes_where_they_are_looked_up() -> None:
    config = tomllib.loads((REPO / "pyproject.toml").read_text(encoding="utf-8"))
    hatch = config["tool"]["hatch"]["build"]["targets"]
    shipped = hatch["wheel"]["force-include"]["docs/method.md"]
    assert shipped == "verifier/_docs/method.md"
    assert "docs" in hatch["sdist"]["include"]
    package = Path(method.__file__).resolve().parent
    installed = package.parent / shipped
    # verifier.method.path() tries that location first (then the checkout's docs/).
    assert installed.parent.parent == package
    assert method.path() in (installed, DOC)
