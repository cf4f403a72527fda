"""The vectorised evaluator against two independent implementations, on random specs and
random exports from `simulate` (with planted faults and random cell noise):

* DuckDB as the oracle: every condition translated to SQL (NULL as unknown; SQL's NULL
  logic is Kleene's strong three-valued logic) gives the same per-item table and the same
  out-of-path set (`sqloracle.py`).
* A plain row-by-row Python interpreter of the routing semantics (DEVELOPERS.md) agrees on every cell state: due,
  has a value, valid; and on which stop fired (`rowwise.py`).
"""

from __future__ import annotations

import random
from pathlib import Path

import numpy as np
import pyarrow as pa
from hypothesis import HealthCheck, given, settings
from hypothesis import strategies as st

from logiccheck.data import validate
from logiccheck.data.simulate import simulate, write_csv
from logiccheck.loader import load_text
from tests.data.rowwise import interpret_csv
from tests.data.specgen import make_spec
from tests.data.sqloracle import sql_validate

NOISE = ["", " ", "1", "2", "3", "0", "98", "99", "x", " 2", "2.5", "7", "12a", "nan", "-1"]


def _export(spec_seed: int, data_seed: int, rows: int, faults: float, noise: float, folder: Path):
    text = make_spec(spec_seed, size=random.Random(spec_seed).randint(3, 8))
    q = load_text(text, "prop.qlc").questionnaire
    sim = simulate(q, rows, seed=data_seed, faults=faults)
    table = sim.table
    if noise:
        rng = random.Random(data_seed)
        cols = {}
        for name in table.column_names:
            values = [None if v is None else str(v) for v in table.column(name).to_pylist()]
            if name not in ("id", "duration"):
                values = [rng.choice(NOISE) if rng.random() < noise else v for v in values]
            cols[name] = pa.array([None if v == "" else v for v in values], pa.string())
        table = pa.table(cols)
    path = folder / f"export_{spec_seed}_{data_seed}.csv"
    write_csv(table, path)
    return q, path


@settings(max_examples=25, deadline=None, suppress_health_check=[HealthCheck.function_scoped_fixture])
@given(
    spec_seed=st.integers(0, 10_000),
    data_seed=st.integers(0, 10_000),
    rows=st.integers(1, 60),
    faults=st.sampled_from([0.0, 0.1, 0.4]),
    noise=st.sampled_from([0.0, 0.05, 0.3]),
)
def test_duckdb_oracle_agrees(tmp_path: Path, spec_seed: int, data_seed: int, rows: int, faults: float, noise: float) -> None:
    q, path = _export(spec_seed, data_seed, rows, faults, noise, tmp_path)
    result = validate(q, path)
    table, off, stops = sql_validate(q, str(path))
    ours = {
        r["item"]: {k: int(r[k]) for k in ("expected", "answered", "out_of_path", "missing_on_path", "invalid")}
        for r in result.table.to_dict("records")
    }
    assert ours == table
    j = {name: i for i, name in enumerate(result.items)}
    ours_off = {
        (int(r) + 1, item) for item in result.items for r in np.flatnonzero(result.has_value[:, j[item]] & ~result.due[:, j[item]])
    }
    assert ours_off == off
    finding_off = {(f.row, f.item) for f in result.findings if f.check in ("out-of-path", "after-stop")}
    assert finding_off == off
    assert {str(i + 1): s for i, s in enumerate(result.stop.tolist())} == stops


@settings(max_examples=25, deadline=None, suppress_health_check=[HealthCheck.function_scoped_fixture])
@given(
    spec_seed=st.integers(0, 10_000),
    data_seed=st.integers(0, 10_000),
    rows=st.integers(1, 60),
    faults=st.sampled_from([0.0, 0.2]),
    noise=st.sampled_from([0.0, 0.1, 0.3]),
)
def test_rowwise_interpreter_agrees_on_every_cell(
    tmp_path: Path, spec_seed: int, data_seed: int, rows: int, faults: float, noise: float
) -> None:
    q, path = _export(spec_seed, data_seed, rows, faults, noise, tmp_path)
    result = validate(q, path, chunk_rows=7)
    states = interpret_csv(q, str(path))
    assert len(states) == result.respondents
    for j, item in enumerate(result.items):
        assert [s.due[item] for s in states] == result.due[:, j].tolist(), item
        assert [s.present[item] for s in states] == result.has_value[:, j].tolist(), item
        assert [s.valid[item] for s in states] == result.valid[:, j].tolist(), item
    assert [s.stop for s in states] == result.stop.tolist()
    failed = sorted((i + 1, c) for i, s in enumerate(states) for c in s.failed)
    assert failed == sorted((f.row, f.item) for f in result.findings if f.check == "check-failed")


def test_bikeshare_demo_agrees_with_both_oracles() -> None:
    root = Path(__file__).resolve().parents[2]
    spec = root / "specs" / "bikeshare.qlc"
    data = root / "specs" / "bikeshare_export.csv"
    q = load_text(spec.read_text(), str(spec)).questionnaire
    result = validate(q, data)
    table, off, _ = sql_validate(q, str(data))
    assert {r["item"]: {k: int(r[k]) for k in table[r["item"]]} for r in result.table.to_dict("records")} == table
    assert {(f.row, f.item) for f in result.findings if f.check in ("out-of-path", "after-stop")} == off
    states = interpret_csv(q, str(data))
    for j, item in enumerate(result.items):
        assert [s.due[item] for s in states] == result.due[:, j].tolist(), item


@settings(max_examples=20, deadline=None)
@given(spec_seed=st.integers(0, 10_000), data_seed=st.integers(0, 10_000), rows=st.integers(1, 80))
def test_simulate_without_faults_follows_the_routing(spec_seed: int, data_seed: int, rows: int) -> None:
    text = make_spec(spec_seed, size=random.Random(spec_seed).randint(3, 8))
    q = load_text(text, "prop.qlc").questionnaire
    sim = simulate(q, rows, seed=data_seed)
    result = validate(q, sim.table)
    assert sim.faults == []
    table = result.table
    assert (table["out_of_path"] == 0).all() and (table["invalid"] == 0).all()
    assert not (table["answered"] > table["expected"]).any()
    # Edit rules drawn at random may fail on random answers; nothing else is an error.
    assert not [f for f in result.findings if f.severity.value == "error" and f.check != "check-failed"]
