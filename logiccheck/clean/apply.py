"""Apply a policy: blank cells, remove respondents, and record every change."""

from __future__ import annotations

import json
from dataclasses import dataclass, field

import numpy as np
import pandas as pd

from logiccheck.clean.policy import CleanPolicy
from logiccheck.clean.sheet import ESCAPE_REASON, SHEET_ESCAPE, escape, needs_escape_any
from logiccheck.model.questionnaire import Questionnaire
from logiccheck.quality.run import QualityResult

AUDIT_COLUMNS = ["row", "respondent", "item", "column", "old_value", "new_value", "check", "reason"]
# For these checks a removal keeps the first case of each group and removes the later copies.
_KEEP_FIRST = ("duplicate-id", "duplicate-response", "near-duplicate")


@dataclass
class CleanOutcome:
    cleaned: pd.DataFrame
    audit: pd.DataFrame
    removed: dict[str, int] = field(default_factory=dict)  # reason (check) -> respondents
    blanked: dict[str, int] = field(default_factory=dict)  # check -> cells


def _condition_text(q: Questionnaire, item: str) -> str:
    entry = q.symbols[item]
    parts = []
    for cond in entry.conditions():
        s = cond.span
        line = q.source_line(s.line)
        end = s.end_column if s.end_line == s.line and s.end_column else len(line) + 1
        parts.append(line[s.column - 1 : end - 1].strip())
    return " and ".join(f"({p})" if len(parts) > 1 else p for p in parts)


def _removals(q: Questionnaire, result: QualityResult, policy: CleanPolicy) -> dict[int, tuple[str, str]]:
    """Row → (check, reason) for every respondent the policy removes (first reason wins)."""
    out: dict[int, tuple[str, str]] = {}
    drops = set(policy.drops)
    ids = result.state.ids
    first_of_id: dict[str, int] = {}
    for r, rid in enumerate(ids):
        first_of_id.setdefault(rid, r)
    for f in result.findings:
        if f.check not in drops or f.row in out:
            continue
        if f.check == "duplicate-id" and first_of_id[f.respondent] == f.row:
            continue
        if f.check == "duplicate-response" and isinstance(f.value, int) and f.value == f.row:
            continue
        if f.check == "near-duplicate" and result.match is not None and result.match.partner[f.row] > f.row:
            continue
        out[f.row] = (f.check, f"respondent removed by policy ({f.check}): {f.message}")
    if "check-failed" in drops:
        for name, failed in result.state.checks_failed.items():
            for r in np.flatnonzero(failed):
                out.setdefault(int(r), ("check-failed", f"respondent removed by policy (check-failed): fails check {name}"))
    if policy.keep_dispositions is not None:
        keep = set(policy.keep_dispositions)
        for r, d in enumerate(result.dispositions.to_numpy()):
            if d not in keep:
                out.setdefault(r, ("disposition", f"respondent removed by policy: disposition {d} is not kept"))
    return out


def apply_policy(
    q: Questionnaire, frame: pd.DataFrame, result: QualityResult, policy: CleanPolicy, markers: set[str] | None = None
) -> CleanOutcome:
    """`frame` holds the export's cells as text ("" = empty); it is not modified. Cells
    whose trimmed text is in `markers` (blank / not-shown markers) are left alone."""
    markers = markers or {""}
    state = result.state
    cleaned = frame.copy()
    records: list[dict[str, object]] = []
    removed_rows = _removals(q, result, policy)
    kept = np.ones(len(frame), bool)
    kept[list(removed_rows)] = False
    blanked: dict[str, int] = {}
    for j, item in enumerate(state.items):
        for col in state.columns.get(item, []):
            if col not in frame.columns:
                continue
            cells = frame[col].to_numpy(dtype=object)
            nonempty = np.array([str(c).strip() not in markers for c in cells], dtype=bool)
            todo: list[tuple[np.ndarray, str, str]] = []
            if policy.blank_out_of_path:
                cond = _condition_text(q, item)
                why = f"the routing did not ask {item}" + (f" (condition: {cond})" if cond else "") + " or an earlier stop or skip applied"
                todo.append((nonempty & ~state.due[:, j], "out-of-path", why))
            if policy.blank_invalid:
                todo.append((nonempty & state.due[:, j] & state.has_value[:, j] & ~state.valid[:, j], "invalid-value",
                             f"not a valid answer to {item}"))
            done = np.zeros(len(frame), bool)
            for mask, check, why in todo:
                rows = np.flatnonzero(mask & kept & ~done)
                done |= mask
                for r in rows:
                    records.append({"row": int(r) + 1, "respondent": state.ids[r], "item": item, "column": col,
                                    "old_value": str(cells[r]), "new_value": "", "check": check, "reason": why})
                if len(rows):
                    cleaned.iloc[rows, cleaned.columns.get_loc(col)] = ""
                    blanked[check] = blanked.get(check, 0) + len(rows)
    if policy.sheet_safe:
        records += _escape_records(cleaned, kept, state.ids)
    removed: dict[str, int] = {}
    for r, (check, why) in sorted(removed_rows.items()):
        original = {c: str(v) for c, v in frame.iloc[r].items()}
        records.append({"row": r + 1, "respondent": state.ids[r], "item": "", "column": "",
                        "old_value": json.dumps(original, ensure_ascii=False), "new_value": "", "check": check,
                        "reason": why})
        removed[check] = removed.get(check, 0) + 1
    cleaned = cleaned.iloc[np.flatnonzero(kept)].reset_index(drop=True)
    audit = pd.DataFrame(records, columns=AUDIT_COLUMNS)
    if len(audit):
        audit = audit.sort_values(["row", "column"], kind="stable").reset_index(drop=True)
    return CleanOutcome(cleaned, audit, removed, blanked)


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


def reverse_audit(cleaned: pd.DataFrame, audit: pd.DataFrame) -> pd.DataFrame:
    """Undo every change in `audit`: put removed respondents back at their rows and old
    values back in their cells. Gives the original export's cells exactly."""
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
    kept_iter = iter(cleaned.to_dict(orient="records"))
    for r in range(1, total + 1):
        rows.append(removed_at[r] if r in removed_at else next(kept_iter))
    out = pd.DataFrame(rows, columns=list(cleaned.columns))
    for r, col, old in zip(changes["row"], changes["column"], changes["old_value"], strict=True):
        out.at[int(r) - 1, col] = "" if pd.isna(old) else str(old)
    return out
