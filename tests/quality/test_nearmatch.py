"""Near-duplicates without the square are exact: every pair above the threshold, checked
against a naive all-pairs implementation of the percent match."""

from __future__ import annotations

import numpy as np
import pandas as pd
import pytest
from hypothesis import given, settings
from hypothesis import strategies as st

from logiccheck.quality import checks as quality_checks
from logiccheck.quality import nearmatch as nm
from logiccheck.quality.config import QualityConfig
from tests.quality.context import build_context, quality_blocks


def naive_pairs(codes: np.ndarray, threshold: float, min_items: int) -> set[tuple[int, int, int, int]]:
    """Kuriakose & Robbins (2016): the percent match of two respondents is the share of
    items on which they give the same answer; a respondent's maximum percent match is the
    largest over all others. Here (our rule) the items are those BOTH answered (0 =
    blank never matches), and a pair needs `min_items` of them. Every pair, one by one."""
    out = set()
    n = codes.shape[0]
    for a in range(n):
        for b in range(a + 1, n):
            both = (codes[a] != 0) & (codes[b] != 0)
            compared = int(both.sum())
            matched = int((both & (codes[a] == codes[b])).sum())
            if compared >= min_items and matched / compared > threshold:
                out.add((a, b, compared, matched))
    return out


def random_codes(rng: np.random.Generator, n: int, m: int, levels: int, blank: float) -> np.ndarray:
    codes = rng.integers(1, levels + 1, size=(n, m)).astype(np.int16)
    codes[rng.random((n, m)) < blank] = 0
    # Plant near-copies with their own blanks, so pairs above the threshold exist and
    # their answered patterns differ.
    for _ in range(n // 3):
        a, b = rng.integers(0, n, 2)
        codes[b] = codes[a]
        change = rng.random(m) < rng.choice([0.02, 0.1, 0.2])
        codes[b, change] = rng.integers(0, levels + 1, int(change.sum()))
    return codes


@settings(max_examples=120, deadline=None)
@given(
    seed=st.integers(0, 2**32 - 1),
    n=st.integers(2, 45),
    m=st.integers(1, 30),
    levels=st.integers(1, 5),
    blank=st.sampled_from([0.0, 0.05, 0.3, 0.6]),
    threshold=st.sampled_from([0.0, 0.5, 0.7, 0.8, 0.85, 0.9, 0.95, 1.0]),
    min_items=st.integers(1, 12),
)
def test_every_pair_above_the_threshold_is_found(seed: int, n: int, m: int, levels: int, blank: float,
                                                 threshold: float, min_items: int) -> None:
    codes = random_codes(np.random.default_rng(seed), n, m, levels, blank)
    pairs = nm.near_pairs(codes, threshold, min_items)
    got = set(zip(pairs.a.tolist(), pairs.b.tolist(), pairs.compared.tolist(), pairs.matched.tolist(), strict=True))
    assert got == naive_pairs(codes, threshold, min_items)


@pytest.mark.parametrize("seed", range(4))
def test_best_partner_is_the_naive_maximum_percent_match(seed: int) -> None:
    rng = np.random.default_rng(seed)
    codes = random_codes(rng, 80, 24, 4, 0.2)
    threshold, k = 0.85, 10
    best = nm.best_partners(nm.near_pairs(codes, threshold, k), codes.shape[0])
    # The maximum percent match by direct comparison (this module's sample estimate, and
    # the naive loop above) agrees wherever it is above the threshold.
    direct = nm.max_match_of(codes, np.arange(codes.shape[0]), k)
    naive = naive_pairs(codes, -1.0, k)
    by_row: dict[int, float] = {}
    for a, b, c, m in naive:
        by_row[a] = max(by_row.get(a, -1.0), m / c)
        by_row[b] = max(by_row.get(b, -1.0), m / c)
    for r in range(codes.shape[0]):
        want = by_row.get(r, np.nan)
        assert direct[r] == pytest.approx(want, nan_ok=True)
        if want > threshold:
            assert best.score[r] == pytest.approx(want)
            p = best.partner[r]
            both = (codes[r] != 0) & (codes[p] != 0)
            assert (both & (codes[r] == codes[p])).sum() / both.sum() == pytest.approx(want)
        else:
            assert best.partner[r] == -1


def test_the_block_size_keeps_the_pigeonhole_argument() -> None:
    # s·(1 - t) <= 2: a block of s compared items with two mismatches is at or below t.
    for t in (0.0, 0.5, 0.8, 0.85, 0.9, 0.95, 0.99):
        s = nm.block_size(t)
        assert s >= 1 and (s - 2) / s <= t + 1e-12
    assert nm.block_size(0.85) == 13
    assert nm.block_size(1.0) == 0


@settings(max_examples=60, deadline=None)
@given(seed=st.integers(0, 2**32 - 1), n=st.integers(1, 60), m=st.integers(1, 8), k=st.integers(1, 5))
def test_exact_groups_match_pandas(seed: int, n: int, m: int, k: int) -> None:
    rng = np.random.default_rng(seed)
    codes = rng.integers(0, 3, size=(n, m)).astype(np.int8)
    groups = nm.exact_groups(codes, k)
    # Oracle: pandas marks every row of a repeated record (blanks included as 0).
    frame = pd.DataFrame(codes)
    eligible = (codes != 0).sum(axis=1) >= k
    sub = frame[eligible]
    want = set(sub.index[sub.duplicated(keep=False)].tolist())
    assert set(np.concatenate(groups).tolist() if groups else []) == want
    for g in groups:
        assert (codes[g] == codes[g[0]]).all() and list(g) == sorted(g)


def test_huge_runs_are_paired_in_batches(monkeypatch: pytest.MonkeyPatch) -> None:
    # Everyone identical: n(n-1)/2 pairs, more than one batch.
    monkeypatch.setattr(nm, "PAIR_BATCH", 100)
    codes = np.ones((40, 12), np.int8)
    codes[::2, 0] = 2
    pairs = nm.near_pairs(codes, 0.85, 10)
    assert pairs.a.size == 40 * 39 // 2


def test_the_check_compares_answers_as_the_export_holds_them() -> None:
    # Non-response codes are answers; blanks never match; free text is not compared.
    items = "\n".join(f"q{i}: single lvl \"Q{i}?\"" for i in range(12))
    spec = (f'survey s "S"\ncodes lvl\n  a = 1 "A"\n  b = 2 "B"\n  c = 3 "C"\n'
            f'nonresponse\n  dk = 9 "Don\'t know"\n{items}\nnote_txt: text "Say more"\n')
    rng = np.random.default_rng(7)
    n = 40
    values = rng.choice(["1", "2", "3", "9", ""], size=(n, 12), p=[0.3, 0.3, 0.25, 0.05, 0.1])
    values[1] = values[0]
    values[1, :2] = ["", "9"]
    values[3] = values[2]
    values[3, 5] = "1" if values[2, 5] != "1" else "2"
    export = pd.DataFrame(values, columns=[f"q{i}" for i in range(12)])
    export.insert(0, "id", [f"r{i}" for i in range(n)])
    export["note_txt"] = ["same words"] * n
    ctx = build_context(spec, export)
    codes = np.where(values == "", "0", values).astype(np.int16)  # the code itself; 0 = blank
    want: dict[int, float] = {}
    for a, b, c, m in naive_pairs(codes, 0.85, 10):
        want[a] = max(want.get(a, 0.0), m / c)
        want[b] = max(want.get(b, 0.0), m / c)
    blocks = [b for b in quality_blocks(ctx) if b.check in ("near-duplicate", "duplicate-response")]
    got = {int(r): float(v) for b in blocks if b.check == "near-duplicate" for r, v in zip(b.rows, b.values or [], strict=True)}
    exact = {int(r) for b in blocks if b.check == "duplicate-response" for r in b.rows}
    assert {r: pytest.approx(s, abs=1e-4) for r, s in want.items() if r not in exact} == got
    assert {0, 1, 2, 3} <= set(want)


@settings(max_examples=60, deadline=None)
@given(seed=st.integers(0, 2**32 - 1), n=st.integers(2, 45), m=st.integers(1, 30),
       blank=st.sampled_from([0.0, 0.3, 0.6]), budget=st.integers(0, 400))
def test_a_budgeted_search_returns_only_true_pairs_and_all_of_them_when_complete(
        seed: int, n: int, m: int, blank: float, budget: int) -> None:
    codes = random_codes(np.random.default_rng(seed), n, m, 3, blank)
    want = naive_pairs(codes, 0.85, 10)
    coverage = nm.Coverage(budget=budget)
    pairs = nm.near_pairs(codes, 0.85, 10, coverage=coverage)
    got = set(zip(pairs.a.tolist(), pairs.b.tolist(), pairs.compared.tolist(), pairs.matched.tolist(), strict=True))
    assert got <= want  # every pair returned is exact, whatever the budget
    assert coverage.budget is None or coverage.candidates <= coverage.budget
    if coverage.complete:
        assert got == want
    else:
        assert coverage.skipped and coverage.skipped_pairs > 0


def test_small_exports_are_searched_completely_whatever_the_budget() -> None:
    # The floor of the budget: a few hundred respondents never get a partial search.
    items = "\n".join(f"q{i}: single yn \"Q{i}?\"" for i in range(40))
    spec = f'survey s "S"\ncodes yn\n  yes = 1 "Yes"\n  no = 2 "No"\n{items}\n'
    values = np.random.default_rng(5).choice(["1", "2"], size=(300, 40))
    export = pd.DataFrame(values, columns=[f"q{i}" for i in range(40)])
    export.insert(0, "id", [f"r{i}" for i in range(300)])
    ctx = build_context(spec, export, QualityConfig.model_validate({"duplicates": {"near_search_budget": 1}}))
    quality_blocks(ctx)
    assert ctx.memo["quality.near_coverage"].complete
    assert not [x for x in ctx.notes if x.startswith("near-duplicate:")]


def test_two_option_answers_stop_at_the_budget_with_a_note_and_a_sample_estimate(
        monkeypatch: pytest.MonkeyPatch) -> None:
    # Forty yes/no items answered at random: chance agreement makes a candidate of almost
    # every pair, so a budget of one candidate per respondent cannot cover the search.
    items = "\n".join(f"q{i}: single yn \"Q{i}?\"" for i in range(40))
    spec = f'survey s "S"\ncodes yn\n  yes = 1 "Yes"\n  no = 2 "No"\n{items}\n'
    rng = np.random.default_rng(3)
    n = 300
    values = rng.choice(["1", "2"], size=(n, 40))
    values[1] = values[0]  # an exact copy: duplicate-response, not near-duplicate
    export = pd.DataFrame(values, columns=[f"q{i}" for i in range(40)])
    export.insert(0, "id", [f"r{i}" for i in range(n)])
    config = QualityConfig.model_validate({"duplicates": {"near_search_budget": 1}})
    monkeypatch.setattr(quality_checks, "NEAR_MIN_BUDGET", 0)  # as if the export were large
    ctx = build_context(spec, export, config)
    quality_blocks(ctx)
    note = next(x for x in ctx.notes if x.startswith("near-duplicate:"))
    assert "near_search_budget" in note and "drawn at random" in note
    coverage = ctx.memo["quality.near_coverage"]
    assert not coverage.complete and coverage.candidates <= n
    # The same export without a budget is searched completely (no note).
    full = build_context(spec, export, QualityConfig.model_validate({"duplicates": {"near_search_budget": 0}}))
    quality_blocks(full)
    assert full.memo["quality.near_coverage"].complete
    assert not [x for x in full.notes if x.startswith("near-duplicate:")]
