"""The draft and routing-mismatch against an invented questionnaire with known routing:
gates, a section, a screen-out, a number threshold, a conjunction, `has` on a multi
option, item non-response and a few answers planted off the route."""

from __future__ import annotations

import json
from pathlib import Path

import numpy as np
import pandas as pd
import pytest

from logiccheck.checks.data_runner import run_data_checks
from logiccheck.checks.runner import run_checks
from logiccheck.data import DataMapping, validate
from logiccheck.data.mapping import mapping_from_dict
from logiccheck.draft import draft_file, mismatch
from logiccheck.draft.mismatch import routing_mismatch
from logiccheck.loader import load_text
from tests.data.test_labels import to_labels
from tests.draft.context import data_context
from tests.draft.scenario import ITEMS, SPEC, export, questionnaire

ROOT = Path(__file__).resolve().parents[2]
WRONG = {"water_ok": ("when water = yes", "when shed = yes"), "wait_years": ("when waitlist = yes", "when holds_plot = no")}


@pytest.fixture(scope="module")
def codes_export(tmp_path_factory: pytest.TempPathFactory) -> Path:
    frame, planted = export()
    assert len(planted) == 20
    path = tmp_path_factory.mktemp("allot") / "allotments.csv"
    frame.to_csv(path, index=False)
    return path


@pytest.fixture(scope="module")
def drafted(codes_export: Path):  # type: ignore[no-untyped-def]
    return draft_file(codes_export)


def test_draft_says_it_is_a_draft_and_lints_without_errors(drafted) -> None:  # type: ignore[no-untyped-def]
    assert drafted.text.startswith("# DRAFT")
    loaded = load_text(drafted.text, "draft.qlc")
    errors = [d for d in run_checks(loaded) if d.severity.value == "error"]
    assert errors == []
    assert [e.name for e in loaded.questionnaire.items()] == ITEMS


def test_draft_routes_at_least_15_of_17_items_as_the_real_spec(codes_export: Path, drafted) -> None:  # type: ignore[no-untyped-def]
    real = validate(questionnaire(), codes_export, DataMapping()).table.set_index("item")["expected"]
    ours = validate(load_text(drafted.text, "d.qlc").questionnaire, codes_export, DataMapping()).table.set_index("item")["expected"]
    n = 3000
    same = [i for i in ITEMS if abs(int(real[i]) - int(ours[i])) <= 0.01 * n]
    assert len(same) >= 15, (real.to_dict(), ours.to_dict())
    # The routing facts, as mined: the screen-out, the threshold, `has`, the conjunction.
    text = drafted.text
    assert "stop out_age" in text and "when age < 25" in text
    assert "mentor: single" in text and "when years >= 5" in text
    assert "when grows has c5" in text
    assert "when years >= 3 and shed = c1" in text
    assert "when water = c1" in text  # the planted off-route answers did not move it
    # The plot section comes back as one section, its follow-ups inside with their own `when`.
    assert "section part_1 \"Part 1\" when holds_plot = c1" in text
    inside = text.split("section part_1", 1)[1].split("\n\n", 1)[0]
    assert all(f"\n  {name}:" in inside for name in ITEMS[2:10])


def test_labels_export_gives_the_same_table_and_dispositions(codes_export: Path, tmp_path: Path) -> None:
    q = questionnaire()
    frame = pd.read_csv(codes_export, dtype=str, keep_default_na=False)
    path = tmp_path / "labels.csv"
    to_labels(frame, q).to_csv(path, index=False)
    codes = validate(q, codes_export, DataMapping())
    labels = validate(q, path, mapping_from_dict({"values": "labels"}))
    pd.testing.assert_frame_equal(labels.table, codes.table)
    assert labels.dispositions == codes.dispositions
    assert sorted((f.check, f.row, f.item) for f in labels.findings) == sorted((f.check, f.row, f.item) for f in codes.findings)
    # A draft from the labels export lints clean and names the answers by their labels.
    d = draft_file(path)
    assert [x for x in run_checks(load_text(d.text, "d.qlc")) if x.severity.value == "error"] == []
    assert "when holds_plot = yes" in d.text or "holds_plot = yes" in d.text


def test_routing_mismatch_finds_exactly_the_two_wrong_conditions(codes_export: Path) -> None:
    text = SPEC.read_text()
    for right, wrong in WRONG.values():
        text = text.replace(right, wrong)
    hits = list(routing_mismatch(data_context(questionnaire(text), codes_export)))
    assert sorted(h.item for h in hits) == sorted(WRONG)
    said = {h.item: h.message for h in hits}
    assert "as if asked `when water = yes`" in said["water_ok"] and "shed = yes` (" in said["water_ok"]
    assert "as if asked `when waitlist = yes`" in said["wait_years"]


def test_the_quick_screen_keeps_both_wrong_conditions_on_a_larger_export(tmp_path: Path) -> None:
    # 9,000 respondents: the 2,000-row screen runs before the full search, and must not
    # rule out either planted item (nor let a right one through).
    frame, _ = export(rows=9000, seed=11)
    path = tmp_path / "allotments_9000.csv"
    frame.to_csv(path, index=False)
    text = SPEC.read_text()
    for right, wrong in WRONG.values():
        text = text.replace(right, wrong)
    ctx = data_context(questionnaire(text), path)
    assert ctx.n > 2 * mismatch.SCREEN_ROWS
    assert sorted(h.item for h in routing_mismatch(ctx)) == sorted(WRONG)


def test_routing_mismatch_is_silent_when_the_spec_is_right(codes_export: Path) -> None:
    assert list(routing_mismatch(data_context(questionnaire(), codes_export))) == []


def test_fixture_folder_through_the_data_runner() -> None:
    folder = ROOT / "tests" / "data_checks" / "routing-mismatch"
    q = load_text((folder / "spec.qlc").read_text(), str(folder / "spec.qlc")).questionnaire
    ctx = data_context(q, folder / "export.csv")
    got = [{"check": f.check, "row": f.row or None, "item": f.item}
           for b in run_data_checks(ctx) if b.check == "routing-mismatch" for f in b.records()]
    expected = json.loads((folder / "expected.json").read_text())
    key = lambda d: (d["check"], d["item"])  # noqa: E731
    assert sorted(got, key=key) == sorted(expected, key=key)
    assert all(f["row"] is None for f in got)


def test_planted_answers_are_what_validate_reports_off_path(codes_export: Path) -> None:
    # The scenario's own sanity: the 20 planted cells are off the route in the real spec.
    result = validate(questionnaire(), codes_export, DataMapping())
    off = result.table.set_index("item")["out_of_path"]
    assert int(off["water_ok"]) >= 10 and int(off["events"]) >= 10
    assert np.isfinite(result.respondents)
