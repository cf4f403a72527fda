"""The quality stage's route state against the data stage's evaluator (an independent
implementation of the same semantics, DESIGN §3): due, answered and valid agree cell for
cell, and so do the default dispositions."""

from __future__ import annotations

from pathlib import Path

import numpy as np
import pytest

from logiccheck.clean.io import read_export
from logiccheck.data import validate
from logiccheck.load import load_file, load_text
from logiccheck.quality.completeness import dispositions
from logiccheck.quality.config import CompletenessConfig
from logiccheck.quality.route import route_state
from tests.conftest import SPECS
from tests.quality.planted import SPEC, build


def cases(tmp: Path) -> list[tuple[object, Path]]:
    export, _, _ = build()
    path = tmp / "planted.csv"
    export.to_csv(path, index=False)
    return [
        (load_text(SPEC, "libvisit.qlc").questionnaire, path),
        (load_file(SPECS / "bikeshare.qlc").questionnaire, SPECS / "bikeshare_export.csv"),
    ]


@pytest.mark.parametrize("case", [0, 1])
def test_route_state_agrees_with_validation(tmp_path: Path, case: int) -> None:
    q, path = cases(tmp_path)[case]
    theirs = validate(q, path, keep_cells=True)
    ours = route_state(q, read_export(path))
    assert ours.items == theirs.items and ours.ids == list(theirs.ids)
    for name in ("due", "has_value", "valid"):
        np.testing.assert_array_equal(getattr(ours, name), getattr(theirs, name), err_msg=name)
    np.testing.assert_array_equal(dispositions(q, ours, CompletenessConfig()).to_numpy(), theirs.disposition)
    failed = {(f.respondent, f.item) for f in theirs.findings if f.check == "check-failed"}
    mine = {(ours.ids[r], name) for name, m in ours.checks_failed.items() for r in np.flatnonzero(m)}
    assert {r for r, _ in mine} == {r for r, _ in failed}


def test_quality_on_a_validation_result_matches(tmp_path: Path) -> None:
    from logiccheck.quality.bridge import as_data_findings, state_from_validation
    from logiccheck.quality.run import run_quality

    q, path = cases(tmp_path)[0]
    data = read_export(path)
    theirs = validate(q, path, keep_cells=True)
    via_validation = run_quality(q, data, state=state_from_validation(q, theirs))
    standalone = run_quality(q, data)
    assert [(f.check, f.row) for f in via_validation.findings] == [(f.check, f.row) for f in standalone.findings]
    np.testing.assert_array_equal(via_validation.state.nonresponse, standalone.state.nonresponse)
    records = as_data_findings(via_validation.findings)
    assert records[0].row == via_validation.findings[0].row + 1 and records[0].to_json()["check"]
