"""The scale checks (`data_check` units) give exactly the findings their fixture folders
expect (tests/data_checks/<check>/: spec.qlc, export.csv, expected.json, a list of
{"check", "row" (1-based data row, null for a file-level finding), "item"})."""

from __future__ import annotations

import json
from pathlib import Path

import pytest

from logiccheck.checks.data_runner import run_data_checks
from logiccheck.checks.registry import all_checks
from logiccheck.data.validate import validate
from logiccheck.loader import load_file
from logiccheck.scales.bridge import context_from_validation

FIXTURES = Path(__file__).resolve().parent / "data_checks"
WITH_FIXTURES = sorted(p.name for p in FIXTURES.iterdir() if (p / "expected.json").is_file())
# The scale checks must have one. They run through `scales.bridge` until the pipeline
# builds the context (its own fixture test then runs these folders too).
REQUIRED = ("low-reliability", "scale-misfit", "inconsistent-answers")


def findings_for(check: str, folder: Path) -> list[dict[str, object]]:
    q = load_file(folder / "spec.qlc").questionnaire
    result = validate(q, folder / "export.csv", keep_cells=True)
    ctx = context_from_validation(q, result)
    others = [name for name in all_checks() if name != check]
    out = []
    for block in run_data_checks(ctx, disable=others):
        for f in block.records():
            out.append({"check": f.check, "row": f.row, "item": f.item})
    return sorted(out, key=lambda d: (d["row"] or 0, str(d["item"])))


@pytest.mark.parametrize("check", REQUIRED)
def test_fixture_exists(check: str) -> None:
    assert check in WITH_FIXTURES, f"add tests/data_checks/{check}/spec.qlc, export.csv and expected.json"
    assert all_checks()[check].data_run is not None


@pytest.mark.parametrize("check", WITH_FIXTURES)
def test_fixture_gives_exactly_the_expected(check: str) -> None:
    folder = FIXTURES / check
    expected = json.loads((folder / "expected.json").read_text())
    expected = sorted(expected, key=lambda d: (d["row"] or 0, str(d["item"])))
    assert findings_for(check, folder) == expected
