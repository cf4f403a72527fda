"""Duplicates: ids, exact copies, and the maximum percent match against a naive oracle."""

from __future__ import annotations

import numpy as np
import pandas as pd
import pytest

from logiccheck.quality.duplicates import duplicate_ids, duplicate_responses, max_percent_match, near_duplicates


def naive_max_match(values: np.ndarray, asked: np.ndarray | None, min_items: int) -> np.ndarray:
    """Pairwise by definition (Kuriakose & Robbins 2016: share of items on which two
    respondents give the same answer; blanks match blanks). With `asked`, only items
    asked of either respondent of the pair are compared."""
    n, m = values.shape
    out = np.full(n, np.nan)
    for a in range(n):
        best = -1.0
        for b in range(n):
            if a == b:
                continue
            cols = np.ones(m, bool) if asked is None else (asked[a] | asked[b])
            if cols.sum() < min_items:
                continue
            va, vb = values[a, cols], values[b, cols]
            same = (va == vb) | (np.isnan(va) & np.isnan(vb))
            best = max(best, same.mean())
        if best >= 0:
            out[a] = best
    return out


@pytest.mark.parametrize("seed", [0, 1, 2])
@pytest.mark.parametrize("basis", ["all", "asked"])
@pytest.mark.parametrize("strays", [True, False])
def test_max_match_agrees_with_naive_pairs(seed: int, basis: str, strays: bool) -> None:
    rng = np.random.default_rng(seed)
    n, m = 60, 12
    values = rng.integers(1, 4, size=(n, m)).astype(float)
    asked = rng.random((n, m)) < 0.7
    asked[:, 0] = True  # an item asked of everyone
    values[~asked] = np.nan  # not asked: blank
    values[rng.random((n, m)) < 0.05] = np.nan  # blanks where asked
    if strays:
        stray = (~asked) & (rng.random((n, m)) < 0.2)
        values[stray] = 2.0  # some out-of-path answers
    values[5] = values[4]  # plant copies so high scores occur
    values[7, :10] = values[6, :10]
    frame = pd.DataFrame(values, columns=[f"q{i}" for i in range(m)])
    got = max_percent_match(frame, asked if basis == "asked" else None, basis=basis, min_items=3, chunk_size=17)
    want = naive_max_match(values, asked if basis == "asked" else None, 3)
    np.testing.assert_allclose(got.score, want, rtol=1e-6)
    # The partner reported reaches that score.
    for r in range(n):
        if not np.isnan(want[r]):
            p = got.partner[r]
            cols = np.ones(m, bool) if basis == "all" else (asked[r] | asked[p])
            va, vb = values[r, cols], values[p, cols]
            assert ((va == vb) | (np.isnan(va) & np.isnan(vb))).mean() == pytest.approx(want[r])


def test_near_duplicate_flags_above_threshold_and_names_the_pair() -> None:
    rng = np.random.default_rng(3)
    values = rng.integers(1, 6, size=(30, 20)).astype(float)
    values[11] = values[10]
    values[11, :3] = (values[10, :3] % 5) + 1  # 17 of 20 = 85 %: not above
    values[21] = values[20]
    values[21, :2] = (values[20, :2] % 5) + 1  # 18 of 20 = 90 %
    frame = pd.DataFrame(values)
    scores = max_percent_match(frame, basis="all")
    ids = [f"r{i}" for i in range(30)]
    found = near_duplicates(ids, scores, threshold=0.85)
    assert {f.respondent for f in found} == {"r20", "r21"}
    assert "respondent r21" in next(f.message for f in found if f.respondent == "r20")


def test_asked_basis_ignores_shared_skips() -> None:
    # Two respondents routed past the same long section look alike on all items
    # (blanks match blanks) but not on the items they were asked.
    values = np.full((2, 20), np.nan)
    values[0, :4] = [1, 2, 3, 4]
    values[1, :4] = [4, 3, 2, 1]
    asked = np.zeros((2, 20), bool)
    asked[:, :4] = True
    frame = pd.DataFrame(values)
    assert max_percent_match(frame, basis="all").score[0] == pytest.approx(16 / 20)
    assert max_percent_match(frame, asked, basis="asked").score[0] == pytest.approx(0.0)


def test_duplicate_ids_and_exact_copies() -> None:
    ids = ["a", "b", "a", "c", "d"]
    found = duplicate_ids(ids)
    assert [(f.respondent, f.row) for f in found] == [("a", 1), ("a", 3)]  # 1-based data rows
    frame = pd.DataFrame({"x": [1, 2, 1, 1, np.nan], "y": [3, 3, 3, 3, np.nan], "z": [np.nan, 1, np.nan, 2, np.nan]})
    dup = duplicate_responses(ids, frame, min_answered=2)
    assert [f.row for f in dup] == [1, 3]
    assert all(f.value == "0" for f in dup)  # the first row of the group (0-based)
