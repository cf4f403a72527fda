"""Project configuration: `logiccheck.toml`, or `[tool.logiccheck]` in `pyproject.toml`.

Found by walking up from the spec's folder (the first folder holding either file wins;
in one folder `logiccheck.toml` wins over `pyproject.toml`, and a `pyproject.toml`
without a `[tool.logiccheck]` table is passed over), or named with `--config FILE`.

    fail-on = "warning"          # default for --fail-on
    format = "text"              # default for --format
    [checks]
    "unsafe-pipe" = "error"      # a severity override ...
    "always-asked" = "off"       # ... or turn a check off
    [data]                       # the data mapping (docs/formats.md)
    [quality]                    # quality thresholds
    [clean]                      # cleaning policy
"""

from __future__ import annotations

import importlib
import sys
from pathlib import Path
from typing import Any, Literal

from pydantic import BaseModel, ConfigDict, Field, ValidationError

from logiccheck.diagnostics import Severity
from logiccheck.suggest import did_you_mean

if sys.version_info >= (3, 11):
    import tomllib
else:  # pragma: no cover - older Pythons
    import tomli as tomllib

CONFIG_NAME = "logiccheck.toml"
PYPROJECT = "pyproject.toml"
LEVELS = ("error", "warning", "info")
FORMATS = ("text", "json", "sarif", "junit", "github", "csv", "markdown", "html")
CheckSetting = Literal["error", "warning", "info", "off"]

# Where the owners of the pass-through tables keep their models: (module, class).
# Validated with that model when it can be imported; kept as a plain table otherwise.
SECTION_MODELS: dict[str, tuple[str, str]] = {
    "data": ("logiccheck.data.mapping", "DataMapping"),
    "quality": ("logiccheck.quality.config", "QualityConfig"),
    "clean": ("logiccheck.clean.policy", "CleanPolicy"),
}


class ConfigError(Exception):
    """A configuration file that cannot be used; the message is one line naming the file."""


class Config(BaseModel):
    """The validated configuration; `source` is the file it came from (None: defaults)."""

    model_config = ConfigDict(extra="forbid", populate_by_name=True, strict=True)

    fail_on: Literal["error", "warning", "info"] | None = Field(default=None, alias="fail-on")
    format: str | None = None
    checks: dict[str, CheckSetting] = Field(default_factory=dict)
    data: dict[str, Any] = Field(default_factory=dict)
    quality: dict[str, Any] = Field(default_factory=dict)
    clean: dict[str, Any] = Field(default_factory=dict)
    source: str | None = Field(default=None, exclude=True)
    # The validated pass-through tables, where their models exist.
    models: dict[str, Any] = Field(default_factory=dict, exclude=True)

    @property
    def disabled(self) -> set[str]:
        return {name for name, value in self.checks.items() if value == "off"}

    @property
    def severity(self) -> dict[str, Severity]:
        return {name: Severity(value) for name, value in self.checks.items() if value != "off"}


TOP_KEYS = ("fail-on", "format", "checks", "data", "quality", "clean")


def _did_you_mean(word: str, options: list[str]) -> str:
    return did_you_mean(word, options)


def _fmt_loc(loc: tuple[Any, ...], prefix: str) -> str:
    parts = [str(p) for p in loc]
    return ".".join([prefix, *parts] if prefix else parts)


def _pydantic_message(err: ValidationError, where: str, prefix: str) -> str:
    first = err.errors()[0]
    key = _fmt_loc(first["loc"], prefix)
    kind = first["type"]
    if kind == "extra_forbidden":
        return f"{where}: unknown key `{key}`"
    if kind == "literal_error":
        allowed = first.get("ctx", {}).get("expected", "")
        return f"{where}: key `{key}`: {first['input']!r} is not allowed; use one of {allowed}"
    return f"{where}: key `{key}`: {first['msg']}"


def find_config(start: str | Path) -> Path | None:
    """The nearest configuration file at or above `start` (a spec file or folder)."""
    here = Path(start).resolve()
    if not here.is_dir():
        here = here.parent
    for folder in (here, *here.parents):
        own = folder / CONFIG_NAME
        if own.is_file():
            return own
        py = folder / PYPROJECT
        if py.is_file() and _pyproject_table(py) is not None:
            return py
    return None


def read_toml(path: Path, what: str = "configuration", error: type[Exception] | None = None) -> dict[str, Any]:
    """A TOML file as a dict; a missing, unreadable or malformed file raises `error`
    (default `ConfigError`) with one line naming the file and `what` it should be."""
    fail: type[Exception] = error or ConfigError
    try:
        raw = path.read_bytes()
    except FileNotFoundError:
        raise fail(f"{path}: no such {what} file") from None
    except OSError as err:
        raise fail(f"{path}: cannot read the {what} ({err.strerror})") from None
    try:
        return tomllib.loads(raw.decode("utf-8"))
    except UnicodeDecodeError:
        raise fail(f"{path}: not UTF-8 text; save the {what} as UTF-8") from None
    except tomllib.TOMLDecodeError as err:
        raise fail(f"{path}: not valid TOML ({err})") from None




def _pyproject_table(path: Path) -> dict[str, Any] | None:
    try:
        data = read_toml(path)
    except ConfigError:
        # Someone else's broken pyproject is not our configuration; one that names our
        # table is, and stops the run as a broken logiccheck.toml does.
        try:
            mentions = b"tool.logiccheck" in path.read_bytes()
        except OSError:
            mentions = False
        if mentions:
            raise
        return None
    table = data.get("tool", {}).get("logiccheck") if isinstance(data.get("tool"), dict) else None
    return table if isinstance(table, dict) else None


def _validate_section(name: str, table: dict[str, Any], where: str) -> Any:
    module_name, class_name = SECTION_MODELS[name]
    try:
        module = importlib.import_module(module_name)
    except ModuleNotFoundError:
        return None
    model = getattr(module, class_name, None)
    if model is None or not hasattr(model, "model_validate"):
        return None
    try:
        return model.model_validate(table)
    except ValidationError as err:
        raise ConfigError(_pydantic_message(err, where, name)) from None


def parse_config(table: dict[str, Any], where: str, checks: list[str] | None = None) -> Config:
    """Validate one configuration table; `where` names the file (and table) in messages."""
    for key in table:
        if key not in TOP_KEYS:
            raise ConfigError(
                f"{where}: unknown key `{key}`{_did_you_mean(key, list(TOP_KEYS))} "
                f"(allowed: {', '.join(TOP_KEYS)})"
            )
    for key in ("checks", "data", "quality", "clean"):
        if key in table and not isinstance(table[key], dict):
            raise ConfigError(f"{where}: `{key}` must be a table (`[{key}]`)")
    fmt = table.get("format")
    if fmt is not None and fmt not in FORMATS:
        raise ConfigError(
            f"{where}: key `format`: {fmt!r} is not a format{_did_you_mean(str(fmt), list(FORMATS))} "
            f"(allowed: {', '.join(FORMATS)})"
        )
    from logiccheck.checks.registry import all_checks, is_check

    for name, value in table.get("checks", {}).items():
        if (name not in checks) if checks is not None else not is_check(name):
            checks = checks if checks is not None else sorted(all_checks())
            raise ConfigError(
                f"{where}: key `checks.{name}`: no check is called `{name}`{_did_you_mean(name, checks)} "
                "(`logiccheck explain` lists them)"
            )
        if value not in (*LEVELS, "off"):
            raise ConfigError(
                f"{where}: key `checks.{name}`: {value!r} is not allowed; use one of error, warning, info, off"
            )
    try:
        config = Config.model_validate(table)
    except ValidationError as err:
        raise ConfigError(_pydantic_message(err, where, "")) from None
    for name in SECTION_MODELS:
        if name in table:
            model = _validate_section(name, table[name], where)
            if model is not None:
                config.models[name] = model
    return config


def load_config(path: str | Path, checks: list[str] | None = None) -> Config:
    """Read and validate one named configuration file (`--config FILE`)."""
    path = Path(path)
    if not path.is_file():
        raise ConfigError(f"{path}: no such configuration file; give a logiccheck.toml or pyproject.toml")
    if path.name == PYPROJECT:
        table = read_toml(path).get("tool", {}).get("logiccheck")
        if not isinstance(table, dict):
            raise ConfigError(f"{path}: has no [tool.logiccheck] table")
        where = f"{path} [tool.logiccheck]"
    else:
        table = read_toml(path)
        where = str(path)
    config = parse_config(table, where, checks)
    config.source = str(path)
    return config


def config_for(spec: str | Path | None, explicit: str | Path | None = None) -> Config:
    """The configuration a run uses: the named file, else the nearest one, else defaults."""
    if explicit is not None:
        return load_config(explicit)
    found = find_config(spec if spec is not None else Path.cwd())
    return load_config(found) if found is not None else Config()
