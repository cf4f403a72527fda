"""Every quality check has a fixture folder `tests/data_checks/<check>/` (spec.qlc,
export.csv, expected.json, optional frame.csv) and gives exactly the expected findings.

The general fixture runner for data checks uses the same layout; until it lands, this
test runs the quality checks' folders."""

from __future__ import annotations

import json
from pathlib import Path

import pandas as pd
import pytest

from logiccheck.checks.registry import all_checks
from tests.quality.context import build_context, quality_blocks

FIXTURES = Path(__file__).resolve().parents[1] / "data_checks"
QUALITY_UNITS = sorted(name for name, info in all_checks().items() if info.stage == "quality" and info.data_run)


def test_every_quality_check_has_a_fixture() -> None:
    assert QUALITY_UNITS, "no quality check is declared with data_check"
    missing = [name for name in QUALITY_UNITS if not (FIXTURES / name / "expected.json").exists()]
    assert not missing, f"quality checks without a fixture folder: {missing}"


@pytest.mark.parametrize("check", QUALITY_UNITS)
def test_fixture_gives_exactly_the_expected_findings(check: str) -> None:
    folder = FIXTURES / check
    frame_file = folder / "frame.csv"
    frame = pd.read_csv(frame_file, dtype=str, keep_default_na=False) if frame_file.exists() else None
    ctx = build_context((folder / "spec.qlc").read_text(), folder / "export.csv", sample_frame=frame)
    got = sorted(
        ({"check": f.check, "row": f.row, "item": f.item} for b in quality_blocks(ctx) for f in b.records()
         if f.check == check),
        key=lambda d: (d["row"] or 0, d["item"] or ""),
    )
    want = json.loads((folder / "expected.json").read_text())
    assert want, "a fixture must include a failing case"
    assert got == want
