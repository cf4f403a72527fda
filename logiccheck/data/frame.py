"""The typed frame: each spec name's cells in one chunk, parsed and judged.

Cells are parsed once per chunk: a number column is cast by pyarrow in one call, and
only a column that fails the cast takes the slow path (its distinct texts parsed one by
one), so a stray "12a" becomes an invalid value rather than a silent NaN.
"""

from __future__ import annotations

from dataclasses import dataclass, field

import numpy as np
import pyarrow as pa
import pyarrow.compute as pc

from logiccheck.data.mapping import DataMapping
from logiccheck.model import nodes as n
from logiccheck.model.questionnaire import Entry, Questionnaire

# Why a cell is invalid (0: it is not).
OK, NOT_A_NUMBER, NOT_A_CODE, OUT_OF_RANGE, NONRESPONSE_STRICT, NOT_INTEGER, BAD_OPTION_CELL = range(7)

REASON_TEXT = {
    NOT_A_NUMBER: "is not a number",
    NOT_A_CODE: "is not one of its codes",
    OUT_OF_RANGE: "is outside its range",
    NONRESPONSE_STRICT: "is a non-response code, but the item is `strict`",
    NOT_INTEGER: "is not a whole number",
    BAD_OPTION_CELL: "has an option cell that is not 1, 0 or blank",
}


@dataclass
class NamePlan:
    """Where one spec name sits in the export."""

    name: str
    entry: Entry
    kind: str  # value | multi | text | note
    columns: list[str]  # export columns read (one, or one per option)
    options: list[int] = field(default_factory=list)  # multi option values
    labels: dict[int, str] = field(default_factory=dict)  # code value -> label
    allowed: np.ndarray | None = None  # allowed values of a coded item (with nonresponse)
    nonresponse: np.ndarray | None = None  # nonresponse values valid for this item
    global_nr: np.ndarray | None = None  # every nonresponse value of the spec
    lo: float | None = None
    hi: float | None = None
    integer: bool = False
    missing: list[str] = field(default_factory=list)  # expected columns absent from the export


@dataclass
class Layout:
    """The column plan for a questionnaire and an export's header."""

    plans: dict[str, NamePlan]
    id_column: str | None
    duration_column: str | None
    unknown: list[str]
    missing: list[tuple[str, str]]  # (spec name or "id", column)


def entry_kind(entry: Entry) -> str:
    kind = entry.stmt.type.kind
    if kind in ("single", "number", "decimal"):
        return "value"
    return kind  # multi | text | note


def plan_layout(q: Questionnaire, mapping: DataMapping, header: list[str]) -> Layout:
    present = set(header)
    plans: dict[str, NamePlan] = {}
    used: set[str] = set()
    missing: list[tuple[str, str]] = []
    nr_values = np.array([o.value for o in q.nonresponse], dtype=np.float64)
    for entry in q.entries:
        if entry.kind not in ("item", "sample") or entry.name in plans:
            continue
        stmt = entry.stmt
        kind = entry_kind(entry)
        codes = q.item_codes(stmt)
        plan = NamePlan(stmt.name, entry, kind, [])
        if codes is not None:
            plan.labels = {o.value: o.label for o in codes.options}
        plan.labels.update({o.value: o.label for o in q.nonresponse})
        allows_nr = q.allows_nonresponse(stmt)
        plan.nonresponse = nr_values if allows_nr else np.array([], dtype=np.float64)
        plan.global_nr = nr_values
        if kind == "multi":
            plan.options = [o.value for o in codes.options] if codes is not None else []
            if mapping.multi.layout == "columns":
                plan.columns = [mapping.option_column(stmt.name, v) for v in plan.options]
            else:
                plan.columns = [mapping.column_of(stmt.name)]
        elif kind == "note":
            plan.columns = []
            if mapping.column_of(stmt.name) in present:
                used.add(mapping.column_of(stmt.name))  # a note's column is tolerated, never read
        else:
            plan.columns = [mapping.column_of(stmt.name)]
            if stmt.type.kind == "single":
                own = [o.value for o in codes.options] if codes is not None else []
                plan.allowed = np.array(own, dtype=np.float64)
                plan.integer = True
            elif stmt.type.kind in ("number", "decimal"):
                plan.lo, plan.hi = stmt.type.lo, stmt.type.hi
                plan.integer = stmt.type.kind == "number"
        for col in plan.columns:
            if col in present:
                used.add(col)
            else:
                plan.missing.append(col)
                missing.append((stmt.name, col))
        plans[stmt.name] = plan
    id_column = mapping.id if mapping.id in present else None
    if id_column is None:
        missing.insert(0, ("id", mapping.id))
    duration = mapping.duration if mapping.duration in present else None
    known = used | {mapping.id, mapping.duration, *mapping.ignore}
    if mapping.frame is None:
        known.add("email")  # matched against a sample frame when one is given
    unknown = [c for c in header if c not in known]
    return Layout(plans, id_column, duration, unknown, missing)


@dataclass
class Cells:
    """One spec name's cells in one chunk."""

    plan: NamePlan
    present: np.ndarray  # the export has something for it (valid or not)
    valid: np.ndarray  # present and acceptable
    reason: np.ndarray  # int8, why invalid (0: valid or blank)
    value: np.ndarray | None = None  # float64 for value items; NaN where none or unparseable
    nr: np.ndarray | None = None  # the value is a non-response code
    chosen: np.ndarray | None = None  # n × options, for multi items
    not_shown: np.ndarray | None = None
    unanswered: np.ndarray | None = None


def _markers(arr: pa.Array, values: list[str]) -> np.ndarray | None:
    if not values:
        return None
    trimmed = pc.utf8_trim_whitespace(arr) if pa.types.is_string(arr.type) else pc.cast(arr, pa.string())
    return np.asarray(pc.fill_null(pc.is_in(trimmed, value_set=pa.array(values, pa.string())), False))


def _blank_out(arr: pa.Array, markers: np.ndarray | None) -> pa.Array:
    if markers is None or not markers.any():
        return arr
    return pc.if_else(pa.array(markers), pa.scalar(None, arr.type), arr)


def parse_numbers(arr: pa.Array, blank: set[str]) -> tuple[np.ndarray, np.ndarray, np.ndarray]:
    """Cells → (present, value, parsed): `parsed` False where a present cell is no number."""
    if isinstance(arr, pa.ChunkedArray):
        arr = arr.combine_chunks()
    if pa.types.is_integer(arr.type) or pa.types.is_floating(arr.type) or pa.types.is_boolean(arr.type):
        value = np.asarray(pc.cast(arr, pa.float64()).to_numpy(zero_copy_only=False), dtype=np.float64)
        present = np.asarray(arr.is_valid()) & ~np.isnan(value)
        return present, value, np.ones(len(arr), dtype=bool)
    if not pa.types.is_string(arr.type) and not pa.types.is_large_string(arr.type):
        arr = pc.cast(arr, pa.string())
    present = np.asarray(arr.is_valid())
    try:
        value = pc.cast(arr, pa.float64()).to_numpy(zero_copy_only=False)
        value = np.asarray(value, dtype=np.float64)
        parsed = ~np.isnan(value) | ~present
        if len(blank) > 1 or not parsed.all():
            raise pa.ArrowInvalid("take the careful path")
        return present, value, parsed
    except (pa.ArrowInvalid, pa.ArrowNotImplementedError):
        pass
    # Careful path: parse each distinct text once.
    enc = pc.dictionary_encode(arr)
    texts = enc.dictionary.to_pylist()
    d_value = np.full(len(texts) + 1, np.nan)
    d_blank = np.zeros(len(texts) + 1, dtype=bool)
    d_parsed = np.ones(len(texts) + 1, dtype=bool)
    d_blank[-1] = True  # null
    for i, text in enumerate(texts):
        t = text.strip()
        if t in blank:
            d_blank[i] = True
            continue
        try:
            v = float(t)
        except ValueError:
            d_parsed[i] = False
            continue
        if np.isnan(v) or np.isinf(v):
            d_parsed[i] = False
            continue
        d_value[i] = v
    idx = np.asarray(enc.indices.fill_null(len(texts)).to_numpy(zero_copy_only=False), dtype=np.int64)
    return ~d_blank[idx], d_value[idx], d_parsed[idx]


def _column(table: pa.Table, name: str) -> pa.Array:
    col = table.column(name)
    if isinstance(col, pa.ChunkedArray):
        return col.chunk(0) if col.num_chunks == 1 else col.combine_chunks()
    return col


def type_cells(plan: NamePlan, table: pa.Table, mapping: DataMapping) -> Cells:
    rows = table.num_rows
    blank = mapping.blank_markers()
    if plan.kind == "note":
        z = np.zeros(rows, dtype=bool)
        return Cells(plan, z, z.copy(), np.zeros(rows, dtype=np.int8))
    if plan.kind == "multi":
        return _multi_cells(plan, table, mapping, blank)
    if plan.missing:
        z = np.zeros(rows, dtype=bool)
        return Cells(plan, z, z.copy(), np.zeros(rows, dtype=np.int8), np.full(rows, np.nan), z.copy())
    arr = _column(table, plan.columns[0])
    not_shown = _markers(arr, mapping.not_shown)
    unanswered = _markers(arr, mapping.unanswered)
    arr = _blank_out(_blank_out(arr, not_shown), unanswered)
    if plan.kind == "text":
        if not pa.types.is_string(arr.type):
            arr = pc.cast(arr, pa.string())
        trimmed = pc.utf8_trim_whitespace(arr)
        is_blank = np.asarray(pc.fill_null(pc.is_in(trimmed, value_set=pa.array(sorted(blank))), True))
        present = np.asarray(arr.is_valid()) & ~is_blank
        return Cells(plan, present, present.copy(), np.zeros(rows, dtype=np.int8), not_shown=not_shown, unanswered=unanswered)
    present, value, parsed = parse_numbers(arr, blank)
    reason = np.zeros(rows, dtype=np.int8)
    reason[present & ~parsed] = NOT_A_NUMBER
    num = present & parsed
    is_nr = num & np.isin(value, plan.nonresponse)
    if plan.allowed is not None:
        bad = num & ~is_nr & ~np.isin(value, plan.allowed)
        reason[bad & (reason == OK)] = NOT_A_CODE
    else:
        if plan.integer:
            reason[num & ~is_nr & (np.floor(value) != value)] = NOT_INTEGER
        lo = -np.inf if plan.lo is None else plan.lo
        hi = np.inf if plan.hi is None else plan.hi
        out = num & ~is_nr & ((value < lo) | (value > hi)) & (reason == OK)
        reason[out] = OUT_OF_RANGE
    if plan.entry.kind == "item" and plan.entry.stmt.flags.strict and plan.entry.stmt.type.kind != "text":
        # A non-response code on a strict item: name it as such rather than "not a code".
        strict_nr = num & (reason != OK) & np.isin(value, plan.global_nr)
        reason[strict_nr] = NONRESPONSE_STRICT
    valid = present & (reason == OK)
    value = np.where(num, value, np.nan)
    return Cells(plan, present, valid, reason, value, is_nr & valid, not_shown=not_shown, unanswered=unanswered)


def _multi_cells(plan: NamePlan, table: pa.Table, mapping: DataMapping, blank: set[str]) -> Cells:
    rows = table.num_rows
    k = len(plan.options)
    chosen = np.zeros((rows, k), dtype=bool)
    bad = np.zeros(rows, dtype=bool)
    not_shown: np.ndarray | None = None
    unanswered: np.ndarray | None = None
    if mapping.multi.layout == "columns":
        for j, col in enumerate(plan.columns):
            if col in plan.missing:
                continue
            arr = _column(table, col)
            ns = _markers(arr, mapping.not_shown)
            un = _markers(arr, mapping.unanswered)
            if ns is not None:
                not_shown = ns if not_shown is None else (not_shown | ns)
            if un is not None:
                unanswered = un if unanswered is None else (unanswered | un)
            arr = _blank_out(_blank_out(arr, ns), un)
            present, value, parsed = parse_numbers(arr, blank)
            chosen[:, j] = present & parsed & (value == 1)
            bad |= present & ~(parsed & ((value == 1) | (value == 0)))
    elif not plan.missing:
        arr = _column(table, plan.columns[0])
        not_shown = _markers(arr, mapping.not_shown)
        unanswered = _markers(arr, mapping.unanswered)
        arr = _blank_out(_blank_out(arr, not_shown), unanswered)
        if not pa.types.is_string(arr.type):
            arr = pc.cast(arr, pa.string())
        enc = pc.dictionary_encode(arr)
        texts = enc.dictionary.to_pylist()
        position = {v: j for j, v in enumerate(plan.options)}
        d_chosen = np.zeros((len(texts) + 1, k), dtype=bool)
        d_bad = np.zeros(len(texts) + 1, dtype=bool)
        for i, text in enumerate(texts):
            for token in text.split(mapping.multi.separator):
                token = token.strip()
                if token == "" or token in blank:
                    continue
                try:
                    v = float(token)
                except ValueError:
                    d_bad[i] = True
                    continue
                j = position.get(int(v)) if v.is_integer() else None
                if j is None:
                    d_bad[i] = True
                else:
                    d_chosen[i, j] = True
        idx = np.asarray(enc.indices.fill_null(len(texts)).to_numpy(zero_copy_only=False), dtype=np.int64)
        chosen = d_chosen[idx]
        bad = d_bad[idx]
    present = chosen.any(axis=1) | bad
    reason = np.where(bad, BAD_OPTION_CELL, OK).astype(np.int8)
    valid = present & ~bad
    return Cells(plan, present, valid, reason, chosen=chosen, not_shown=not_shown, unanswered=unanswered)


def cell_texts(table: pa.Table, plan: NamePlan, rows: np.ndarray, mapping: DataMapping) -> list[str]:
    """The export's own text of some cells, for findings (multi: the option cells set)."""
    if not plan.columns or (plan.missing and (plan.kind != "multi" or mapping.multi.layout != "columns")):
        return [""] * len(rows)
    take = pa.array(rows, type=pa.int64())
    if plan.kind == "multi" and mapping.multi.layout == "columns":
        parts = []
        for col, v in zip(plan.columns, plan.options, strict=False):
            if col in plan.missing:
                continue
            vals = _column(table, col).take(take).to_pylist()
            parts.append((col, v, vals))
        out = []
        for i in range(len(rows)):
            cells = [f"{col}={vals[i]}" for col, _, vals in parts if vals[i] not in (None, "", "0", 0)]
            out.append(", ".join(cells))
        return out
    vals = _column(table, plan.columns[0]).take(take).to_pylist()
    return ["" if v is None else str(v) for v in vals]


def is_multi(entry: Entry) -> bool:
    return isinstance(entry.stmt, (n.Item, n.Sample)) and entry.stmt.type.kind == "multi"
