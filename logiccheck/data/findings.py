"""Findings: one record per problem cell, built in blocks of index arrays.

A block holds one check, one item, one message template and the rows it applies to;
`Finding` records are made from blocks only when someone asks for them, so an export
with a million problem cells costs arrays, not a million objects, until it is printed.
"""

from __future__ import annotations

from collections.abc import Iterator
from dataclasses import dataclass

import numpy as np
from pydantic import BaseModel

from logiccheck.diagnostics import Severity
from logiccheck.safety.text import clip


class Finding(BaseModel):
    """One data finding: which check, how serious, which respondent and item, and why."""

    check: str
    severity: Severity
    respondent: str | None = None  # the respondent id, as text
    row: int | None = None  # 1-based data row (the header is row 0)
    item: str | None = None
    value: str | None = None  # the cell as the export has it
    message: str

    def to_json(self) -> dict[str, object]:
        """docs/formats.md's fields, plus row and value."""
        return {
            "check": self.check,
            "severity": self.severity.value,
            "respondent": self.respondent,
            "item": self.item,
            "message": self.message,
            "row": self.row,
            "value": self.value,
        }


@dataclass
class Hits:
    """What a data or quality check returns: the rows it flags and why, without its own
    name or severity (the data runner stamps those, so a misspelt name cannot exist).

    `rows` are 0-based data rows (empty: one file-level finding). `message` is one
    template for every row (`{value}` is filled with the row's cell text) or one message
    per row."""

    rows: np.ndarray
    message: str | list[str]
    item: str | None = None
    values: list[str] | None = None  # cell texts aligned with rows


@dataclass
class FindingBlock:
    """Findings sharing check, severity, item and a message template (`{value}` filled in)."""

    check: str
    severity: Severity
    item: str | None
    message: str
    rows: np.ndarray  # 0-based global data rows; empty for a file-level finding
    ids: np.ndarray | None = None  # respondent ids (object array of str), aligned with rows
    values: list[str] | None = None  # cell texts, aligned with rows
    messages: list[str] | None = None  # one message per row, replacing `message`, where a check gives them

    def _message(self, i: int, value: str | None) -> str:
        if self.messages is not None:
            return self.messages[i]
        return self.message.replace("{value}", clip(value or "")) if "{value}" in self.message else self.message

    def rows_out(self) -> Iterator[tuple[str, str, str | None, int | None, str | None, str | None, str]]:
        """(check, severity, respondent, row, item, value, message) without building records."""
        sev = self.severity.value
        if self.rows.size == 0:
            yield (self.check, sev, None, None, self.item, None, self.message)
            return
        ids = self.ids.tolist() if self.ids is not None else [None] * len(self.rows)
        values = self.values if self.values is not None else [None] * len(self.rows)
        for i, (row, rid, value) in enumerate(zip(self.rows.tolist(), ids, values, strict=True)):
            yield (self.check, sev, rid, row + 1, self.item, value, self._message(i, value))

    def head(self, k: int) -> list[Finding]:
        """The first `k` records only."""
        return self.records(limit=k)

    def records(self, limit: int | None = None) -> list[Finding]:
        if self.rows.size == 0:
            return [Finding(check=self.check, severity=self.severity, item=self.item, message=self.message)]
        out = []
        rows = self.rows if limit is None else self.rows[:limit]
        for i, row in enumerate(rows.tolist()):
            value = self.values[i] if self.values is not None else None
            message = self._message(i, value)
            # Fields are built here from checked parts, so skip pydantic's validation.
            out.append(
                Finding.model_construct(
                    check=self.check,
                    severity=self.severity,
                    respondent=str(self.ids[i]) if self.ids is not None else None,
                    row=row + 1,
                    item=self.item,
                    value=value,
                    message=message,
                )
            )
        return out


def count_blocks(blocks: list[FindingBlock]) -> int:
    return sum(b.rows.size or 1 for b in blocks)
