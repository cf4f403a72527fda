"""The record a quality check produces for one respondent (and item, where there is one).

Same fields as the data stage's findings, so one list feeds every reporter.
"""

from __future__ import annotations

from dataclasses import asdict, dataclass
from typing import Any

from logiccheck.checks.registry import default_severity
from logiccheck.diagnostics import Severity


@dataclass(frozen=True)
class Finding:
    check: str
    severity: Severity
    respondent: str
    row: int  # 0-based row of the export (header not counted)
    item: str | None
    value: Any
    message: str

    def to_json(self) -> dict[str, Any]:
        out = asdict(self)
        out["severity"] = self.severity.value
        return out


def finding(check: str, respondent: object, row: int, message: str, item: str | None = None, value: Any = None) -> Finding:
    return Finding(check, default_severity(check), str(respondent), int(row), item, value, message)
