"""Stops and edit rules that can never, or always, do their job."""

from __future__ import annotations

from collections.abc import Iterable

from logiccheck.checks.context import LintContext
from logiccheck.checks.registry import register
from logiccheck.checks.routing.common import analysis, explain, subject_of, target
from logiccheck.diagnostics import Diagnostic


def _cond(a, entry) -> str:  # type: ignore[no-untyped-def]
    return a.enc.source(entry.own.span) if entry.own is not None else ""


@register(
    "stop-never",
    severity="warning",
    stage="routing",
    summary="A stop can be reached but never ends the interview.",
    what="A `stop` whose condition is never true for anyone who reaches it, given its section "
    "conditions, the ranges and codes of the items it reads and the routing before it.",
    why="A screen-out that never fires lets ineligible respondents through; usually a wrong "
    "comparison or a condition on an item that is not asked at that point.",
    bad='age: number 0..120 "Age?" strict required\nstop minor "Sorry." when age < 0',
    good='age: number 0..120 "Age?" strict required\nstop minor "Sorry." when age < 16',
)
def stop_never(ctx: LintContext) -> Iterable[Diagnostic]:
    a = analysis(ctx)
    for entry in ctx.q.entries:
        if entry.kind != "stop" or not a.ok(entry) or not a.facts.possible(("reached", entry.index)):
            continue
        if a.facts.possible(("fires", entry.index)):
            continue
        core = a.why_not(*target(a.enc.fires(entry), entry.span, f"stop `{entry.name}` fires"),
                         roots=[subject_of(entry)])
        why, related = explain(core, subject_of(entry))
        yield ctx.diag("stop-never", entry.span,
                       f"stop `{entry.name}` never fires: `{_cond(a, entry)}` is never true where it is reached ({why})",
                       item=entry.name, related=related)


@register(
    "stop-always",
    severity="warning",
    stage="routing",
    summary="A stop's condition holds for everyone who reaches it.",
    what="A `stop` with a condition that is true for every respondent who reaches the stop: "
    "the condition is redundant, or the stop ends the interview for more people than meant.",
    why="Everyone reaching the stop is screened out; when that is intended the condition is "
    "misleading, and when it is not, the rest of the questionnaire loses its respondents.",
    bad='age: number 0..120 "Age?" strict required\nstop minor "Sorry." when age <= 120',
    good='age: number 0..120 "Age?" strict required\nstop minor "Sorry." when age < 16',
)
def stop_always(ctx: LintContext) -> Iterable[Diagnostic]:
    a = analysis(ctx)
    for entry in ctx.q.entries:
        if entry.kind != "stop" or entry.own is None or not a.ok(entry):
            continue
        key = ("not-fires", entry.index)
        if key not in a.questions or a.facts.possible(key) or not a.facts.possible(("reached", entry.index)):
            continue
        model = a.facts.model(("fires", entry.index))
        witness = a.enc.witness(model, a.cone([entry.own], entry)) if model is not None else None
        yield ctx.diag("stop-always", entry.own.span,
                       f"stop `{entry.name}` ends the interview for everyone who reaches it: "
                       f"`{_cond(a, entry)}` always holds there",
                       item=entry.name, witness=witness)


@register(
    "check-never-applies",
    severity="warning",
    stage="routing",
    summary="An edit rule's `when` is never true for anyone who reaches it.",
    what="A `check` that can be reached but whose `when` condition can never hold, so its "
    "`require` is never tested.",
    why="An edit rule that never applies gives false confidence: the data it was meant to "
    "guard are never checked.",
    bad='trips: number 1..2000 "Trips?" strict\ncheck many "Many trips" when trips > 5000 require trips < 9000',
    good='trips: number 1..2000 "Trips?" strict\ncheck many "Many trips" when trips > 500 require trips < 1900',
)
def check_never_applies(ctx: LintContext) -> Iterable[Diagnostic]:
    a = analysis(ctx)
    for entry in ctx.q.entries:
        if entry.kind != "check" or entry.own is None or not a.ok(entry):
            continue
        if not a.facts.possible(("reached", entry.index)) or a.facts.possible(("fires", entry.index)):
            continue
        core = a.why_not(*target(a.enc.applies(entry), entry.span, f"check `{entry.name}` applies"),
                         roots=[subject_of(entry)])
        why, related = explain(core, subject_of(entry))
        yield ctx.diag("check-never-applies", entry.span,
                       f"check `{entry.name}` never applies: `{_cond(a, entry)}` is never true ({why})",
                       item=entry.name, related=related)


@register(
    "check-always-fails",
    severity="error",
    stage="routing",
    summary="An edit rule fails for every respondent it applies to.",
    what="A `check` whose `require` is false for everyone it applies to (a blank input is not "
    "a failure, so this means every respondent with the inputs answered fails it).",
    why="The rule contradicts the routing or the ranges: every record will be flagged, so the "
    "rule is wrong, not the data.",
    bad='age: number 16..120 "Age?" strict required\ncheck adult "Adults only" require age < 16',
    good='age: number 16..120 "Age?" strict required\ncheck adult "Adults only" require age >= 16',
)
def check_always_fails(ctx: LintContext) -> Iterable[Diagnostic]:
    a = analysis(ctx)
    for entry in ctx.q.entries:
        if entry.kind != "check" or entry.require is None or not a.ok(entry):
            continue
        if not a.facts.possible(("fires", entry.index)) or a.facts.possible(("passes", entry.index)):
            continue
        if not a.facts.possible(("fails", entry.index)):
            continue  # never fails either: its inputs are never answered where it applies
        model = a.facts.model(("fails", entry.index))
        cond = a.enc.source(entry.require.span)
        yield ctx.diag("check-always-fails", entry.require.span,
                       f"check `{entry.name}` fails for everyone it applies to: `{cond}` is never true there",
                       item=entry.name, witness=a.enc.witness(model, a.cone([entry.own, entry.require], entry)))
