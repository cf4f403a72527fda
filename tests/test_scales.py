"""Scales: the statement, the statistics against outside references, composite scores,
and the results in validate's JSON and clean's outputs."""

from __future__ import annotations

import itertools
import json
from pathlib import Path

import numpy as np
import pandas as pd
import pingouin as pg
import pytest

from logiccheck.checks.runner import run_checks
from logiccheck.loader import load_text
from logiccheck.pipeline import PipelineResult, run_pipeline
from logiccheck.scales.answers import answers_of
from logiccheck.scales.examples import AGREE5 as CODES_AGREE5
from logiccheck.scales.stats import (
    alpha_if_deleted,
    corrected_item_total,
    cronbach_alpha,
    feldt_interval,
    reliability,
)
from tests.cli_run import run_cli

AGREE5 = CODES_AGREE5 + '''
nonresponse
  dk = 98 "Don't know"
  refused = 99 "Prefer not to say"
'''

SPEC = f'''survey museum "Museum visit"

{AGREE5}
staff_kind: single agree5 "Staff were kind."
staff_quick: single agree5 "Staff were quick to help."
staff_clear: single agree5 "Staff explained things clearly."
staff_rude: single agree5 "Staff were rude."
room_light: number 0..10 "How well lit were the rooms, 0 to 10?"
room_quiet: number 0..10 "How quiet were the rooms, 0 to 10?"
room_crowded: number 0..10 "How crowded were the rooms, 0 to 10?"

scale staff "Staff" min 3
  staff_kind
  staff_quick
  staff_clear
  staff_rude reversed

scale rooms "Rooms" score top 3
  room_light
  room_quiet
  room_crowded reversed
'''


def _export(seed: int, n: int = 300) -> pd.DataFrame:
    """Invented museum visitors: a shared trait per theme, non-response codes and blanks."""
    rng = np.random.default_rng(seed)
    t, u = rng.normal(size=n), rng.normal(size=n)

    def agree(load: float, flip: bool = False) -> np.ndarray:
        x = np.clip(np.round(3 + load * t + rng.normal(size=n)), 1, 5)
        return 6 - x if flip else x

    def ten(load: float, flip: bool = False) -> np.ndarray:
        x = np.clip(np.round(5 + 2 * load * u + 2 * rng.normal(size=n)), 0, 10)
        return 10 - x if flip else x

    frame = pd.DataFrame({
        "id": [f"v{i}" for i in range(n)],
        "staff_kind": agree(1.2), "staff_quick": agree(0.9), "staff_clear": agree(1.0), "staff_rude": agree(1.1, True),
        "room_light": ten(1.0), "room_quiet": ten(0.8), "room_crowded": ten(0.9, True),
    }).astype(object)
    cells = frame.columns[1:]
    for col in cells:
        frame.loc[rng.random(n) < 0.05, col] = ""
    for col in cells[:4]:
        frame.loc[rng.random(n) < 0.04, col] = rng.choice([98, 99])
    return frame


def _run(spec: str, frame: pd.DataFrame) -> PipelineResult:
    """The pipeline every command runs, on an invented export."""
    q = load_text(spec, "museum.qlc").questionnaire
    return run_pipeline(q, frame.astype(str).replace("nan", ""))


def _scales(result: PipelineResult) -> dict[str, dict]:
    return {s["scale"]: s for s in result.analyses["scales"].sections["scales"]}


def _rows(result: PipelineResult, check: str) -> list[int]:
    return sorted({int(r) for b in result.blocks if b.check == check for r in b.rows.tolist()})


def _answers(frame: pd.DataFrame, items: list[str], reversed_: dict[str, float]) -> pd.DataFrame:
    """Independent reading of the export: numbers only, codes 98/99 and blanks are no answer."""
    out = frame[items].apply(pd.to_numeric, errors="coerce").astype(float)
    out = out.where(~out.isin([98, 99]))
    for item, flip in reversed_.items():
        out[item] = flip - out[item]
    return out


STAFF = ["staff_kind", "staff_quick", "staff_clear", "staff_rude"]
ROOMS = ["room_light", "room_quiet", "room_crowded"]


@pytest.mark.parametrize("seed", [1, 2, 3])
def test_alpha_and_feldt_interval_match_pingouin(seed: int) -> None:
    frame = _export(seed)
    results = _scales(_run(SPEC, frame))
    for name, items, flip in (("staff", STAFF, {"staff_rude": 6}), ("rooms", ROOMS, {"room_crowded": 10})):
        complete = _answers(frame, items, flip).dropna()
        # pingouin.cronbach_alpha: listwise complete cases when nan_policy="listwise"; its
        # interval is Feldt's, rounded to 3 decimals.
        alpha, ci = pg.cronbach_alpha(data=complete, ci=0.95, nan_policy="listwise")
        rel = results[name]
        assert rel["n"] == len(complete)
        assert rel["alpha"] == pytest.approx(alpha, abs=1e-6)
        assert rel["alpha_ci"] == pytest.approx(list(ci), abs=1e-3)
        # alpha if deleted: pingouin on the other items of the same respondents.
        for item in items:
            others, _ = pg.cronbach_alpha(data=complete.drop(columns=[item]), ci=0.95)
            assert rel["alpha_if_deleted"][item] == pytest.approx(others, abs=1e-6)
            # corrected item-total: pandas' Pearson correlation with the sum of the others.
            rest = complete.drop(columns=[item]).sum(axis=1)
            assert rel["item_total"][item] == pytest.approx(complete[item].corr(rest), abs=1e-6)


def test_alpha_equals_the_standardised_formula_for_parallel_items() -> None:
    # Cronbach (1951), "Coefficient alpha and the internal structure of tests",
    # Psychometrika 16: with equal item variances and equal covariances, alpha =
    # k·r / (1 + (k − 1)·r), r the common inter-item correlation (the Spearman-Brown form).
    # Items = a true score crossed with every permutation of three errors, so the item
    # variances are exactly equal and so are the covariances.
    true = np.array([1.0, 2.0, 4.0, 7.0])
    errors = np.array(list(itertools.permutations([-1.0, 0.0, 1.5])))
    x = np.array([t + e for t in true for e in errors])
    cov = np.cov(x, rowvar=False)
    assert np.allclose(np.diag(cov), cov[0, 0]) and np.allclose(cov[~np.eye(3, dtype=bool)], cov[0, 1])
    r = cov[0, 1] / cov[0, 0]
    assert cronbach_alpha(x) == pytest.approx(3 * r / (1 + 2 * r), abs=1e-12)


def test_feldt_interval_brackets_alpha_and_narrows_with_n() -> None:
    lo_small, hi_small = feldt_interval(0.8, 30, 5)
    lo_big, hi_big = feldt_interval(0.8, 3000, 5)
    assert lo_small < lo_big < 0.8 < hi_big < hi_small


def test_statistics_are_none_where_undefined() -> None:
    flat = np.ones((10, 3))
    assert cronbach_alpha(flat) is None
    assert corrected_item_total(flat) == [None, None, None]
    assert alpha_if_deleted(np.ones((10, 2))) == [None, None]  # one item left: no alpha
    rel = reliability(np.array([[1.0, 2.0], [np.nan, 1.0], [2.0, np.nan]]))
    assert rel.n == 1 and rel.alpha is None and rel.alpha_ci is None


def test_composite_scores_match_an_independent_computation() -> None:
    frame = _export(5, n=200)
    scores = _run(SPEC, frame).analyses["scales"].columns
    # Proportional: (value − lo) / (hi − lo) after reversal, mean over answered items,
    # blank under `min 3` answers.
    staff = (_answers(frame, STAFF, {"staff_rude": 6}) - 1) / 4
    want = staff.mean(axis=1).where(staff.notna().sum(axis=1) >= 3)
    np.testing.assert_allclose(scores["score_staff"], want.to_numpy(), rtol=0, atol=1e-12)
    # Top 3 of 0..10 after reversal = 8, 9, 10; default min = half of 3, rounded up = 2.
    rooms = _answers(frame, ROOMS, {"room_crowded": 10})
    share = (rooms >= 8).astype(float).where(rooms.notna()).mean(axis=1)
    want = share.where(rooms.notna().sum(axis=1) >= 2)
    np.testing.assert_allclose(scores["score_rooms"], want.to_numpy(), rtol=0, atol=1e-12)


def test_inconsistent_answers_match_a_pairwise_implementation() -> None:
    frame = _export(7, n=250)
    got = _rows(_run(SPEC, frame), "inconsistent-answers")
    # Independent: every pair of items of one scale, one at the lowest option and the
    # other at the highest, after reversal (common practice, no source).
    want: set[int] = set()
    for items, flip, lo, hi in ((STAFF, {"staff_rude": 6}, 1, 5), (ROOMS, {"room_crowded": 10}, 0, 10)):
        values = _answers(frame, items, flip)
        for a, b in itertools.permutations(items, 2):
            want |= set(np.flatnonzero(((values[a] == lo) & (values[b] == hi)).to_numpy()).tolist())
    assert got == sorted(want) and got


def test_positions_follow_the_order_of_the_answer_list() -> None:
    # Codes listed high to low and with a gap: positions follow the lines, not the values.
    spec = '''survey s "S"
codes odd
  top = 10 "Best"
  mid = 5 "Middle"
  low = 1 "Worst"
a1: single odd "A?"
a2: single odd "B?"
scale both "Both" min 1
  a1
  a2 reversed
'''
    frame = pd.DataFrame({"id": ["1", "2", "3"], "a1": ["10", "5", "1"], "a2": ["10", "", "1"]})
    q = load_text(spec, "odd.qlc").questionnaire
    answers = answers_of(q, "a1")
    assert not isinstance(answers, str)
    values = np.array([10.0, 5.0, 1.0, np.nan, 7.0])
    np.testing.assert_array_equal(answers.positions(values), [0, 1, 2, np.nan, np.nan])
    np.testing.assert_array_equal(answers.positions(values, reversed_=True), [2, 1, 0, np.nan, np.nan])
    np.testing.assert_allclose(_run(spec, frame).analyses["scales"].columns["score_both"], [0.5, 0.5, 0.5])


def test_scale_positions_on_every_part() -> None:
    spec = AGREE5 + 'q1: single agree5 "Q1"\nq2: single agree5 "Q2"\nscale pair "A pair" min 1 score top 2\n  q1\n  q2 reversed\n'
    loaded = load_text(spec, "p.qlc")
    scale = loaded.questionnaire.scales["pair"]
    line = spec.count("\n", 0, spec.index("scale pair")) + 1
    assert (scale.span.line, scale.name_span.line, scale.name_span.column) == (line, line, 7)
    assert scale.title == "A pair" and scale.title_span.column == 12
    assert scale.min == 1 and scale.min_span is not None and scale.min_span.line == line
    assert scale.top == 2 and scale.top_span is not None
    assert [(m.name, m.reversed, m.span.line, m.span.column) for m in scale.items] == [
        ("q1", False, line + 1, 3), ("q2", True, line + 2, 3)]
    assert scale.items[1].reversed_span is not None and scale.items[1].reversed_span.column == 6


@pytest.mark.parametrize(("head", "message"), [
    ("scale pair \"P\" min 0", "`min` takes a whole number of 1 or more"),
    ("scale pair \"P\" min 1 min 2", "`min` is given twice"),
    ("scale pair \"P\" score top 1.5", "`score top` takes a whole number"),
])
def test_bad_scale_options_are_syntax_errors(head: str, message: str) -> None:
    spec = AGREE5 + f'q1: single agree5 "Q1"\n{head}\n  q1\n'
    got = [d.message for d in run_checks(load_text(spec, "p.qlc")) if d.check == "syntax-error"]
    assert any(message in m for m in got), got


def test_a_scale_with_no_items_is_a_syntax_error() -> None:
    got = [d for d in run_checks(load_text(AGREE5 + 'scale empty "Empty"\n', "p.qlc")) if d.check == "syntax-error"]
    assert got


def test_scale_inside_a_section_is_gathered() -> None:
    spec = AGREE5 + 'section s "S"\n  q1: single agree5 "Q1"\n  q2: single agree5 "Q2"\n  scale pair "P"\n    q1\n    q2\n  q3: single agree5 "Q3"\n'
    q = load_text(spec, "p.qlc").questionnaire
    assert list(q.scales) == ["pair"] and [e.name for e in q.items()] == ["q1", "q2", "q3"]


def test_validate_json_and_clean_outputs(tmp_path: Path) -> None:
    frame = _export(9, n=120)
    spec = tmp_path / "museum.qlc"
    spec.write_text(SPEC)
    export = tmp_path / "museum.csv"
    frame.to_csv(export, index=False)
    done = run_cli("validate", str(spec), "--data", str(export), "--format", "json")
    data = json.loads(done.stdout)
    fields = {"scale", "items", "n", "alpha", "alpha_ci", "alpha_if_deleted", "item_total", "scored", "mean", "sd"}
    assert [s["scale"] for s in data["scales"]] == ["staff", "rooms"]
    for s in data["scales"]:
        assert fields <= set(s)
        assert set(s["alpha_if_deleted"]) == set(s["items"]) == set(s["item_total"])
    out = tmp_path / "out"
    done = run_cli("clean", str(spec), "--data", str(export), "--out", str(out))
    assert done.returncode in (0, 1), done.stderr
    cleaned = pd.read_csv(out / "museum.cleaned.csv", dtype=str, keep_default_na=False)
    summary = json.loads((out / "summary.json").read_text())
    assert summary["added_columns"] == ["score_staff", "score_rooms"]
    assert "mean of proportional item scores" in summary["scales"]["score_staff"]
    # Scores of the kept respondents, exactly as validate computes them.
    want = np.asarray(_run(SPEC, frame).analyses["scales"].columns["score_staff"], dtype=float)
    kept = frame["id"].astype(str).tolist()
    rows = [kept.index(i) for i in cleaned["id"]]
    got = pd.to_numeric(cleaned["score_staff"].replace("", np.nan)).to_numpy()
    np.testing.assert_array_equal(got, want[rows])
    text = run_cli("validate", str(spec), "--data", str(export)).stdout
    assert "staff" in text and "alpha" in text.lower()


def test_signed_bar_cells() -> None:
    from logiccheck.report.bars import signed_bar_cells

    assert signed_bar_cells(0.6, 10) == "     │███  "
    assert signed_bar_cells(-0.4, 10) == "   ▓▓│     "
    assert signed_bar_cells(None, 10) == "     │     "


def test_terminal_html_notebook_and_picture_show_the_scales(tmp_path: Path) -> None:
    from rich.console import Console

    from logiccheck.api import load
    from logiccheck.report.graph_data import build_drawing
    from logiccheck.report.html import render_fragment, render_html
    from logiccheck.report.report_data import from_validation
    from logiccheck.report.scale_text import render_scales

    frame = _export(4, n=150)
    frame["staff_quick"] = frame["staff_rude"]  # worded the other way: a misfit
    spec = tmp_path / "museum.qlc"
    spec.write_text(SPEC)
    export = tmp_path / "museum.csv"
    frame.to_csv(export, index=False)
    q = load_text(SPEC, str(spec)).questionnaire
    result = run_pipeline(q, export)
    scales = result.analyses["scales"].sections["scales"]
    console = Console(width=100, record=True, color_system=None)
    render_scales(console, scales)
    text = console.export_text()
    assert "scale staff: alpha" in text and "staff_rude (reversed)" in text and "▓" in text
    data = from_validation(q, result)
    page = render_html(data)
    assert 'id="scale-staff"' in page and 'class="num neg"' in page
    assert 'id="scale-rooms"' in render_fragment(data)
    view = load(spec).validate(export)
    table = view.scales
    assert set(table["scale"]) == {"staff", "rooms"}
    row = table[(table["scale"] == "staff") & (table["item"] == "staff_quick")].iloc[0]
    assert row["item_total"] < 0 and row["alpha"] == pytest.approx(scales[0]["alpha"])
    details = {node.name: node.detail for node in build_drawing(q).nodes.values()}
    assert details["staff_rude"].endswith("scale staff reversed") and "scale rooms" in details["room_light"]


def test_clinic_demo_shows_the_misfit_item() -> None:
    from logiccheck.loader import load_file
    from tests.conftest import SPECS

    loaded = load_file(SPECS / "clinic_visit.qlc")
    q = loaded.questionnaire
    result = run_pipeline(loaded, SPECS / "clinic_visit_export.csv")
    got = [(b.check, b.item) for b in result.blocks if b.check in ("low-reliability", "scale-misfit")]
    assert got == [("scale-misfit", "bld_privacy")]
    assert [m.name for m in q.scales["building"].items if m.reversed] == ["bld_crowded"]


@pytest.mark.parametrize("name", ["scale-mixed-answers", "scale-unreachable", "scale-top-covers-all"])
def test_docs_examples_of_the_scale_spec_checks_behave(name: str) -> None:
    from logiccheck.checks.registry import check_info

    info = check_info(name)
    bad = run_checks(load_text('survey s "S"\n' + info.bad + "\n", "bad.qlc"))
    good = run_checks(load_text('survey s "S"\n' + info.good + "\n", "good.qlc"))
    assert name in {d.check for d in bad}
    assert not [d for d in good if d.severity.value == "error"], [d.message for d in good]


def test_explain_prints_the_scale_checks() -> None:
    for name in ("scale-mixed-answers", "scale-unreachable", "low-reliability", "scale-misfit", "inconsistent-answers"):
        done = run_cli("explain", name)
        assert done.returncode == 0 and name in done.stdout
    assert "rule of thumb" in run_cli("explain", "low-reliability").stdout


def test_unknown_and_repeated_names_in_scales_use_the_name_checks() -> None:
    spec = AGREE5 + ('owns_bike: single agree5 "I like my bike."\n'
                     'scale mobility "Getting around"\n  owns_bike\n  owns_bik\n  owns_bike\n'
                     'scale mobility "Again"\n  owns_bike\n')
    line = spec.count("\n", 0, spec.index("scale mobility")) + 1
    got = [(d.check, d.line, d.column, d.message) for d in run_checks(load_text(spec, "m.qlc"))
           if d.check in ("unknown-name", "duplicate-name")]
    assert sorted((c, ln, col) for c, ln, col, _ in got) == [
        ("duplicate-name", line + 3, 3), ("duplicate-name", line + 4, 7), ("unknown-name", line + 2, 3)]
    assert any(c == "unknown-name" and "did you mean `owns_bike`" in m for c, _, _, m in got)
