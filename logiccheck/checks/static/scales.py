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
