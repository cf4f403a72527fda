"""Scales the routing makes impossible to score."""

from __future__ import annotations

from collections.abc import Iterable

import z3

from logiccheck.checks.context import LintContext
from logiccheck.checks.registry import register
from logiccheck.checks.routing.common import analysis, explain, subject_of, target
from logiccheck.diagnostics import Diagnostic


@register(
    "scale-unreachable",
    severity="error",
    stage="routing",
    summary="No respondent can be asked enough items of a scale (its `min`) to get a score.",
    what="A scale whose items cannot be asked together: no respondent is routed to `min` of "
    "them (default half, rounded up), e.g. two halves behind exclusive gates. Proved by the "
    "solver; the message names the conflicting conditions with their lines (a minimal unsat core).",
    why="Nobody would get a composite score and alpha could not be computed: the scale is "
    "split across routes, so its items measure different groups of people.",
    bad='codes yesno\n  yes = 1 "Yes"\n  no = 2 "No"\nused: single yesno "Used a bike?" gate\n'
    'happy: number 0..10 "How happy with the bikes?" when used = yes\n'
    'hopes: number 0..10 "How keen to try them?" when used = no\n'
    'scale mood "Mood" min 2\n  happy\n  hopes',
    good='codes yesno\n  yes = 1 "Yes"\n  no = 2 "No"\nused: single yesno "Used a bike?" gate\n'
    'happy: number 0..10 "How happy with the bikes?" when used = yes\n'
    'comfy: number 0..10 "How comfortable were they?" when used = yes\n'
    'scale mood "Mood" min 2\n  happy\n  comfy',
)
def scale_unreachable(ctx: LintContext) -> Iterable[Diagnostic]:
    q = ctx.q
    if not q.scales:
        return
    a = analysis(ctx)
    for scale in q.scales.values():
        entries = [q.symbols.get(m.name) for m in scale.items]
        if any(e is None or e.kind != "item" or not a.ok(e) for e in entries):
            continue  # unknown-name, scale-mixed-answers or routing-skipped speak for it
        need = scale.min_answered
        where = f"its `min {need}`" if scale.min is not None else "half of its items, rounded up"
        if need > len(entries):
            yield ctx.diag("scale-unreachable", scale.min_span or scale.name_span,
                           f"scale `{scale.name}` needs {need} answered items ({where}) but has only {len(entries)}",
                           item=scale.name)
            continue
        formula = z3.AtLeast(*[a.enc.asked(e.name) for e in entries], need)  # type: ignore[union-attr]
        subjects = [subject_of(e) for e in entries]  # type: ignore[arg-type]
        text = f"{need} items of scale `{scale.name}` are asked"
        core = a.why_not(*target(formula, scale.name_span, text), roots=subjects)
        if core is None:
            continue
        why, related = explain(core, subjects)
        yield ctx.diag(
            "scale-unreachable",
            scale.name_span,
            f"no respondent can be asked {need} of the {len(entries)} items of scale `{scale.name}` ({where}): {why}",
            item=scale.name,
            related=related,
        )
