"""The substantive answers the duplicate checks compare, as a compact code matrix.

One column per compared item (single, number, decimal, multi; free text and notes are
not compared), one small integer per cell: 0 where the respondent has no valid answer,
1..K for the item's distinct answers (a non-response code is an answer of its own; a
`multi` answer is the set of options chosen). Built once per run and shared through the
context's memo.
"""

from __future__ import annotations

from dataclasses import dataclass

import numpy as np
import pandas as pd

from logiccheck.checks.data_context import DataContext

COMPARED_KINDS = ("single", "multi", "number", "decimal")


@dataclass
class Answers:
    codes: np.ndarray  # respondents × items, int8/int16/int32, 0 = blank
    items: list[str]

    @property
    def answered(self) -> np.ndarray:
        return (self.codes != 0).sum(axis=1)


def _codes(values: np.ndarray, present: np.ndarray) -> tuple[np.ndarray, int]:
    """1..K for the distinct values where present, 0 elsewhere (K: the largest code)."""
    out = np.zeros(values.shape[0], np.int64)
    if present.any():
        got = values[present]
        lo, hi = float(got.min()), float(got.max())
        if hi - lo < 30_000 and bool((got == np.round(got)).all()):
            # Whole numbers in a narrow range (codes, counts): the value itself, shifted,
            # is already a distinct small code; no hashing needed.
            out[present] = (got - lo).astype(np.int64) + 1
            return out, int(hi - lo) + 1
        # Hash-based (no sort); which number each answer gets does not matter.
        labels, distinct = pd.factorize(values[present])
        out[present] = labels + 1
        return out, len(distinct)
    return out, 0


def _multi_values(ctx: DataContext, name: str) -> np.ndarray:
    """A multi item's chosen options as one number per respondent (a bit per option)."""
    stmt = ctx.q.symbols[name].stmt
    codes = ctx.q.item_codes(stmt)
    total = np.zeros(ctx.n, np.float64)
    for k, option in enumerate(codes.options if codes else []):
        chosen = ctx.value_of(f"{name}_{option.value}") == 1
        total += np.where(chosen, float(2**k), 0.0)
    return total


def answer_codes(ctx: DataContext) -> Answers:
    """The compared answers of every respondent (memoised on the context)."""
    memo = ctx.memo.get("quality.answers")
    if isinstance(memo, Answers):
        return memo
    columns: list[np.ndarray] = []
    names: list[str] = []
    widest = 0
    for j, name in enumerate(ctx.items):
        kind = ctx.q.symbols[name].stmt.type.kind
        if kind not in COMPARED_KINDS:
            continue
        values = _multi_values(ctx, name) if kind == "multi" else np.asarray(ctx.value_of(name), dtype=np.float64)
        present = ctx.valid[:, j] & ~np.isnan(values)
        col, k = _codes(values, present)
        # Narrowed at once: a list of int64 columns was 8 bytes a cell (2.4 GB at 1M × 300).
        columns.append(col.astype(np.int8 if k < 127 else np.int16 if k < 32_767 else np.int32))
        names.append(name)
        widest = max(widest, k)
    dtype = np.int8 if widest < 127 else np.int16 if widest < 32_767 else np.int32
    codes = np.zeros((ctx.n, len(columns)), dtype=dtype)
    for j, col in enumerate(columns):
        codes[:, j] = col
    out = Answers(codes, names)
    ctx.memo["quality.answers"] = out
    return out
