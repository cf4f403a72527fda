"""Who can be asked what: unreachable statements, redundant conditions, skipped parts."""

from __future__ import annotations

from collections.abc import Iterable

from logiccheck.checks.context import LintContext
from logiccheck.checks.registry import register
from logiccheck.checks.routing.common import analysis, explain, subject_of, target
from logiccheck.diagnostics import Diagnostic
from logiccheck.logic.routing import RoutingAnalysis
from logiccheck.model import nodes as n
from logiccheck.model.questionnaire import Entry, Questionnaire


def _word(entry: Entry) -> str:
    if entry.kind == "item":
        return f"grid row `{entry.name}`" if entry.grid is not None else f"`{entry.name}`"
    return f"{entry.kind} `{entry.name}`"


def _entered_later(a: RoutingAnalysis, q: Questionnaire, name: str) -> bool:
    """Some statement of a block not reached at its start is reached further in (a
    `skip to` that passes over its start lands inside it)."""
    return any(
        a.facts.possible(("reached", e.index))
        for e in q.entries
        if any(o.name == name for o, _ in e.context) and ("reached", e.index) in a.questions
    )


@register(
    "unreachable-item",
    severity="error",
    stage="routing",
    summary="No respondent can ever be asked this item (or reach this row, section, stop or check).",
    what="An item, grid row, section, grid, stop or check whose conditions, together with the "
    "conditions of the items they read, earlier stops and skips, can never all hold. The "
    "message names the conflicting conditions with their lines (a minimal unsat core).",
    why="A follow-up nobody sees leaves a hole in the data that is only noticed after "
    "fielding; usually a gate reads the wrong answer or two conditions contradict.",
    bad='ebike: single yesno "Electric?"\nrange_ok: single yesno "Battery ok?" when ebike = yes\n'
    'charge: text "Charging?" when range_ok = yes and ebike = no',
    good='ebike: single yesno "Electric?"\nrange_ok: single yesno "Battery ok?" when ebike = yes\n'
    'charge: text "Charging?" when range_ok = no and ebike = yes',
)
def unreachable_item(ctx: LintContext) -> Iterable[Diagnostic]:
    a = analysis(ctx)
    q = ctx.q
    dead_blocks: set[str] = set()
    # Blocks first, outermost first: what lies inside a dead block is not repeated.
    for name, block in a.enc.blocks.items():
        key: tuple[str, str | int] = ("block", name)  # ("asked", index) etc. below
        if key not in a.questions or a.facts.possible(key):
            continue
        if any(o.name in dead_blocks for o, _ in block.context[:-1]):
            dead_blocks.add(name)
            continue
        if _entered_later(a, q, name):
            continue  # a skip lands inside: its statements are judged one by one
        dead_blocks.add(name)
        subject = f"block:{name}"
        word = "grid" if isinstance(block.node, n.Grid) else "section"
        core = a.why_not(*target(a.enc.block_reached(name), block.node.name_span, f"{word} `{name}` is reached"),
                         roots=[subject])
        why, related = explain(core, subject)
        yield ctx.diag(
            "unreachable-item",
            block.node.name_span,
            f"{word} `{name}` is never reached: {why}",
            item=name,
            related=related,
            notes=["nothing in it can be asked"],
        )
    for entry in q.entries:
        if entry.kind not in ("item", "stop", "check") or not a.ok(entry):
            continue
        if any(o.name in dead_blocks for o, _ in entry.context):
            continue
        key = ("asked", entry.index) if entry.kind == "item" else ("reached", entry.index)
        if key not in a.questions or a.facts.possible(key):
            continue
        formula = a.questions[key]
        verb = "asked" if entry.kind == "item" else "reached"
        if entry.kind == "item" and entry.stmt.type.kind == "note":
            verb = "shown"
        core = a.why_not(*target(formula, entry.span, f"{_word(entry)} is {verb}"), roots=[subject_of(entry)])
        why, related = explain(core, subject_of(entry))
        yield ctx.diag(
            "unreachable-item",
            entry.span,
            f"{_word(entry)} is never {verb}: {why}",
            item=entry.name,
            related=related,
        )


@register(
    "always-asked",
    severity="info",
    stage="routing",
    summary="An item's own condition always holds where the item is reached.",
    what="An item or grid row with a `when` condition that is true for every respondent who "
    "reaches it: its section and grid conditions, earlier stops and skips already imply it.",
    why="A redundant condition is harmless today but misleads readers and breaks silently "
    "when the section condition is edited; drop it or make the intent explicit.",
    bad='used: single yesno "Used?"\nsection riders "Riders" when used = yes\n  freq: single freq "How often?" when used = yes',
    good='used: single yesno "Used?"\nsection riders "Riders" when used = yes\n  freq: single freq "How often?"',
)
def always_asked(ctx: LintContext) -> Iterable[Diagnostic]:
    a = analysis(ctx)
    for entry in ctx.q.entries:
        if entry.kind != "item" or entry.own is None or not a.ok(entry):
            continue
        key = ("not-own", entry.index)
        if key not in a.questions or a.facts.possible(key) or not a.facts.possible(("asked", entry.index)):
            continue
        cond = a.enc.source(entry.own.span)
        related = [(expr.span, f"{type(o).__name__.lower()} `{o.name}` condition") for o, expr in entry.context
                   if expr is not None]
        yield ctx.diag(
            "always-asked",
            entry.own.span,
            f"`{cond}` always holds where {_word(entry)} is reached, so the condition is redundant",
            item=entry.name,
            related=related,
        )


@register(
    "routing-skipped",
    severity="info",
    stage="routing",
    summary="The routing of a statement with an error (and of what depends on it) was not analysed.",
    what="A statement whose condition has a static error (an unknown name or code, a type "
    "mismatch) cannot be encoded; it, and every statement that reads it or stands after a "
    "stop or inside a skip that does, is left out of the routing analysis. The rest is analysed.",
    why="Routing findings about statements built on a broken condition would be guesses; "
    "fix the error reported at the same place and lint again.",
    bad='used: single yesno "Used?"\nwhy: text "Why?" when used = yse',
    good='used: single yesno "Used?"\nwhy: text "Why?" when used = yes',
)
def routing_skipped(ctx: LintContext) -> Iterable[Diagnostic]:
    a = analysis(ctx)
    q = ctx.q
    for root, dependents in a.error_roots().items():
        entry = q.entries[root]
        names = [_word(q.entries[i]) for i in dependents]
        more = (f" and {len(names)} statement{'s that depend' if len(names) != 1 else ' that depends'} on it"
                if names else "")
        yield ctx.diag(
            "routing-skipped",
            entry.span,
            f"routing of {_word(entry) if entry.name else entry.kind}{more} not analysed: its condition has an error",
            item=entry.name or None,
            notes=[f"not analysed: {', '.join(names[:20])}{' ...' if len(names) > 20 else ''}"] if names else [],
        )
