"""How conditions read: comparisons that cannot go both ways, readings that differ,
piped values that may be missing."""

from __future__ import annotations

from collections.abc import Iterable

import z3

from logiccheck.checks.context import LintContext
from logiccheck.checks.registry import register
from logiccheck.checks.routing.common import analysis, explain, target
from logiccheck.diagnostics import Diagnostic
from logiccheck.logic.routing import RoutingAnalysis, Statement
from logiccheck.model import nodes as n
from logiccheck.model.questionnaire import Entry

READING_WORDS = {
    "blank": "a blank counts as a value unequal to every code",
    "code": "a non-response code counts as its plain number",
}


def _reachable(a: RoutingAnalysis, st: Statement) -> bool:
    if st.key.startswith("block:"):
        return a.facts.possible(("st-reach", st.key))
    if st.key.startswith("let:"):
        return True
    entry = st.entry
    assert entry is not None  # only section/grid statements have no entry
    if st.key.startswith("require:"):
        return a.facts.possible(("fires", entry.index))
    return a.facts.possible(("reached", entry.index))


def _covered(st: Statement, can_true: bool) -> bool:
    """A whole condition that cannot go both ways is another check's finding: an item's
    (unreachable-item / always-asked), a stop's (stop-never / stop-always), a check's
    `when` (check-never-applies); a `require` or section condition never true
    (check-always-fails / unreachable-item)."""
    if st.key.startswith("entry:"):
        return st.entry is not None and st.entry.kind in ("item", "stop", "check")
    if st.key.startswith(("require:", "block:")):
        return not can_true
    return False


def _roots(st: Statement) -> list[str]:
    return [st.root]


@register(
    "impossible-comparison",
    severity="warning",
    stage="routing",
    summary="A comparison is never true, or never false, for anyone who reaches it.",
    what="A comparison inside a condition, derived value or edit rule that cannot go both "
    "ways for respondents who reach the statement: out of the item's range (`trips > 5000` "
    "on a 1..2000 item), already decided by the section condition, or always reading an "
    "item that has no value there. A whole condition that always holds is `always-asked`.",
    why="The condition does not test what its author meant; whatever it guards is always or "
    "never asked for a reason nobody wrote down.",
    bad='trips: number 1..2000 "Trips?" strict\nodd: text "Why so many, or so few?" when trips > 5000 or trips < 3',
    good='trips: number 1..2000 "Trips?" strict\nodd: text "Why so many, or so few?" when trips > 500 or trips < 3',
)
def impossible_comparison(ctx: LintContext) -> Iterable[Diagnostic]:
    a = analysis(ctx)
    for k, (st, node) in enumerate(a.comparisons):
        if not _reachable(a, st):
            continue
        can_true = a.facts.possible(("cmp-true", k))
        can_false = a.facts.possible(("cmp-false", k))
        if can_true and can_false:
            continue
        text = a.enc.source(node.span)
        if node is st.expr and _covered(st, can_true):
            continue
        if not can_true:
            t, _ = a.enc.truth(node, at=st.at)
            formula = z3.And(st.reach, t)
            core = a.why_not(*target(formula, node.span, f"`{text}` is true"), roots=_roots(st))
            why, related = explain(core, "none")
            how = "never true nor false: it reads an item that has no value here" if not can_false else "never true"
            message = f"`{text}` is {how} for anyone who reaches it"
            if not can_false:
                related = []
            elif why and core:
                message += f": {why}"
            yield ctx.diag("impossible-comparison", node.span, message, item=st.entry.name if st.entry else None,
                           related=related)
            continue
        # Never false.
        model = a.facts.model(("cmp-true", k))
        witness = a.enc.witness(model, a.cone([st.expr], st.entry)) if model is not None else None
        yield ctx.diag(
            "impossible-comparison",
            node.span,
            f"`{text}` is never false for anyone who reaches it, so it tests nothing here",
            item=st.entry.name if st.entry else None,
            witness=witness,
        )


@register(
    "missing-sensitive",
    severity="warning",
    stage="routing",
    summary="Another common reading of blanks or non-response codes routes this respondent differently.",
    what="A condition whose outcome, for some respondent who reaches it, changes when a blank "
    "is read as a value unequal to every code (so `x != yes` is true) or a non-response "
    "code as its plain number (so `x >= 4` is true for 98). Typical under `not`, `!=`, or "
    "an ordering comparison on an item that allows non-response codes. The witness is that "
    "respondent.",
    why="Fielding tools and analysis scripts read blanks and non-response codes in these ways; where they "
    "disagree with the spec, the export will not match the routing you wrote.",
    bad='used: single yesno "Used?"\nwhy_not: text "Why not?" when used != yes',
    good='used: single yesno "Used?"\nwhy_not: text "Why not?" when used = no',
)
def missing_sensitive(ctx: LintContext) -> Iterable[Diagnostic]:
    a = analysis(ctx)
    for st in a.statements:
        hits = [r for r in ("blank", "code") if a.facts.possible(("sensitive", st.key, r))]
        if not hits:
            continue
        reading = hits[0]
        model = a.facts.model(("sensitive", st.key, reading))
        assert model is not None  # possible() above: the question has a model
        ours, _ = a.enc.truth(st.expr, at=st.at)
        holds = z3.is_true(model.eval(ours, model_completion=True))
        text = a.enc.source(st.expr.span)
        ours_word = "holds" if holds else "does not hold"
        other_word = "does not hold" if holds else "holds"
        message = (
            f"`{text}` {ours_word} for this respondent, but {other_word} if {READING_WORDS[reading]}; "
            f"{advice(ctx, st, reading)}"
        )
        notes = [f"it also differs if {READING_WORDS[r]}" for r in hits[1:]]
        yield ctx.diag(
            "missing-sensitive",
            st.expr.span,
            message,
            item=st.entry.name if st.entry is not None else st.key.split(":", 1)[1],
            witness=a.enc.witness(model, a.cone([st.expr], st.entry)),
            notes=notes,
        )


def advice(ctx: LintContext, st: Statement, reading: str) -> str:
    """What to write so the condition reads the same either way. A blank is ruled out by
    `answered(x)`; a non-response code is not (it is an answer), so for that reading the
    advice is a range (`x in LO..HI`) or `strict`."""
    q = ctx.q
    names: list[str] = []
    for node in n.walk(st.expr):
        if not isinstance(node, n.Ref):
            continue
        target_entry = q.symbols.get(node.name)
        if target_entry is not None and target_entry.kind == "item" and node.name not in names:
            names.append(node.name)
    if reading == "blank":
        first = names[0] if names else "..."
        return f"make the intent explicit: `answered({first}) and ...`"
    coded = [x for x in names if q.allows_nonresponse(q.symbols[x].stmt)]
    first = coded[0] if coded else (names[0] if names else "...")
    spec = q.symbols[first].stmt if first in q.symbols else None
    kind = getattr(getattr(spec, "type", None), "kind", None)
    if spec is not None and kind in ("number", "decimal") and spec.type.lo is not None and spec.type.hi is not None:
        rewrite = _as_range(ctx, st, first, spec.type.lo, spec.type.hi, kind == "number")
        if rewrite is not None:
            return f"make the intent explicit: write {rewrite} or mark `{first}` `strict`"
        lo, hi = _num(spec.type.lo), _num(spec.type.hi)
        return (f"make the intent explicit: compare with a range (`{first} in LO..HI`, inside {lo}..{hi}) "
                f"or mark `{first}` `strict`")
    return f"make the intent explicit: list the codes (`{first} in (...)`) or mark `{first}` `strict`"


def _as_range(ctx: LintContext, st: Statement, name: str, lo: float, hi: float, whole: bool) -> str | None:
    """The first ordering comparison of `name` with a number, as a range: a range is
    false (not unknown) for a non-response code under both readings."""
    for node in n.walk(st.expr):
        if not isinstance(node, n.Compare) or node.op not in ("<", "<=", ">", ">="):
            continue
        left, right = node.left, node.right
        op: str = node.op
        if isinstance(right, n.Ref) and isinstance(left, n.Num):
            left, right, op = right, left, {"<": ">", "<=": ">=", ">": "<", ">=": "<="}[op]
        if not (isinstance(left, n.Ref) and left.name == name and isinstance(right, n.Num)):
            continue
        k, step = float(right.value), (1.0 if whole else 0.0)
        if op in (">", ">=") and (op == ">=" or whole):
            low, high = (k if op == ">=" else k + step), hi
        elif op in ("<", "<=") and (op == "<=" or whole):
            low, high = lo, (k if op == "<=" else k - step)
        else:
            return None
        return f"`{ctx_source(ctx, node)}` as `{name} in {_num(low)}..{_num(high)}`"
    return None


def ctx_source(ctx: LintContext, node: n.Node) -> str:
    return analysis(ctx).enc.source(node.span)


def _num(x: float) -> str:
    return str(int(x)) if float(x).is_integer() else str(x)


@register(
    "unsafe-pipe",
    severity="warning",
    stage="routing",
    summary="A text pipes in a value that may be missing when it is shown.",
    what="A `{name}` in an item's or stop's text where some respondent who is shown the text "
    "has no value for `name`: not asked, left blank, or a derived value that is unknown.",
    why="The respondent sees an empty gap or a placeholder (\"You took about  trips\"), "
    "which reads as a broken survey and biases the answer.",
    bad='trips: number 1..2000 "Trips?"\npraise: text "You took {trips} trips. Why?"',
    good='trips: number 1..2000 "Trips?"\npraise: text "You took {trips} trips. Why?" when answered(trips)',
)
def unsafe_pipe(ctx: LintContext) -> Iterable[Diagnostic]:
    a = analysis(ctx)
    for k, (entry, name, span, _shown) in enumerate(a.pipes):
        model = a.facts.model(("pipe", k))
        if model is None:
            continue
        target_entry = ctx.q.symbols[name]
        names = [*a.cone([], entry), *([name] if target_entry.kind != "let" else a.cone([target_entry.own]))]
        if entry.kind == "item":
            names.append(entry.name)
        yield ctx.diag(
            "unsafe-pipe",
            span,
            f"`{{{name}}}` may be empty when {_shown_word(entry)}: `{name}` can have no value here",
            item=entry.name,
            witness=a.enc.witness(model, names),
            related=[(target_entry.span, f"`{name}` is defined here")],
        )


def _shown_word(entry: Entry) -> str:
    if entry.kind == "stop":
        return f"stop `{entry.name}` ends the interview"
    return f"`{entry.name}` is asked"
