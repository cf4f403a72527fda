"""Every quality check over one export, in one call: findings, dispositions, measures."""

from __future__ import annotations

from dataclasses import dataclass, field

import numpy as np
import pandas as pd

from logiccheck.model.questionnaire import Questionnaire
from logiccheck.quality import careless, completeness, duplicates
from logiccheck.quality.bridge import route_state
from logiccheck.quality.config import QualityConfig
from logiccheck.quality.findings import Finding
from logiccheck.quality.route import RouteState

# Item kinds whose answers are compared for duplicates (free text is not).
_COMPARED = ("single", "multi", "number", "decimal")


@dataclass
class QualityResult:
    state: RouteState
    findings: list[Finding]
    dispositions: pd.Series  # index: respondent id
    measures: pd.DataFrame
    match: duplicates.MatchScores | None = None
    notes: list[str] = field(default_factory=list)

    def counts(self) -> dict[str, int]:
        out: dict[str, int] = {}
        for f in self.findings:
            out[f.check] = out.get(f.check, 0) + 1
        return dict(sorted(out.items()))

    def disposition_counts(self) -> dict[str, int]:
        return {str(k): int(v) for k, v in self.dispositions.value_counts().sort_index().items()}


def compared_answers(q: Questionnaire, state: RouteState, frame: pd.DataFrame) -> tuple[pd.DataFrame, np.ndarray]:
    """The substantive answer columns and, per column, whether the routing asked it."""
    cols: list[str] = []
    asked: list[np.ndarray] = []
    for j, name in enumerate(state.items):
        if q.symbols[name].stmt.type.kind not in _COMPARED:
            continue
        for c in state.columns[name]:
            cols.append(c)
            asked.append(state.due[:, j])
    data = pd.DataFrame(
        {c: pd.to_numeric(frame[c], errors="coerce") if c in frame.columns else np.nan for c in cols},
        index=frame.index,
    ).reset_index(drop=True)
    return data, (np.stack(asked, axis=1) if asked else np.zeros((len(frame), 0), bool))


def grid_values(q: Questionnaire, state: RouteState, frame: pd.DataFrame, grid: str) -> pd.DataFrame:
    """A grid's rows as columns, substantive valid answers where due (others blank)."""
    rows = [e.name for e in q.entries if e.is_item and e.grid is not None and e.grid.name == grid]
    out = {}
    for r in rows:
        j = state.col(r)
        v = pd.to_numeric(frame[r], errors="coerce").to_numpy(dtype=float) if r in frame.columns else np.full(len(frame), np.nan)
        keep = state.due[:, j] & state.valid[:, j] & ~state.nonresponse[:, j]
        out[r] = np.where(keep, v, np.nan)
    return pd.DataFrame(out)


def run_quality(
    q: Questionnaire,
    frame: pd.DataFrame,
    config: QualityConfig | None = None,
    sample_frame: pd.DataFrame | None = None,
    id_column: str = "id",
    state: RouteState | None = None,
    dispositions: pd.Series | None = None,
) -> QualityResult:
    """`dispositions`: computed once by the pipeline (else here, by the configured rule)."""
    config = config or QualityConfig()
    state = state or route_state(q, frame, id_column)
    ids = state.ids
    found: list[Finding] = []
    notes: list[str] = []
    found += duplicates.duplicate_ids(ids)
    answers, asked = compared_answers(q, state, frame)
    dc = config.duplicates
    exact = duplicates.duplicate_responses(ids, answers, min_answered=min(dc.exact_min_answered, max(1, answers.shape[1])))
    found += exact
    match = None
    work = near_duplicate_work(answers)
    if len(frame) > dc.near_max_respondents:
        notes.append(
            f"near-duplicate not checked: {len(frame)} respondents is above "
            f"[quality.duplicates] near_max_respondents = {dc.near_max_respondents} (the cost grows with the square)"
        )
    elif work > dc.near_max_work:
        notes.append(
            f"near-duplicate not checked: {len(frame)} respondents × {answers.shape[1]} items with many "
            f"distinct answers is about {work:.1e} units of work, above [quality.duplicates] "
            f"near_max_work = {dc.near_max_work:.1e}; raise it to run the check anyway"
        )
    elif answers.shape[1] and len(frame) > 1:
        match = duplicates.max_percent_match(
            answers, asked if dc.near_basis == "asked" else None, basis=dc.near_basis,
            min_items=min(dc.near_min_items, answers.shape[1]), chunk_size=dc.chunk_size,
        )
        found += duplicates.near_duplicates(ids, match, dc.near_threshold, exclude={(f.row or 1) - 1 for f in exact})
    for grid in q.grids:
        found += careless.grid_findings(ids, grid, grid_values(q, state, frame, grid), config.careless)
    if config.speed.duration_column in frame.columns:
        found += careless.speeders(ids, frame[config.speed.duration_column], config.speed)
    else:
        notes.append(f"no `{config.speed.duration_column}` column: speeders not checked")
    if sample_frame is not None:
        fc = config.frame
        emails = frame[fc.email_column].tolist() if fc.email_column in frame.columns else None
        found += careless.not_in_frame(ids, emails, sample_frame, fc.id_column, fc.email_column)
    table = completeness.measures(q, state, config.completeness)
    disp = dispositions if dispositions is not None else completeness.dispositions(q, state, config.completeness)
    found.sort(key=lambda f: (f.row or 0, f.check))
    return QualityResult(state, found, disp, table, match, notes)


def near_duplicate_work(answers: pd.DataFrame) -> float:
    """Pairs to compare × one-hot width (distinct answers per item, blank included): what
    the near-duplicate matrix products cost."""
    n = len(answers)
    width = sum(int(answers[c].nunique(dropna=False)) for c in answers.columns)
    return n * (n - 1) / 2 * width
