"""qreferee: prove or refute the modular-form identities tagged in a manuscript.

Library API::

    from verifier import check_path, check_text
    report = check_path("paper.tex")
    for claim in report.claims:
        print(claim.location, claim.verdict, claim.outcome.message)
"""

from __future__ import annotations

__version__ = "0.1.0"

__all__ = ["__version__", "check_path", "check_text"]


def __getattr__(name: str) -> object:
    # Lazy: importing the package (e.g. for --help) does not load FLINT or lark.
    if name in ("check_path", "check_text", "check_document", "Report", "ClaimResult"):
        from verifier import api

        return getattr(api, name)
    raise AttributeError(name)
