"""Per-project defaults: a ``qreferee.toml`` beside the manuscript, or ``[tool.qreferee]`` in ``pyproject.toml``.

The file is looked for in the manuscript's folder and then in each parent folder; the
first folder that has a ``qreferee.toml``, or a ``pyproject.toml`` with a ``[tool.qreferee]``
table, gives the settings (``qreferee.toml`` wins when a folder has both).  The search
stops at the first folder that holds a ``pyproject.toml`` or ``.git`` (the project's root).

Keys (``-`` and ``_`` are interchangeable)::

    nome = "e^{\\pi i\\tau}"        # default nome= of every claim tag
    group = "\\Gamma_0(4)"          # default group= of every claim tag
    max-seconds = 30                # --max-seconds
    max-terms = 20000               # --max-terms
    jobs = 2                        # --jobs
    fail-on = ["refuted", "error"]  # --fail-on
    cache = false                   # like --no-cache

A tag's own ``nome=`` or ``group=`` wins over the default; an option on the command line
wins over the file. The environment variable ``QREFEREE_NO_CACHE`` (set and not ``0``)
turns the verdict cache off like ``--no-cache``, for ``check`` and ``watch``. An unknown
key or a value of the wrong type is an error (exit 2), never silently ignored.
``qreferee screen`` never reads settings from inside a submission.
"""

from __future__ import annotations

import difflib
import math
import os
import tomllib
from dataclasses import dataclass
from pathlib import Path
from typing import Any

from verifier.options import parse_group, parse_nome
from verifier.scan.document import ClaimBlock, ScannedDocument

CONFIG_NAME = "qreferee.toml"
PYPROJECT = "pyproject.toml"
# The verdicts that can make the exit status non-zero, and the default set (all of them).
FAIL_ON_CHOICES = ("refuted", "unproven", "error")
DEFAULT_FAIL_ON = frozenset(FAIL_ON_CHOICES)
NO_CACHE_ENV = "QREFEREE_NO_CACHE"
KEYS = ("nome", "group", "max-seconds", "max-terms", "jobs", "fail-on", "cache")


class ConfigError(Exception):
    """A settings file that cannot be used, with the message to print."""


@dataclass(frozen=True)
class ProjectConfig:
    """The settings of one project; None means "not set" (the built-in default applies)."""

    source: Path | None = None
    nome: str | None = None
    group: str | None = None
    max_seconds: float | None = None
    max_terms: int | None = None
    jobs: int | None = None
    fail_on: frozenset[str] | None = None
    cache: bool | None = None

    def tag_defaults(self) -> dict[str, str]:
        """The tag options every claim gets unless its tag sets them."""
        out: dict[str, str] = {}
        if self.nome is not None:
            out["nome"] = self.nome
        if self.group is not None:
            out["group"] = self.group
        return out


def parse_fail_on(value: str | list[str] | tuple[str, ...]) -> frozenset[str]:
    """``"refuted,error"`` or ``["refuted", "error"]`` -> the set; ``none`` (or empty) -> never fail.

    Raises ValueError with a message naming the bad item.
    """
    items = value.split(",") if isinstance(value, str) else list(value)
    out: set[str] = set()
    for raw in items:
        if not isinstance(raw, str):
            raise ValueError(f"fail-on takes verdict names, not {raw!r}")
        item = raw.strip().lower()
        if item in ("", "none"):
            continue
        if item not in FAIL_ON_CHOICES:
            close = difflib.get_close_matches(item, FAIL_ON_CHOICES, n=1)
            extra = f"; did you mean {close[0]!r}?" if close else ""
            raise ValueError(f"unknown verdict {raw.strip()!r} (choose from {', '.join(FAIL_ON_CHOICES)}, none){extra}")
        out.add(item)
    return frozenset(out)


def find_config(start: Path) -> Path | None:
    """The settings file that applies to a manuscript in (or at) ``start``, or None."""
    folder = start.resolve()
    if not folder.is_dir():
        folder = folder.parent
    for here in (folder, *folder.parents):
        own = here / CONFIG_NAME
        if own.is_file():
            return own
        pyproject = here / PYPROJECT
        if pyproject.is_file():
            return pyproject if _has_table(pyproject) else None
        if (here / ".git").exists():
            return None
    return None


def _has_table(pyproject: Path) -> bool:
    try:
        data = tomllib.loads(pyproject.read_text(encoding="utf-8"))
    except (OSError, UnicodeDecodeError, tomllib.TOMLDecodeError):
        return False
    tool = data.get("tool")
    return isinstance(tool, dict) and "qreferee" in tool


def load_config(path: Path) -> ProjectConfig:
    """Read and check the settings in ``path`` (a ``qreferee.toml`` or a ``pyproject.toml``)."""
    try:
        data = tomllib.loads(path.read_text(encoding="utf-8"))
    except OSError as exc:
        raise ConfigError(f"cannot read {path}: {exc.strerror or exc}") from exc
    except UnicodeDecodeError as exc:
        raise ConfigError(f"cannot read {path}: not UTF-8 text") from exc
    except tomllib.TOMLDecodeError as exc:
        raise ConfigError(f"{path} is not valid TOML: {exc}") from exc
    if path.name == PYPROJECT:
        tool = data.get("tool")
        table = tool.get("qreferee") if isinstance(tool, dict) else None
        where = f"{path} [tool.qreferee]"
        if table is None:
            return ProjectConfig(source=path)
        if not isinstance(table, dict):
            raise ConfigError(f"{where} must be a table")
    else:
        table, where = data, str(path)
    return _from_table(table, path, where)


def _from_table(table: dict[str, Any], path: Path, where: str) -> ProjectConfig:
    values: dict[str, Any] = {}
    for raw_key, value in table.items():
        key = raw_key.replace("_", "-")
        if key not in KEYS:
            close = difflib.get_close_matches(key, KEYS, n=1)
            extra = f"; did you mean {close[0]!r}?" if close else f" (known keys: {', '.join(KEYS)})"
            raise ConfigError(f"{where}: unknown key {raw_key!r}{extra}")
        values[key] = _checked(key, value, where)
    return ProjectConfig(
        source=path,
        nome=values.get("nome"),
        group=values.get("group"),
        max_seconds=values.get("max-seconds"),
        max_terms=values.get("max-terms"),
        jobs=values.get("jobs"),
        fail_on=values.get("fail-on"),
        cache=values.get("cache"),
    )


def _checked(key: str, value: Any, where: str) -> Any:
    def bad(expected: str) -> ConfigError:
        return ConfigError(f"{where}: {key} must be {expected}, not {value!r}")

    if key == "nome":
        if not isinstance(value, str) or parse_nome(value) is None:
            raise bad('a nome such as "e^{\\pi i\\tau}" or "e^{2\\pi i\\tau}"')
        return value
    if key == "group":
        if not isinstance(value, str) or parse_group(value) is None:
            raise bad('a group such as "SL2(Z)" or "\\Gamma_0(4)"')
        return value
    if key == "max-seconds":
        if isinstance(value, bool) or not isinstance(value, int | float) or not math.isfinite(value) or value <= 0:
            raise bad("a positive number of seconds")
        return float(value)
    if key in ("max-terms", "jobs"):
        if isinstance(value, bool) or not isinstance(value, int) or value < 1:
            raise bad("a positive integer")
        return value
    if key == "fail-on":
        if not isinstance(value, str | list):
            raise bad('a list of verdicts such as ["refuted", "error"]')
        try:
            return parse_fail_on(value)
        except ValueError as exc:
            raise ConfigError(f"{where}: {exc}") from exc
    if key == "cache":
        if not isinstance(value, bool):
            raise bad("true or false")
        return value
    raise AssertionError(key)  # pragma: no cover - KEYS and this function list the same keys


def project_config(manuscript: Path, explicit: Path | None = None) -> ProjectConfig:
    """The settings for ``manuscript``: from ``explicit`` if given, else the file found for it."""
    path = explicit if explicit is not None else find_config(manuscript)
    if path is None:
        return ProjectConfig()
    return load_config(path)


@dataclass(frozen=True)
class Settings:
    """What one manuscript is checked with: the command line over the project's defaults."""

    max_terms: int
    max_seconds: float
    jobs: int
    fail_on: frozenset[str]
    cache: bool
    tag_defaults: dict[str, str]


def resolve(
    manuscript: Path,
    explicit: Path | None = None,
    *,
    max_terms: int | None = None,
    max_seconds: float | None = None,
    jobs: int | None = None,
    fail_on: frozenset[str] | None = None,
    no_cache: bool = False,
) -> Settings:
    """The settings for ``manuscript``: each value given here wins over the project's file,
    which wins over the built-in default.  Raises ConfigError for a bad settings file."""
    from verifier.budget import DEFAULT_MAX_SECONDS
    from verifier.prove.prover import DEFAULT_MAX_TERMS

    config = project_config(manuscript, explicit)

    def pick(given: Any, configured: Any, default: Any) -> Any:
        return given if given is not None else (configured if configured is not None else default)

    return Settings(
        max_terms=pick(max_terms, config.max_terms, DEFAULT_MAX_TERMS),
        max_seconds=pick(max_seconds, config.max_seconds, DEFAULT_MAX_SECONDS),
        jobs=max(pick(jobs, config.jobs, 1), 1),
        fail_on=pick(fail_on, config.fail_on, DEFAULT_FAIL_ON),
        cache=cache_allowed(no_cache, config),
        tag_defaults=config.tag_defaults(),
    )


def cache_allowed(no_cache_option: bool, config: ProjectConfig) -> bool:
    """Whether the verdict cache on disk is used: not if ``--no-cache``, the environment or the file says no."""
    if no_cache_option or os.environ.get(NO_CACHE_ENV, "") not in ("", "0"):
        return False
    return config.cache is not False


def apply_tag_defaults(doc: ScannedDocument, defaults: dict[str, str]) -> ScannedDocument:
    """Give every claim tag of ``doc`` the options in ``defaults`` that it does not set itself."""
    if defaults:
        for item in doc.items:
            if isinstance(item, ClaimBlock):
                for key, value in defaults.items():
                    item.options.setdefault(key, value)
    return doc
