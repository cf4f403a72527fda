"""What every routing check shares: one analysis per lint run, and how to say a core."""

from __future__ import annotations

from typing import Any

from logiccheck.checks.context import LintContext
from logiccheck.diagnostics import Span
from logiccheck.logic.encoding import Conjunct
from logiccheck.logic.routing import RoutingAnalysis
from logiccheck.logic.solve import TELLING
from logiccheck.model.questionnaire import Entry


def analysis(ctx: LintContext) -> RoutingAnalysis:
    """The routing analysis of this lint run, built once and shared by the checks."""
    found = ctx.shared.get("routing")
    if found is None:
        found = RoutingAnalysis(ctx.q)
        ctx.shared["routing"] = found
    return found


def subject_of(entry: Entry) -> str:
    return f"entry:{entry.index}"


def explain(core: list[Conjunct] | None, subject: str | list[str]) -> tuple[str, list[tuple[Span, str]]]:
    """A core as words: what the statement (or statements) itself needs, and what stands against it."""
    if not core:
        return "its conditions contradict each other", []
    own = {subject} if isinstance(subject, str) else set(subject)
    needs = [c for c in core if c.subject in own and c.kind in ("own", "context") and c.cond]
    against = [c for c in core if c not in needs and c.kind in TELLING and c.kind != "target"]
    related = [(c.span, c.text) for c in [*needs, *against]]
    parts = []
    if needs:
        # Several statements may need the same condition (a scale's items in one section).
        parts.append("it needs " + _join(list(dict.fromkeys(f"`{c.cond}` (line {c.span.line})" for c in _unique(needs)))))
    if against:
        lead = "but " if needs else ""
        parts.append(lead + _join([c.text for c in _unique(against)]))
    elif needs:
        parts.append("and that can never hold")
    return ", ".join(parts) if parts else "its conditions contradict each other", related


def _unique(items: list[Conjunct]) -> list[Conjunct]:
    seen, out = set(), []
    for c in items:
        if c.text not in seen:
            seen.add(c.text)
            out.append(c)
    return out


def _join(words: list[str]) -> str:
    if len(words) <= 1:
        return "".join(words)
    return ", ".join(words[:-1]) + " and " + words[-1]


def target(formula: Any, span: Span, text: str) -> tuple[Any, Conjunct]:
    return formula, Conjunct("target", formula, "target", span, text)
