"""The data runner stamps names and severities, and turns a failing check into one finding."""

from __future__ import annotations

import numpy as np
import pytest

from logiccheck.checks import registry
from logiccheck.checks.data_context import DataContext
from logiccheck.checks.data_runner import run_data_checks
from logiccheck.data.findings import Hits
from logiccheck.loader import load_text


def _ctx() -> DataContext:
    q = load_text('survey s "S"\nq1: single { a = 1 "A", b = 2 "B" } "Q?"\n', "s.qlc").questionnaire
    n = 3
    z = np.zeros((n, 1), bool)
    return DataContext(
        q=q, ids=np.array(["a", "b", "c"], dtype=object), items=["q1"], due=z, has_value=z, valid=z, nonresponse=z,
        stop=np.array([""] * n, dtype=object), disposition=np.array(["complete"] * n, dtype=object),
        value_of=lambda name: np.full(n, np.nan), text_of=lambda name: None, config=None,
    )


def test_runner_stamps_name_and_severity_and_survives_a_failing_check(monkeypatch: pytest.MonkeyPatch) -> None:
    saved = dict(registry._REGISTRY)
    registry.all_checks()  # load the real checks first
    try:
        @registry.data_check("zz-test-flag", severity="warning", stage="quality", summary="s", what="w", why="y",
                             bad="b", good="g")
        def flag(ctx: DataContext):  # type: ignore[no-untyped-def]
            yield Hits(rows=np.array([2, 0]), message=["third", "first"], item="q1")

        @registry.data_check("zz-test-broken", severity="error", stage="quality", summary="s", what="w", why="y",
                             bad="b", good="g")
        def broken(ctx: DataContext):  # type: ignore[no-untyped-def]
            raise RuntimeError("boom")

        blocks = {b.check: b for b in run_data_checks(_ctx())}
        flagged = blocks["zz-test-flag"].records()
        assert [(f.check, f.severity.value, f.respondent, f.row, f.message) for f in flagged] == [
            ("zz-test-flag", "warning", "c", 3, "third"), ("zz-test-flag", "warning", "a", 1, "first")]
        assert "zz-test-broken" in blocks["internal-error"].message and "boom" in blocks["internal-error"].message
    finally:
        registry._REGISTRY.clear()
        registry._REGISTRY.update(saved)


def test_unknown_check_name_raises() -> None:
    with pytest.raises(KeyError, match="no check is declared"):
        registry.check_info("no-such-check")
