"""How long the interview is: fewest and most items on any route, and the minutes."""

from __future__ import annotations

import time
from collections.abc import Iterable

import z3

from logiccheck.checks.context import LintContext
from logiccheck.checks.registry import register
from logiccheck.checks.routing.common import analysis
from logiccheck.diagnostics import Diagnostic, Span
from logiccheck.logic.solve import add_all

# Seconds to answer one item of each type, before reading time. Common practice, no
# source: rough figures survey teams use for self-completion; override per item with
# `seconds N`.
BASE_SECONDS = {"single": 5.0, "multi": 8.0, "number": 7.0, "decimal": 8.0, "text": 30.0, "note": 2.0}
# Reading speed for question text: about 240 words a minute (common practice, no source).
WORDS_PER_SECOND = 4.0
BUDGET_S = 1.5  # for both searches; past it the best route found so far is reported as a bound


def _extreme(solver: z3.Solver, count: z3.ArithRef, most: int, goal: str, stats,  # type: ignore[no-untyped-def]
             deadline: float) -> tuple | None:
    """Binary search on the number of items asked: (model, count, proven optimal)."""
    stats.calls += 1
    solver.set("timeout", max(50, int((deadline - time.monotonic()) * 1000)))
    if solver.check() != z3.sat:
        return None
    model = solver.model()
    best = model.eval(count, model_completion=True).as_long()
    lo, hi = (0, best - 1) if goal == "min" else (best + 1, most)
    while lo <= hi:
        left = deadline - time.monotonic()
        if left <= 0.05:
            return model, best, False
        solver.set("timeout", max(50, int(left * 1000)))
        mid = (lo + hi) // 2
        bound = count <= mid if goal == "min" else count >= mid
        stats.calls += 1
        status = solver.check(bound)
        if status == z3.sat:
            model = solver.model()
            best = model.eval(count, model_completion=True).as_long()
            if goal == "min":
                hi = best - 1
            else:
                lo = best + 1
        elif status == z3.unsat:
            if goal == "min":
                lo = mid + 1
            else:
                hi = mid - 1
        else:
            return model, best, False
    return model, best, True


def item_seconds(entry) -> float:  # type: ignore[no-untyped-def]
    """Estimated seconds for one item: its `seconds` flag, or type base plus reading."""
    stmt = entry.stmt
    if stmt.flags.seconds is not None:
        return float(stmt.flags.seconds)
    words = len(stmt.text.split())
    if entry.grid is not None and entry.grid.rows and entry.grid.rows[0] is stmt:
        words += len(entry.grid.text.split())
    return BASE_SECONDS.get(stmt.type.kind, 5.0) + words / WORDS_PER_SECOND


@register(
    "route-length",
    severity="info",
    stage="routing",
    summary="The fewest and the most items any respondent can be asked, with estimated minutes.",
    what="Where routes differ in length: the shortest and the longest route through the "
    "questionnaire (items and grid rows asked), each with a witness respondent and the "
    "estimated minutes from per-type seconds plus reading time (or the items' `seconds N`).",
    why="Interview length drives break-off and cost; the longest route is often much longer "
    "than the one clicked through in testing.",
    bad='used: single yesno "Used?"\nfreq: single freq "How often?" when used = yes',
    good='used: single yesno "Used?"\nfreq: single freq "How often?"',
)
def route_length(ctx: LintContext) -> Iterable[Diagnostic]:
    a = analysis(ctx)
    q = ctx.q
    items = [e for e in q.entries if e.kind == "item" and a.enc.is_own(e) and a.ok(e)]
    if not items or len(items) < len([e for e in q.entries if e.kind == "item"]):
        return  # a part could not be analysed: a length would be a guess
    count = z3.Sum([z3.If(a.enc.asked(e.name), 1, 0) for e in items])
    seconds = {e.name: item_seconds(e) for e in items}
    results = []
    solver = z3.SimpleSolver()
    solver.set("relevancy", 0)  # faster here, as in the routing cover
    add_all(solver, a.enc.facts())
    start = time.monotonic()
    for number, goal in enumerate(("min", "max")):
        found = _extreme(solver, count, len(items), goal, a.stats, start + BUDGET_S * (number + 1) / 2)
        if found is None:
            return
        model, n, exact = found
        asked = [e.name for e in items if z3.is_true(model.eval(a.enc.asked(e.name), model_completion=True))]
        minutes = sum(seconds[x] for x in asked) / 60
        results.append((n, minutes, asked, model, exact))
    (lo, lo_min, lo_asked, lo_model, lo_exact), (hi, hi_min, hi_asked, hi_model, hi_exact) = results
    if lo == hi and lo_exact and hi_exact:
        return
    span = q.spec.survey_span or Span(file=q.file, line=1, column=1)
    for word, n, minutes, asked, model, exact in (("fewest", lo, lo_min, lo_asked, lo_model, lo_exact),
                                                  ("most", hi, hi_min, hi_asked, hi_model, hi_exact)):
        witness = a.enc.witness(model, asked)
        bound = "" if exact else (" or fewer (search stopped)" if word == "fewest" else " or more (search stopped)")
        yield ctx.diag(
            "route-length",
            span,
            f"the {word} items on any route: {n}{bound} (about {minutes:.1f} min)",
            witness=witness,
            notes=[f"route: {', '.join(asked[:30])}{' ...' if len(asked) > 30 else ''}"],
        )
