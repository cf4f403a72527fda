"""Raking: iterative proportional fitting of weights to population margins (Deming &
Stephan, 1940), vectorised, with optional trimming to bounds on weight / mean weight.

One sweep multiplies every respondent's weight, variable after variable, by the ratio of
the population total of their category to the weighted sample total of that category.
Sweeps repeat until every weighted share is within `tolerance` of its population share
(and, with bounds, every weight is within them), or `max_iterations` sweeps have run.
"""

from __future__ import annotations

from dataclasses import dataclass, field

import numpy as np


@dataclass
class RakeResult:
    weights: np.ndarray  # mean 1
    iterations: int  # sweeps run
    converged: bool
    max_difference: float  # largest |weighted share − population share| at the end
    trimmed: int = 0  # weights at a bound at the end
    notes: list[str] = field(default_factory=list)


def kish_deff(w: np.ndarray) -> float:
    """Kish's design effect of unequal weighting: 1 + CV² = n Σw² / (Σw)² (CV with the
    population variance, divisor n)."""
    w = np.asarray(w, dtype=float)
    return float(w.size * np.dot(w, w) / w.sum() ** 2)


def effective_n(w: np.ndarray) -> float:
    """n / deff = (Σw)² / Σw²."""
    w = np.asarray(w, dtype=float)
    return float(w.sum() ** 2 / np.dot(w, w))


def _clip(w: np.ndarray, lo: float, hi: float) -> np.ndarray:
    """Clip to [lo, hi] × mean weight; clipping moves the mean, so repeat to a fixed point."""
    for _ in range(200):
        m = w.mean()
        low, high = lo * m, hi * m
        if w.min() >= low * (1 - 1e-12) and w.max() <= high * (1 + 1e-12):
            break
        w = np.clip(w, low, high)
    return w


def _differences(w: np.ndarray, cells: list[np.ndarray], shares: list[np.ndarray]) -> list[np.ndarray]:
    total = w.sum()
    return [np.bincount(c, weights=w, minlength=len(s)) / total - s for c, s in zip(cells, shares, strict=True)]


def rake(
    cells: list[np.ndarray],
    shares: list[np.ndarray],
    base: np.ndarray | None = None,
    *,
    tolerance: float = 1e-10,
    max_iterations: int = 1000,
    trim: tuple[float, float] | None = None,
) -> RakeResult:
    """Rake to the margins. `cells[v]` holds each respondent's category index (0..k-1) on
    variable v, `shares[v]` the k population shares (summing to 1); `base` the starting
    weights (default uniform). Every category needs at least one respondent."""
    n = len(cells[0]) if cells else (0 if base is None else len(base))
    w = np.ones(n) if base is None else np.asarray(base, dtype=float).copy()
    if n == 0:
        return RakeResult(w, 0, True, 0.0)
    for c, s in zip(cells, shares, strict=True):
        if np.bincount(c, minlength=len(s)).min() == 0:
            raise ValueError("a category with population share has no respondent to weight")
    targets = [np.asarray(s, dtype=float) * w.sum() for s in shares]
    converged = False
    iterations = 0
    worst = float("inf")
    for iterations in range(1, max_iterations + 1):  # noqa: B007 - the count is reported
        for c, t in zip(cells, targets, strict=True):
            sums = np.bincount(c, weights=w, minlength=len(t))
            w *= (t / sums)[c]
        if trim is not None:
            w = _clip(w, *trim)
        worst = max(float(np.abs(d).max()) for d in _differences(w, cells, shares))
        if worst < tolerance:
            converged = True
            break
    w = w / w.mean()
    result = RakeResult(w, iterations, converged, worst)
    if trim is not None:
        result.trimmed = int(np.sum(np.isclose(w, trim[0]) | np.isclose(w, trim[1])))
    return result
