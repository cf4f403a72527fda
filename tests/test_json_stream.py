"""The streamed JSON writer against the standard library's `json.dumps` of the same
result (the oracle): byte-identical text, awkward strings included, in any slice size."""

from __future__ import annotations

import json
from pathlib import Path

import numpy as np
import pytest

from logiccheck.data.findings import FindingBlock
from logiccheck.diagnostics import Severity
from logiccheck.loader import load_file
from logiccheck.pipeline import run_pipeline
from logiccheck.report import data_json
from logiccheck.report.data_json import validation_json

ROOT = Path(__file__).resolve().parents[1]


def _result():  # type: ignore[no-untyped-def]
    return run_pipeline(load_file(ROOT / "specs" / "bikeshare.qlc"), ROOT / "specs" / "bikeshare_export.csv")


def _oracle(result) -> str:  # type: ignore[no-untyped-def]
    result._findings = None
    return json.dumps(result.to_json(), indent=2, ensure_ascii=False)


@pytest.mark.parametrize("size", [1, 7, 200_000])
def test_demo_export_same_text(monkeypatch: pytest.MonkeyPatch, size: int) -> None:
    monkeypatch.setattr(data_json, "SLICE", size)
    result = _result()
    assert result.finding_count > 20
    assert validation_json(result) == _oracle(result)


def test_awkward_strings_and_order(monkeypatch: pytest.MonkeyPatch) -> None:
    monkeypatch.setattr(data_json, "SLICE", 3)
    result = _result()
    result.blocks += [
        # A template filled with values needing escapes, rows out of order, a blank value.
        FindingBlock("x-check", Severity.warning, 'it"em', 'm {value} "q"\\ {value} é', np.array([3, 0, 5]),
                     np.array(['a"b', "ü\n", "c"], dtype=object), ["v\t1", None, "\x01z"]),
        FindingBlock("y-check", Severity.info, None, 'file level "x"', np.array([], dtype=np.int64)),
        # One message per row, no ids, a value that is not text.
        FindingBlock("z-check", Severity.error, "i", "unused", np.array([2, 2]), None, [1.5, "x"], ["m1\n", 'm"2']),
        FindingBlock("w-check", Severity.error, "i", "plain", np.array([7, 1]), np.array(["1", "2"], dtype=object),
                     None, ["a", "b"]),
    ]
    assert validation_json(result) == _oracle(result)


def test_no_findings() -> None:
    result = _result()
    result.blocks = []
    text = validation_json(result)
    assert text == _oracle(result)
    assert json.loads(text)["findings"] == []
