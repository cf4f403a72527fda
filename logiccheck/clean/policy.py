"""The cleaning policy (`[clean]` in TOML). `CleanPolicy.model_validate(dict)` is the
entry point."""

from __future__ import annotations

from pathlib import Path
from typing import Any, Literal

from pydantic import BaseModel, ConfigDict, Field, ValidationError, field_validator

from logiccheck.config import read_toml
from logiccheck.quality.config import QualityConfig

# Checks whose flagged respondents a policy may remove.
RESPONDENT_CHECKS = (
    "duplicate-id",
    "duplicate-response",
    "near-duplicate",
    "straightline",
    "pattern-response",
    "speeder",
    "not-in-frame",
    "check-failed",
)

BIAS_WARNING = (
    "Removing respondents can bias results; whether a case is removed is a decision for the "
    "study's own protocol, not for this tool."
)


class PolicyError(ValueError):
    """A policy file that cannot be read or does not validate."""


class CleanPolicy(BaseModel):
    # Strict: `blank_invalid = "no"` is a mistake to report, not a false to guess.
    model_config = ConfigDict(extra="forbid", strict=True)

    blank_out_of_path: bool = True  # answers the routing did not ask for (with cascade)
    blank_invalid: bool = True  # undeclared codes, out-of-range numbers, non-response on strict items
    # Per check: "flag" (default, nothing removed) or "drop" (remove the respondents it flags).
    respondents: dict[str, Literal["flag", "drop"]] = Field(default_factory=dict)
    # Dispositions to keep; None keeps every respondent whatever their disposition.
    keep_dispositions: list[str] | None = None
    # Neutralise cells a spreadsheet would run as a formula in CSV and .xlsx outputs.
    sheet_safe: bool = True

    @field_validator("respondents")
    @classmethod
    def _known(cls, v: dict[str, str]) -> dict[str, str]:
        for name in v:
            if name not in RESPONDENT_CHECKS:
                raise ValueError(f"unknown check {name!r}; use one of {', '.join(RESPONDENT_CHECKS)}")
        return v

    @field_validator("keep_dispositions")
    @classmethod
    def _keeps_someone(cls, v: list[str] | None) -> list[str] | None:
        if v is not None and not v:
            raise ValueError(
                "an empty list keeps no disposition, so every respondent would be removed; "
                "list the dispositions to keep (e.g. [\"complete\", \"partial\"]) or leave the key out to keep everyone"
            )
        return v

    @property
    def drops(self) -> list[str]:
        return [name for name, what in self.respondents.items() if what == "drop"]


def _fmt(err: ValidationError, file: str) -> str:
    first = err.errors()[0]
    where = ".".join(str(p) for p in first["loc"])
    return f"{file}: [{where}] {first['msg']}"


def configured_policy(spec: str | Path) -> tuple[CleanPolicy, QualityConfig]:
    """The `[clean]` and `[quality]` tables of the configuration found above the spec
    (`logiccheck.toml` or `[tool.logiccheck]`); defaults where there is none."""
    from logiccheck.config import ConfigError, config_for

    try:
        config = config_for(spec)
    except ConfigError as err:
        raise PolicyError(str(err)) from None
    policy = config.models.get("clean")
    quality = config.models.get("quality")
    return (
        policy if isinstance(policy, CleanPolicy) else CleanPolicy(),
        quality if isinstance(quality, QualityConfig) else QualityConfig(),
    )


def load_policy(path: str | Path | None) -> tuple[CleanPolicy, QualityConfig]:
    """Read `[clean]` and `[quality]` from a TOML file (or `[tool.logiccheck]` in a
    pyproject.toml). No file: the defaults."""
    if path is None:
        return CleanPolicy(), QualityConfig()
    path = Path(path)
    doc: dict[str, Any] = read_toml(path, "policy", PolicyError)
    doc = doc.get("tool", {}).get("logiccheck", doc)
    unknown = sorted(set(doc) - {"clean", "quality", "data", "lint", "ci", "report"})
    if unknown:
        raise PolicyError(f"{path}: unknown table [{unknown[0]}]; the policy lives in [clean] and [quality]")
    try:
        return CleanPolicy.model_validate(doc.get("clean", {})), QualityConfig.model_validate(doc.get("quality", {}))
    except ValidationError as err:
        raise PolicyError(_fmt(err, str(path))) from None
