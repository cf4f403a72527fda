"""One spec, two stages: the z3 encoding behind `lint` and the vectorised evaluator
behind `validate` must route every respondent the same way.

Forward: simulated export rows (with and without planted faults) are fixed in the
encoding; z3's `asked` must equal the evaluator's `due` for every item, and the stop
that fired and the checks that failed must agree. Backward: every witness the routing
analysis finds for "asked" (and "stop fires", "check fails") becomes an export row in
the default layout, and validation must route that row the same way; nothing the
linter calls unreachable is ever due in simulated data.

Outside reference: DESIGN §3 (semantics) and §5 (`expected` with cascade) are the
contract both stages implement; z3 decides the encoding side, numpy the other.
"""

from __future__ import annotations

from pathlib import Path

import pandas as pd
import pytest
import z3
from hypothesis import HealthCheck, given, settings

from logiccheck.checks.runner import run_checks
from logiccheck.data import validate
from logiccheck.data.simulate import simulate
from logiccheck.diagnostics import Severity
from logiccheck.load import Loaded, load_file, load_text
from logiccheck.logic.encoding import Encoding
from logiccheck.logic.routing import RoutingAnalysis
from logiccheck.model.questionnaire import Questionnaire
from tests.data.specgen import make_spec
from tests.logic.test_oracle import specs
from tests.stages import (
    base_solver,
    failed_checks,
    own_entries,
    respondent_constraints,
    row_from_model,
    sample_rows,
    stop_entries,
)

ROOT = Path(__file__).resolve().parents[1]
DEMO_SPECS = [*sorted((ROOT / "specs").glob("*.qlc")), ROOT / "specs" / "faulty" / "routing.qlc"]


def _clean(loaded: Loaded) -> bool:
    """No syntax or static error: both stages then read every statement."""
    if loaded.questionnaire.broken:
        return False
    return not any(d.severity == Severity.error for d in run_checks(loaded, solver=False))


def _describe_row(result, r: int) -> str:  # type: ignore[no-untyped-def]
    frame = result.frame
    cells = {c: frame[c].iloc[r] for c in frame.columns if c != "id"}
    return ", ".join(f"{k}={v}" for k, v in cells.items() if not pd.isna(v))


class _Where:
    """The row, described only when a message needs it."""

    def __init__(self, result, r: int) -> None:  # type: ignore[no-untyped-def]
        self.result, self.r = result, r

    def __str__(self) -> str:
        return f"row {self.r + 1} ({_describe_row(self.result, self.r)})"


def forward(q: Questionnaire, rows: int, seed: int, faults: float, sample: int) -> int:
    """Fix sampled rows of a simulated export in the encoding; returns rows compared."""
    sim = simulate(q, rows, seed=seed, faults=faults)
    result = validate(q, sim.table)
    assert result.due is not None
    enc = Encoding(q)
    solver = base_solver(enc)
    col = {name: j for j, name in enumerate(result.items)}
    items = [e for e in own_entries(enc, ("item",)) if e.name in col]
    stops = stop_entries(q)
    checks = [e for e in q.entries if e.kind == "check"]
    failed = failed_checks(result)
    compared = 0
    for r in sample_rows(result.respondents, sample, seed).tolist():
        cons = respondent_constraints(enc, result, r)
        if cons is None:
            continue
        solver.push()
        solver.add(*cons)
        where = _Where(result, r)
        assert solver.check() == z3.sat, f"the encoding has no respondent for {where}"
        model = solver.model()

        def true(b: z3.BoolRef, m: z3.ModelRef = model) -> bool:
            return z3.is_true(m.eval(b, model_completion=True))

        expect: list[tuple[str, z3.BoolRef, bool]] = []
        for e in items:
            expect.append((f"`{e.name}` asked", enc.asked(e.name), bool(result.due[r, col[e.name]])))
        for e in stops:
            expect.append((f"stop `{e.name}` fires", enc.fires(e), result.stop[r] == e.name))
        for e in checks:
            expect.append((f"check `{e.name}` fails", enc.fails(e), r in failed.get(e.name, set())))
        wrong = [f"{what}: solver {true(f)}, evaluator {v}" for what, f, v in expect if true(f) != v]
        assert not wrong, f"stages disagree on {where}: {'; '.join(wrong)}"
        # The answers determine the route: no other model may route differently.
        solver.add(z3.Or([f != z3.BoolVal(v) for _, f, v in expect] or [z3.BoolVal(False)]))
        assert solver.check() == z3.unsat, f"the answers of {where} do not determine the route"
        solver.pop()
        compared += 1
    return compared


def backward(loaded: Loaded) -> int:
    """Every solver witness, written as an export row, is routed the same way by
    validation; returns the witnesses checked."""
    q = loaded.questionnaire
    a = RoutingAnalysis(q)
    enc = a.enc
    checked = 0
    for e in q.entries:
        if e.kind == "item" and e.stmt.type.kind == "note":
            continue
        key = {"item": ("asked", e.index), "stop": ("fires", e.index), "check": ("fails", e.index)}.get(e.kind)
        if key is None or key not in a.questions or not a.facts.possible(key):
            continue
        model = a.facts.model(key)
        assert model is not None
        row = row_from_model(enc, model)
        result = validate(q, row)
        assert result.due is not None
        where = f"witness {enc.witness(model)}"
        if e.kind == "item":
            assert result.due[0, result.items.index(e.name)], f"`{e.name}` is not due for the {where}"
        elif e.kind == "stop":
            assert result.stop[0] == e.name, f"stop `{e.name}` does not fire for the {where}"
        else:
            assert 0 in failed_checks(result).get(e.name, set()), f"check `{e.name}` does not fail for the {where}"
        checked += 1
    return checked


def unreachable_never_due(loaded: Loaded, seeds: range, rows: int) -> int:
    """Nothing `unreachable-item` names is due (or fires) in simulated data; returns the
    number of unreachable statements checked."""
    q = loaded.questionnaire
    dead_items: set[str] = set()
    dead_stops: set[str] = set()
    dead_checks: set[str] = set()
    for d in run_checks(loaded):
        if d.check != "unreachable-item":
            continue
        entry = next((e for e in q.entries if e.name == d.item and e.span.line == d.line), None)
        if entry is None:  # a section or grid: everything in it
            inside = [e for e in q.entries if any(o.name == d.item for o, _ in e.context)]
        else:
            inside = [entry]
        assert inside, f"unreachable-item at line {d.line} names nothing"
        for e in inside:
            {"item": dead_items, "stop": dead_stops, "check": dead_checks}.get(e.kind, set()).add(e.name)
    if not (dead_items or dead_stops or dead_checks):
        return 0
    for seed in seeds:
        for faults in (0.0, 0.3):
            result = validate(q, simulate(q, rows, seed=seed, faults=faults).table)
            assert result.due is not None
            for name in dead_items & set(result.items):
                assert not result.due[:, result.items.index(name)].any(), f"unreachable `{name}` is due (seed {seed})"
            for name in dead_stops:
                assert not (result.stop == name).any(), f"unreachable stop `{name}` fired (seed {seed})"
            for name in dead_checks:
                assert name not in failed_checks(result), f"unreachable check `{name}` failed (seed {seed})"
    return len(dead_items | dead_stops | dead_checks)


# ------------------------------------------------------------------ demo specs

@pytest.mark.parametrize("path", DEMO_SPECS, ids=lambda p: p.name)
@pytest.mark.parametrize("faults", [0.0, 0.3])
def test_demo_exports_route_alike(path: Path, faults: float) -> None:
    loaded = load_file(path)
    assert _clean(loaded)
    assert forward(loaded.questionnaire, rows=300, seed=7, faults=faults, sample=40) > 0


@pytest.mark.parametrize("path", DEMO_SPECS, ids=lambda p: p.name)
def test_demo_witnesses_route_alike(path: Path) -> None:
    loaded = load_file(path)
    assert backward(loaded) > 0


def test_unreachable_in_faulty_spec_never_due() -> None:
    loaded = load_file(ROOT / "specs" / "faulty" / "routing.qlc")
    # The spec plants unreachable statements; the check must find some to hold to data.
    assert unreachable_never_due(loaded, range(5), rows=300) > 0


# ------------------------------------------------------------------ random specs

def _random_case(text: str, seed: int) -> None:
    loaded = load_text(text)
    if not _clean(loaded):
        return
    q = loaded.questionnaire
    forward(q, rows=60, seed=seed, faults=0.0, sample=8)
    forward(q, rows=60, seed=seed + 1, faults=0.3, sample=8)
    backward(loaded)
    unreachable_never_due(loaded, range(3), rows=120)


@settings(max_examples=40, deadline=None, suppress_health_check=[HealthCheck.too_slow, HealthCheck.data_too_large])
@given(specs())
def test_random_specs_route_alike(text: str) -> None:
    _random_case(text, seed=3)


@pytest.mark.parametrize("seed", range(25))
def test_generated_specs_route_alike(seed: int) -> None:
    _random_case(make_spec(seed, size=6), seed)
