"""Each scale's statistics and composite scores, computed once per run from the pipeline's
context and shared (through `ctx.memo`) by the scale checks and the "scales" analysis."""

from __future__ import annotations

from dataclasses import dataclass
from typing import TYPE_CHECKING, Any

import numpy as np

from logiccheck.model import nodes as n
from logiccheck.scales.answers import Answers, scale_answers
from logiccheck.scales.stats import Reliability, proportional_score, reliability, top_box_score

if TYPE_CHECKING:
    from logiccheck.checks.data_context import DataContext

MEMO_KEY = "scales"


@dataclass
class ScaleResult:
    scale: n.Scale
    answers: Answers
    points: np.ndarray  # respondents × items: positions after reversal, NaN = no answer
    reliability: Reliability
    score: np.ndarray  # composite per respondent, NaN = not scored

    @property
    def items(self) -> list[str]:
        return [m.name for m in self.scale.items]

    @property
    def column(self) -> str:
        return f"score_{self.scale.name}"

    def rule(self) -> str:
        """The scoring rule in words, for summaries and reports."""
        s = self.scale
        need = f"at least {s.min_answered} of {len(s.items)} items answered"
        if s.top is not None:
            return f"share of answered items in the top {s.top} options (after reversal), {need}"
        return f"mean of proportional item scores 0..1 (after reversal), {need}"

    def to_json(self) -> dict[str, Any]:
        rel = self.reliability
        scored = self.score[~np.isnan(self.score)]
        return {
            "scale": self.scale.name,
            "title": self.scale.title,
            "items": self.items,
            "reversed": [m.name for m in self.scale.items if m.reversed],
            "n": rel.n,
            "alpha": rel.alpha,
            "alpha_ci": list(rel.alpha_ci) if rel.alpha_ci is not None else None,
            "alpha_if_deleted": dict(zip(self.items, rel.alpha_if_deleted, strict=True)),
            "item_total": dict(zip(self.items, rel.item_total, strict=True)),
            "scored": int(scored.size),
            "mean": float(scored.mean()) if scored.size else None,
            "sd": float(scored.std(ddof=1)) if scored.size > 1 else None,
            "min": self.scale.min_answered,
            "score_top": self.scale.top,
            "column": self.column,
            "rule": self.rule(),
        }


def item_points(ctx: DataContext, answers: Answers, member: n.ScaleItem) -> np.ndarray:
    """One item's positions after reversal; blanks, invalid cells and non-response codes are NaN."""
    j = ctx.col(member.name)
    answered = ctx.valid[:, j] & ~ctx.nonresponse[:, j]
    values = np.where(answered, ctx.value_of(member.name), np.nan)
    return answers.positions(values, member.reversed)


def compute_scale(ctx: DataContext, scale: n.Scale, answers: Answers) -> ScaleResult:
    points = np.column_stack([item_points(ctx, answers, m) for m in scale.items]) if scale.items else np.zeros((ctx.n, 0))
    steps = float(answers.steps)
    if scale.top is not None:
        score = top_box_score(points, steps, scale.top, scale.min_answered)
    else:
        score = proportional_score(points, steps, scale.min_answered)
    return ScaleResult(scale, answers, points, reliability(points), score)


def scale_results(ctx: DataContext) -> dict[str, ScaleResult]:
    """Every scorable scale of the spec, computed on the first call of a run."""
    if MEMO_KEY in ctx.memo:
        return ctx.memo[MEMO_KEY]
    out: dict[str, ScaleResult] = {}
    known = set(ctx.items)
    for scale in ctx.q.scales.values():
        answers, _ = scale_answers(ctx.q, scale)
        if answers is None:
            ctx.notes.append(f"scale `{scale.name}` is not scored: its items do not share one answer list (see lint)")
            continue
        missing = [m.name for m in scale.items if m.name not in known]
        if missing:
            ctx.notes.append(f"scale `{scale.name}` is not scored: the export has no column for {', '.join(missing)}")
            continue
        out[scale.name] = compute_scale(ctx, scale, answers)
    ctx.memo[MEMO_KEY] = out
    return out
