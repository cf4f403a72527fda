"""Judging cells once per distinct text, kept from chunk to chunk, gives exactly the
verdicts of judging each chunk on its own: Arrow chunks with their own dictionaries, in
different orders, texts first seen in a later chunk, nulls, markers."""

from __future__ import annotations

import numpy as np
import pyarrow as pa
import pytest

from logiccheck.data.frame import Cells, judge, parse_numbers, plan_layout, type_cells
from logiccheck.data.mapping import DataMapping
from logiccheck.loader import load_text

SPEC = """survey memo "Memo"

codes yesno
  yes = 1 "Yes"
  no  = 2 "No"

nonresponse
  dk = 98 "Don't know"

kept: single yesno "Kept?" gate
count: number 0..30 "How many?" when kept = yes
share: decimal 0..1 "Share?" strict when kept = yes
again: single yesno "Again?" when kept = yes
"""

# Each Arrow chunk has its own dictionary (as a CSV reader gives per block), with new
# texts appearing late: an invalid code, stray text, a marker, a non-response code.
CHUNKS = [
    ["1", "2", None, "1", " 2 "],
    ["2", "1", "98", "x", None, "1"],
    ["3", "-", "1", "nan", "2", "98", "1.5", "N/S"],
]
NUMBERS = [
    ["0", "30", None, "31"],
    ["4", "4.5", "98", "abc"],
    ["1e1", "", " 7", "-1", "N/S"],
]


def _column(parts: list[list[str | None]]) -> pa.ChunkedArray:
    return pa.chunked_array([pc_encode(p) for p in parts])


def pc_encode(values: list[str | None]) -> pa.Array:
    return pa.array(values, pa.string()).dictionary_encode()


def _plain(plan, values: list[str | None], mapping: DataMapping) -> tuple[np.ndarray, ...]:
    """The per-cell path: parse and judge every cell of a plain (not dictionary) column."""
    present, value, parsed = parse_numbers(pa.array(values, pa.string()).cast(pa.large_string()), mapping.blank_markers() | {"N/S"})
    reason, valid, value, nr = judge(plan, present, value, parsed)
    return present, valid, reason, value, nr


def _same(c: Cells, ref: tuple[np.ndarray, ...]) -> None:
    present, valid, reason, value, nr = ref
    assert (c.present == present).all()
    assert (c.valid == valid).all()
    assert (c.reason == reason).all()
    assert np.array_equal(c.value, value, equal_nan=True)
    assert ((c.nr if c.nr is not None else np.zeros(len(present), dtype=bool)) == nr).all()


@pytest.mark.parametrize("name,parts", [("kept", CHUNKS), ("count", NUMBERS), ("share", NUMBERS)])
def test_memo_across_chunks_matches_judging_each_cell(name: str, parts: list[list[str | None]]) -> None:
    q = load_text(SPEC, "memo.qlc").questionnaire
    mapping = DataMapping.model_validate({"not_shown": ["N/S"]})
    plan = plan_layout(q, mapping, ["id", "kept", "count", "share"]).plans[name]
    memo: dict = {}
    # Two table chunks: the first with two Arrow chunks, the second with one, sharing a memo.
    first = pa.table({plan.columns[0]: _column(parts[:2])})
    second = pa.table({plan.columns[0]: _column(parts[2:])})
    a = type_cells(plan, first, mapping, memo)
    b = type_cells(plan, second, mapping, memo)
    assert memo, "the verdicts were kept for the next chunk"
    values = [v for p in parts for v in p]
    ref = _plain(plan, values, mapping)
    n1 = len(parts[0]) + len(parts[1])
    _same(a, tuple(r[:n1] for r in ref))
    _same(b, tuple(r[n1:] for r in ref))
    # The same column in one piece, without a memo, agrees too.
    whole = type_cells(plan, pa.table({plan.columns[0]: pa.array(values, pa.string())}), mapping)
    _same(whole, ref)
    marked = np.array([v is not None and v.strip() == "N/S" for v in values])
    assert (np.concatenate([a.not_shown, b.not_shown]) == marked).all()
    assert (whole.not_shown == marked).all()


def test_columns_judged_alike_share_verdicts() -> None:
    q = load_text(SPEC, "memo.qlc").questionnaire
    mapping = DataMapping()
    plans = plan_layout(q, mapping, ["id", "kept", "count", "share", "again"]).plans
    memo: dict = {}
    type_cells(plans["kept"], pa.table({"kept": _column(CHUNKS)}), mapping, memo)
    type_cells(plans["count"], pa.table({"count": _column(NUMBERS)}), mapping, memo)
    assert len(memo) == 2  # a code list and a range judge differently
    # `again` is judged like `kept`: it reuses (and extends) the same verdicts.
    texts = ["2", "7", None, "98", "1", "zz", "1"]
    got = type_cells(plans["again"], pa.table({"again": _column([texts[:3], texts[3:]])}), mapping, memo)
    assert len(memo) == 2
    _same(got, _plain(plans["again"], texts, mapping))
