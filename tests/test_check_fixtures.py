"""Every spec check has a failing and a passing fixture with the exact diagnostics."""

from __future__ import annotations

import json

import pytest

from logiccheck.checks.registry import all_checks
from logiccheck.checks.runner import run_checks
from logiccheck.loader import load_file
from tests.conftest import CHECK_FIXTURES

SPEC_CHECKS = sorted(n for n, c in all_checks().items() if c.stage in ("spec", "routing"))


def _lint(path):
    return [d for d in run_checks(load_file(path)) if d.severity.value != "info" or True]


@pytest.mark.parametrize("name", SPEC_CHECKS)
def test_fixture_exists(name: str) -> None:
    folder = CHECK_FIXTURES / name
    assert (folder / "bad.qlc").is_file(), f"{name}: add tests/checks/{name}/bad.qlc"
    assert (folder / "good.qlc").is_file(), f"{name}: add tests/checks/{name}/good.qlc"
    assert (folder / "bad.expected.json").is_file(), f"{name}: add bad.expected.json"


@pytest.mark.parametrize("name", SPEC_CHECKS)
def test_bad_fixture_gives_exactly_the_expected(name: str) -> None:
    folder = CHECK_FIXTURES / name
    expected = json.loads((folder / "bad.expected.json").read_text())
    got = [
        {"check": d.check, "line": d.line, "column": d.column}
        for d in run_checks(load_file(folder / "bad.qlc"))
        if d.check == name
    ]
    assert got == expected


@pytest.mark.parametrize("name", SPEC_CHECKS)
def test_good_fixture_is_clean_for_that_check(name: str) -> None:
    folder = CHECK_FIXTURES / name
    got = [d for d in run_checks(load_file(folder / "good.qlc")) if d.check == name]
    assert got == []
    errors = [d for d in run_checks(load_file(folder / "good.qlc")) if d.severity.value == "error"]
    assert errors == [], [d.message for d in errors]


@pytest.mark.parametrize("name", sorted(all_checks()))
def test_docs_have_every_section(name: str) -> None:
    info = all_checks()[name]
    for section in ("summary", "what", "why", "bad", "good"):
        assert getattr(info, section).strip(), f"{name}: docs section `{section}` is empty"
    assert info.bad != info.good
