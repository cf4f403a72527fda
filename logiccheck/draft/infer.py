"""Infer what each column of an export holds: coded answers, numbers, text, or the
options of a multi-answer item (`NAME_N` column groups, or one column of delimited
labels), and which codes mean non-response.
"""

from __future__ import annotations

import math
import re
from collections.abc import Callable
from dataclasses import dataclass, field
from pathlib import Path

import numpy as np
import pyarrow as pa
import pyarrow.compute as pc

from logiccheck.data.frame import parse_numbers
from logiccheck.data.readers import open_export
from logiccheck.draft.mine import Var

# A column of whole numbers is read as codes when it has at most this many distinct
# values, all between 0 and CODED_MAX; otherwise as a number. Common practice, no source.
CODED_DISTINCT = 12
CODED_MAX = 20
# A text column is read as answer labels when it has at most this many distinct texts,
# each used on average at least LABEL_REPEAT times.
LABEL_DISTINCT = 30
LABEL_REPEAT = 5
# A text column is a delimited multi-answer list when this share of its cells holds
# the separator.
DELIMITED_SHARE = 0.1
SEPARATOR = ";"

RESERVED = set(
    "survey codes nonresponse sample section grid let skip stop check scale when require seconds gate key required strict "
    "shuffled soft and or not in has any all count answered asked single multi number decimal text note".split()
)


@dataclass
class Column:
    """One item of the draft: the miner's view (`var`) and what the spec must declare."""

    var: Var
    columns: list[str]  # export columns read
    kind: str  # single | multi | number | decimal | text
    texts: dict[int, str] = field(default_factory=dict)  # code -> label text (shown in quotes)
    lo: float | None = None
    hi: float | None = None
    strict: bool = False  # values equal to a non-response code are ordinary answers here
    delimited: bool = False  # a multi held as one column of delimited labels


@dataclass
class Inferred:
    rows: int
    columns: list[Column]
    nonresponse: list[int]
    id_column: str | None
    skipped: list[str]  # export columns not drafted (id, duration, empty)
    renamed: dict[str, str]  # spec name -> export column, where the column name is not a valid name


def _unused(name: str, prefix: str, taken: set[str]) -> str:
    """`name` made a valid spec name (not starting with a digit, not a keyword) and unused."""
    if not re.match(r"[a-z_]", name):
        name = prefix + name
    if name in RESERVED:
        name += "_"
    base, i = name, 2
    while name in taken:
        name, i = f"{base}_{i}", i + 1
    taken.add(name)
    return name


def spec_name(column: str, taken: set[str]) -> str:
    """A valid, unused spec name for an export column."""
    return _unused(re.sub(r"[^a-z0-9_]", "_", column.strip().lower()) or "column", "q_", taken)


def label_name(text: str, taken: set[str]) -> str:
    """A code label for an answer text (`Strongly agree` -> `strongly_agree`)."""
    return _unused(re.sub(r"[^a-z0-9]+", "_", text.strip().lower()).strip("_")[:24].strip("_") or "answer", "a_", taken)


def read_table(path: str | Path, encoding: str | None = None) -> pa.Table:
    export = open_export(path, encoding=encoding)
    tables = list(export.chunks)
    return pa.concat_tables(tables) if len(tables) > 1 else tables[0]


def _texts(arr: pa.ChunkedArray | pa.Array) -> np.ndarray:
    """Trimmed cell texts (None where blank) as an object array."""
    text = pc.utf8_trim_whitespace(pc.cast(arr, pa.string()))
    out = np.asarray(text.to_numpy(zero_copy_only=False), dtype=object)
    out[out == ""] = None
    return out


def infer(
    table: pa.Table, *, id_column: str = "id", duration: str = "duration", decimal: str = ".",
    progress: Callable[[int, int], None] | None = None,
) -> Inferred:
    """Every column of `table` (in order) as a draft item."""
    n = table.num_rows
    names = list(table.column_names)
    skipped = [c for c in names if c in (id_column, duration)]
    parsed: dict[str, tuple[np.ndarray, np.ndarray, bool]] = {}  # column -> (present, value, numeric)
    for col in names:
        if col in skipped:
            continue
        arr = table.column(col)
        if decimal != "." and not (pa.types.is_integer(arr.type) or pa.types.is_floating(arr.type)):
            arr = pc.replace_substring(pc.cast(arr, pa.string()), decimal, ".")
        present, value, ok = parse_numbers(arr, {""})
        parsed[col] = (present, value, bool(ok.all()))
    groups = _multi_groups(names, parsed)
    nonresponse = _nonresponse(parsed, groups)
    taken: set[str] = set()
    out: list[Column] = []
    renamed: dict[str, str] = {}
    done: set[str] = set()
    for col in names:
        if col in skipped or col in done:
            continue
        if progress is not None:
            progress(len(done), len(names))
        if col in groups:
            prefix, members = groups[col]
            name = spec_name(prefix, taken)
            if name != prefix:
                renamed[name] = prefix
            out.append(_multi_columns(name, members, parsed))
            done.update(c for c, _ in members)
            continue
        done.add(col)
        name = spec_name(col, taken)
        if name != col:
            renamed[name] = col
        present, value, numeric = parsed[col]
        if not present.any():
            skipped.append(col)
            taken.discard(name)
            renamed.pop(name, None)
            continue
        if numeric:
            out.append(_numeric(name, col, present, value, nonresponse))
        else:
            out.append(_textual(name, col, _texts(table.column(col)), present))
    for i, c in enumerate(out):
        c.var.position = i
    return Inferred(n, out, nonresponse, id_column if id_column in names else None, skipped, renamed)


def _multi_groups(names: list[str], parsed: dict) -> dict[str, tuple[str, list[tuple[str, int]]]]:
    """Runs of `NAME_N` columns holding only 0, 1 or blank: first column -> (NAME, members)."""
    out: dict[str, tuple[str, list[tuple[str, int]]]] = {}
    i = 0
    while i < len(names):
        m = re.fullmatch(r"(.+)_(\d+)", names[i])
        if not m or names[i] not in parsed:
            i += 1
            continue
        prefix, run = m.group(1), []
        j = i
        while j < len(names):
            mj = re.fullmatch(r"(.+)_(\d+)", names[j])
            if not mj or mj.group(1) != prefix or names[j] not in parsed:
                break
            present, value, numeric = parsed[names[j]]
            if not numeric or not np.isin(value[present], (0.0, 1.0)).all():
                break
            run.append((names[j], int(mj.group(2))))
            j += 1
        if len(run) >= 2:
            out[names[i]] = (prefix, run)
            i = j
        else:
            i += 1
    return out


def _nonresponse(parsed: dict, groups: dict) -> list[int]:
    """Codes that sit far above a coded column's answers (98, 99 beside 1..5) in at least
    two columns: the spec's non-response codes."""
    in_groups = {c for _, members in groups.values() for c, _ in members}
    seen: dict[int, int] = {}
    tails: list[list[int]] = []
    for col, (present, value, numeric) in parsed.items():
        if col in in_groups or not numeric or not present.any():
            continue
        vals = value[present]
        if not np.all(vals == np.floor(vals)):
            continue
        uniq = np.unique(vals)
        if len(uniq) < 3:
            continue
        gaps = uniq[1:] / np.maximum(uniq[:-1], 1)
        for cut in np.flatnonzero(gaps >= 2.0)[::-1]:
            tail = uniq[cut + 1 :]
            if len(tail) <= 4 and tail.min() >= 7 and uniq[cut] <= CODED_MAX:
                tails.append([int(v) for v in tail.tolist()])
                for v in tails[-1]:
                    seen[v] = seen.get(v, 0) + 1
                break
    common = {v for v, k in seen.items() if k >= 2}
    # A code seen in one column only counts beside a common one (98 beside 99).
    return sorted({v for tail in tails if common & set(tail) for v in tail})


def _round_out(lo: float, hi: float) -> tuple[float, float]:
    """The observed range widened to round numbers (16..89 -> 10..90)."""
    top = max(abs(lo), abs(hi), 1.0)
    step = 10.0 ** math.floor(math.log10(top))
    return math.floor(lo / step) * step, math.ceil(hi / step) * step


def _numeric(name: str, col: str, present: np.ndarray, value: np.ndarray, nonresponse: list[int]) -> Column:
    vals = value[present]
    nr_codes = np.asarray(nonresponse, dtype=np.float64)
    is_nr_value = np.isin(vals, nr_codes)
    others = vals[~is_nr_value]
    # Non-response codes count as such only above every answer (an age of 98 is not).
    as_nr = bool(is_nr_value.any()) and (others.size == 0 or others.max() < nr_codes.min())
    nr = present & np.isin(value, nr_codes) if as_nr else np.zeros(len(present), dtype=bool)
    strict = bool(is_nr_value.any()) and not as_nr
    subst = vals[~is_nr_value] if as_nr else vals
    integer = bool(np.all(subst == np.floor(subst)))
    uniq = np.unique(subst)
    if integer and len(uniq) and len(uniq) <= CODED_DISTINCT and uniq.min() >= 0 and uniq.max() <= CODED_MAX:
        codes = list(range(int(uniq.min()), int(uniq.max()) + 1))
        if len(codes) > CODED_DISTINCT:
            codes = [int(v) for v in uniq]
        nr_seen = [int(c) for c in nonresponse if as_nr]
        var = Var(name, "coded", present, value, nr, options=codes, nr_codes=nr_seen,
                  labels={**{c: f"c{c}" for c in codes}, **{c: f"nr{c}" for c in nr_seen}})
        # A code equal to a non-response code (8 on a 0..10 scale beside 8 = don't know)
        # is an answer here: the item is strict, so the two never collide.
        strict = strict or bool(set(codes) & set(nonresponse))
        return Column(var, [col], "single", {c: str(c) for c in codes}, strict=strict)
    seen_lo, seen_hi = (float(uniq.min()), float(uniq.max())) if len(uniq) else (0.0, 0.0)
    lo, hi = _round_out(seen_lo, seen_hi)
    if not strict:
        # Rounding out must not swallow a non-response code (it could no longer be read).
        for code in nr_codes.tolist():
            if seen_hi < code <= hi:
                hi = code - 1
            elif lo <= code < seen_lo:
                lo = code + 1
            elif lo <= code <= hi:
                strict = True
    var = Var(name, "number", present, value, nr, integer=integer)
    return Column(var, [col], "number" if integer else "decimal", lo=lo, hi=hi, strict=strict)


def _textual(name: str, col: str, texts: np.ndarray, present: np.ndarray) -> Column:
    cells = texts[present]
    folded = np.array([t.casefold() for t in cells], dtype=object)
    uniq, first = np.unique(folded, return_index=True)
    has_sep = np.char.find(folded.astype(str), SEPARATOR) >= 0
    if has_sep.mean() >= DELIMITED_SHARE:
        return _delimited(name, col, texts, present)
    if len(uniq) <= LABEL_DISTINCT and len(cells) >= LABEL_REPEAT * len(uniq):
        shown = [cells[i] for i in first]  # the first spelling of each label
        codes = list(range(1, len(uniq) + 1))
        index = {u: i for i, u in enumerate(uniq.tolist())}
        value = np.full(len(present), np.nan)
        value[present] = [index[f] + 1 for f in folded.tolist()]
        taken: set[str] = set()
        labels = {c: label_name(t, taken) for c, t in zip(codes, shown, strict=True)}
        var = Var(name, "coded", present, value, np.zeros(len(present), dtype=bool), options=codes, labels=labels)
        return Column(var, [col], "single", dict(zip(codes, shown, strict=True)))
    return Column(Var(name, "text", present), [col], "text")


def _delimited(name: str, col: str, texts: np.ndarray, present: np.ndarray) -> Column:
    rows = np.flatnonzero(present)
    tokens: dict[str, str] = {}  # folded -> first spelling
    split: list[list[str]] = []
    for t in texts[rows].tolist():
        parts = [p.strip() for p in t.split(SEPARATOR) if p.strip()]
        split.append([p.casefold() for p in parts])
        for p in parts:
            tokens.setdefault(p.casefold(), p)
    order = sorted(tokens)
    where = {t: j for j, t in enumerate(order)}
    chosen = np.zeros((len(present), len(order)), dtype=bool)
    for r, parts in zip(rows.tolist(), split, strict=True):
        for p in parts:
            chosen[r, where[p]] = True
    codes = list(range(1, len(order) + 1))
    taken: set[str] = set()
    labels = {c: label_name(tokens[t], taken) for c, t in zip(codes, order, strict=True)}
    var = Var(name, "multi", present, chosen=chosen, options=codes, labels=labels)
    return Column(var, [col], "multi", {c: tokens[t] for c, t in zip(codes, order, strict=True)}, delimited=True)


def _multi_columns(name: str, members: list[tuple[str, int]], parsed: dict) -> Column:
    present = np.zeros(len(parsed[members[0][0]][0]), dtype=bool)
    chosen = np.zeros((len(present), len(members)), dtype=bool)
    for j, (col, _) in enumerate(members):
        p, v, _ = parsed[col]
        present |= p
        chosen[:, j] = p & (v == 1)
    codes = [v for _, v in members]
    var = Var(name, "multi", present, chosen=chosen, options=codes, labels={c: f"c{c}" for c in codes})
    return Column(var, [c for c, _ in members], "multi", {c: str(c) for c in codes})
