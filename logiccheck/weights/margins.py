"""The margins file (TOML): population shares or counts per category of coded variables,
and the `[weights]` settings. Validated by pydantic; every error is one line naming the
file and the key, with a did-you-mean for unknown variables, labels and dispositions."""

from __future__ import annotations

import math
from dataclasses import dataclass
from pathlib import Path
from typing import Any, Literal

from pydantic import BaseModel, ConfigDict, Field, ValidationError, field_validator

from logiccheck.config import _pydantic_message, read_toml
from logiccheck.model import nodes as n
from logiccheck.model.questionnaire import Questionnaire
from logiccheck.suggest import did_you_mean as _did_you_mean

# Shares may be rounded in their published source; within this of 1 they are rescaled to
# sum to exactly 1 (common practice, no source).
SHARE_TOLERANCE = 0.01
# A category with fewer kept respondents than this is `sparse-cell`: common practice, no
# source (figures between 20 and 50 are usual; smaller cells give unstable weights).
MIN_CELL = 20


class MarginsError(ValueError):
    """A margins file that cannot be used: one line naming the file and the key."""


class WeightSettings(BaseModel):
    """`[weights]`: how to weight, whom, and when to stop."""

    model_config = ConfigDict(extra="forbid")

    method: Literal["rake"] = "rake"  # iterative proportional fitting (Deming & Stephan, 1940)
    base: str | None = None  # a column of design (base) weights to start from
    trim: tuple[float, float] | None = None  # bounds on weight / mean weight
    respondents: list[str] = Field(default_factory=lambda: ["complete", "partial"])
    # Largest difference between a weighted share and its population share at convergence.
    tolerance: float = Field(1e-10, gt=0, lt=0.1)
    max_iterations: int = Field(1000, ge=1)  # full sweeps over every margin variable
    min_cell: int = Field(MIN_CELL, ge=1)  # `sparse-cell` threshold
    share_tolerance: float = Field(SHARE_TOLERANCE, ge=0, lt=0.5)

    @field_validator("trim")
    @classmethod
    def _bounds(cls, v: tuple[float, float] | None) -> tuple[float, float] | None:
        if v is not None and not (0 < v[0] <= 1 <= v[1]):
            raise ValueError("give [low, high] with 0 < low <= 1 <= high (bounds on weight / mean weight)")
        return v

    @field_validator("respondents")
    @classmethod
    def _some(cls, v: list[str]) -> list[str]:
        if not v:
            raise ValueError("list at least one disposition (e.g. [\"complete\", \"partial\"])")
        return v


class MarginsFile(BaseModel):
    model_config = ConfigDict(extra="forbid")

    margins: dict[str, dict[str, float]]
    weights: WeightSettings = Field(default_factory=lambda: WeightSettings.model_validate({}))


@dataclass(frozen=True)
class Category:
    label: str
    code: float
    share: float  # population share, rescaled to sum to 1 over the variable


@dataclass(frozen=True)
class Variable:
    name: str
    categories: tuple[Category, ...]
    given_as: Literal["shares", "counts"]
    total: float  # what the file's numbers sum to

    @property
    def codes(self) -> list[float]:
        return [c.code for c in self.categories]

    @property
    def shares(self) -> list[float]:
        return [c.share for c in self.categories]


@dataclass(frozen=True)
class Margins:
    """A margins file resolved against a questionnaire."""

    file: str
    variables: tuple[Variable, ...]
    settings: WeightSettings

    def variable(self, name: str) -> Variable:
        return next(v for v in self.variables if v.name == name)


def _candidates(q: Questionnaire) -> list[str]:
    """Names a margin may use: sample variables and `single` items (grid rows included)."""
    return [name for name, e in q.symbols.items() if e.kind in ("sample", "item") and e.stmt.type.kind == "single"]


def _variable(q: Questionnaire, where: str, name: str, given: dict[str, float], tol: float) -> Variable:
    key = f"margins.{name}"
    entry = q.symbols.get(name)
    if entry is None or entry.kind not in ("sample", "item"):
        raise MarginsError(f"{where}: key `{key}`: the spec has no sample variable or item `{name}`"
                           f"{_did_you_mean(name, _candidates(q))}")
    stmt = entry.stmt
    if stmt.type.kind != "single":
        raise MarginsError(f"{where}: key `{key}`: `{name}` is a {stmt.type.kind} item; margins need a single item "
                           "or a coded sample variable (for numbers, add a coded sample variable of groups)")
    codes = q.item_codes(stmt)
    options: dict[str, n.CodeOption] = {o.label: o for o in (codes.options if codes else [])}
    if isinstance(stmt, n.Item) and q.allows_nonresponse(stmt):
        # A non-response code may be a category of its own when the file lists it.
        options.update({o.label: o for o in q.nonresponse if o.label not in options})
    if len(given) < 2:
        raise MarginsError(f"{where}: key `{key}`: list at least two categories with their population shares")
    for label, value in given.items():
        if label not in options:
            raise MarginsError(f"{where}: key `{key}.{label}`: `{name}` has no code label `{label}`"
                               f"{_did_you_mean(label, list(options))}")
        if not math.isfinite(value) or value <= 0:
            raise MarginsError(f"{where}: key `{key}.{label}`: {value!r} is not a positive number; "
                               "leave out a category no one in the population has")
    total = math.fsum(given.values())
    if abs(total - 1) <= tol + 1e-12:  # 0.33 × 3 is 0.99 only up to rounding
        given_as: Literal["shares", "counts"] = "shares"
    elif any(v > 1 for v in given.values()):
        given_as = "counts"
    else:
        raise MarginsError(f"{where}: key `{key}`: the shares sum to {total:.6g}, not 1 (tolerance {tol:g}); "
                           "correct them, or give population counts")
    cats = tuple(Category(label, float(options[label].value), value / total) for label, value in given.items())
    return Variable(name, cats, given_as, total)


def resolve_margins(raw: dict[str, Any], q: Questionnaire, where: str) -> Margins:
    """Validate the file's tables and resolve every variable and label against the spec."""
    try:
        model = MarginsFile.model_validate(raw)
    except ValidationError as err:
        raise MarginsError(_pydantic_message(err, where, "")) from None
    if not model.margins:
        raise MarginsError(f"{where}: key `margins`: give at least one variable, e.g. [margins.district]")
    settings = model.weights
    known = ["complete", "partial", "break-off", *(e.name for e in q.entries if e.kind == "stop")]
    for d in settings.respondents:
        if d not in known:
            raise MarginsError(f"{where}: key `weights.respondents`: no disposition is called {d!r}"
                               f"{_did_you_mean(d, known)}; the dispositions are {', '.join(known)}")
    variables = tuple(_variable(q, where, name, given, settings.share_tolerance) for name, given in model.margins.items())
    return Margins(where, variables, settings)


def load_margins(path: str | Path, q: Questionnaire) -> Margins:
    """Read and resolve a margins file; raises `MarginsError` with one line."""
    p = Path(path)
    return resolve_margins(read_toml(p, "margins", MarginsError), q, str(p))
