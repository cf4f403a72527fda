"""A quick screen for `routing-mismatch`: which items could any simple condition explain
much better than the spec's own routing?

The miner (`mine.search`) tries literals one column at a time, so screening every item
with it costs items × earlier columns calls. Here the same single-literal errors are
computed for every item and column at once on a small random sample: each column's
values become one-hot indicator columns, and a sparse product with the items'
answered / blank indicators gives, per item and value, how many answered and blank rows
carry it. From those counts follow the errors of the miner's literals (a set of codes,
a threshold, `has` an option, `answered`), exactly as `mine._best_literal` counts them.
A conjunction is screened as the spec's own condition and one more literal (the usual
shape of a missed condition); the full search still runs on every item the screen
keeps, and it alone decides what is reported.
"""

from __future__ import annotations

import numpy as np
from scipy import sparse

from logiccheck.draft.mine import Var


def _levels(v: Var) -> tuple[np.ndarray, int, int, str] | None:
    """Per row the value slot of `v` (slots 0..m-1 values, m: none), the slot count m,
    the ordered slots for a threshold (k; 0 = no threshold) and the kind."""
    if v.kind == "coded" and v.options:
        m = len(v.all_codes)
        return v.code_index(), m, len(v.options) if len(v.options) >= 3 else 0, "coded"
    if v.kind == "number" and v.value is not None:
        uniq, idx = v.numbers()
        if len(uniq) >= 2:
            return idx, len(uniq), len(uniq), "number"
    return None


BATCH_SLOTS = 4096


def _best_of(p: np.ndarray, n: np.ndarray, m: int, k: int, kind: str, options: int) -> np.ndarray:
    """Per item, the fewest errors of a set-of-codes or threshold literal on one column
    from its answered (`p`) and blank (`n`) counts per value slot (slot m: no value)."""
    best = np.full(p.shape[0], np.inf)
    if kind == "coded":
        # A set of codes: each value goes to the side with more rows (ties: blank).
        take = p[:, :m] > n[:, :m]
        err = np.minimum(p[:, :m], n[:, :m]).sum(axis=1) + p[:, m]
        best = np.where(take[:, :options].any(axis=1), err, best)
    if k:
        none_pos = p[:, k:].sum(axis=1)
        cp, cn = np.cumsum(p[:, :k], axis=1), np.cumsum(n[:, :k], axis=1)
        below_p, below_n = cp[:, :-1], cn[:, :-1]
        ge = below_p + (cn[:, -1:] - below_n)
        lt = (cp[:, -1:] - below_p) + below_n
        best = np.minimum(best, np.minimum(ge.min(axis=1), lt.min(axis=1)) + none_pos)
    return best


def single_errors(vars_: list[Var], answered: np.ndarray, alive: np.ndarray) -> np.ndarray:
    """items × columns: the fewest errors of one literal on that column predicting the
    item's answered rows among its alive rows (inf: the column offers no literal).
    `answered`, `alive`: rows × items."""
    rows, items = answered.shape
    # float32 holds every count exactly (the screen sample is a few thousand rows).
    a = (answered & alive).astype(np.float32)
    b = (~answered & alive).astype(np.float32)
    out = np.full((items, len(vars_)), np.inf)
    layouts: list[tuple[int, int, np.ndarray, int, int, str]] = []
    offset = 0
    for c, v in enumerate(vars_):
        got = _levels(v)
        if got is None:
            continue
        idx, m, k, kind = got
        layouts.append((c, offset, idx, m, k, kind))
        offset += m + 1
    # Columns in batches of at most BATCH_SLOTS value slots: the counts of one batch are
    # items × slots, so a thousand number columns of 500 values each never sit in memory
    # at once (they were 2 GB at 1,200 items).
    start = 0
    while start < len(layouts):
        stop, slots = start, 0
        while stop < len(layouts) and (stop == start or slots + layouts[stop][3] + 1 <= BATCH_SLOTS):
            slots += layouts[stop][3] + 1
            stop += 1
        batch = layouts[start:stop]
        base = batch[0][1]
        col_index = np.concatenate([o - base + idx for _, o, idx, *_ in batch])
        row_index = np.tile(np.arange(rows), len(batch))
        onehot = sparse.csc_matrix((np.ones(col_index.size, np.float32), (row_index, col_index)), shape=(rows, slots))
        pos = np.asarray((onehot.T @ a).T)  # items × slots: answered rows per value
        neg = np.asarray((onehot.T @ b).T)
        for c, o, _idx, m, k, kind in batch:
            p, n = pos[:, o - base : o - base + m + 1], neg[:, o - base : o - base + m + 1]
            out[:, c] = _best_of(p, n, m, k, kind, len(vars_[c].options))
        start = stop
    for c, v in enumerate(vars_):
        if v.kind == "multi" and v.chosen is not None and v.options:
            chosen = v.chosen.astype(np.float64)
            tp, fp = a.T @ chosen, b.T @ chosen  # items × options
            has = (a.sum(axis=0)[:, None] - tp) + fp
            out[:, c] = np.minimum(out[:, c], has.min(axis=1))
    # `answered` on every column at once: answered rows without a value, blank rows with one.
    present = np.column_stack([v.present for v in vars_]).astype(np.float64) if vars_ else np.zeros((rows, 0))
    answered_err = a.T @ (1 - present) + b.T @ present
    usable = np.array([v.kind in ("text", "multi", "number", "coded") for v in vars_], dtype=bool)
    out[:, usable] = np.minimum(out[:, usable], answered_err[:, usable])
    return out


def promising(vars_: list[Var], answered: np.ndarray, alive: np.ndarray, due: np.ndarray,
              need: float) -> np.ndarray:
    """Per item: whether one literal on an earlier column, or the spec's own condition and
    one more literal, errs on at least `need` fewer rows than the spec's own routing.
    All arrays rows × items, on the screen sample."""
    items = answered.shape[1]
    own_err = (due != answered).sum(axis=0).astype(np.float64)
    earlier = np.arange(len(vars_))[None, :] < np.arange(items)[:, None]
    single = np.where(earlier, single_errors(vars_, answered, alive), np.inf).min(axis=1)
    always = (~answered & alive).sum(axis=0).astype(np.float64)
    # Own condition and one more literal: answers outside it stay errors; inside it the
    # literal predicts answered among the due rows.
    outside = (answered & alive & ~due).sum(axis=0).astype(np.float64)
    inside = np.where(earlier, single_errors(vars_, answered, alive & due), np.inf).min(axis=1)
    best = np.minimum(np.minimum(single, always), outside + inside)
    return best <= own_err - need
