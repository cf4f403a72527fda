"""One spec, two stages: the z3 encoding behind `lint` and the vectorised evaluator
behind `validate` must route every respondent the same way.

Forward: simulated export rows (with and without planted faults) are fixed in the
encoding; z3's `asked` must equal the evaluator's `due` for every item, and the stop
that fired and the checks that failed must agree. Backward: every witness the routing
analysis finds for "asked" (and "stop fires", "check fails") becomes an export row in
the default layout, and validation must route that row the same way; nothing the
linter calls unreachable is ever due in simulated data.

Outside reference: the routing semantics (DEVELOPERS.md) and `expected` with cascade (docs/formats.md) are the
contract both stages implement; z3 decides the encoding side, numpy the other.
"""

from __future__ import annotations

from pathlib import Path

import numpy as np
import pandas as pd
import pyarrow as pa
import pytest
import z3
from hypothesis import HealthCheck, given, settings

from logiccheck.checks.runner import run_checks
from logiccheck.data import validate
from logiccheck.data.simulate import simulate
from logiccheck.diagnostics import Severity
from logiccheck.loader import Loaded, load_file, load_text
from logiccheck.logic.encoding import Encoding
from logiccheck.logic.routing import RoutingAnalysis
from logiccheck.model.questionnaire import Questionnaire
from logiccheck.quality.bridge import route_state
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
    return agree_on(q, sim.table, sample_rows(rows, sample, seed).tolist())


def agree_on(q: Questionnaire, export: pa.Table | Path, rows: list[int] | None = None) -> int:
    """Fix the given data rows (0-based) of an export in the encoding and compare."""
    result = validate(q, export)
    assert result.due is not None
    enc = Encoding(q)
    solver = base_solver(enc)
    col = {name: j for j, name in enumerate(result.items)}
    items = [e for e in own_entries(enc, ("item",)) if e.name in col]
    stops = stop_entries(q)
    checks = [e for e in q.entries if e.kind == "check"]
    failed = failed_checks(result)
    compared = 0
    for r in range(result.respondents) if rows is None else rows:
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
    required = [e.name for e in q.items() if e.stmt.flags.required and e.stmt.type.kind != "note"]
    for seed in seeds:
        for faults in (0.0, 0.3):
            result = validate(q, simulate(q, rows, seed=seed, faults=faults).table)
            assert result.due is not None and result.valid is not None
            # Lint's respondents are those the form can produce: a `required` item is
            # answered once asked. A planted fault can blank one, which opens what
            # lint rightly calls unreachable (`when not answered(gate)`): leave those out.
            keep = np.ones(result.respondents, dtype=bool)
            for name in required:
                j = result.items.index(name)
                keep &= ~(result.due[:, j] & ~result.valid[:, j])
            for name in dead_items & set(result.items):
                due = result.due[keep, result.items.index(name)]
                assert not due.any(), f"unreachable `{name}` is due (seed {seed})"
            for name in dead_stops:
                assert not (result.stop[keep] == name).any(), f"unreachable stop `{name}` fired (seed {seed})"
            for name in dead_checks:
                rows_failed = failed_checks(result).get(name, set())
                assert not any(keep[r] for r in rows_failed), f"unreachable check `{name}` failed (seed {seed})"
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


def test_demo_export_routes_alike_row_by_row() -> None:
    # The demo export carries hand-planted faults beside the simulated answers.
    q = load_file(ROOT / "specs" / "bikeshare.qlc").questionnaire
    assert agree_on(q, ROOT / "specs" / "bikeshare_export.csv") == 300


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


# Constructs neither random generator writes: notes, nested and resumed sections, a
# skip to a section, a stop without a condition, number sample variables, checks
# reading count() and arithmetic, division by zero.
UNCOMMON = """survey ferry "Harbour ferry passengers"

codes yesno
  yes = 1 "Yes"
  no = 2 "No"

nonresponse
  dk = 98 "Don't know"

sample pier single { north = 1 "North pier", south = 2 "South pier" }
sample crossings number 0..3

trips: number 0..4 "Trips this week?"
returns: number 0..4 "Return trips?"
welcome: note "Thanks for riding" when trips / returns > 1 or crossings = 0
skip to harbour when trips - returns = 0
section deck "On deck" when answered(pier) and trips in (1, 98)
  seat: single yesno "Did you find a seat?" when asked(welcome)
  section cabin "In the cabin" when seat != no
    warm: single yesno "Was the cabin warm?"
    stop cabin_done "That is all for cabin riders."
  rail: single yesno "Did you stand at the rail?" required
section harbour "At the harbour" when not (trips >= 3)
  skip to last when returns in 1..2
  kiosk: multi { coffee = 1 "Coffee", paper = 2 "Newspaper" } "What did you buy?"
  spend: number 0..9 "How much did you spend?" when count(kiosk) * 2 - trips > 1
  queue: single yesno "Did you queue?" when spend = 98 or spend != 3
last: single yesno "Will you ride again?" when returns != 4 or pier = south
check spend_rule "Spending covers purchases"
  when answered(kiosk)
  require spend >= count(kiosk)
"""


@pytest.mark.parametrize("faults", [0.0, 0.3])
def test_uncommon_constructs_route_alike(faults: float) -> None:
    loaded = load_text(UNCOMMON)
    assert _clean(loaded)
    assert forward(loaded.questionnaire, rows=400, seed=11, faults=faults, sample=60) == 60
    assert backward(loaded) > 0
    unreachable_never_due(loaded, range(2), rows=200)


# ------------------------------------------------------------------ regressions

REQUIRED_GATE = """survey pantry "Food pantry intake"

codes yesno
  yes = 1 "Yes"
  no = 2 "No"

household: single yesno "Do you shop for a household?" required
no_answer: single yesno "Would you tell us why not?" when not answered(household)
"""


def test_required_blank_opens_only_in_faulty_data() -> None:
    # Found by the random specs: lint calls `no_answer` unreachable (the form forces
    # `household`), yet a planted invalid value makes it due. Both stages are right;
    # the unreachable comparison leaves out rows whose required items are blank.
    loaded = load_text(REQUIRED_GATE)
    q = loaded.questionnaire
    assert [d.item for d in run_checks(loaded) if d.check == "unreachable-item"] == ["no_answer"]
    export = pa.table({"id": ["1", "2"], "household": ["1", "7"], "no_answer": [None, None]})
    result = validate(q, export)
    assert result.due is not None
    assert result.due[:, result.items.index("no_answer")].tolist() == [False, True]
    assert unreachable_never_due(loaded, range(3), rows=200) == 1

SKIP_INTO_SECTION = """survey hike "Trail walkers"

codes yesno
  yes = 1 "Yes"
  no = 2 "No"

guided: single yesno "Did you walk with a guide?"
skip to rating when answered(guided)
section trail "On the trail" when guided != no
  pace: single yesno "Was the pace right?"
  rating: number 0..10 "How would you rate the walk?"
"""


def test_skip_landing_inside_a_section_keeps_its_later_items() -> None:
    # Found by the generated specs: the section is never entered at its start (the
    # skip passes over it whenever `guided` is answered), so lint called the whole
    # section unreachable, yet the skip lands on `rating` inside it and validation
    # (rightly, the routing semantics (DEVELOPERS.md)) routes guided walkers there.
    loaded = load_text(SKIP_INTO_SECTION)
    dead = [d.item for d in run_checks(loaded) if d.check == "unreachable-item"]
    assert dead == ["pace"]
    export = pa.table({"id": ["1"], "guided": ["1"], "pace": [None], "rating": ["8"]})
    result = validate(loaded.questionnaire, export)
    assert result.due is not None and result.due[0].tolist() == [True, False, True]
    assert agree_on(loaded.questionnaire, export) == 1
    assert unreachable_never_due(loaded, range(3), rows=200) == 1
    assert backward(loaded) == 2


DECIMALS = """survey tank_refill "Water tank refill log"

codes yesno
  yes = 1 "Yes"
  no = 2 "No"

sample tanks number 1..5
litres: decimal 0..5 "How many cubic metres did you refill?"
per_tank: single yesno "Was that enough?" when litres / tanks > 0.9
topped: single yesno "Did you top up?" when litres + 0.2 = 0.3
triple: single yesno "Was it a triple fill?" when litres * 3 >= 0.9 and litres * 3 <= 0.9
ranged: single yesno "Within the band?" when litres * 3 in 0.9..1.2
listed: single yesno "A listed amount?" when litres + 0.2 in (0.3, 0.5)
"""


def test_decimal_arithmetic_reads_exactly_in_both_stages() -> None:
    # The solver reads decimals exactly; the evaluator once compared float results
    # (0.1 + 0.2 != 0.3, 0.3 * 3 < 0.9) and routed these respondents elsewhere.
    q = load_text(DECIMALS).questionnaire
    export = pa.table({
        "id": ["1", "2", "3", "4"],
        "tanks": ["3", "1", "1", "2"],
        "litres": ["2.7", "0.1", "0.3", "0.4"],
        **{name: [None] * 4 for name in ("per_tank", "topped", "triple", "ranged", "listed")},
    })
    assert agree_on(q, export, [0, 1, 2, 3]) == 4
    due = validate(q, export).due
    assert due is not None
    # Worked by hand: 2.7 / 3 = 0.9 (not > 0.9); 0.1 + 0.2 = 0.3; 0.3 * 3 = 0.9;
    # 0.4 * 3 = 1.2 (the top of the band).
    assert due[:, 1:].tolist() == [
        [False, False, False, False, False],
        [False, True, False, False, True],
        [False, False, True, True, True],
        [False, False, False, True, False],
    ]
    # The cleaner reads the same route state.
    state = route_state(q, export.to_pandas())
    assert state.due[:, [state.col(i) for i in validate(q, export).items]].tolist() == due.tolist()
