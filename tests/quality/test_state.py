"""The quality stage's route state comes from the data stage: check failures and
findings agree with the validation result, and completeness rules keep SQL's NULL logic."""

from __future__ import annotations

from pathlib import Path

import duckdb
import numpy as np
import pandas as pd
import pytest

from logiccheck.data import validate
from logiccheck.data.evaluate import evaluate_columns
from logiccheck.data.readers import read_cells as read_export
from logiccheck.loader import load_file, load_text
from logiccheck.pipeline import run_pipeline
from logiccheck.quality.bridge import route_state, state_from_validation
from logiccheck.quality.completeness import parse_rule
from logiccheck.quality.route import RouteError
from tests.conftest import SPECS
from tests.quality.context import QUALITY, build_context, quality_blocks
from tests.quality.planted import SPEC, build


def cases(tmp: Path) -> list[tuple[object, Path]]:
    export, _, _ = build()
    path = tmp / "planted.csv"
    export.to_csv(path, index=False)
    return [
        (load_text(SPEC, "libvisit.qlc").questionnaire, path),
        (load_file(SPECS / "bikeshare.qlc").questionnaire, SPECS / "bikeshare_export.csv"),
    ]


@pytest.mark.parametrize("case", [0, 1])
def test_state_carries_the_validation(tmp_path: Path, case: int) -> None:
    q, path = cases(tmp_path)[case]
    result = validate(q, path, keep_cells=True)
    state = state_from_validation(q, result)
    assert state.items == result.items and state.ids == list(result.ids)
    np.testing.assert_array_equal(state.due, result.due)
    failed = {(f.respondent, f.item) for f in result.findings if f.check == "check-failed"}
    mine = {(state.ids[r], name) for name, m in state.checks_failed.items() for r in np.flatnonzero(m)}
    assert mine == failed
    stopped = {(state.ids[r], name) for name, m in state.stops.items() for r in np.flatnonzero(m)}
    assert stopped == {(str(i), s) for i, s in zip(result.ids, result.stop, strict=True) if s}


def test_pipeline_quality_matches_a_standalone_route_state(tmp_path: Path) -> None:
    q, path = cases(tmp_path)[0]
    data = read_export(path)
    result = run_pipeline(q, path)
    standalone = route_state(q, data)
    assert result.state is not None and result.state.ids == standalone.ids
    for mask in ("due", "has_value", "valid", "nonresponse"):
        np.testing.assert_array_equal(getattr(result.state, mask), getattr(standalone, mask), err_msg=mask)
    # The same check units on a context built from a separate validation agree.
    ours = [(f.check, f.row) for f in result.findings if f.check in QUALITY]
    theirs = [(f.check, f.row) for b in quality_blocks(build_context(q, data)) for f in b.records()]
    assert sorted(ours, key=str) == sorted(theirs, key=str)
    # One record type: quality findings carry the data stage's 1-based rows.
    first = next(f for f in result.findings if f.check in QUALITY)
    assert first.row is not None and first.row >= 1 and first.to_json()["check"] == first.check


def test_no_id_column_is_a_clear_error(tmp_path: Path) -> None:
    q, path = cases(tmp_path)[0]
    data = read_export(path).drop(columns=["id"])
    with pytest.raises(RouteError, match="no respondent id column 'id'"):
        route_state(q, data)


def test_rule_logic_matches_sql_null_logic() -> None:
    # Oracle: DuckDB evaluates the same condition with NULL for a missing measure
    # (three-valued logic as the SQL standard defines it); a row holds where it is TRUE.
    q = load_text('survey t "t"\nlast: single yn "Last"\ncodes yn\n  yes = 1 "Yes"\n').questionnaire
    rng = np.random.default_rng(7)
    share = rng.choice([0.2, 0.6, 0.9, np.nan], size=64)
    due = rng.choice([0.0, 2.0, 5.0, np.nan], size=64)
    rules = [
        "answered_share > 0.5 and not (due_count < 3)",
        "answered_share > 0.8 or due_count >= 5",
        "not (answered_share <= 0.5 or due_count = 2)",
        "answered_share in 0.5..1 and due_count != 0",
    ]
    sql = {
        rules[0]: "answered_share > 0.5 and not (due_count < 3)",
        rules[1]: "answered_share > 0.8 or due_count >= 5",
        rules[2]: "not (answered_share <= 0.5 or due_count = 2)",
        rules[3]: "answered_share between 0.5 and 1 and due_count <> 0",
    }
    con = duckdb.connect()
    con.register("m", pd.DataFrame({"i": np.arange(64), "answered_share": share, "due_count": due}))
    for text in rules:
        expr = parse_rule(text, q).expr
        ours = evaluate_columns(q, expr, 64, numbers={"answered_share": share, "due_count": due}).t
        # NaN from pandas registers as a float NaN in DuckDB, not NULL: make it NULL.
        got = con.execute(
            "select coalesce(" + sql[text] + ", false) from (select i, "
            "case when isnan(answered_share) then null else answered_share end as answered_share, "
            "case when isnan(due_count) then null else due_count end as due_count from m) order by i"
        ).fetchall()
        np.testing.assert_array_equal(ours, np.array([r[0] for r in got]), err_msg=text)


def test_command_path_reads_and_routes_once(monkeypatch: pytest.MonkeyPatch) -> None:
    from logiccheck.cli import validate as cli_validate
    from logiccheck.pipeline import RunOptions
    from logiccheck.pipeline import run as pipeline_run

    opened: list[str] = []
    routed: list[int] = []
    real_open, real_run = pipeline_run.open_export, pipeline_run.Validator.run

    def counted_open(*args, **kwargs):  # type: ignore[no-untyped-def]
        opened.append(str(args[0]))
        return real_open(*args, **kwargs)

    def counted_run(self, *args, **kwargs):  # type: ignore[no-untyped-def]
        routed.append(1)
        return real_run(self, *args, **kwargs)

    monkeypatch.setattr(pipeline_run, "open_export", counted_open)
    monkeypatch.setattr(pipeline_run.Validator, "run", counted_run)
    loaded = load_file(SPECS / "bikeshare.qlc")
    result = cli_validate.run_validation(loaded, str(SPECS / "bikeshare_export.csv"), RunOptions(chunk_rows=1000), "never")
    assert len(opened) == 1 and routed == [1]
    # The quality checks ran on the same pass (the near-duplicate search left its scores).
    assert result.match is not None and len(result.match.partner) == result.respondents


def test_api_drops_the_cells_unless_asked() -> None:
    import logiccheck

    survey = logiccheck.load(SPECS / "bikeshare.qlc")
    export = SPECS / "bikeshare_export.csv"
    plain = survey.validate(export)
    kept = survey.validate(export, keep_cells=True)
    assert plain.raw.due is None and plain.raw.frame is None
    assert kept.raw.due is not None and kept.raw.due.shape == (kept.raw.respondents, len(kept.raw.items))
    assert [(f.check, f.row) for f in plain.raw.findings] == [(f.check, f.row) for f in kept.raw.findings]
