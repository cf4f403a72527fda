"""The per-item chart: bars match the table, items in order, labels readable."""

from __future__ import annotations

import itertools

import pytest

pytest.importorskip("matplotlib")

from logiccheck.loader import load_file
from logiccheck.report.item_chart import chart_rows, item_chart
from logiccheck.report.report_data import from_validation
from tests.report.fakes import fake_result
from tests.report.test_graph_picture import _text_boxes


@pytest.fixture(scope="module")
def table():
    q = load_file("specs/bikeshare.qlc").questionnaire
    return q, from_validation(q, fake_result(q)).ordered_items()


def test_rows_follow_the_questionnaire_with_section_headers(table) -> None:
    q, items = table
    rows = chart_rows(items)
    headers = [label for label, header, _ in rows if header]
    assert headers == ["screening", "riding", "lapsed", "overall"]
    assert [label for label, header, _ in rows if not header] == [e.name for e in q.items()]


def test_bar_segments_add_up_to_the_table(table) -> None:
    _, items = table
    values = [v for _, header, v in chart_rows(items) if not header]
    for rec, v in zip(items.to_dict("records"), values, strict=True):
        assert v["on_path"] + v["out_of_path"] == rec["answered"]
        assert v["missing"] == rec["missing_on_path"] and v["expected"] == rec["expected"]


def test_labels_do_not_overlap_and_off_path_is_called_out(table) -> None:
    _, items = table
    fig = item_chart(items, 200)
    texts = _text_boxes(fig)
    for (a, ea), (b, eb) in itertools.combinations(texts, 2):
        assert not ea.overlaps(eb), (a, b)
    called = [t for t, _ in texts if t.endswith("off path")]
    assert len(called) == int((items["out_of_path"] > 0).sum()) > 0
