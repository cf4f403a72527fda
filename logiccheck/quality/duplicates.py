"""Duplicate ids, exact duplicate answers and near-duplicates (maximum percent match).

The maximum percent match (Kuriakose & Robbins 2016) of a respondent is the largest
share of items on which they agree with any other respondent. It is computed with
one-hot encoding and blocked matrix products over the upper triangle, so memory is
bounded by three `chunk_size²` tiles (plus the one-hot matrices) and no Python loop runs over pairs.
"""

from __future__ import annotations

from collections.abc import Callable, Sequence
from dataclasses import dataclass

import numpy as np
import pandas as pd

from logiccheck.quality.findings import Finding, finding
from logiccheck.quality.nearmatch import exact_groups

# How many other rows a duplicate finding names before it gives a count.
SHOWN = 5


def others_text(names: list[str], total: int) -> str:
    """`a, b, c` or `a, b, c, d, e and 20,995 more` (names: the first few shown)."""
    shown = ", ".join(names[:SHOWN])
    return shown + (f" and {total - min(total, SHOWN):,} more" if total > SHOWN else "")


def id_groups(ids: Sequence[object] | np.ndarray) -> list[np.ndarray]:
    """Rows sharing an id (groups of two or more, rows ascending), in order of first row."""
    text = np.asarray([str(i) for i in ids] if not isinstance(ids, np.ndarray) else ids.astype(str), dtype=object)
    if text.size == 0:
        return []
    _, inverse, counts = np.unique(text, return_inverse=True, return_counts=True)
    inverse = inverse.ravel()
    rows = np.flatnonzero(counts[inverse] > 1)
    order = rows[np.argsort(inverse[rows], kind="stable")]
    groups = np.split(order, np.flatnonzero(np.diff(inverse[order])) + 1) if order.size else []
    return sorted(groups, key=lambda g: int(g[0]))


def group_messages(group: np.ndarray, label: Callable[[int], str], template: str) -> list[str]:
    """One message per row of a group naming up to `SHOWN` other members (by `label`)
    and a count of the rest; `template` gets {others} and {count}."""
    first = group[: SHOWN + 1].tolist()
    out = []
    for r in group.tolist():
        others = [label(o) for o in first if o != r][:SHOWN]
        out.append(template.format(others=others_text(others, group.size - 1), count=f"{group.size:,}"))
    return out


def duplicate_ids(ids: Sequence[object]) -> list[Finding]:
    out = []
    for group in id_groups(ids):
        rid = str(ids[int(group[0])])
        for r, msg in zip(group.tolist(), group_messages(group, lambda o: f"row {o + 1}", f"id {rid} appears on {{count}} rows; also on {{others}}"),
                          strict=True):
            out.append(finding("duplicate-id", rid, r, msg))
    return sorted(out, key=lambda f: f.row or 0)


def duplicate_responses(ids: Sequence[object], answers: pd.DataFrame, min_answered: int = 3) -> list[Finding]:
    """Respondents whose answers on every substantive item are identical (blanks equal),
    among those with at least `min_answered` answers. `answers` is numeric (NaN = blank)."""
    values = answers.to_numpy(dtype=float)
    codes = np.zeros(values.shape, np.int64)
    for j in range(values.shape[1]):
        present = ~np.isnan(values[:, j])
        if present.any():
            codes[present, j] = np.unique(values[present, j], return_inverse=True)[1].ravel() + 1
    out: list[Finding] = []
    for group in exact_groups(codes, min_answered):
        answered = int((codes[group[0]] != 0).sum())
        msgs = group_messages(group, lambda o: str(ids[o]), f"the same {answered} answers (and the same blanks) as respondent {{others}}")
        out += [finding("duplicate-response", ids[r], r, m, value=int(group[0])) for r, m in zip(group.tolist(), msgs, strict=True)]
    return sorted(out, key=lambda f: f.row or 0)


@dataclass
class MatchScores:
    """Per respondent: the maximum percent match, the row it was reached with (-1: none
    scored) and how many items that pair was compared on."""

    score: np.ndarray  # float64, NaN where no pair had enough items
    partner: np.ndarray  # int64 row
    compared: np.ndarray  # int64


def _one_hot(codes: np.ndarray, mask: np.ndarray | None = None) -> np.ndarray:
    """codes: n × m non-negative category codes per column. Returns n × K float32 with a
    1 at each (row, column-category), restricted to cells where `mask` is true; columns
    never set are dropped."""
    n, m = codes.shape
    width = codes.max(axis=0) + 1 if n else np.zeros(m, dtype=np.int64)
    offsets = np.concatenate([[0], np.cumsum(width)[:-1]]).astype(np.int64)
    flat = codes + offsets[None, :]
    rows = np.repeat(np.arange(n), m)
    cols = flat.ravel()
    if mask is not None:
        keep = mask.ravel()
        rows, cols = rows[keep], cols[keep]
    used = np.unique(cols)
    remap = np.full(int(width.sum()) if m else 0, -1, dtype=np.int64)
    remap[used] = np.arange(len(used))
    out = np.zeros((n, len(used)), dtype=np.float32)
    out[rows, remap[cols]] = 1.0
    return out


def encode(answers: pd.DataFrame) -> np.ndarray:
    """Category codes per column, blank as a category of its own."""
    cols = []
    for name in answers.columns:
        codes, _ = pd.factorize(answers[name], use_na_sentinel=True)
        cols.append(np.where(codes < 0, codes.max(initial=-1) + 1, codes))
    return np.stack(cols, axis=1).astype(np.int64) if cols else np.zeros((len(answers), 0), dtype=np.int64)


def max_percent_match(
    answers: pd.DataFrame,
    asked: np.ndarray | None = None,
    basis: str = "asked",
    min_items: int = 1,
    chunk_size: int = 2000,
) -> MatchScores:
    """Each respondent's maximum percent match with any other.

    basis "all": over every item, blanks matching blanks. basis "asked": over the items
    asked of either respondent of the pair (`asked` is respondents × items, True where
    the routing asked the item); needs `asked`.
    """
    n, m = answers.shape
    codes = encode(answers)
    onehot = _one_hot(codes)
    if basis == "asked":
        if asked is None:
            raise ValueError("basis 'asked' needs the asked matrix")
        not_asked = ~np.asarray(asked, dtype=bool)
        neither_onehot = _one_hot(codes, not_asked)  # same value on an item neither was asked
        # Items asked of everyone add nothing to "neither was asked".
        na = not_asked[:, not_asked.any(axis=0)].astype(np.float32)
    elif basis == "all":
        neither_onehot = None
        na = None
    else:
        raise ValueError(f"unknown basis {basis!r}; use 'asked' or 'all'")

    best = np.full(n, -1.0)
    partner = np.full(n, -1, dtype=np.int64)
    compared = np.zeros(n, dtype=np.int64)
    same_na = neither_onehot is not None and na is not None and np.array_equal(neither_onehot, na)
    # Square tiles over the upper triangle, written into reused buffers: fresh
    # allocations of this size cost more in page faults than the products themselves.
    c = max(1, min(chunk_size, n))
    matches_buf = np.empty((c, c), dtype=np.float32)
    denom_buf = np.empty((c, c), dtype=np.float32)
    other_buf = np.empty((c, c), dtype=np.float32)
    low_buf = np.empty((c, c), dtype=bool)
    lower = np.tri(c, c, 0, dtype=bool)  # self and the lower triangle of a diagonal tile
    for r0 in range(0, n, c):
        r1 = min(r0 + c, n)
        for c0 in range(r0, n, c):
            c1 = min(c0 + c, n)
            h, w = r1 - r0, c1 - c0
            matches = np.matmul(onehot[r0:r1], onehot[c0:c1].T, out=matches_buf[:h, :w])
            denom: np.ndarray | None = None
            if neither_onehot is not None and na is not None:
                denom = np.matmul(na[r0:r1], na[c0:c1].T, out=denom_buf[:h, :w])
                if same_na:
                    matches -= denom
                else:
                    matches -= np.matmul(neither_onehot[r0:r1], neither_onehot[c0:c1].T, out=other_buf[:h, :w])
                np.subtract(np.float32(m), denom, out=denom)
                with np.errstate(divide="ignore", invalid="ignore"):
                    score = np.divide(matches, denom, out=other_buf[:h, :w])
                np.copyto(score, np.float32(-1.0), where=np.less(denom, min_items, out=low_buf[:h, :w]))
            else:
                score = np.divide(matches, np.float32(m), out=other_buf[:h, :w])
                if m < min_items:
                    score[:] = -1.0
            if r0 == c0:
                # The diagonal (self) and the lower triangle are not pairs of this tile.
                np.copyto(score, np.float32(-1.0), where=lower[:h, :w])
            _update(best, partner, compared, score, matches, denom, r0, c0, rows=True, m_all=m)
            _update(best, partner, compared, score, matches, denom, r0, c0, rows=False, m_all=m)
    result = np.where(best < 0, np.nan, best)
    return MatchScores(result, partner, compared)


def _update(
    best: np.ndarray, partner: np.ndarray, compared: np.ndarray, score: np.ndarray, matches: np.ndarray,
    denom: np.ndarray | None, row0: int, col0: int, rows: bool, m_all: int,
) -> None:
    """Fold one tile into the running best per respondent: per row (rows=True) or per
    column of the tile."""
    if rows:
        arg = score.argmax(axis=1)
        take = np.arange(score.shape[0])
        idx = np.arange(row0, row0 + score.shape[0])
        hit_at = (take, arg)
        other = col0 + arg
    else:
        # Column maxima are cheap; the strided argmax runs only on columns that may improve.
        colmax = score.max(axis=0)
        cols = np.flatnonzero(colmax >= best[col0 : col0 + score.shape[1]] - 1e-6)
        if cols.size == 0:
            return
        arg = np.ascontiguousarray(score[:, cols].T).argmax(axis=1)
        idx = col0 + cols
        hit_at = (arg, cols)
        other = row0 + arg
    ok = score[hit_at] >= 0
    hit = matches[hit_at].astype(np.float64)
    den = np.full(len(hit), float(m_all)) if denom is None else denom[hit_at].astype(np.float64)
    # Exact in float64 (float32 would put 17/20 above 0.85).
    with np.errstate(divide="ignore", invalid="ignore"):
        val = np.where(ok, hit / np.where(den > 0, den, 1.0), -1.0)
    better = val > best[idx]
    best[idx[better]] = val[better]
    partner[idx[better]] = other[better]
    compared[idx[better]] = den[better].astype(np.int64)


def near_duplicates(
    ids: Sequence[object],
    scores: MatchScores,
    threshold: float = 0.85,
    exclude: set[int] | None = None,
) -> list[Finding]:
    """Respondents whose maximum percent match is above `threshold`; rows in `exclude`
    (already exact duplicates) are left to `duplicate-response`."""
    out = []
    skip = exclude or set()
    for r in np.flatnonzero(np.nan_to_num(scores.score, nan=-1.0) > threshold).tolist():
        if int(r) in skip:
            continue
        p = int(scores.partner[r])
        pct = 100 * scores.score[r]
        out.append(
            finding(
                "near-duplicate", ids[r], int(r),
                f"{pct:.1f} % of {scores.compared[r]} compared items match respondent {ids[p]} (row {p + 1})",
                value=round(float(scores.score[r]), 4),
            )
        )
    return out
