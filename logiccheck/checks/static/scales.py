"""Scale checks that need no solver: items that cannot be scored together."""

from __future__ import annotations

from collections.abc import Iterable

from logiccheck.checks.context import LintContext
from logiccheck.checks.registry import register
from logiccheck.diagnostics import Diagnostic
from logiccheck.scales.answers import scale_answers
from logiccheck.scales.examples import AGREE5

_CODES = AGREE5 + '''codes yesno
  yes = 1 "Yes"
  no  = 2 "No"
'''


@register(
    "scale-mixed-answers",
    severity="error",
    stage="spec",
    summary="The items of a scale do not share one answer list or range, or one is not a single or number item.",
    what="A `scale` lists an item whose answer list (codes and their order) or number range "
    "differs from the first item's, or an item that is not `single` or `number` (a `multi`, "
    "`text`, `decimal` or `note` item, a derived value or a sample variable).",
    why="A composite averages positions on one shared answer list; items on different lists "
    "cannot be reversed or put on one 0..1 scale, so no score or alpha would mean anything.",
    bad=_CODES + 'staff_ok: single agree5 "Staff were helpful."\nclean_ok: single yesno "Was it clean?"\n'
    'scale service "Service"\n  staff_ok\n  clean_ok',
    good=_CODES + 'staff_ok: single agree5 "Staff were helpful."\nclean_ok: single agree5 "The station was clean."\n'
    'scale service "Service"\n  staff_ok\n  clean_ok',
)
def scale_mixed_answers(ctx: LintContext) -> Iterable[Diagnostic]:
    for scale in ctx.q.scales.values():
        _, problems = scale_answers(ctx.q, scale)
        for p in problems:
            yield ctx.diag("scale-mixed-answers", p.span, f"scale `{scale.name}`: {p.message}", item=p.item,
                           related=p.related)


@register(
    "scale-top-covers-all",
    severity="warning",
    stage="spec",
    summary="A scale's `score top K` counts every answer option, so every respondent scores 100 %.",
    what="A `scale` with `score top K` where K is at least the number of options its items "
    "share (the codes of their answer list, or every whole number of their range).",
    why="Top-box scoring counts the answers among the top K options; when those are all the "
    "options, every answer counts and each scored respondent gets 100 %, so the score tells "
    "nothing. K was probably meant to be smaller (often 1 or 2).",
    bad=AGREE5 + 'staff_kind: single agree5 "Staff were kind."\nstaff_fast: single agree5 "Staff were fast."\n'
    'scale staff "Staff" score top 5\n  staff_kind\n  staff_fast',
    good=AGREE5 + 'staff_kind: single agree5 "Staff were kind."\nstaff_fast: single agree5 "Staff were fast."\n'
    'scale staff "Staff" score top 2\n  staff_kind\n  staff_fast',
)
def scale_top_covers_all(ctx: LintContext) -> Iterable[Diagnostic]:
    for scale in ctx.q.scales.values():
        if scale.top is None or scale.top_span is None:
            continue
        shared, _ = scale_answers(ctx.q, scale)
        if shared is None:
            continue  # scale-mixed-answers (or unknown-name) speaks for the items
        options = shared.steps + 1
        if scale.top < options:
            continue
        yield ctx.diag(
            "scale-top-covers-all", scale.top_span,
            f"scale `{scale.name}`: `score top {scale.top}` counts all {options} options of "
            f"{shared.describe()}, so every respondent scored gets 100 %; use a number below {options}",
            item=scale.name,
        )
