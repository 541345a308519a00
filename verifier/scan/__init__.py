"""Stage 1: find the tagged claims in a LaTeX or Markdown source, with exact positions."""

from __future__ import annotations

from collections.abc import Mapping
from pathlib import Path

from verifier.scan.document import ScannedDocument
from verifier.scan.latex import scan_latex_path, scan_latex_text
from verifier.scan.markdown import scan_markdown_path, scan_markdown_source
from verifier.scan.memo import DisplayMemo
from verifier.scan.text import SourceFile

MARKDOWN_SUFFIXES = (".md", ".markdown", ".mdown")


def is_markdown(name: str) -> bool:
    """Markdown by file name; everything else is read as LaTeX."""
    return name.lower().endswith(MARKDOWN_SUFFIXES)


def scan_path(
    path: Path, overlay: Mapping[Path, str] | None = None, memo: DisplayMemo | None = None
) -> ScannedDocument:
    """Scan a manuscript file (LaTeX, or Markdown by suffix).

    ``overlay`` maps paths to texts that replace those files on disk (an editor's unsaved buffers).
    ``memo`` (LaTeX only) reuses the rows of displays unchanged since the last scan with it.
    """
    if is_markdown(path.name):
        text = next((t for p, t in (overlay or {}).items() if p.resolve() == path.resolve()), None)
        if text is not None:
            return scan_markdown_source(SourceFile(str(path), text, path))
        return scan_markdown_path(path, str(path))
    return scan_latex_path(path, overlay, memo)


def scan_text(text: str, display: str = "<text>", markdown: bool | None = None) -> ScannedDocument:
    """Scan a manuscript given as a string."""
    if markdown is None:
        markdown = is_markdown(display)
    if markdown:
        return scan_markdown_source(SourceFile(display, text))
    return scan_latex_text(text, display)


__all__ = ["DisplayMemo", "ScannedDocument", "is_markdown", "scan_path", "scan_text"]
