"""The quality checks as units: each reads only the pipeline's `DataContext` and yields
`Hits`; its name, severity and docs are declared beside its code.

Thresholds live in `[quality]` (`quality/config.py`, with where each default comes from).
"""

from __future__ import annotations

from collections.abc import Iterator

import numpy as np
import pandas as pd

from logiccheck.checks.data_context import DataContext
from logiccheck.checks.registry import data_check
from logiccheck.data.findings import Hits
from logiccheck.quality.answers import answer_codes
from logiccheck.quality.careless import (
    GridFlags,
    cycle_text,
    frame_flags,
    frame_message,
    grid_flags,
    speed_flags,
    straightline_message,
)
from logiccheck.quality.config import QualityConfig
from logiccheck.quality.duplicates import group_messages, id_groups
from logiccheck.quality.nearmatch import (
    Coverage,
    Pairs,
    against_all,
    best_partners,
    column_labels,
    exact_groups,
    near_pairs,
)

# Dispositions whose interview length is compared; screen-outs and break-offs end early
# because the routing (or the respondent) ended them, so they are never speeders.
TIMED = ("complete", "partial")


def _config(ctx: DataContext) -> QualityConfig:
    return ctx.config if isinstance(ctx.config, QualityConfig) else QualityConfig()


def _ids(ctx: DataContext) -> list[str]:
    return [str(i) for i in ctx.ids.tolist()]


def _exact(ctx: DataContext) -> list[np.ndarray]:
    """Groups of identical answer vectors, computed once per run."""
    groups = ctx.memo.get("quality.exact")
    if groups is None:
        dc = _config(ctx).duplicates
        groups = exact_groups(answer_codes(ctx).codes, dc.exact_min_answered)
        ctx.memo["quality.exact"] = groups
    return list(groups)


@data_check(
    "duplicate-id",
    severity="error",
    stage="quality",
    summary="The same respondent id appears on more than one row.",
    what="Every row whose id is shared with another row of the export. Each finding names up to five of the "
    "other rows and counts the rest, so a file in which thousands of rows share one id stays readable.",
    why="Merged files, re-imports and re-opened interviews duplicate cases; every count and rate is then off, "
    "and answers cannot be traced to one sampled case.",
    bad="id,age\n1007,34\n1007,35",
    good="id,age\n1007,34\n1008,35",
)
def duplicate_id(ctx: DataContext) -> Iterator[Hits]:
    ids = _ids(ctx)
    rows: list[int] = []
    messages: list[str] = []
    for group in id_groups(ctx.ids):
        rid = ids[int(group[0])]
        rows += group.tolist()
        messages += group_messages(group, lambda o: f"row {o + 1}", f"id {rid} appears on {{count}} rows; also on {{others}}")
    if rows:
        yield Hits(rows=np.array(rows, np.int64), message=messages)


@data_check(
    "duplicate-response",
    severity="warning",
    stage="quality",
    summary="Two or more respondents gave identical substantive answers, blanks in the same places.",
    what="Respondents with at least `[quality.duplicates] exact_min_answered` answers (default 10; common "
    "practice, no source) whose answers to the compared items (single, number, decimal and multi items; "
    "non-response codes count as answers, free text is not compared) equal another respondent's on every "
    "item, with the same items blank. Found by hashing each respondent's answers once, so the cost grows "
    "with the number of respondents, not its square. Each finding names up to five of the copies.",
    why="An exact copy is rarely chance: a record entered twice, a fabricated interview, or one person "
    "answering twice. Whether to drop it is the study's decision; this check only points at it.",
    bad="id,q1,...,q10\n11,2,5,1,4,4,3,2,5,1,1\n12,2,5,1,4,4,3,2,5,1,1",
    good="id,q1,...,q10\n11,2,5,1,4,4,3,2,5,1,1\n12,3,5,1,4,2,3,2,5,4,1",
)
def duplicate_response(ctx: DataContext) -> Iterator[Hits]:
    ids = _ids(ctx)
    answered = answer_codes(ctx).answered
    rows: list[int] = []
    messages: list[str] = []
    for group in _exact(ctx):
        count = int(answered[group[0]])
        rows += group.tolist()
        messages += group_messages(group, lambda o: ids[o], f"the same {count} answers (and the same blanks) as respondent {{others}}")
    if rows:
        yield Hits(rows=np.array(rows, np.int64), message=messages)


@data_check(
    "near-duplicate",
    severity="warning",
    stage="quality",
    summary="A respondent's answers match another respondent's on more than the threshold share "
    "(default 85 %) of the items both answered.",
    what="For each pair of respondents, the share of items BOTH answered on which they give the same answer "
    "(the maximum percent match of Kuriakose & Robbins 2016, who flag above 85 %). Non-response codes count "
    "as answers; blanks never match, so two break-offs or two people routed past the same section do not "
    "look alike; free text is not compared. A pair is scored only when it shares at least "
    "`[quality.duplicates] near_min_items` answered items (default 10; common practice, no source), so a "
    "respondent with fewer answers is never flagged. Every pair above `near_threshold` is found exactly "
    "without comparing all pairs: items are split into blocks of at most 2 / (1 - threshold) items (13 at "
    "85 %), and a pair above the threshold must, in some block, agree on all but at most one of the items "
    "both answered (a pigeonhole argument, as in multi-index hashing: Norouzi, Punjani & Fleet 2014), so "
    "only pairs that meet in some block are compared. The search spends at most `near_search_budget` "
    "candidate pairs per respondent (default 10; 0 = no limit); answers with little spread can need more, and "
    "the run then says in a note which blocks were left out and estimates the maximum percent match on 10 "
    "respondents drawn at random. Respondents reported as `duplicate-response` are left to that check.",
    why="Near-copies point at interviews fabricated by editing a real one.",
    bad="two respondents agreeing on 18 of the 20 items both answered (90 %)",
    good="two respondents agreeing on 7 of the 20 items both answered (35 %), as chance gives on five-point items",
)
def near_duplicate(ctx: DataContext) -> Iterator[Hits]:
    dc = _config(ctx).duplicates
    answers = answer_codes(ctx)
    # Items asked of the same respondents are blocked together (speed only).
    groups = column_labels(ctx.due[:, [ctx.col(name) for name in answers.items]])
    # Small exports are always searched completely: the floor costs about half a second.
    budget = max(dc.near_search_budget * ctx.n, NEAR_MIN_BUDGET) if dc.near_search_budget else None
    coverage = Coverage(budget=budget)
    pairs = near_pairs(answers.codes, dc.near_threshold, dc.near_min_items, groups, coverage)
    if not coverage.complete:
        pairs = _with_sample(ctx, answers.codes, pairs, coverage)
    best = best_partners(pairs, ctx.n)
    ctx.memo["quality.near"] = best
    ctx.memo["quality.near_coverage"] = coverage
    flagged = best.partner >= 0
    for group in _exact(ctx):
        flagged[group] = False
    rows = np.flatnonzero(flagged)
    if rows.size == 0:
        return
    ids = _ids(ctx)
    messages = [
        f"{100 * best.score[r]:.1f} % of the {best.compared[r]} items both answered match respondent "
        f"{ids[best.partner[r]]} (row {best.partner[r] + 1})"
        for r in rows.tolist()
    ]
    yield Hits(rows=rows, message=messages, values=[f"{best.score[r]:.4f}" for r in rows.tolist()])


# The budget never falls below this many candidate pairs, so an export of a few thousand
# respondents is searched completely whatever its answers.
NEAR_MIN_BUDGET = 1_000_000

# Respondents whose maximum percent match is computed directly, against everyone, when
# the exact search did not finish within its budget (the estimate is said to be one).
NEAR_SAMPLE = 10


def _with_sample(ctx: DataContext, codes: np.ndarray, pairs: Pairs, coverage: Coverage) -> Pairs:
    """Add a sample estimate to an incomplete search: NEAR_SAMPLE respondents compared
    with everyone (exactly), their pairs above the threshold added to `pairs`, and a note
    saying what was not searched and what the sample shows."""
    dc = _config(ctx).duplicates
    eligible = np.flatnonzero((codes != 0).sum(axis=1) >= dc.near_min_items)
    rng = np.random.default_rng(0)  # a fixed seed: the same export gives the same note
    sample = np.sort(rng.choice(eligible, size=min(NEAR_SAMPLE, eligible.size), replace=False))
    best_scores: list[float] = []
    extra: list[tuple[np.ndarray, ...]] = []
    for r in sample.tolist():
        others = eligible[eligible != r]
        compared, matched = (x[others] for x in against_all(codes, r))
        ok = compared >= dc.near_min_items
        if not ok.any():
            continue
        score = matched / np.maximum(compared, 1)
        best_scores.append(float(score[ok].max()))
        above = ok & (score > dc.near_threshold)
        if above.any():
            o = others[above]
            extra.append((np.minimum(o, r), np.maximum(o, r), compared[above], matched[above]))
    if extra:
        parts = [(pairs.a, pairs.b, pairs.compared, pairs.matched), *extra]
        a, b, c, m = (np.concatenate(column) for column in zip(*parts, strict=True))
        key = a * ctx.n + b
        _, first = np.unique(key, return_index=True)
        pairs = Pairs(a[first], b[first], c[first], m[first])
    ctx.notes.append(_coverage_note(ctx, coverage, sample.size, best_scores))
    return pairs


def _coverage_note(ctx: DataContext, coverage: Coverage, sampled: int, scores: list[float]) -> str:
    dc = _config(ctx).duplicates
    items = answer_codes(ctx).items
    cols = sorted({int(c) for part in coverage.skipped for c in part.tolist()})
    shown = ", ".join(items[c] for c in cols[:5]) + (f" and {len(cols) - 5} more" if len(cols) > 5 else "")
    share = f"{100 * dc.near_threshold:g} %"
    if scores:
        arr = np.array(scores)
        above = int((arr > dc.near_threshold).sum())
        estimate = (f"maximum percent match of {len(scores)} respondents drawn at random, each compared with "
                    f"everyone: median {100 * float(np.median(arr)):.0f} %, highest {100 * float(arr.max()):.0f} % "
                    f"({above} above {share}; those are reported)")
    else:
        estimate = f"none of the {sampled} respondents drawn at random shares {dc.near_min_items} answered items with anyone"
    return (f"near-duplicate: the exact search stopped at its budget of {dc.near_search_budget} candidate pairs per "
            f"respondent ([quality.duplicates] near_search_budget; 0 searches everything): {len(coverage.skipped)} "
            f"block(s) of items were not fully searched ({shown}), where chance agreement alone would make at least "
            f"{coverage.skipped_pairs:,} candidate pairs (answers with little spread, or many different answered "
            f"patterns). Pairs above {share} that agree closely only there may be missed. Estimate: {estimate}.")


def _grid(ctx: DataContext, grid: str) -> tuple[np.ndarray, GridFlags]:
    """A grid's answers and flags, computed once per run for both grid checks."""
    key = f"quality.grid.{grid}"
    if key not in ctx.memo:
        values = _grid_values(ctx, grid)
        ctx.memo[key] = (values, grid_flags(values, _config(ctx).careless))
    values, flags = ctx.memo[key]
    return values, flags


def _grid_values(ctx: DataContext, grid: str) -> np.ndarray:
    """A grid's rows as columns: substantive, valid answers where due; NaN elsewhere."""
    names = [e.name for e in ctx.q.entries if e.is_item and e.grid is not None and e.grid.name == grid]
    out = np.full((ctx.n, len(names)), np.nan)
    for k, name in enumerate(names):
        j = ctx.col(name)
        keep = ctx.due[:, j] & ctx.valid[:, j] & ~ctx.nonresponse[:, j]
        out[:, k] = np.where(keep, np.asarray(ctx.value_of(name), dtype=float), np.nan)
    return out


@data_check(
    "straightline",
    severity="warning",
    stage="quality",
    summary="A grid answered with (nearly) the same answer on every row.",
    what="Grids where a respondent's substantive answers (where asked; non-response codes left out) have a "
    "standard deviation at or below `[quality.careless] straightline_sd` (default 0) or the longest run of "
    "identical answers covers at least `longest_run_share` of the answered rows (default: all), among "
    "respondents with at least `min_rows` answered rows (default 4); the standard deviation and the longest "
    "run are shown. Thresholds: common practice, no source.",
    why="Giving one answer down a grid is a common sign of inattention; the answers then carry no "
    "information about the statements.",
    bad="docks: 4, 4, 4, 4, 4, 4",
    good="docks: 4, 2, 5, 4, 3, 4",
)
def straightline(ctx: DataContext) -> Iterator[Hits]:
    for grid in ctx.q.grids:
        _, flags = _grid(ctx, grid)
        rows = np.flatnonzero(flags.flat)
        if rows.size:
            messages = [straightline_message(grid, int(flags.answered[r]), float(flags.sd[r]), int(flags.longest_run[r]))
                        for r in rows.tolist()]
            yield Hits(rows=rows, message=messages, item=grid)


@data_check(
    "pattern-response",
    severity="warning",
    stage="quality",
    summary="A grid answered in a repeating cycle, such as 1-2-3-4-1-2-3-4 or a see-saw 1-5-1-5.",
    what="Grids whose answered rows repeat a cycle of 2 to `[quality.careless] pattern_max_period` answers "
    "(default 5; not all the same, which is `straightline`) over at least `pattern_min_length` rows "
    "(default 6) and at least two full cycles. Thresholds: common practice, no source.",
    why="Drawing a pattern through a grid is inattentive responding that a standard-deviation test misses.",
    bad="1, 5, 1, 5, 1, 5",
    good="1, 5, 2, 4, 4, 5",
)
def pattern_response(ctx: DataContext) -> Iterator[Hits]:
    for grid in ctx.q.grids:
        values, flags = _grid(ctx, grid)
        rows = np.flatnonzero(flags.period > 0)
        if rows.size:
            messages = []
            for r in rows.tolist():
                cycle, length = cycle_text(values[r], int(flags.period[r]))
                messages.append(f"grid {grid}: answers repeat the cycle {cycle} over {length} rows")
            yield Hits(rows=rows, message=messages, item=grid)


def duration_column(ctx: DataContext) -> str:
    """The configured duration column; a mapping's `duration` key names it when the
    configuration keeps the default."""
    column = _config(ctx).speed.duration_column
    mapped = getattr(ctx.mapping, "duration", None)
    return mapped if column == "duration" and isinstance(mapped, str) and mapped else column


@data_check(
    "speeder",
    severity="warning",
    stage="quality",
    summary="The interview was much faster per item asked than is usual (default: under a third of the median).",
    what="Compares like with like: each respondent's interview length (the duration column, in seconds) "
    "divided by the number of items the routing asked them, against the median of the same figure among "
    "respondents whose disposition is `complete` or `partial`. Below `[quality.speed] fraction_of_median` × "
    "that median (default 1/3) is a speeder. Screen-outs (a stop fired) and break-offs are never speeders: "
    "their interviews are short because the routing or the respondent ended them. The rule and the default "
    "are common practice, no source.",
    why="Nobody reads and answers the questions in a third of the usual time per question; the answers are "
    "unlikely to be considered ones.",
    bad="median 6 s per item asked among completes; a complete with 100 items asked in 150 s (1.5 s per item)",
    good="a screen-out asked 3 items in 40 s, or a complete with 100 items asked in 500 s (5 s per item)",
)
def speeder(ctx: DataContext) -> Iterator[Hits]:
    column = duration_column(ctx)
    texts = ctx.text_of(column)
    if texts is None:
        ctx.notes.append(f"no `{column}` column: speeders not checked")
        return
    seconds = pd.to_numeric(pd.Series(texts, dtype=object), errors="coerce").to_numpy(dtype=float)
    asked = ctx.due.sum(axis=1)
    eligible = np.isin(ctx.disposition.astype(str), TIMED)
    fraction = _config(ctx).speed.fraction_of_median
    flags = speed_flags(seconds, asked, eligible, fraction)
    rows = np.flatnonzero(flags.flag)
    if rows.size == 0:
        return
    messages = [
        f"{seconds[r]:g} s for {asked[r]} items asked ({flags.per_item[r]:.2f} s per item), under {fraction:.2f} × "
        f"the median {flags.median:.2f} s per item of completes and partials"
        for r in rows.tolist()
    ]
    yield Hits(rows=rows, message=messages, item=column, values=[f"{seconds[r]:g}" for r in rows.tolist()])


@data_check(
    "not-in-frame",
    severity="error",
    stage="quality",
    summary="A respondent's id (or e-mail) is not in the sample frame.",
    what="With a sample frame (`--frame FILE`: a CSV with column `id`, optionally `email`), respondents whose "
    "id is not in the frame, or whose e-mail is not, where both files have e-mails. E-mails are compared "
    "ignoring case and spaces.",
    why="A case that was never sampled (a forwarded link, a test interview, a typo in the id) does not "
    "belong to the sample the weights and rates describe.",
    bad="frame ids 1, 2, 3; export id 9",
    good="frame ids 1, 2, 3; export id 2",
)
def not_in_frame(ctx: DataContext) -> Iterator[Hits]:
    if ctx.sample_frame is None:
        return
    fc = _config(ctx).frame
    emails = ctx.text_of(fc.email_column)
    flags = frame_flags(ctx.ids, emails, ctx.sample_frame, fc.id_column, fc.email_column)
    rows = np.flatnonzero(flags.id_missing | flags.email_missing)
    if rows.size == 0:
        return
    ids = _ids(ctx)
    messages = [
        frame_message(ids[r], emails[r] if emails is not None else None, bool(flags.id_missing[r]), bool(flags.email_missing[r]))
        for r in rows.tolist()
    ]
    yield Hits(rows=rows, message=messages)
