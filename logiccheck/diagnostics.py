"""The records every stage produces and every reporter consumes."""

from __future__ import annotations

from enum import Enum

from pydantic import BaseModel, ConfigDict, Field

# The one severity order: worst first (display order); `Severity.rank` follows it.
SEVERITY_ORDER = {"error": 0, "warning": 1, "info": 2}


class Severity(str, Enum):
    """How serious a record is; ordered error > warning > info."""

    error = "error"
    warning = "warning"
    info = "info"

    @property
    def rank(self) -> int:
        return len(SEVERITY_ORDER) - SEVERITY_ORDER[self.value]

    def at_least(self, other: Severity) -> bool:
        return self.rank >= other.rank


class Span(BaseModel):
    """A place in a file: 1-based line and column; the end column is exclusive (one past
    the last character), as in SARIF."""

    model_config = ConfigDict(frozen=True)

    file: str
    line: int
    column: int
    end_line: int | None = None
    end_column: int | None = None


class Related(BaseModel):
    """Another place that explains a diagnostic (the other end of a loop, a condition)."""

    model_config = ConfigDict(frozen=True)

    span: Span
    message: str


class Diagnostic(BaseModel):
    """One finding about a spec, with its position and, where it helps, a witness."""

    check: str
    severity: Severity
    span: Span
    message: str
    item: str | None = None
    witness: dict[str, str] | None = None
    related: list[Related] = Field(default_factory=list)
    notes: list[str] = Field(default_factory=list)

    @property
    def file(self) -> str:
        return self.span.file

    @property
    def line(self) -> int:
        return self.span.line

    @property
    def column(self) -> int:
        return self.span.column

    def sort_key(self) -> tuple[str, int, int, str]:
        return (self.span.file, self.span.line, self.span.column, self.check)

    def to_json(self) -> dict[str, object]:
        """The fixed JSON shape of docs/formats.md, plus optional extras."""
        out: dict[str, object] = {
            "check": self.check,
            "severity": self.severity.value,
            "file": self.span.file,
            "line": self.span.line,
            "column": self.span.column,
            "item": self.item,
            "message": self.message,
            "witness": self.witness,
        }
        out["end_line"] = self.span.end_line
        out["end_column"] = self.span.end_column
        out["related"] = [
            {"file": r.span.file, "line": r.span.line, "column": r.span.column, "message": r.message}
            for r in self.related
        ]
        if self.notes:
            out["notes"] = list(self.notes)
        return out


def count_by_severity(records: list[Diagnostic]) -> dict[str, int]:
    counts = {"error": 0, "warning": 0, "info": 0}
    for record in records:
        counts[record.severity.value] += 1
    return counts
