"""Solving a group apart from the stops before it (`SPLIT_GUARDS`) decides every routing
question as solving it whole does, and its joined models are real respondents.

References: the brute-force enumerator (tests/logic/oracle.py) on random small specs cut
into many small groups, and the whole-closure solve (the plan before the split) on
generated specs of a few hundred items.
"""

from __future__ import annotations

from collections.abc import Iterator
from contextlib import contextmanager
from unittest import mock

import pytest
import z3
from hypothesis import HealthCheck, given, settings

import logiccheck.logic.routing as routing
from benchmarks.generate import Shape, generate, routing_spec
from logiccheck.checks.runner import run_checks
from logiccheck.diagnostics import Diagnostic
from logiccheck.loader import load_text
from logiccheck.logic.encoding import JointModel
from logiccheck.logic.routing import RoutingAnalysis
from logiccheck.logic.solve import Outer
from tests.logic.test_oracle import HEADER, compare, specs

# A stop reads a screener that a later item reads too, a sample variable is read on both
# sides of the stops, and independent items stand after them.
SHARED_SCREENER = HEADER + """sample area single { east = 1 "East", west = 2 "West" }
age: number 0..2 "Age?" strict required
stop young "Bye" when age = 0 and area = east
""" + "".join(f'q{i}: single yesno "Q{i}?" when area = west\n' for i in range(1, 25)) + """stop tired "Bye" when q24 = no
late: text "Why?" when age = 2
""" + "".join(f'p{i}: single yesno "P{i}?" when area = east\n' for i in range(1, 25))

GENERATED = {
    "routing": routing_spec(400, seed=7),
    "sections": generate(Shape(items=400, depth=4, skips=True, stops=True, seed=3)),
    "screener": SHARED_SCREENER,
}


@contextmanager
def small_groups(size: int) -> Iterator[None]:
    with mock.patch.object(routing, "GROUP_QUESTIONS", size):
        yield


@contextmanager
def whole() -> Iterator[None]:
    with mock.patch.object(routing, "SPLIT_GUARDS", False):
        yield


@settings(max_examples=80, deadline=None, suppress_health_check=[HealthCheck.too_slow, HealthCheck.data_too_large])
@given(specs())
def test_split_groups_agree_with_brute_force(text: str) -> None:
    with small_groups(3):
        compare(text)


def answers(a: RoutingAnalysis) -> dict[object, bool]:
    return {key: a.facts.possible(key) for key in a.questions}


@pytest.mark.parametrize("name", sorted(GENERATED))
def test_split_decides_as_whole(name: str) -> None:
    q = load_text(GENERATED[name], f"{name}.qlc").questionnaire
    with small_groups(60):
        split = RoutingAnalysis(q)
        with whole():
            reference = RoutingAnalysis(q)
    assert answers(split) == answers(reference)


def test_generated_spec_is_split() -> None:
    seen: list[int] = []
    real = Outer.prepare

    def spy(self: Outer, subjects: set[str], own: set[str]) -> None:
        seen.append(len(subjects))
        real(self, subjects, own)

    with mock.patch.object(Outer, "prepare", spy), small_groups(60):
        RoutingAnalysis(load_text(GENERATED["routing"], "r.qlc").questionnaire)
    assert seen


@pytest.mark.parametrize("name", sorted(GENERATED))
def test_joined_models_are_respondents(name: str) -> None:
    """Every constraint that decides a question holds in its joined model, and so does
    the question."""
    q = load_text(GENERATED[name], f"{name}.qlc").questionnaire
    with small_groups(60):
        a = RoutingAnalysis(q)
    joined = 0
    checked: dict[int, set[str]] = {}  # model -> subjects whose constraints hold in it
    for key, formula in a.questions.items():
        model = a.facts.model(key)
        if not isinstance(model, JointModel):
            continue
        joined += 1
        assert z3.is_true(model.eval(formula, model_completion=True)), key
        done = checked.setdefault(id(model), set())
        subjects = a.closure(a.roots[key]) - done
        for c in a.queries.conjuncts_of(subjects):
            assert z3.is_true(model.eval(c.formula, model_completion=True)), (key, c.text)
        done |= subjects
    assert joined


def comparable(diags: list[Diagnostic]) -> list[tuple[object, ...]]:
    """A finding without what depends on the model z3 happens to find: the witness, and
    missing-sensitive's "holds for this respondent" (route-length stops on a clock)."""
    return [
        (d.check, d.span.line, d.span.column, d.item, d.severity,
         None if d.check == "missing-sensitive" else d.message,
         tuple((r.span.line, r.message) for r in d.related))
        for d in diags
        if d.check != "route-length"
    ]


@pytest.mark.parametrize("name", sorted(GENERATED))
def test_lint_findings_as_whole(name: str) -> None:
    loaded = load_text(GENERATED[name], f"{name}.qlc")
    with small_groups(60):
        fast = run_checks(loaded)
        with whole():
            before = run_checks(loaded)
    assert comparable(fast) == comparable(before)
    assert [bool(d.witness) for d in fast] == [bool(d.witness) for d in before]
