"""Reliability statistics and composite scores of one scale, vectorised with numpy/scipy.

Inputs are respondents × items matrices of item *positions* on the shared answer list
after reversal (0 = the first option or the low end of the range), NaN where the
respondent gave no answer (blank, invalid or a non-response code). Alpha and the item
statistics are invariant to the affine map from code values to positions, so they equal
the figures computed on the reversed code values themselves.
"""

from __future__ import annotations

from dataclasses import dataclass

import numpy as np

# Below this many complete respondents the statistics are not computed (common practice,
# no source: with fewer, a variance barely exists).
MIN_COMPLETE = 3


@dataclass
class Reliability:
    """Alpha and its item statistics on the respondents who answered every item."""

    n: int
    alpha: float | None
    alpha_ci: tuple[float, float] | None
    alpha_if_deleted: list[float | None]  # per item, scale order
    item_total: list[float | None]  # corrected item-total correlation per item


def cronbach_alpha(x: np.ndarray) -> float | None:
    """Cronbach's alpha of a complete respondents × items matrix (k ≥ 2):
    k/(k−1) · (1 − Σ item variances / variance of the total). None when undefined."""
    n, k = x.shape
    if k < 2 or n < 2:
        return None
    item_var = x.var(axis=0, ddof=1).sum()
    total_var = x.sum(axis=1).var(ddof=1)
    if not total_var > 0:
        return None
    return float(k / (k - 1) * (1.0 - item_var / total_var))


def feldt_interval(alpha: float, n: int, k: int, level: float = 0.95) -> tuple[float, float]:
    """Feldt's interval for alpha: 1 − (1 − α)·F quantiles with (n−1, (n−1)(k−1)) degrees
    of freedom (Feldt, Woodruff & Salih 1987, "Statistical inference for coefficient alpha",
    Applied Psychological Measurement 11(1))."""
    df1 = n - 1
    df2 = df1 * (k - 1)
    tail = (1.0 - level) / 2.0
    # scipy.stats takes about a second to import: only runs with a scale pay for it.
    from scipy import stats as sps

    lower = 1.0 - (1.0 - alpha) * sps.f.isf(tail, df1, df2)
    upper = 1.0 - (1.0 - alpha) * sps.f.isf(1.0 - tail, df1, df2)
    return float(lower), float(upper)


def alpha_if_deleted(x: np.ndarray) -> list[float | None]:
    """Alpha of the other items, per item, on the same respondents.

    Uses the covariance matrix once: the total variance without item i is
    Σ C − 2 Σ_j C_ij + C_ii, the item variances without it Σ diag − C_ii."""
    n, k = x.shape
    if k < 3 or n < 2:
        return [None] * k
    cov = np.cov(x, rowvar=False, ddof=1)
    diag = np.diag(cov)
    total = cov.sum()
    rest_total = total - 2.0 * cov.sum(axis=1) + diag
    rest_items = diag.sum() - diag
    m = k - 1
    with np.errstate(divide="ignore", invalid="ignore"):
        values = m / (m - 1) * (1.0 - rest_items / rest_total)
    return [float(v) if rest_total[i] > 0 else None for i, v in enumerate(values)]


def corrected_item_total(x: np.ndarray) -> list[float | None]:
    """Pearson correlation of each item with the sum of the other items."""
    n, k = x.shape
    if k < 2 or n < 2:
        return [None] * k
    rest = x.sum(axis=1, keepdims=True) - x
    xc = x - x.mean(axis=0)
    rc = rest - rest.mean(axis=0)
    num = (xc * rc).sum(axis=0)
    den = np.sqrt((xc**2).sum(axis=0) * (rc**2).sum(axis=0))
    return [float(num[i] / den[i]) if den[i] > 0 else None for i in range(k)]


def reliability(points: np.ndarray, level: float = 0.95) -> Reliability:
    """Every reliability figure of one scale, on the respondents who answered every item."""
    complete = points[~np.isnan(points).any(axis=1)]
    n, k = complete.shape
    if n < MIN_COMPLETE:
        return Reliability(n, None, None, [None] * k, [None] * k)
    alpha = cronbach_alpha(complete)
    ci = feldt_interval(alpha, n, k, level) if alpha is not None else None
    return Reliability(n, alpha, ci, alpha_if_deleted(complete), corrected_item_total(complete))


def proportional_score(points: np.ndarray, steps: float, min_answered: int) -> np.ndarray:
    """Mean of the items' proportional scores (position / steps, in 0..1) over the answered
    items, for respondents who answered at least `min_answered`; NaN for the others."""
    answered = ~np.isnan(points)
    count = answered.sum(axis=1)
    # Item scores first, then their mean: the order the rule is stated in, so a score
    # recomputed by hand from the item scores agrees to the last digit.
    mean = np.where(answered, points / steps, 0.0).sum(axis=1) / np.maximum(count, 1)
    return np.where(count >= max(min_answered, 1), mean, np.nan)


def top_box_score(points: np.ndarray, steps: float, top: int, min_answered: int) -> np.ndarray:
    """Share of the answered items whose position is among the top `top` options (position
    ≥ steps − top + 1), for respondents who answered at least `min_answered`."""
    answered = ~np.isnan(points)
    count = answered.sum(axis=1)
    with np.errstate(invalid="ignore"):
        hit = (points >= steps - top + 1) & answered
    share = hit.sum(axis=1) / np.maximum(count, 1)
    return np.where(count >= max(min_answered, 1), share, np.nan)


def opposite_ends(points: np.ndarray, steps: float) -> tuple[np.ndarray, np.ndarray, np.ndarray]:
    """Respondents with two items at opposite ends (one at the first position, another at
    the last): their rows (ascending), and for each the first item at the low end and the
    first at the high end."""
    low = points == 0
    high = points == steps
    hit = low.any(axis=1) & high.any(axis=1)
    rows = np.flatnonzero(hit)
    return rows, np.argmax(low[rows], axis=1), np.argmax(high[rows], axis=1)
