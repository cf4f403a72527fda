"""The weights checks' fixtures: `tests/data_checks/<check>/` holds spec.qlc, export.csv,
margins.toml and expected.json (the exact findings of that check: check, 1-based data
row or null for a finding about the export as a whole, item)."""

from __future__ import annotations

import json
from pathlib import Path

import pytest

from logiccheck.checks.registry import all_checks
from tests.cli_run import run_cli

ROOT = Path(__file__).parent.parent / "data_checks"
CHECKS = ["weight-missing", "sparse-cell"]


@pytest.mark.parametrize("name", CHECKS)
def test_fixture_gives_exactly_the_expected(name: str) -> None:
    folder = ROOT / name
    ran = run_cli("validate", str(folder / "spec.qlc"), "--data", str(folder / "export.csv"),
                  "--margins", str(folder / "margins.toml"), "--format", "json")
    assert ran.returncode in (0, 1), ran.stderr
    found = json.loads(ran.stdout)["findings"]
    got = sorted(((f["check"], f["row"], f["item"]) for f in found if f["check"] == name), key=str)
    want = sorted(((e["check"], e["row"], e["item"]) for e in json.loads((folder / "expected.json").read_text())), key=str)
    assert got == want


@pytest.mark.parametrize("name", CHECKS)
def test_without_margins_the_check_is_silent(name: str) -> None:
    folder = ROOT / name
    ran = run_cli("validate", str(folder / "spec.qlc"), "--data", str(folder / "export.csv"), "--format", "json")
    assert not [f for f in json.loads(ran.stdout)["findings"] if f["check"] == name]


@pytest.mark.parametrize("name", CHECKS)
def test_docs_and_explain(name: str) -> None:
    info = all_checks()[name]
    assert info.data_run is not None and info.stage == "quality"
    assert all((info.summary, info.what, info.why, info.bad, info.good))
    ran = run_cli("explain", name)
    assert ran.returncode == 0 and name in ran.stdout
