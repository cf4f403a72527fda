"""Checks on names, code labels and types, judged from the resolver's facts."""

from __future__ import annotations

from collections.abc import Iterable

from logiccheck.checks.context import LintContext
from logiccheck.checks.registry import describe, register
from logiccheck.diagnostics import Diagnostic
from logiccheck.suggest import did_you_mean

describe(
    "syntax-error",
    severity="error",
    stage="spec",
    summary="The spec does not follow the grammar of the spec language.",
    what="A line that the parser cannot read: a missing quote, colon, range, or a "
    "misplaced option. The message says what was expected at the marked column.",
    why="Nothing after a syntax error in the same statement can be checked, so the "
    "routing it describes is unknown.",
    bad='age number 0..120 "How old are you?"',
    good='age: number 0..120 "How old are you?"',
)


def _problems(ctx: LintContext, check: str) -> Iterable:
    return (p for p in ctx.q.problems if p.check == check)


@register(
    "duplicate-name",
    severity="error",
    stage="spec",
    summary="Two statements share one name.",
    what="Two items, grid rows, derived values or sample variables with the same name, "
    "or two sections or grids with the same name, or two answer lists with the same name.",
    why="Conditions and the export refer to items by name; with two of them, which one "
    "a condition reads (and which column holds which answer) is ambiguous.",
    bad='q1: single yesno "Do you drive?"\nq1: single yesno "Do you cycle?"',
    good='drives: single yesno "Do you drive?"\ncycles: single yesno "Do you cycle?"',
)
def duplicate_name(ctx: LintContext) -> Iterable[Diagnostic]:
    for p in _problems(ctx, "duplicate-name"):
        yield ctx.diag("duplicate-name", p.span, p.message, item=p.item, related=p.related)


def _suggest(name: str, candidates: Iterable[str]) -> str:
    return did_you_mean(name, candidates)


@register(
    "unknown-name",
    severity="error",
    stage="spec",
    summary="A condition, pipe or skip names something that is not defined.",
    what="A name in a condition, a derived value, a piped `{name}` or a `skip to` target "
    "that is no item, row, derived value, sample variable or section of the spec.",
    why="A condition that reads a missing name can never be evaluated: in the field the "
    "follow-up is never shown (or always shown), depending on the platform.",
    bad='owns_bike: single yesno "Do you own a bike?"\nbike_type: text "Which kind?" when own_bike = yes',
    good='owns_bike: single yesno "Do you own a bike?"\nbike_type: text "Which kind?" when owns_bike = yes',
)
def unknown_name(ctx: LintContext) -> Iterable[Diagnostic]:
    q = ctx.q
    candidates = list(q.symbols) + list(q.sections) + list(q.grids)
    for p in _problems(ctx, "unknown-name"):
        if p.message == p.item or " " not in p.message:
            name = p.message
            message = f"`{name}` is not defined{_suggest(name, candidates)}"
        else:
            name = p.item or ""
            message = p.message + _suggest(name, candidates)
        yield ctx.diag("unknown-name", p.span, message, item=name)


@register(
    "unknown-code",
    severity="error",
    stage="spec",
    summary="A condition compares a coded item with a label or value it does not have.",
    what="A bare name or number beside a coded item (`used = yse`, `freq in (1, 7)`, "
    "`purpose has sport`) that is none of the item's codes (or of the non-response codes, "
    "where the item allows them).",
    why="The comparison can never be true, so whatever it guards is silently never asked; "
    "usually a typo or an answer list that changed.",
    bad='used: single yesno "Used a bike?"\nwhy: text "Why?" when used = yse',
    good='used: single yesno "Used a bike?"\nwhy: text "Why?" when used = yes',
)
def unknown_code(ctx: LintContext) -> Iterable[Diagnostic]:
    q = ctx.q
    for p in _problems(ctx, "unknown-code"):
        message = p.message
        entry = q.symbols.get(p.item or "")
        if entry is not None and "labelled" in message:
            codes = q.item_codes(entry.stmt)
            labels = [o.label for o in codes.options] if codes else []
            if q.allows_nonresponse(entry.stmt):
                labels += [o.label for o in q.nonresponse]
            written = message.split("`")[3] if message.count("`") >= 4 else ""
            message += _suggest(written, labels)
            if labels and "did you mean" not in message:
                message += f"; its labels are {', '.join(labels)}"
        yield ctx.diag("unknown-code", p.span, message, item=p.item, related=p.related)


@register(
    "type-mismatch",
    severity="error",
    stage="spec",
    summary="An operator is used on a value of the wrong kind.",
    what="`has` on a single item, `=` on a multi item, a label compared with a number "
    "item, arithmetic on a coded item, `count()` of a non-multi item, a number where a "
    "condition is needed, and similar mixes.",
    why="Platforms and analysis scripts read such conditions in different ways, so the "
    "routing the spec describes is not the routing that runs.",
    bad='purpose: multi purposes "Trip purposes?"\nwhy: text "Why?" when purpose = commute',
    good='purpose: multi purposes "Trip purposes?"\nwhy: text "Why?" when purpose has commute',
)
def type_mismatch(ctx: LintContext) -> Iterable[Diagnostic]:
    seen = set()
    for p in _problems(ctx, "type-mismatch"):
        key = (p.span.line, p.span.column, p.message)
        if key in seen:
            continue
        seen.add(key)
        yield ctx.diag("type-mismatch", p.span, p.message, item=p.item, related=p.related)
