"""placeholder"""
from typing import Any
def recheck_progression(cert: dict[str, Any], reasons: list[str], notes: list[str]) -> None:
    raise NotImplementedError
