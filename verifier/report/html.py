"""A self-contained HTML report: one file, inline CSS, no script, no network, printable.

The page is rendered from the jinja2 templates in ``verifier/report/templates/`` with
autoescaping on: claim sources and messages are the author's text and are never trusted.
The only markup built in Python is the typeset form of a claim (:func:`math_html`), which
escapes every piece of text it emits.
"""

from __future__ import annotations

import re
from dataclasses import dataclass, field
from pathlib import Path
from typing import Any

from markupsafe import Markup, escape

from verifier import __version__
from verifier import method as method_notes
from verifier.api import ClaimResult, Report
from verifier.diagnostics import CODES, Diagnostic
from verifier.report.coefficients import Row, table_rows
from verifier.report.text import CAUTION, SEVERITY

TEMPLATES = Path(__file__).resolve().parent / "templates"


# ---------------------------------------------------------------------------
# A claim's LaTeX, typeset as plain HTML (sub/sup, stacked fractions, symbols)
# ---------------------------------------------------------------------------

_SYMBOLS = {
    "alpha": "α",
    "beta": "β",
    "gamma": "γ",
    "delta": "δ",
    "epsilon": "ε",
    "varepsilon": "ε",
    "zeta": "ζ",
    "eta": "η",
    "theta": "θ",
    "vartheta": "ϑ",
    "iota": "ι",
    "kappa": "κ",
    "lambda": "λ",
    "mu": "μ",
    "nu": "ν",
    "xi": "ξ",
    "pi": "π",
    "varpi": "ϖ",
    "rho": "ρ",
    "sigma": "σ",
    "tau": "τ",
    "upsilon": "υ",
    "phi": "φ",
    "varphi": "φ",
    "chi": "χ",
    "psi": "ψ",
    "omega": "ω",
    "Gamma": "Γ",
    "Delta": "Δ",
    "Theta": "Θ",
    "Lambda": "Λ",
    "Xi": "Ξ",
    "Pi": "Π",
    "Sigma": "Σ",
    "Upsilon": "Υ",
    "Phi": "Φ",
    "Psi": "Ψ",
    "Omega": "Ω",
    "cdot": "·",
    "times": "×",
    "cdots": "⋯",
    "dots": "…",
    "ldots": "…",
    "dotsb": "⋯",
    "dotsc": "…",
    "neq": "≠",
    "ne": "≠",
    "in": "∈",
    "le": "≤",
    "leq": "≤",
    "ge": "≥",
    "geq": "≥",
    "pm": "±",
    "mp": "∓",
    "infty": "∞",
    "sum": "∑",
    "prod": "∏",
    "to": "→",
    "mapsto": "↦",
    "equiv": "≡",
    "mid": "∣",
    "{": "{",
    "}": "}",
    "%": "%",
    "&": "&",
    "#": "#",
    "$": "$",
    "_": "_",
}
_WORDS = ("dim", "log", "exp", "sin", "cos", "det", "gcd", "lcm", "mod", "deg", "max", "min")
_SPACES = {",": "\u2009", ";": " ", ":": " ", " ": " ", "quad": "\u2003", "qquad": "\u2003\u2003", "!": ""}
_DROPPED = {
    "left",
    "right",
    "middle",
    "big",
    "Big",
    "bigg",
    "Bigg",
    "bigl",
    "bigr",
    "Bigl",
    "Bigr",
    "biggl",
    "biggr",
    "Biggl",
    "Biggr",
    "nonumber",
    "notag",
    "displaystyle",
    "textstyle",
    "limits",
    "nolimits",
}
_RELATIONS = {"neq", "ne", "in", "le", "leq", "ge", "geq", "equiv", "to", "mapsto"}
_SKIP_ARGUMENT = {"label", "tag", "tag*", "hspace", "vspace", "begin", "end"}
_UPRIGHT = {"mathrm", "operatorname", "text", "textrm", "mathbf", "textbf", "mathsf", "mathit", "textit"}
_BLACKBOARD = {"Z": "ℤ", "Q": "ℚ", "R": "ℝ", "C": "ℂ", "N": "ℕ", "H": "ℍ", "F": "𝔽"}
_TOKEN = re.compile(r"\\[A-Za-z]+\*?|\\.|\s+|.", re.S)
_MAX_DEPTH = 30
_MAX_TOKENS = 5000


class _Math:
    """A tiny reader of the claim language's LaTeX, producing escaped HTML."""

    def __init__(self, text: str) -> None:
        self.tokens: list[str] = _TOKEN.findall(text)[:_MAX_TOKENS]
        self.truncated = len(self.tokens) == _MAX_TOKENS
        self.i = 0
        self.operand = False  # whether the last thing emitted can be the left operand of a binary minus

    def render(self) -> Markup:
        out = self.sequence(0, closing=False)
        if self.truncated:
            out += Markup("…")
        return out

    def sequence(self, depth: int, closing: bool) -> Markup:
        out = Markup("")
        while self.i < len(self.tokens):
            tok = self.tokens[self.i]
            if tok == "}" and closing:
                self.i += 1
                return out
            out += self.item(depth)
        return out

    def argument(self, depth: int) -> Markup:
        """The next argument: a braced group or one token (spaces before it are skipped)."""
        while self.i < len(self.tokens) and self.tokens[self.i].isspace():
            self.i += 1
        if self.i >= len(self.tokens):
            return Markup("")
        return self.item(depth, single=True)

    def raw_argument(self) -> str:
        """The next braced argument as text (for \\label, \\mathbb), or one token."""
        while self.i < len(self.tokens) and self.tokens[self.i].isspace():
            self.i += 1
        if self.i >= len(self.tokens):
            return ""
        if self.tokens[self.i] != "{":
            self.i += 1
            return self.tokens[self.i - 1]
        level = 0
        text: list[str] = []
        while self.i < len(self.tokens):
            tok = self.tokens[self.i]
            self.i += 1
            if tok == "{":
                level += 1
                if level == 1:
                    continue
            elif tok == "}":
                level -= 1
                if level == 0:
                    break
            text.append(tok)
        return "".join(text)

    def item(self, depth: int, single: bool = False) -> Markup:
        tok = self.tokens[self.i]
        if not tok.isspace():
            was_operand = self.operand
            self.operand = tok not in ("(", "[", "{", "=", "+", "-", ",", "^", "_", "&") and not (
                tok.startswith("\\") and tok[1:] in _RELATIONS
            )
            if tok in (")", "]", "}"):
                self.operand = True
        else:
            was_operand = self.operand
        self.i += 1
        if depth > _MAX_DEPTH:
            return escape(tok)
        if tok == "{":
            return self.sequence(depth + 1, closing=True)
        if tok == "}":
            return Markup("")
        if tok in ("^", "_"):
            tag = "sup" if tok == "^" else "sub"
            return Markup(f"<{tag}>") + self.argument(depth + 1) + Markup(f"</{tag}>")
        if tok.isspace():
            return Markup("")
        if tok == "~":
            return Markup("\u00a0")
        if tok == "&":
            return Markup("")
        if tok.startswith("\\"):
            return self.command(tok[1:], depth)
        if tok.isascii() and tok.isalpha():
            return Markup("<i>") + escape(tok) + Markup("</i>")
        if tok == "-":
            return Markup(" − ") if was_operand and not single else Markup("−")
        if tok in "=<>+" and not single:
            return Markup(" ") + escape(tok) + Markup(" ")
        return escape(tok)

    def command(self, name: str, depth: int) -> Markup:
        if name in ("frac", "dfrac", "tfrac", "cfrac"):
            top = self.argument(depth + 1)
            bottom = self.argument(depth + 1)
            return (
                Markup('<span class="fr"><span class="nu">')
                + top
                + Markup('</span><span class="de">')
                + bottom
                + Markup("</span></span>")
            )
        if name == "sqrt":
            return Markup("√(") + self.argument(depth + 1) + Markup(")")
        if name == "mathbb":
            letters = self.raw_argument().strip()
            return escape("".join(_BLACKBOARD.get(ch, ch) for ch in letters))
        if name in _UPRIGHT:
            return Markup('<span class="up">') + self.argument(depth + 1) + Markup("</span>")
        if name in _SKIP_ARGUMENT:
            self.raw_argument()
            return Markup("")
        if name in _DROPPED:
            return Markup("")
        if name in _SPACES:
            return Markup(_SPACES[name])
        if name == "\\":
            return Markup(" ")
        if name in _RELATIONS:
            return Markup(" ") + escape(_SYMBOLS[name]) + Markup(" ")
        if name in ("cdot", "times", "pm", "mp"):
            return Markup(" ") + escape(_SYMBOLS[name]) + Markup(" ")
        if name in _SYMBOLS:
            return escape(_SYMBOLS[name])
        if name in _WORDS:
            return Markup('<span class="up">') + escape(name) + Markup("</span> ")
        # Anything else (the author's own macros, say) is shown as written, with its arguments.
        out = Markup('<span class="cmd">') + escape("\\" + name) + Markup("</span>")
        while self.i < len(self.tokens) and self.tokens[self.i] == "{":
            self.i += 1
            out += Markup("{") + self.sequence(depth + 1, closing=True) + Markup("}")
        self.operand = True
        return out


def math_html(latex: str) -> Markup:
    """``latex`` (a claim in the claim language) typeset as HTML; every piece of text is escaped."""
    return _Math(latex).render()


# ---------------------------------------------------------------------------
# What the template shows
# ---------------------------------------------------------------------------


@dataclass
class ClaimView:
    """One claim, prepared for the template."""

    index: int
    anchor: str
    result: ClaimResult
    severity: str
    title: str
    where: str
    math: Markup
    reading: str | None
    reading_math: Markup | None
    explanation: str | None
    space: list[tuple[str, str]]
    certificate: list[tuple[str, str]]
    component_columns: list[str]
    components: list[list[str]]
    table: list[Row]
    table_is_witness: bool
    suggestion: str | None
    # Sections of docs/method.md behind this claim: (anchor, label, whether the page carries it).
    method_links: list[tuple[str, str, bool]] = field(default_factory=list)


def _where(c: ClaimResult) -> str:
    loc = c.location
    if (c.end.line, c.end.column) > (loc.line, loc.column):
        if c.end.line == loc.line:
            return f"{loc.file}:{loc.line}:{loc.column}–{c.end.column}"
        return f"{loc.file}:{loc.line}:{loc.column}–{c.end.line}:{c.end.column}"
    return str(loc)


def _fmt(value: Any) -> str:
    if value is None:
        return "—"
    if isinstance(value, float):
        return f"{value:.3f}"
    return str(value)


def _view(index: int, c: ClaimResult) -> ClaimView:
    o = c.outcome
    title = c.name or c.label or f"claim {index}"
    reading = getattr(c, "reading", None)
    space = [(k, _fmt(v)) for k, v in (o.space or {}).items()]
    certificate = [
        ("method", _fmt(o.method)),
        ("bound", _fmt(o.bound)),
        ("coefficients compared", _fmt(o.terms_compared)),
        ("seconds", f"{c.seconds:.3f}"),
    ]
    columns: list[str] = []
    for comp in o.components:
        for key in comp:
            if key not in columns:
                columns.append(key)
    components = [[_fmt(comp.get(k)) for k in columns] for comp in o.components]
    explanation = CODES[o.code][1] if o.code in CODES else None
    suggestion = getattr(o, "suggestion", None)
    return ClaimView(
        index=index,
        anchor=f"claim-{index}",
        result=c,
        severity=SEVERITY.get(o.verdict, "error"),
        title=title,
        where=_where(c),
        math=math_html(c.source),
        reading=reading if isinstance(reading, str) and reading else None,
        reading_math=math_html(reading) if isinstance(reading, str) and reading else None,
        explanation=explanation,
        space=space,
        certificate=certificate,
        component_columns=columns,
        components=components,
        table=table_rows(c),
        table_is_witness=o.verdict != "refuted",
        suggestion=suggestion if isinstance(suggestion, str) and suggestion else None,
        method_links=_method_links(o),
    )


def _method_links(o: Any) -> list[tuple[str, str, bool]]:
    """The method-notes sections for a claim's kind, proof method and code, without repeats."""
    anchors: list[str] = []
    for anchor in (
        method_notes.for_kind(o.kind),
        method_notes.for_method(o.method),
        method_notes.for_code(o.code),
    ):
        if anchor is not None and anchor not in anchors:
            anchors.append(anchor)
    links = []
    for anchor in anchors:
        sec = method_notes.section(anchor)
        label = f"{sec.title} ({sec.reference})" if sec is not None else method_notes.reference(anchor)
        links.append((anchor, label, sec is not None))
    return links


def _diagnostic_explanation(d: Diagnostic) -> str:
    return CODES[d.code][1] if d.code in CODES else ""


def render(report: Report, title: str | None = None) -> str:
    """The report as one self-contained HTML page."""
    import jinja2

    env = jinja2.Environment(
        loader=jinja2.FileSystemLoader(str(TEMPLATES)),
        autoescape=True,
        undefined=jinja2.StrictUndefined,
        trim_blocks=True,
        lstrip_blocks=True,
        keep_trailing_newline=True,
    )
    env.filters["explain"] = _diagnostic_explanation
    template = env.get_template("report.html.j2")
    claims = [_view(i, c) for i, c in enumerate(report.claims, start=1)]
    files = report.files or sorted({c.location.file for c in report.claims})
    cited: list[str] = []
    for view in claims:
        cited += [anchor for anchor, _, present in view.method_links if present and anchor not in cited]
    method_sections = [s for s in (method_notes.section(a) for a in cited) if s is not None]
    return template.render(
        title=title or ("qreferee report: " + ", ".join(files) if files else "qreferee report"),
        version=__version__,
        files=files,
        summary=report.summary,
        total=len(report.claims),
        exit_code=report.exit_code,
        claims=claims,
        diagnostics=report.diagnostics,
        caution=CAUTION,
        method_sections=method_sections,
        method_doc=method_notes.DOC,
    )
