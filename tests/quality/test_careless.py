"""Straight-lining, repeating patterns, speeders and the sample frame."""

from __future__ import annotations

import numpy as np
import pandas as pd
import pytest

from logiccheck.quality.careless import (
    grid_findings,
    grid_measures,
    longest_run,
    not_in_frame,
    repeating_period,
    speeders,
)
from logiccheck.quality.config import CarelessConfig, SpeedConfig

NAN = np.nan


def test_measures_by_hand() -> None:
    values = np.array([[3, 3, 3, 3, 3, 3], [1, 2, 2, 2, 5, NAN], [1, 5, 1, 5, 1, 5]], dtype=float)
    m = grid_measures(values)
    assert m["answered"].tolist() == [6, 5, 6]
    assert m["longest_run"].tolist() == [6, 3, 1]
    # population sd of 1,2,2,2,5: mean 2.4, variance (1.96+0.16*3+6.76)/5 = 1.84
    assert m["sd"].iloc[1] == pytest.approx(np.sqrt(1.84))
    assert m["sd"].iloc[0] == 0.0


def test_longest_run_skips_blanks() -> None:
    values = np.array([[2, NAN, 2, 2, 1]], dtype=float)
    blank = np.isnan(values)
    packed = np.take_along_axis(values, np.argsort(blank, axis=1, kind="stable"), axis=1)
    assert longest_run(packed, (~blank).sum(axis=1)).tolist() == [3]


def test_periods() -> None:
    values = np.array(
        [
            [1, 2, 3, 4, 1, 2, 3, 4],  # cycle of 4
            [1, 5, 1, 5, 1, 5, 1, 5],  # see-saw
            [3, 3, 3, 3, 3, 3, 3, 3],  # straight line: not a pattern
            [1, 2, 1, 2, 1, 3, 1, 2],  # broken
            [1, 2, 1, 2, NAN, NAN, NAN, NAN],  # too short
        ],
        dtype=float,
    )
    assert repeating_period(values, min_length=6, max_period=5).tolist() == [4, 2, 0, 0, 0]


def test_grid_findings_pick_the_right_check() -> None:
    frame = pd.DataFrame(
        [[4, 4, 4, 4, 4, 4], [1, 5, 1, 5, 1, 5], [2, 4, 3, 5, 1, 2], [4, 4, NAN, NAN, NAN, NAN]],
        columns=[f"r{i}" for i in range(6)],
    )
    found = grid_findings(["a", "b", "c", "d"], "g", frame, CarelessConfig())
    assert sorted((f.check, f.respondent) for f in found) == [("pattern-response", "b"), ("straightline", "a")]
    # a looser threshold (longest run ≥ half the rows) also flags a partly flat grid
    loose = grid_findings(["a", "b", "c", "d"], "g", frame, CarelessConfig(longest_run_share=0.5, min_rows=2))
    assert ("straightline", "d") in {(f.check, f.respondent) for f in loose}


def test_speeders_against_median() -> None:
    # median of 300, 320, 90, 310, 600 = 310; 1/3 of it = 103.3 (common practice, no source)
    found = speeders(list("abcde"), pd.Series([300, 320, 90, 310, 600]), SpeedConfig())
    assert [f.respondent for f in found] == ["c"]
    assert speeders(list("ab"), pd.Series([None, None]), SpeedConfig()) == []


def test_frame_ids_and_emails() -> None:
    frame = pd.DataFrame({"id": ["1", "2", "3"], "email": ["Ann@Example.org", "bo@example.org ", None]})
    found = not_in_frame(["1", "2", "9"], [" ann@EXAMPLE.org", "b o@example.org", "x@example.org"], frame)
    assert [(f.respondent, "e-mail" in f.message) for f in found] == [("9", True)]
    found = not_in_frame(["1", "2"], ["someone@else.org", None], frame)
    assert [f.respondent for f in found] == ["1"]
    with pytest.raises(ValueError, match="neither column"):
        not_in_frame(["1"], None, pd.DataFrame({"x": [1]}))
