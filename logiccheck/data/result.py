"""`ValidationResult`: the one object every data reporter, the cleaner and notebooks read."""

from __future__ import annotations

import dataclasses
from dataclasses import dataclass, field
from typing import Any

import numpy as np
import pandas as pd

from logiccheck.data.findings import Finding, FindingBlock, count_blocks
from logiccheck.diagnostics import Severity

TABLE_COLUMNS = ["item", "expected", "answered", "out_of_path", "missing_on_path", "invalid", "over_expected"]


@dataclass
class ValidationResult:
    """Everything validation learned about one export.

    `due`, `has_value` and `valid` are respondents × `items` Boolean arrays (None when
    validation ran with `keep_cells=False`); `has_value` is the
    export's own (answered, valid or not); `due` is the routing's, with cascade.
    """

    respondents: int
    ids: np.ndarray  # respondent ids as text, in data-row order
    items: list[str]  # the per-item table's items, questionnaire order
    table: pd.DataFrame
    blocks: list[FindingBlock]
    stop: np.ndarray  # the stop that fired per respondent ("" if none)
    disposition: np.ndarray  # per respondent
    dispositions: dict[str, int]
    measures: pd.DataFrame  # per respondent: id, answered, due, answered_share, gates_due, gates_answered, stop, disposition, duration
    due: np.ndarray | None = None
    has_value: np.ndarray | None = None
    valid: np.ndarray | None = None
    frame: pd.DataFrame | None = None  # the typed frame (values where valid, NaN otherwise)
    nonresponse: np.ndarray | None = None  # valid non-response codes, respondents × items (with keep_cells)
    missing_columns: list[tuple[str, str]] = field(default_factory=list)
    unknown_columns: list[str] = field(default_factory=list)
    # Items whose routing reads an item with a missing column → those items: not judged.
    unjudged: dict[str, list[str]] = field(default_factory=dict)
    notes: list[str] = field(default_factory=list)
    source: str | None = None
    _findings: list[Finding] | None = field(default=None, repr=False)

    @property
    def findings(self) -> list[Finding]:
        """Every finding, materialised once (file-level first, then by row)."""
        if self._findings is None:
            out: list[Finding] = []
            for block in self.blocks:
                out.extend(block.records())
            out.sort(key=lambda f: (f.row is not None, f.row or 0))
            self._findings = out
        return self._findings

    def apply_check_settings(self, disabled: set[str], severity: dict[str, Severity]) -> None:
        """The configuration's `[checks]` table: drop turned-off checks, set severities."""
        if not disabled and not severity:
            return
        self.blocks = [
            dataclasses.replace(b, severity=severity.get(b.check, b.severity))
            for b in self.blocks
            if b.check not in disabled
        ]
        self._findings = None

    @property
    def finding_count(self) -> int:
        return count_blocks(self.blocks)

    def counts_by_check(self) -> dict[tuple[str, str], int]:
        """(check, severity) → number of findings, without materialising them."""
        out: dict[tuple[str, str], int] = {}
        for b in self.blocks:
            key = (b.check, b.severity.value)
            out[key] = out.get(key, 0) + (b.rows.size or 1)
        return out

    def severity_counts(self) -> dict[str, int]:
        counts = {"error": 0, "warning": 0, "info": 0}
        for (_, sev), k in self.counts_by_check().items():
            counts[sev] += k
        return counts

    def worst_at_least(self, level: Severity) -> bool:
        return any(b.severity.at_least(level) for b in self.blocks)

    def item_states(self, item: str) -> pd.DataFrame:
        """Per respondent for one item: due, has_value, valid (needs keep_cells)."""
        if self.due is None or self.has_value is None or self.valid is None:
            raise ValueError("cell arrays were not kept; validate with keep_cells=True")
        j = self.items.index(item)
        return pd.DataFrame(
            {"id": self.ids, "due": self.due[:, j], "has_value": self.has_value[:, j], "valid": self.valid[:, j]}
        )

    def to_json(self, findings: Any = None) -> dict[str, Any]:
        """docs/formats.md: respondents, items, findings, dispositions. `findings`, when
        given, stands in for the findings list (a writer that streams them)."""
        counts = ("expected", "answered", "out_of_path", "missing_on_path", "invalid")
        items = [
            {"item": r["item"], **{k: int(r[k]) for k in counts}, "over_expected": bool(r["over_expected"])}
            for r in self.table[TABLE_COLUMNS].to_dict(orient="records")
        ]
        return {
            "respondents": int(self.respondents),
            "items": items,
            "findings": [f.to_json() for f in self.findings] if findings is None else findings,
            "dispositions": dict(self.dispositions),
            "summary": self.severity_counts(),
        }
