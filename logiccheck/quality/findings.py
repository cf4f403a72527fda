"""Quality findings are the data stage's `Finding` records (1-based rows, values as text):
one record type for every check and reporter. `finding` builds one from a 0-based row."""

from __future__ import annotations

from typing import Any

from logiccheck.checks.registry import check_info
from logiccheck.data.findings import Finding

__all__ = ["Finding", "finding"]


def finding(check: str, respondent: object, row: int, message: str, item: str | None = None, value: Any = None) -> Finding:
    """A finding of the declared check `check` for 0-based data row `row`."""
    info = check_info(check)
    text = None if value is None else (str(value) if not isinstance(value, float) else f"{value:g}")
    return Finding(check=info.name, severity=info.severity, respondent=str(respondent), row=int(row) + 1, item=item,
                   value=text, message=message)
