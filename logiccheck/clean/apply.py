"""Apply a policy: blank cells, remove respondents, and record every change."""

from __future__ import annotations

import json
from collections.abc import Sequence
from dataclasses import dataclass, field

import numpy as np
import pandas as pd

from logiccheck.clean.policy import CleanPolicy
from logiccheck.clean.sheet import ESCAPE_REASON, SHEET_ESCAPE, escape, needs_escape_any
from logiccheck.data.validate import AFTER_STOP, CHECK_FAILED, INVALID_VALUE, OUT_OF_PATH
from logiccheck.model.questionnaire import Questionnaire
from logiccheck.pipeline.run import PipelineResult

AUDIT_COLUMNS = ["row", "respondent", "item", "column", "old_value", "new_value", "check", "reason"]
# For these checks a removal keeps the first case of each group and removes the later copies.
_KEEP_FIRST = ("duplicate-id", "duplicate-response", "near-duplicate")


@dataclass
class CleanOutcome:
    cleaned: pd.DataFrame
    audit: pd.DataFrame
    removed: dict[str, int] = field(default_factory=dict)  # reason (check) -> respondents
    blanked: dict[str, int] = field(default_factory=dict)  # check -> cells
    kept: np.ndarray = field(default_factory=lambda: np.zeros(0, dtype=np.int64))  # 0-based input rows kept, in order


def _condition_text(q: Questionnaire, item: str) -> str:
    entry = q.symbols[item]
    parts = []
    for cond in entry.conditions():
        s = cond.span
        line = q.source_line(s.line)
        end = s.end_column if s.end_line == s.line and s.end_column else len(line) + 1
        parts.append(line[s.column - 1 : end - 1].strip())
    return " and ".join(f"({p})" if len(parts) > 1 else p for p in parts)


# The data stage's checks whose findings name an answer a blanking policy removes.
_OFF_ROUTE = (OUT_OF_PATH.name, AFTER_STOP.name)


def _reasons(result: PipelineResult, checks: tuple[str, ...]) -> dict[tuple[int, str], tuple[str, str]]:
    """(0-based row, item) → (check, message) for the findings of `checks`: the audit
    gives the data stage's own check name and root cause."""
    out: dict[tuple[int, str], tuple[str, str]] = {}
    for block in result.blocks:
        if block.check not in checks or block.item is None or not block.rows.size:
            continue
        for i, row in enumerate(block.rows.tolist()):
            value = block.values[i] if block.values is not None else None
            out.setdefault((row, block.item), (block.check, block._message(i, value)))
    return out


def _removals(result: PipelineResult, policy: CleanPolicy) -> dict[int, tuple[str, str]]:
    """Row → (check, reason) for every respondent the policy removes (first reason wins)."""
    out: dict[int, tuple[str, str]] = {}
    drops = set(policy.drops)
    state = result.state
    assert state is not None
    first_of_id: dict[str, int] = {}
    for r, rid in enumerate(state.ids):
        first_of_id.setdefault(rid, r)
    for f in result.findings:
        if f.check not in drops or f.row is None or f.check == CHECK_FAILED.name:
            continue
        r = f.row - 1
        if r in out:
            continue
        # Removing copies keeps the first case of each group.
        if f.check == "duplicate-id" and f.respondent is not None and first_of_id[f.respondent] == r:
            continue
        if f.check == "duplicate-response" and f.value == str(r):
            continue
        if f.check == "near-duplicate" and result.match is not None and result.match.partner[r] > r:
            continue
        out[r] = (f.check, f"respondent removed by policy ({f.check}): {f.message}")
    if CHECK_FAILED.name in drops:
        for name, failed in state.checks_failed.items():
            for r in np.flatnonzero(failed).tolist():
                out.setdefault(r, (CHECK_FAILED.name, f"respondent removed by policy (check-failed): fails check {name}"))
    if policy.keep_dispositions is not None:
        keep = set(policy.keep_dispositions)
        for r, d in enumerate(result.disposition.tolist()):
            if d not in keep:
                out.setdefault(r, ("disposition", f"respondent removed by policy: disposition {d} is not kept"))
    return out


def apply_policy(
    q: Questionnaire, frame: pd.DataFrame, result: PipelineResult, policy: CleanPolicy, markers: set[str] | None = None
) -> CleanOutcome:
    """`frame` holds the export's cells as text ("" = empty), the same table the checks
    judged; it is not modified. Cells whose trimmed text is in `markers` (blank /
    not-shown markers) are left alone."""
    markers = markers or {""}
    state = result.state
    assert state is not None
    cleaned = frame.copy()
    records: list[dict[str, object]] = []
    removed_rows = _removals(result, policy)
    kept = np.ones(len(frame), bool)
    kept[list(removed_rows)] = False
    blanked: dict[str, int] = {}
    off_route = _reasons(result, _OFF_ROUTE) if policy.blank_out_of_path else {}
    invalid = _reasons(result, (INVALID_VALUE.name,)) if policy.blank_invalid else {}
    for j, item in enumerate(state.items):
        for col in result.export_columns(item):
            if col not in frame.columns:
                continue
            cells = frame[col].to_numpy(dtype=object)
            nonempty = np.array([str(c).strip() not in markers for c in cells], dtype=bool)
            todo: list[tuple[np.ndarray, dict[tuple[int, str], tuple[str, str]], str, str]] = []
            # An item whose routing reads a missing column is not judged, so not blanked.
            if policy.blank_out_of_path and item not in result.unjudged:
                cond = _condition_text(q, item)
                why = f"the routing did not ask {item}" + (f" (condition: {cond})" if cond else "")
                todo.append((nonempty & ~state.due[:, j], off_route, OUT_OF_PATH.name, why))
            if policy.blank_invalid:
                todo.append((nonempty & state.due[:, j] & state.has_value[:, j] & ~state.valid[:, j], invalid,
                             INVALID_VALUE.name, f"not a valid answer to {item}"))
            done = np.zeros(len(frame), bool)
            for mask, reasons, fallback, why in todo:
                rows = np.flatnonzero(mask & kept & ~done)
                done |= mask
                for r in rows.tolist():
                    check, reason = reasons.get((r, item), (fallback, why))
                    records.append({"row": r + 1, "respondent": state.ids[r], "item": item, "column": col,
                                    "old_value": str(cells[r]), "new_value": "", "check": check, "reason": reason})
                    blanked[check] = blanked.get(check, 0) + 1
                if len(rows):
                    cleaned.loc[cleaned.index[rows], col] = ""
    if policy.sheet_safe:
        records += _escape_records(cleaned, kept, state.ids)
    removed: dict[str, int] = {}
    for r, (check, why) in sorted(removed_rows.items()):
        original = {c: str(v) for c, v in frame.iloc[r].items()}
        records.append({"row": r + 1, "respondent": state.ids[r], "item": "", "column": "",
                        "old_value": json.dumps(original, ensure_ascii=False), "new_value": "", "check": check,
                        "reason": why})
        removed[check] = removed.get(check, 0) + 1
    kept_rows = np.flatnonzero(kept)
    cleaned = cleaned.iloc[kept_rows].reset_index(drop=True)
    audit = pd.DataFrame(records, columns=AUDIT_COLUMNS)
    if len(audit):
        audit = audit.sort_values(["row", "column"], kind="stable").reset_index(drop=True)
    return CleanOutcome(cleaned, audit, removed, dict(sorted(blanked.items())), np.flatnonzero(kept))


def _escape_records(cleaned: pd.DataFrame, kept: np.ndarray, ids: list[str]) -> list[dict[str, object]]:
    """One audit record per cell (and column name, row 0) the spreadsheet outputs escape."""
    out: list[dict[str, object]] = []
    for i in needs_escape_any([str(c) for c in cleaned.columns]):
        name = str(cleaned.columns[i])
        out.append({"row": 0, "respondent": "", "item": "", "column": name, "old_value": name,
                    "new_value": escape(name), "check": SHEET_ESCAPE, "reason": ESCAPE_REASON})
    for col in cleaned.columns:
        cells = cleaned[col].astype(str).tolist()
        for r in needs_escape_any(cells):
            if kept[r]:
                out.append({"row": r + 1, "respondent": ids[r], "item": "", "column": str(col), "old_value": cells[r],
                            "new_value": escape(cells[r]), "check": SHEET_ESCAPE, "reason": ESCAPE_REASON})
    return out


def reverse_audit(cleaned: pd.DataFrame, audit: pd.DataFrame, added: Sequence[str] = ()) -> pd.DataFrame:
    """Undo every change in `audit`: put removed respondents back at their rows and old
    values back in their cells. Gives the original export's cells exactly. `added` names
    columns the cleaner appended (summary.json's `added_columns`), dropped first."""
    cleaned = cleaned.drop(columns=[c for c in added if c in cleaned.columns])
    audit = audit.astype({"row": int})
    header = audit[audit["row"] == 0]
    names = {str(new): str(old) for old, new in zip(header["old_value"], header["new_value"], strict=True)}
    cleaned = cleaned.rename(columns=lambda c: names.get(str(c), c))
    audit = audit[audit["row"] != 0]
    removals = audit[audit["column"].fillna("") == ""]
    changes = audit[audit["column"].fillna("") != ""]
    removed_at = {int(r): json.loads(v) for r, v in zip(removals["row"], removals["old_value"], strict=True)}
    total = len(cleaned) + len(removed_at)
    rows: list[dict[str, str]] = []
    kept_iter = iter([{str(k): v for k, v in r.items()} for r in cleaned.to_dict(orient="records")])
    for r in range(1, total + 1):
        rows.append(removed_at[r] if r in removed_at else next(kept_iter))
    out = pd.DataFrame(rows, columns=list(cleaned.columns))
    for r, col, old in zip(changes["row"], changes["column"], changes["old_value"], strict=True):
        out.at[int(r) - 1, col] = "" if pd.isna(old) else str(old)
    return out
