"""``--proof-tex``: one LaTeX paragraph per proved claim, with a bibliography.

The paragraphs are built from each claim's certificate (:mod:`verifier.prove.certificate`)
and rendered through the jinja2 template ``templates/proofs.tex.j2`` (delimiters ``<< >>``
and ``<% %>``, so that LaTeX braces need no escaping).  Each theorem a proof uses is cited:
Sturm's bound, the valence formula, the conditions of Newman and of Gordon and Hughes for
eta quotients, Ligozat's orders at the cusps, Serre and Stark for weight 1/2, Kaneko and
Zagier for quasimodular forms.
"""

from __future__ import annotations

import re
from fractions import Fraction
from pathlib import Path
from typing import Any

from verifier import __version__
from verifier.api import ClaimResult, Report

TEMPLATES = Path(__file__).resolve().parent / "templates"

REFERENCES: dict[str, str] = {
    "sturm": "J.~Sturm, \\emph{On the congruence of modular forms}, in: Number Theory (New York, 1984--1985), "
    "LNM~1240, Springer, 1987, 275--280.",
    "valence": "R.~A.~Rankin, \\emph{Modular Forms and Functions}, Cambridge University Press, 1977, "
    "Theorem~4.1.4 (the valence formula).",
    "newman": "M.~Newman, \\emph{Construction and application of a class of modular functions~(II)}, "
    "Proc.\\ London Math.\\ Soc.\\ (3) 9 (1959), 373--387.",
    "gordon-hughes": "B.~Gordon and K.~Hughes, \\emph{Multiplicative properties of $\\eta$-products~II}, "
    "in: A Tribute to Emil Grosswald, Contemp.\\ Math.~143, Amer.\\ Math.\\ Soc., 1993, 415--430.",
    "ligozat": "G.~Ligozat, \\emph{Courbes modulaires de genre~1}, M\\'em.\\ Soc.\\ Math.\\ France~43, 1975.",
    "serre-stark": "J.-P.~Serre and H.~M.~Stark, \\emph{Modular forms of weight~1/2}, in: Modular Functions of "
    "One Variable~VI, LNM~627, Springer, 1977, 27--67.",
    "kaneko-zagier": "M.~Kaneko and D.~Zagier, \\emph{A generalized Jacobi theta function and quasimodular "
    'forms}, in: The Moduli Space of Curves, Progr.\\ Math.~129, Birkh\\"auser, 1995, 165--172.',
    "atkin-lehner": "A.~O.~L.~Atkin and J.~Lehner, \\emph{Hecke operators on $\\Gamma_0(m)$}, Math.\\ Ann.~185 "
    "(1970), 134--160.",
    "serre-padic": "J.-P.~Serre, \\emph{Formes modulaires et fonctions z\\^eta $p$-adiques}, in: Modular Functions "
    "of One Variable~III, LNM~350, Springer, 1973, 191--268.",
    "swinnerton-dyer": "H.~P.~F.~Swinnerton-Dyer, \\emph{On $\\ell$-adic representations and congruences for "
    "coefficients of modular forms}, in: Modular Functions of One Variable~III, LNM~350, "
    "Springer, 1973, 1--55.",
    "ono": "K.~Ono, \\emph{The Web of Modularity}, CBMS Regional Conf.\\ Series in Math.~102, Amer.\\ Math.\\ Soc., "
    "2004, \\S2.1 (twists).",
    "diamond-shurman": "F.~Diamond and J.~Shurman, \\emph{A First Course in Modular Forms}, Graduate Texts in "
    "Math.~228, Springer, 2005, Ch.~3.",
    "diamond-shurman-e2": "F.~Diamond and J.~Shurman, \\emph{A First Course in Modular Forms}, Graduate Texts in "
    "Math.~228, Springer, 2005, Section~1.2 ($E_2(\\tau) - NE_2(N\\tau) \\in M_2(\\Gamma_0(N))$).",
}

_SPECIAL = {
    "\\": "$\\backslash$",
    "{": "\\{",
    "}": "\\}",
    "$": "\\$",
    "&": "\\&",
    "#": "\\#",
    "_": "\\_",
    "%": "\\%",
    "^": "\\^{}",
    "~": "$\\sim$",
    "<": "$<$",
    ">": "$>$",
    "|": "$|$",
}
# Characters outside ASCII that reports use, in LaTeX; any other is replaced by "?" so that
# the file compiles with plain pdflatex.
_UNICODE = {
    "Γ": "$\\Gamma$",
    "χ": "$\\chi$",
    "≥": "$\\geq$",
    "≤": "$\\leq$",
    "≠": "$\\neq$",
    "×": "$\\times$",
    "·": "$\\cdot$",
    "−": "-",
    "…": "\\dots{}",
    "τ": "$\\tau$",
    "η": "$\\eta$",
    "θ": "$\\theta$",
    "Δ": "$\\Delta$",
    "σ": "$\\sigma$",
    "ϑ": "$\\vartheta$",
    "∈": "$\\in$",
}


def escape(text: str) -> str:
    """Plain text made safe for LaTeX."""
    return "".join(_SPECIAL.get(ch, _UNICODE.get(ch, ch if ch.isascii() else "?")) for ch in text)


def _label_ok(label: str) -> bool:
    return re.fullmatch(r"[A-Za-z0-9:._\-+/]+", label) is not None


def _ref(claim: ClaimResult) -> str:
    if claim.label and _label_ok(claim.label):
        return f"\\eqref{{{claim.label}}}"
    return "the claim"  # the paragraph's title says which


def _title(claim: ClaimResult) -> str:
    if claim.label and _label_ok(claim.label):
        return f"Proof of \\eqref{{{claim.label}}}."
    name = f"\\texttt{{{escape(claim.name)}}}, " if claim.name else ""
    return f"Claim {name}{escape(Path(claim.location.file).name)}:{claim.location.line}."


def _character(kernel: Any) -> str:
    if isinstance(kernel, list):
        return ", " + ", ".join(_character(k).lstrip(", ") for k in kernel)
    d = int(kernel)
    if d == 1:
        return ""
    disc = d if d % 4 == 1 else 4 * d
    return f", \\left(\\frac{{{disc}}}{{\\cdot}}\\right)"


def _weight(w: str) -> str:
    f = Fraction(w)
    return str(f.numerator) if f.denominator == 1 else f"{f.numerator}/{f.denominator}"


def _group(level: int) -> str:
    return "\\mathrm{SL}_2(\\mathbb{Z})" if level == 1 else f"\\Gamma_0({level})"


def _space(weight: str, level: int, kernel: Any, quasi: bool = False) -> str:
    name = "\\widetilde{M}" if quasi else "M"
    return f"${name}_{{{_weight(weight)}}}({_group(level)}{_character(kernel)})$"


def _exponent_note(cert: dict[str, Any]) -> str:
    unit = Fraction(str(cert.get("exponent_unit", "1")))
    if unit == 1:
        return ""
    inv = 1 / unit
    return (
        f" (Exponents here are those of $q^{{{inv.numerator}/{inv.denominator}}}$"
        if inv.denominator != 1
        else f" (Exponents here are those of $q^{{{inv.numerator}}}$"
    ) + ", in which every exponent of the claim is an integer.)"


class _Cites:
    def __init__(self) -> None:
        self.used: list[str] = []

    def __call__(self, key: str) -> str:
        if key not in self.used:
            self.used.append(key)
        return f"\\cite{{{key}}}"


def _facts(cert: dict[str, Any], cite: _Cites) -> str:
    """Sentences on where the atoms' levels and characters come from."""
    text = " ".join(str(cert.get(s, {}).get("expr", "")) for s in ("left", "right"))
    out = []
    if "(eta" in text:
        out.append(
            f"The eta quotients are modular forms on the stated group by the criterion of Newman {cite('newman')} "
            f"and of Gordon and Hughes {cite('gordon-hughes')}."
        )
    space = cert.get("space") or {}
    weights = [Fraction(str(p["weight"])) for p in cert.get("pieces", [])] + [Fraction(str(space.get("weight", 0)))]
    if any(w.denominator == 2 for w in weights) or ("(eta" in text and "(theta" in text):
        out.append(f"Forms of half-integral weight are taken with the theta multiplier {cite('serre-stark')}.")
    return " ".join(out)


def _forms_paragraph(claim: ClaimResult, cert: dict[str, Any], cite: _Cites) -> str:
    ref = _ref(claim)
    space = cert["space"]
    level = int(space["level"])
    pieces = cert.get("pieces", [])
    bound = int(cert["bound"])
    valence = cert["method"] == "valence"
    quasi = any(int(p["e2_power"]) for p in pieces)
    theorem = "the valence formula" if valence else "Sturm's theorem"
    ref_key = "valence" if valence else "sturm"
    parts = []
    cleared = Fraction(str(space.get("cleared_weight", "0")))
    if cleared:
        parts.append(
            f"Multiplying out the denominators (of total weight {_weight(str(cleared))}), {ref} becomes an identity "
            f"$N_L D_R = N_R D_L$ of weight {_weight(str(space['proof_weight']))} on ${_group(level)}$."
        )
    if quasi:
        parts.append(
            f"The difference of the two sides of {ref} is a quasimodular form on ${_group(level)}$; "
            f"written as $\\sum_j f_j E_2^j$ with each $f_j$ modular, it vanishes exactly when every $f_j$ "
            f"does, since this decomposition is unique {cite('kaneko-zagier')}."
        )
        listing = "; ".join(
            f"$f_{{{p['e2_power']}}} \\in$ {_space(str(p['weight']), level, p['character'])}, bound {p['bound']}"
            for p in pieces
        )
        parts.append(
            f"The pieces and their Sturm bounds are: {listing}. The coefficients of each $f_j$ vanish through "
            f"its bound (computed exactly), so {ref} holds by Sturm's theorem {cite('sturm')}."
        )
    elif valence:
        orders = ", ".join(
            f"$\\geq {v}$ at the cusps $a/{d}$" for d, v in (cert.get("cusp_order_bounds") or {}).items()
        )
        parts.append(
            f"Both sides of {ref} are holomorphic on the upper half-plane and modular for ${_group(level)}$ "
            f"(index {cert['index']}); their difference may have poles only at cusps, where its orders are "
            f"bounded by Ligozat's formula {cite('ligozat')}: {orders}. By the valence formula "
            f"{cite('valence')} a nonzero such form has order at most {bound} at $\\infty$; the coefficients of "
            f"the difference up to $q^{{{bound}}}$ vanish (computed exactly), so {ref} holds."
        )
    else:
        k = str(space["proof_weight"]) if cleared else str(space["weight"])
        first = int(pieces[0].get("from", 0)) if pieces else 0
        span = f"$q^{{{first}}},\\dots,q^{{{bound}}}$" if bound > first else f"$q^{{{bound}}}$"
        subject = "Both sides of the cleared identity" if cleared else f"Both sides of {ref}"
        parts.append(
            f"{subject} lie in {_space(k, level, space['character'])}, whose Sturm bound is {bound}; their "
            f"coefficients of {span} agree (computed exactly), so {ref} holds by {theorem} {cite(ref_key)}."
        )
    facts = _facts(cert, cite)
    return " ".join(parts + ([facts] if facts else [])) + _exponent_note(cert)


def _paragraph(claim: ClaimResult, cite: _Cites) -> str:
    cert = claim.certificate() or {}
    method = cert.get("method")
    ref = _ref(claim)
    if method in ("sturm", "valence") and "space" in cert:
        text = _forms_paragraph(claim, cert, cite)
        if claim.outcome.kind == "arithmetic":
            text = (
                f"The statement {ref} about coefficients is equivalent to an identity between generating "
                f"functions. {text}"
            )
        return text
    if method == "expansion" and "coefficients" in cert:
        rec = cert["coefficients"]
        return (
            f"The coefficients of $q^{{{rec['from']}}},\\dots,q^{{{rec['to']}}}$ of both sides of {ref} were "
            f"computed exactly and agree; this is the whole range the printed expansion claims." + _exponent_note(cert)
        )
    if method == "witness" and "witness" in cert:
        w = cert["witness"]
        return (
            f"The two sides of {ref} differ: their coefficients of $q^{{{w['n']}}}$ are ${w['left']}$ and "
            f"${w['right']}$ (computed exactly)." + _exponent_note(cert)
        )
    if method == "u-operator" and isinstance(cert.get("progression"), dict):
        return _progression_paragraph(claim, cert["progression"], cite)
    if method == "sturm-congruence" and cert.get("prime_powers"):
        return _congruence_paragraph(claim, cert, cite)
    if method == "cusp-orders" and isinstance(cert.get("space"), dict) and cert.get("cusp_order_bounds"):
        return _membership_paragraph(claim, cert, cite)
    if method == "dimension-formula" and "dimension" in cert and "genus" in cert:
        return _dimension_paragraph(claim, cert, cite)
    return f"{ref[:1].upper()}{ref[1:]} holds ({escape(str(method))}): {escape(claim.outcome.message)}."


_ETA_FACTOR = re.compile(r"eta\((\d*)tau\)(?:\^\((-?\d+)\)|\^(-?\d+))?")


def _eta_tex(text: str) -> str:
    """``eta(tau)^(-1) eta(5tau)^5`` (the certificate's spelling) in LaTeX."""
    out = []
    for m in _ETA_FACTOR.finditer(text):
        scale, exponent = m.group(1), m.group(2) or m.group(3) or "1"
        power = "" if exponent == "1" else f"^{{{exponent}}}"
        out.append(f"\\eta({scale}\\tau){power}")
    return " ".join(out) if out else escape(text)


def _math(text: str) -> str:
    """A certificate's formula such as ``E_4^3 E_6`` for math mode: kept when it is plain
    subscripts and powers, else escaped as text."""
    if re.fullmatch(r"[A-Za-z0-9_{}^ ()*+-]+", text):
        return text.replace("*", " ")
    return f"\\text{{{escape(text)}}}"


def _chi_tex(name: str) -> str:
    """``chi_{-11}`` or ``trivial`` (the certificate's spelling) as a character argument."""
    m = re.fullmatch(r"chi_\{?(-?\d+)\}?", name.strip())
    return "" if m is None else f", \\left(\\frac{{{m.group(1)}}}{{\\cdot}}\\right)"


def _progression_paragraph(claim: ClaimResult, prog: dict[str, Any], cite: _Cites, part: str | None = None) -> str:
    """The U_m proof of one progression; a record with ``components`` (a dissection, a residue set, a
    class of n) gets one such proof per component, after a sentence saying how they make the claim."""
    if "components" in prog:
        return _components_paragraph(claim, prog, cite)
    ref = part or _ref(claim)
    m, t = int(prog["m"]), int(prog["t"])
    form, target = prog["form"], prog["target"]
    bound = int(target["sturm_bound"])
    modulus = prog.get("modulus")
    h_space = f"$M_{{{form['weight']}}}({_group(int(form['level']))}{_chi_tex(str(form['character']))})$"
    t_space = f"$M_{{{target['weight']}}}({_group(int(target['level']))}{_chi_tex(str(target['character']))})$"
    text = (
        f"Let $E = {_eta_tex(str(prog['multiplier']))}$ and $h(\\tau) = {_eta_tex(str(form['eta']))}$, which is "
        f"$\\prod\\eta(\\delta\\tau)^{{r_\\delta}}$ of the generating function times $E({m}\\tau)$. By the criterion "
        f"of Newman {cite('newman')} and of Gordon and Hughes {cite('gordon-hughes')}, with Ligozat's orders at the "
        f"cusps {cite('ligozat')}, $h \\in$ {h_space}. Since $U_{{{m}}}(f\\cdot g(q^{{{m}}})) = U_{{{m}}}(f)\\,g$, "
        f"$U_{{{m}}}h$ is $E$ times a power of $q$ times $\\sum_{{n\\ge0}} a({m}n+{t})q^n$, and $U_{{{m}}}h \\in$ "
        f"{t_space} {cite('atkin-lehner')}, whose Sturm bound is {bound}. "
    )
    if modulus:
        text += (
            f"The coefficients of $q^0,\\dots,q^{{{bound}}}$ of $U_{{{m}}}h$ vanish modulo ${modulus}$ (computed "
            f"exactly), so every coefficient does by Sturm's theorem {cite('sturm')}, which is {ref}."
        )
    else:
        text += (
            f"The coefficients of $q^0,\\dots,q^{{{bound}}}$ of $U_{{{m}}}h$ and of $E$ times the claimed side agree "
            f"(computed exactly), so the two forms are equal by Sturm's theorem {cite('sturm')}, which is {ref}."
        )
    return text


def _components_paragraph(claim: ClaimResult, prog: dict[str, Any], cite: _Cites) -> str:
    ref = _ref(claim)
    comps = [c for c in prog["components"] if isinstance(c, dict)]
    if "dissection" in prog:
        p = int(prog["dissection"])
        head = (
            f"Collecting the terms $q^{{t}}G_t(q^{{{p}}})$ of each class $t \\bmod {p}$, {ref} is the {len(comps)} "
            f"identities $\\sum_{{n\\ge0}} a({p}n+t)q^n = G_t(q)$ of the generating function $\\sum a(n)q^n$ "
            "of its left side, one for each class."
        )
    elif "n_class" in prog:
        k = int(prog["n_class"]["modulus"])
        m0, t0 = (int(x) for x in prog.get("argument", [1, 0]))
        starts = [int(x) for x in prog.get("starts", [])]
        progressions = ", ".join(f"$a({_linear(m0 * k, m0 * n0 + t0)})$" for n0 in starts)
        head = (
            f"The $n$ of the class are the $n_0 + {k}n$ with $n \\ge 0$ and $n_0 \\in \\{{"
            f"{', '.join(map(str, starts))}\\}}$, so {ref} is about {progressions}, each proved as follows."
        )
    else:
        head = f"{ref[:1].upper()}{ref[1:]} is one congruence for each listed class."
    parts = []
    for c in comps:
        argument = _linear(int(c["m"]), int(c["claimed_t"] if "claimed_t" in c else c["t"]))
        parts.append(_progression_paragraph(claim, c, cite, f"the class $a({argument})$"))
    return " ".join([head, *parts])


def _linear(m: int, t: int) -> str:
    """``mn + t`` as an argument: ``n``, ``5n``, ``5n+4``, ``5n-1``."""
    head = "n" if m == 1 else f"{m}n"
    if not t:
        return head
    return f"{head}+{t}" if t > 0 else f"{head}-{-t}"


def _side_tex(text: str) -> str:
    """A lifted side (``eta(tau)^24``, ``Delta``) in LaTeX; anything else as escaped text."""
    if text == "Delta":
        return "\\Delta"
    if text and all(_ETA_FACTOR.fullmatch(t) for t in text.split(" ")):
        return _eta_tex(text)
    return _math(text)


def _exponent(n: int, p: int) -> int:
    """The exponent of the prime p in n."""
    e = 0
    while n % p == 0:
        n //= p
        e += 1
    return e


def _congruence_paragraph(claim: ClaimResult, cert: dict[str, Any], cite: _Cites) -> str:
    ref = _ref(claim)
    level = int(cert.get("level", 1))
    weights = sorted({_weight(str(p["weight"])) for p in cert.get("pieces", [])}, key=Fraction)
    several = len(cert["prime_powers"]) > 1
    how = (
        f"it is treated one prime power of the modulus ${cert['modulus']}$ at a time, and the Chinese remainder "
        "theorem joins them"
        if several
        else f"it is treated modulo ${cert['modulus']}$"
    )
    n_class = cert.get("n_class") if isinstance(cert.get("n_class"), dict) else None
    parts = [
        f"The generating function of the difference of the two sides of {ref} is a sum of modular and "
        f"quasimodular forms (weights {', '.join(weights)}); {how}."
    ]
    if n_class is not None:
        m = int(n_class["modulus"])
        residues = ", ".join(str(r) for r in sorted(n_class["residues"]))
        parts.append(
            f"Only the $n$ with $n \\bmod {m} \\in \\{{{residues}\\}}$ are claimed. The difference restricted to "
            f"them is a combination of its twists by the quadratic characters modulo ${m}$, a form of the same "
            f"weight on ${_group(int(n_class.get('level', level)))}$ {cite('ono')}, and it is this form that is "
            "shown to vanish."
        )
    else:
        parts[0] = parts[0].replace(" (weights", f" on ${_group(level)}$ (weights", 1)
    rescaled = cert.get("rescaled") if isinstance(cert.get("rescaled"), dict) else None
    if rescaled is not None:
        factor, power = rescaled.get("tau_factor"), rescaled.get("q_power")
        how_read = (
            f"; with $q^{{{power}}}$ divided out of both"
            if int(factor) == 1
            else f" whose factors carry fractional powers of $q$; with $\\tau \\mapsto {factor}\\tau$ and "
            f"$q^{{{power}}}$ divided out of both"
        )
        parts[0] = (
            f"The two sides of {ref} are power series in $q${how_read}, they become sums of "
            f"modular forms (weights {', '.join(weights)}), and the coefficient of $q^n$ of each side is that of "
            f"$q^{{{_linear(int(factor), -int(Fraction(str(power))))}}}$; {how}."
        )
    same_everywhere = all(
        isinstance(pp.get("frobenius"), dict) and pp["frobenius"].get("same") for pp in cert["prime_powers"]
    )
    for pp in cert["prime_powers"]:
        p = int(pp["prime"])
        modulus = f"{p}^{{{pp['exponent']}}}" if int(pp["exponent"]) > 1 else str(p)
        scale = int(pp.get("scaled_by", 1))
        working = modulus if scale == 1 else f"{p}^{{{int(pp['exponent']) + _exponent(scale, p)}}}"
        steps = []
        lift = pp.get("frobenius")
        if isinstance(lift, dict):
            moved = (
                f"${modulus}$ coefficientwise, $\\eta({p}\\delta\\tau)^{{{p}^{{e-1}}u}} \\equiv "
                f"\\eta(\\delta\\tau)^{{{p}^e u}}$ (as $(1-x)^{{{p}}} \\equiv 1-x^{{{p}}}$ modulo ${p}$)"
            )
            left_tex = _side_tex(str(lift.get("left", "")))
            if lift.get("same"):
                parts.append(
                    f"Modulo ${modulus}$: the eta quotients of both sides are replaced by the ones congruent to them "
                    f"modulo {moved}, and both become ${left_tex}$ {cite('swinnerton-dyer')}: the two sides are "
                    f"congruent modulo ${modulus}$ to one and the same series."
                )
                continue
            steps.append(
                f"the eta quotients of both sides are first replaced by the ones congruent to them modulo {moved}, "
                f"giving ${left_tex}$ and ${_side_tex(str(lift.get('right', '')))}$ {cite('swinnerton-dyer')}"
            )
        if scale > 1:
            steps.append(
                f"the difference is multiplied by ${scale}$, the largest power of ${p}$ in a denominator of its "
                f"pieces, and compared modulo ${working}$"
            )
        if pp.get("e2_replaced_by"):
            e2_mod = pp.get("e2_modulus", p)
            where = ""
            if pp.get("e2_level") is not None:
                where = (
                    f" (it differs from $E_2$ by ${e2_mod}$ times a series with integer coefficients), a modular "
                    f"form of weight $2$ on $\\Gamma_0({pp['e2_level']})$ {cite('diamond-shurman-e2')}"
                )
            name = _math(str(pp["e2_replaced_by"]))
            if pp.get("e2_level") is not None:
                name = name.replace("tau", "\\tau")
            source = "" if where else f" {cite('serre-padic')}"
            steps.append(
                f"$E_2$ is replaced by ${name}$, which is congruent to it modulo ${e2_mod}${source}{where}; "
                f"a piece of ${p}$-adic valuation $v$ needs this only modulo ${p}^{{{pp['exponent']}-v}}$"
            )
        multipliers = sorted(
            {
                (str(x["multiplier"]), int(x.get("multiplier_modulus", 0)))
                for x in pp.get("multipliers", [])
                if str(x["multiplier"]) != "1"
            }
        )
        if multipliers:
            listed = ", ".join(
                f"${_math(m)}$" + (f" (congruent to $1$ modulo ${t}$)" if t else "") for m, t in multipliers
            )
            steps.append(
                f"the pieces are brought to weight {pp.get('weight')} by the multipliers {listed}, each to the "
                f"precision the piece it multiplies needs {cite('swinnerton-dyer')}"
            )
        if pp.get("vanishing_pieces") and not pp.get("multipliers"):
            steps.append("every piece is congruent to $0$ modulo $" + modulus + "$ through its own Sturm bound")
        else:
            where = ""
            if pp.get("level") is not None and int(pp["level"]) != level:
                where = f" (a form on ${_group(int(pp['level']))}$)"
            steps.append(
                f"the coefficients of $q^0,\\dots,q^{{{pp.get('bound')}}}$ of the result{where} vanish modulo "
                f"${working}$ ({pp.get('coefficients_compared')} compared exactly)"
            )
        parts.append(f"Modulo ${modulus}$: " + "; ".join(steps) + ".")
    every = "every $n$" if n_class is None else "every $n \\geq 1$ of that class"
    if same_everywhere:
        parts.append(f"Hence {ref} holds for {every}.")
    else:
        parts.append(f"By Sturm's theorem modulo prime powers {cite('sturm')}, {ref} holds for {every}.")
    return " ".join(parts)


def _membership_paragraph(claim: ClaimResult, cert: dict[str, Any], cite: _Cites) -> str:
    ref = _ref(claim)
    space = cert["space"]
    orders = ", ".join(f"$\\geq {v}$ at the cusps $a/{d}$" for d, v in cert["cusp_order_bounds"].items())
    name = "S" if space.get("cusp_forms") else "M"
    group = _group(int(space["level"]))
    k = _weight(str(space["weight"]))
    expr = str((cert.get("form") or {}).get("expr", ""))
    if re.fullmatch(r"\(eta( \(\d+ -?\d+\))+\)", expr):
        modular = (
            f"The form of {ref} is an eta quotient; by the criterion of Newman {cite('newman')} and of Gordon and "
            f"Hughes {cite('gordon-hughes')} it is modular of weight {k} on ${group}$ with the stated character"
        )
    else:
        modular = f"The form of {ref} is modular of weight {k} on ${group}$ with the stated character"
    return (
        f"{modular}, and by Ligozat's formula {cite('ligozat')} and the holomorphy of its other factors its orders "
        f"at the cusps are {orders}, so it lies in ${name}_{{{k}}}({group})$ as claimed."
    )


def _dimension_paragraph(claim: ClaimResult, cert: dict[str, Any], cite: _Cites) -> str:
    ref = _ref(claim)
    e2, e3 = (cert.get("elliptic_points") or [0, 0])[:2]
    return (
        f"The group has index {cert.get('index')} in $\\mathrm{{SL}}_2(\\mathbb{{Z}})$, genus {cert['genus']}, "
        f"{cert.get('cusps')} cusps and {e2} and {e3} elliptic points of orders 2 and 3; the dimension formula "
        f"{cite('diamond-shurman')} gives {cert['dimension']}, which is {ref}."
    )


def render(report: Report) -> str:
    """The LaTeX file of proof paragraphs for every proved claim of ``report``."""
    import jinja2

    env = jinja2.Environment(
        loader=jinja2.FileSystemLoader(str(TEMPLATES)),
        block_start_string="<%",
        block_end_string="%>",
        variable_start_string="<<",
        variable_end_string=">>",
        comment_start_string="<#",
        comment_end_string="#>",
        autoescape=False,
        undefined=jinja2.StrictUndefined,
        trim_blocks=True,
        lstrip_blocks=True,
    )
    cite = _Cites()
    paragraphs = [{"title": _title(c), "text": _paragraph(c, cite)} for c in report.claims if c.verdict == "proved"]
    references = [{"key": k, "text": REFERENCES[k]} for k in cite.used]
    template = env.get_template("proofs.tex.j2")
    return template.render(paragraphs=paragraphs, references=references, version=__version__)
