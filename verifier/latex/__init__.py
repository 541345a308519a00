"""The LaTeX package ``qreferee.sty`` shipped with qreferee (visible claim tags)."""

from __future__ import annotations

from pathlib import Path

STY_PATH = Path(__file__).resolve().parent / "qreferee.sty"
