"""Raking, trimming and Kish's design effect on small cases with known answers."""

from __future__ import annotations

import numpy as np
import pytest

from logiccheck.weights.rake import effective_n, kish_deff, rake
from tests.weights.oracles import plain_rake


def test_kish_worked_example() -> None:
    # Kish (1965), Survey Sampling, on weighting classes (from memory): two equal halves
    # of the sample with weights in the ratio k give deff = 1 + (k − 1)² / (k + 1)²;
    # k = 2 gives 10/9 and k = 4 gives 34/25.
    for k, expected in ((2.0, 10 / 9), (4.0, 34 / 25)):
        w = np.array([1.0] * 50 + [k] * 50)
        assert kish_deff(w) == pytest.approx(expected, rel=1e-15)
        assert kish_deff(w) == pytest.approx(1 + (k - 1) ** 2 / (k + 1) ** 2, rel=1e-15)
        assert effective_n(w) == pytest.approx(100 / expected, rel=1e-15)
    # Kish (1992), "Weighting for unequal Pi", J. Official Statistics 8:183–200, the
    # weight-class form (from memory): deff = Σ W_h k_h · Σ W_h / k_h with W_h the
    # population share of class h. Classes of 30, 50, 20 respondents with weights 1, 2, 5:
    n_h, k_h = np.array([30, 50, 20]), np.array([1.0, 2.0, 5.0])
    W_h = n_h * k_h / (n_h * k_h).sum()
    w = np.repeat(k_h, n_h)
    assert kish_deff(w) == pytest.approx((W_h * k_h).sum() * (W_h / k_h).sum(), rel=1e-14)
    # 1 + CV² with the population variance (divisor n), as the definition reads.
    assert kish_deff(w) == pytest.approx(1 + w.var() / w.mean() ** 2, rel=1e-14)
    assert kish_deff(np.ones(7)) == 1.0


def _case(seed: int = 3, n: int = 300) -> tuple[list[np.ndarray], list[np.ndarray]]:
    rng = np.random.default_rng(seed)
    cells = [rng.choice(3, n, p=[0.5, 0.3, 0.2]), rng.choice(2, n, p=[0.3, 0.7]), rng.choice(4, n)]
    shares = [np.array([0.3, 0.3, 0.4]), np.array([0.5, 0.5]), np.array([0.1, 0.2, 0.3, 0.4])]
    return cells, shares


def test_rake_matches_the_plain_loop_and_meets_margins() -> None:
    cells, shares = _case()
    base = np.random.default_rng(9).uniform(0.5, 4.0, len(cells[0]))
    got = rake(cells, shares, base)
    assert got.converged and got.max_difference < 1e-10
    want = plain_rake([c.tolist() for c in cells], [s.tolist() for s in shares], base.tolist())
    assert np.abs(got.weights - np.array(want)).max() < 1e-8
    assert got.weights.mean() == pytest.approx(1.0, abs=1e-14)
    for c, s in zip(cells, shares, strict=True):
        assert np.bincount(c, weights=got.weights) / got.weights.sum() == pytest.approx(s, abs=1e-10)


def test_margins_already_met_need_one_sweep() -> None:
    cells = [np.array([0, 0, 1, 1]), np.array([0, 1, 0, 1])]
    got = rake(cells, [np.array([0.5, 0.5]), np.array([0.5, 0.5])])
    assert got.iterations == 1 and got.converged and (got.weights == 1).all()


def test_trim_bounds_hold_and_change_nothing_when_not_needed() -> None:
    cells, shares = _case()
    free = rake(cells, shares)
    lo, hi = free.weights.min() * 0.9, free.weights.max() * 1.1
    same = rake(cells, shares, trim=(min(lo, 1.0), max(hi, 1.0)))
    assert np.array_equal(same.weights, free.weights) and same.converged
    tight = rake(cells, shares, trim=(0.7, 1.4))
    assert tight.weights.min() >= 0.7 - 1e-9 and tight.weights.max() <= 1.4 + 1e-9
    assert tight.converged == (tight.max_difference < 1e-10)


def test_margins_that_cannot_be_met_within_the_bounds() -> None:
    # One respondent of 100 in a category whose population share is 0.3 would need a
    # weight near 30; bounds of [0.5, 3] cannot give it.
    cells = [np.array([0] * 99 + [1])]
    got = rake(cells, [np.array([0.7, 0.3])], trim=(0.5, 3.0), max_iterations=200)
    assert not got.converged and got.iterations == 200
    assert got.max_difference > 0.2
    assert got.weights.max() <= 3.0 + 1e-9 and got.weights.min() >= 0.5 - 1e-9


def test_iteration_limit_reported() -> None:
    cells, shares = _case()
    got = rake(cells, shares, max_iterations=1, tolerance=1e-15)
    assert got.iterations == 1 and not got.converged and got.max_difference > 1e-15


def test_an_empty_category_is_refused() -> None:
    with pytest.raises(ValueError, match="no respondent"):
        rake([np.array([0, 0, 0])], [np.array([0.5, 0.5])])
