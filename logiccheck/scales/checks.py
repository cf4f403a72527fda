"""Data and quality checks on scales, and the "scales" analysis (JSON section, score
columns, summary keys). All read the statistics `compute.scale_results` makes once per run."""

from __future__ import annotations

from collections.abc import Iterator
from typing import TYPE_CHECKING

import numpy as np

from logiccheck.checks.analyses import Analysis, analysis
from logiccheck.checks.registry import data_check
from logiccheck.data.findings import Hits
from logiccheck.scales.compute import scale_results
from logiccheck.scales.examples import AGREE5
from logiccheck.scales.stats import opposite_ends

if TYPE_CHECKING:
    from logiccheck.checks.data_context import DataContext

# Alpha below this is "low": the usual rule of thumb (common practice, no source).
ALPHA_FLOOR = 0.7
# An item whose removal raises alpha by at least this much does not fit (common practice, no source).
MISFIT_RISE = 0.05

_SCALE_SPEC = AGREE5 + '''svc_time: single agree5 "I was served quickly."
svc_help: single agree5 "Staff were helpful."
svc_rude: single agree5 "Staff were rude."
'''


def _fmt(x: float | None) -> str:
    return "n/a" if x is None else f"{x:.2f}"


@data_check(
    "low-reliability",
    severity="warning",
    stage="quality",
    summary="A scale's items hang together too loosely for a composite score (alpha below 0.7).",
    what="Cronbach's alpha of a scale, on the respondents who answered every item (reversed "
    "items turned round), is below 0.7 — the usual rule of thumb, not a law. One finding per "
    "scale, with alpha, its 95 % interval and how many respondents it rests on.",
    why="A composite of items that do not measure one thing is mostly noise: its score moves "
    "with wording, not with the theme, and differences between groups are blurred.",
    bad=_SCALE_SPEC + 'scale service "Service" min 2\n  svc_time\n  svc_help\n'
    "# in the data, speed and helpfulness are unrelated: alpha 0.2",
    good=_SCALE_SPEC + 'scale service "Service" min 2\n  svc_help\n  svc_rude reversed\n'
    "# helpful and (turned round) rude move together: alpha 0.85",
)
def low_reliability(ctx: DataContext) -> Iterator[Hits]:
    for name, res in scale_results(ctx).items():
        rel = res.reliability
        if rel.alpha is None:
            ctx.notes.append(f"scale `{name}`: alpha not computed ({rel.n} respondents answered every item)")
            continue
        if rel.alpha < ALPHA_FLOOR:
            lo, hi = rel.alpha_ci or (None, None)
            yield Hits(
                rows=np.zeros(0, np.int64),
                item=name,
                message=f"scale `{name}`: Cronbach's alpha {rel.alpha:.3f} (95 % interval {_fmt(lo)} to {_fmt(hi)}, "
                f"n = {rel.n}) is below {ALPHA_FLOOR}, the usual rule of thumb; see which items lower it (scale-misfit)",
            )


@data_check(
    "scale-misfit",
    severity="warning",
    stage="quality",
    summary="An item does not fit its scale: negative item-total correlation, or alpha rises by 0.05 without it.",
    what="An item whose corrected item-total correlation (with the sum of the other items) is "
    "negative — usually a reversed item not marked `reversed` in the spec — or whose removal "
    "raises the scale's alpha by 0.05 or more.",
    why="A misfitting item pulls the composite away from the theme; an unmarked reversed item "
    "even cancels the others out, so the score means less than it seems.",
    bad=_SCALE_SPEC + 'scale service "Service"\n  svc_time\n  svc_help\n  svc_rude\n'
    "# svc_rude is worded the other way round but not marked",
    good=_SCALE_SPEC + 'scale service "Service"\n  svc_time\n  svc_help\n  svc_rude reversed',
)
def scale_misfit(ctx: DataContext) -> Iterator[Hits]:
    for name, res in scale_results(ctx).items():
        rel = res.reliability
        for i, member in enumerate(res.scale.items):
            r = rel.item_total[i]
            without = rel.alpha_if_deleted[i]
            if r is not None and r < 0:
                hint = (" It is marked `reversed`: check the marking and the item's coding." if member.reversed
                        else " Usually a reversed item: mark it `reversed` in the scale if its wording runs the other way.")
                message = f"scale `{name}`: `{member.name}` correlates negatively with the other items (item-total {r:.3f}).{hint}"
            elif without is not None and rel.alpha is not None and without - rel.alpha >= MISFIT_RISE:
                message = (f"scale `{name}`: without `{member.name}` alpha rises from {rel.alpha:.3f} to {without:.3f} "
                           f"(item-total {_fmt(r)}); the item may measure something else")
            else:
                continue
            yield Hits(rows=np.zeros(0, np.int64), item=member.name, message=message)


@data_check(
    "inconsistent-answers",
    severity="warning",
    stage="quality",
    summary="A respondent's answers to two items of one scale sit at opposite ends of the answer list.",
    what="After reversal, one item of a scale answered with the first option (or the low end of "
    "the range) and another with the last: for example \"strongly agree\" that staff were "
    "helpful and \"strongly agree\" that staff were rude. One finding per respondent and scale, "
    "naming the first such pair.",
    why="Contradicting oneself within one theme is a classic sign of careless responding "
    "(answering without reading); such respondents blur every composite they enter.",
    bad=_SCALE_SPEC + 'scale service "Service"\n  svc_help\n  svc_rude reversed\n'
    "# a respondent answers sa to both: helpful 5, rude 5 → 1 after reversal",
    good=_SCALE_SPEC + 'scale service "Service"\n  svc_help\n  svc_rude reversed\n'
    "# helpful 5, rude 1 → 5 after reversal: consistent",
)
def inconsistent_answers(ctx: DataContext) -> Iterator[Hits]:
    for name, res in scale_results(ctx).items():
        rows, first_low, first_high = opposite_ends(res.points, float(res.answers.steps))
        if not rows.size:
            continue
        items = res.items
        messages = []
        for a, b in zip(first_low.tolist(), first_high.tolist(), strict=True):
            x, y = sorted((a, b))
            messages.append(f"scale `{name}`: `{items[x]}` and `{items[y]}` are answered at opposite ends "
                            f"of the answer list{_after(res.scale, (items[x], items[y]))}")
        item = [items[min(a, b)] for a, b in zip(first_low.tolist(), first_high.tolist(), strict=True)]
        # One block per first item, so each finding names the item it starts from.
        for first in sorted(set(item), key=items.index):
            pick = np.array([k for k, it in enumerate(item) if it == first])
            yield Hits(rows=rows[pick], item=first, message=[messages[k] for k in pick])


def _after(scale: object, pair: tuple[str, str]) -> str:
    marked = [m.name for m in getattr(scale, "items", []) if m.reversed and m.name in pair]
    return " (after reversing " + ", ".join(f"`{m}`" for m in marked) + ")" if marked else ""


@analysis("scales")
def scales_analysis(ctx: DataContext) -> Analysis | None:
    """validate's "scales" section, clean's `score_NAME` columns and the scoring rules."""
    if not ctx.q.scales:
        return None
    results = scale_results(ctx)
    return Analysis(
        sections={"scales": [res.to_json() for res in results.values()]},
        columns={res.column: res.score for res in results.values()},
        summary={"scales": {res.column: res.rule() for res in results.values()}},
    )
