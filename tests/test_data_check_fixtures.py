"""Every data check has a fixture folder (tests/data_checks/<check>/) run through the
pipeline: its findings of that check must be exactly the expected ones (check, row, item).
A `frame.csv` in the folder is passed as the sample frame.

Quality checks join this layout as they become `@data_check` units; a data-stage check,
or any check with a runner, without a folder fails the coverage test."""

from __future__ import annotations

import json
from pathlib import Path

import pytest

from logiccheck.checks.registry import all_checks
from logiccheck.loader import load_file
from logiccheck.pipeline import RunOptions, run_pipeline

FIXTURES = Path(__file__).resolve().parent / "data_checks"
FOLDERS = sorted(p.name for p in FIXTURES.iterdir() if p.is_dir())


def _needs_fixture() -> list[str]:
    return sorted(
        name for name, info in all_checks().items()
        if info.stage in ("data", "quality") and (info.stage == "data" or info.data_run is not None)
    )


def test_every_data_check_has_a_fixture_folder() -> None:
    missing = [name for name in _needs_fixture() if name not in FOLDERS]
    assert not missing, f"add tests/data_checks/<check>/ for: {', '.join(missing)}"
    unknown = [name for name in FOLDERS if name not in all_checks()]
    assert not unknown, f"fixture folders naming no declared check: {', '.join(unknown)}"


@pytest.mark.parametrize("check", FOLDERS)
def test_fixture(check: str) -> None:
    folder = FIXTURES / check
    mapping = folder / "mapping.toml"
    margins = folder / "margins.toml"
    frame = folder / "frame.csv"  # the sample frame, for the checks that read one
    result = run_pipeline(
        load_file(folder / "spec.qlc"), folder / "export.csv",
        RunOptions(mapping=mapping if mapping.is_file() else None, frame=frame if frame.is_file() else None,
                   margins=margins if margins.is_file() else None),
    )
    got = sorted(
        ((f.check, f.row or 0, f.item or "") for f in result.findings if f.check == check),
    )
    expected = sorted(
        (e["check"], e["row"] or 0, e["item"] or "") for e in json.loads((folder / "expected.json").read_text(encoding="utf-8"))
    )
    assert expected, "a fixture must expect at least one finding of its check"
    assert got == expected
