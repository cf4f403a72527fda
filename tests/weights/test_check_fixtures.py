"""The weights checks: their fixtures (`tests/data_checks/<check>/`, with a margins.toml)
run in tests/test_data_check_fixtures.py; here, that they stay silent without margins
and that their docs are whole."""

from __future__ import annotations

import json
from pathlib import Path

import pytest

from logiccheck.checks.registry import all_checks
from tests.cli_run import run_cli

ROOT = Path(__file__).parent.parent / "data_checks"
CHECKS = ["weight-missing", "sparse-cell"]


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
