"""Everything one report shows, gathered from the same records as every other format.

`ReportData` is what the HTML report, the notebook view and the charts read. It is
built from a questionnaire, its lint diagnostics and (optionally) a validation result;
`from_validation` accepts any result object with `.table` (or `.items`), `.findings`,
`.dispositions` and `.respondents`, as DataFrames, lists or dicts.
"""

from __future__ import annotations

from collections.abc import Iterable, Mapping
from dataclasses import dataclass, field
from typing import Any

import pandas as pd

from logiccheck.diagnostics import SEVERITY_ORDER, Diagnostic
from logiccheck.model.questionnaire import Questionnaire
from logiccheck.safety.text import clip

ITEM_COLUMNS = ["item", "expected", "answered", "out_of_path", "missing_on_path", "invalid"]
FINDING_COLUMNS = ["check", "severity", "respondent", "row", "item", "value", "message"]


@dataclass
class ReportData:
    questionnaire: Questionnaire
    diagnostics: list[Diagnostic] = field(default_factory=list)
    respondents: int | None = None
    items: pd.DataFrame | None = None  # ITEM_COLUMNS, one row per item
    findings: pd.DataFrame | None = None  # FINDING_COLUMNS, one row per finding
    dispositions: dict[str, int] = field(default_factory=dict)
    settings: dict[str, Any] = field(default_factory=dict)  # thresholds and policy used
    export: str | None = None  # the export's file name, when there is one
    sections: dict[str, Any] = field(default_factory=dict)  # analyses' sections (e.g. representativeness)
    scales: list[dict[str, Any]] = field(default_factory=list)  # validate's "scales" section

    @property
    def has_data(self) -> bool:
        return self.items is not None

    def ordered_items(self) -> pd.DataFrame:
        """The per-item table in questionnaire order, with each item's section."""
        items = self.items if self.items is not None else pd.DataFrame(columns=ITEM_COLUMNS)
        order, sections = item_order(self.questionnaire)
        frame = items.copy()
        frame["section"] = frame["item"].map(sections).fillna("")
        frame["_order"] = frame["item"].map(order).fillna(len(order)).astype(int)
        frame = frame.sort_values(["_order", "item"], kind="stable").drop(columns="_order")
        return frame.reset_index(drop=True)

    def findings_summary(self) -> pd.DataFrame:
        """Findings per check and severity, with how many respondents each touches."""
        f = self.findings
        if f is None or f.empty:
            return pd.DataFrame(columns=["check", "severity", "findings", "respondents"])
        grouped = f.groupby(["check", "severity"], sort=False).agg(
            findings=("check", "size"), respondents=("respondent", "nunique")
        )
        out = grouped.reset_index()
        out["_rank"] = out["severity"].map(SEVERITY_ORDER).fillna(9)
        return out.sort_values(["_rank", "findings"], ascending=[True, False]).drop(columns="_rank").reset_index(drop=True)

    def severity_counts(self) -> dict[str, int]:
        f = self.findings
        counts = {"error": 0, "warning": 0, "info": 0}
        if f is not None and not f.empty:
            for sev, count in f["severity"].value_counts().items():
                counts[str(sev)] = int(count)
        return counts


def item_order(q: Questionnaire) -> tuple[dict[str, int], dict[str, str]]:
    """Position and section name of every item, grid row and sample variable."""
    order: dict[str, int] = {}
    sections: dict[str, str] = {}
    for entry in q.entries:
        if entry.kind in ("item", "sample") and entry.name not in order:
            order[entry.name] = len(order)
            sections[entry.name] = entry.section.name if entry.section is not None else ""
    return order, sections


def _frame(value: Any, columns: list[str]) -> pd.DataFrame:
    if value is None:
        return pd.DataFrame(columns=columns)
    if isinstance(value, pd.DataFrame):
        frame = value.copy()
    else:
        rows = [r.model_dump() if hasattr(r, "model_dump") else (r if isinstance(r, Mapping) else vars(r)) for r in value]
        frame = pd.DataFrame(rows)
    for column in columns:
        if column not in frame.columns:
            frame[column] = None
    if "severity" in frame.columns:
        frame["severity"] = frame["severity"].map(lambda s: getattr(s, "value", s))
    return frame


def _dispositions(value: Any) -> dict[str, int]:
    if value is None:
        return {}
    if isinstance(value, pd.DataFrame):  # one row per respondent
        column = "disposition" if "disposition" in value.columns else value.columns[-1]
        value = value[column].value_counts()
    if isinstance(value, pd.Series) and not value.index.equals(pd.RangeIndex(len(value))):
        return {str(k): int(v) for k, v in value.items()}
    if isinstance(value, pd.Series):
        return {str(k): int(v) for k, v in value.value_counts().items()}
    return {str(k): int(v) for k, v in dict(value).items()}


def findings_from_blocks(blocks: Iterable[Any]) -> pd.DataFrame:
    """Findings as one frame straight from the data stage's blocks of index arrays
    (no record object per finding: an export with many problem cells stays cheap)."""
    parts = []
    for b in blocks:
        n = int(b.rows.size)
        severity = getattr(b.severity, "value", b.severity)
        if n == 0:
            parts.append(pd.DataFrame({"check": [b.check], "severity": [severity], "respondent": [None], "row": [None],
                                       "item": [b.item], "value": [None], "message": [b.message]}))
            continue
        values = list(b.values) if b.values is not None else [None] * n
        if "{value}" in b.message:
            messages: Any = [b.message.replace("{value}", clip(v or "")) for v in values]
        else:
            messages = b.message
        parts.append(pd.DataFrame({
            "check": b.check, "severity": severity,
            "respondent": b.ids.astype(str) if b.ids is not None else None,
            "row": b.rows + 1, "item": b.item, "value": values, "message": messages,
        }))
    if not parts:
        return pd.DataFrame(columns=FINDING_COLUMNS)
    frame = pd.concat(parts, ignore_index=True)
    return frame.sort_values("row", kind="stable", na_position="first").reset_index(drop=True)[FINDING_COLUMNS]


def from_validation(
    q: Questionnaire,
    result: Any,
    diagnostics: Iterable[Diagnostic] = (),
    *,
    settings: Mapping[str, Any] | None = None,
    export: str | None = None,
) -> ReportData:
    """Gather a validation result (any object with table/findings/dispositions)."""
    export = export or getattr(result, "source", None)
    table = getattr(result, "table", None)
    if table is None:
        table = getattr(result, "items", None)
    items = _frame(table, ITEM_COLUMNS)
    blocks = getattr(result, "blocks", None)
    if blocks is not None:
        findings = findings_from_blocks(blocks)
    else:
        findings = _frame(getattr(result, "findings", None), FINDING_COLUMNS)
    respondents = getattr(result, "respondents", None)
    if respondents is not None and not isinstance(respondents, int):
        respondents = len(respondents)
    used = dict(settings or {})
    for attr in ("thresholds", "policy", "settings"):
        extra = getattr(result, attr, None)
        if extra:
            used[attr] = extra.model_dump() if hasattr(extra, "model_dump") else extra
    scales: list[dict[str, Any]] = []
    for analysis in (getattr(result, "analyses", None) or {}).values():
        scales.extend(analysis.sections.get("scales", []))
    return ReportData(
        questionnaire=q,
        diagnostics=list(diagnostics),
        respondents=respondents,
        items=items,
        findings=findings,
        dispositions=_dispositions(getattr(result, "dispositions", None)),
        settings=used,
        export=export,
        sections={k: v for a in (getattr(result, "analyses", None) or {}).values() for k, v in a.sections.items()},
        scales=scales,
    )


def settings_used(config: Any, mapping: Any = None) -> dict[str, Any]:
    """The thresholds, policy and mapping a run used, as the report lists them.

    `config` is a `logiccheck.config.Config`; `mapping` a `DataMapping` (or None).
    """
    out: dict[str, Any] = {"configuration": getattr(config, "source", None) or "none found (defaults)"}
    if mapping is not None:
        out["mapping"] = mapping.model_dump(exclude_defaults=True) or "defaults (docs/formats.md layout)"
    for table in ("checks", "quality", "clean"):
        value = getattr(config, table, None)
        if value:
            out[table] = dict(value)
    return out
