"""The typed frame: each spec name's cells in one chunk, parsed and judged.

Cells are parsed once per chunk: a number column is cast by pyarrow in one call, and
only a column that fails the cast takes the slow path (its distinct texts parsed one by
one), so a stray "12a" becomes an invalid value rather than a silent NaN.
"""

from __future__ import annotations

import re
from collections.abc import Iterator
from dataclasses import dataclass, field

import numpy as np
import pyarrow as pa
import pyarrow.compute as pc

from logiccheck.data.mapping import DataMapping
from logiccheck.model import nodes as n
from logiccheck.model.questionnaire import Entry, Questionnaire

# Why a cell is invalid (0: it is not).
OK, NOT_A_NUMBER, NOT_A_CODE, OUT_OF_RANGE, NONRESPONSE_STRICT, NOT_INTEGER, BAD_OPTION_CELL, NOT_A_LABEL = range(8)

REASON_TEXT = {
    NOT_A_NUMBER: "is not a number",
    NOT_A_CODE: "is not one of its codes",
    OUT_OF_RANGE: "is outside its range",
    NONRESPONSE_STRICT: "is a non-response code, but the item is `strict`",
    NOT_INTEGER: "is not a whole number",
    BAD_OPTION_CELL: "has an option cell that is not 1, 0 or blank",
    NOT_A_LABEL: "is neither one of its codes nor one of its answer labels",
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
    # Answer texts and label names, trimmed and case-folded -> code value (labels in cells).
    answers: dict[str, int] = field(default_factory=dict)
    answer_texts: list[str] = field(default_factory=list)  # as written in the spec, for did-you-mean
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
        options = [*(codes.options if codes is not None else []), *q.nonresponse]
        # A label name is matched only where no answer text reads the same.
        plan.answers = {o.label.casefold(): o.value for o in options}
        plan.answers.update({o.text.strip().casefold(): o.value for o in options})
        plan.answer_texts = [o.text for o in options]
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


@dataclass
class Distinct:
    """A text column as its distinct texts and, per cell, an index into them; index
    `len(texts)` stands for a null (empty) cell. Judging a column then costs one step per
    distinct text and one numpy take per cell."""

    dictionary: pa.Array  # the distinct texts (string), as pyarrow holds them
    index: np.ndarray
    _texts: list[str] | None = None

    @property
    def texts(self) -> list[str]:
        if self._texts is None:
            self._texts = ["" if t is None else t for t in self.dictionary.to_pylist()]
        return self._texts

    def per_cell(self, per_text: np.ndarray, null: object) -> np.ndarray:
        table = np.empty(len(self.dictionary) + 1, dtype=per_text.dtype)
        table[:-1] = per_text
        table[-1] = null
        # `take` with a non-negative intp index is the fastest numpy gather.
        return np.take(table, self.index)


def dictionary_chunks(arr: pa.Array | pa.ChunkedArray) -> Iterator[tuple[pa.Array, pa.Array]]:
    """(string dictionary, indices) per Arrow chunk; each chunk has its own dictionary."""
    for chunk in arr.chunks if isinstance(arr, pa.ChunkedArray) else [arr]:
        if not pa.types.is_dictionary(chunk.type):
            if not (pa.types.is_string(chunk.type) or pa.types.is_large_string(chunk.type)):
                chunk = pc.cast(chunk, pa.string())
            chunk = pc.dictionary_encode(chunk)
        dictionary = chunk.dictionary
        if not pa.types.is_string(dictionary.type):
            dictionary = pc.cast(dictionary, pa.string())
        yield dictionary, chunk.indices


def distinct(arr: pa.Array | pa.ChunkedArray) -> Distinct:
    dictionaries: list[pa.Array] = []
    parts: list[tuple[pa.Array, int]] = []  # (dictionary indices, offset of its dictionary)
    base = 0
    for dictionary, indices in dictionary_chunks(arr):
        dictionaries.append(dictionary)
        parts.append((indices, base))
        base += len(dictionary)
    if not parts:
        return Distinct(pa.array([], pa.string()), np.zeros(0, dtype=np.intp))
    # A null cell indexes slot `base` (one past the last text), which `per_cell` reserves
    # for nulls; the index is intp and never negative, so every gather is a plain take.
    out = [_index_part(indices, offset, base) for indices, offset in parts]
    index = np.concatenate(out) if len(out) > 1 else out[0]
    dictionary = pa.concat_arrays(dictionaries) if len(dictionaries) > 1 else dictionaries[0]
    return Distinct(dictionary, index)


def _index_part(indices: pa.Array, offset: int, null: int) -> np.ndarray:
    """One chunk's dictionary indices as intp, shifted by `offset`, nulls as `null`."""
    if indices.null_count:
        idx = np.asarray(indices.fill_null(null - offset).to_numpy(zero_copy_only=False))
    else:
        idx = np.asarray(indices.to_numpy(zero_copy_only=False))
    idx = idx.astype(np.intp)
    if offset:
        idx += offset  # nulls were filled with null - offset, so they land on `null`
    return idx


def _is_text(arr: pa.Array | pa.ChunkedArray) -> bool:
    t = arr.type
    return pa.types.is_string(t) or pa.types.is_large_string(t) or pa.types.is_dictionary(t)


def _in(trimmed: pa.Array, values: set[str]) -> np.ndarray:
    if not values:
        return np.zeros(len(trimmed), dtype=bool)
    return np.asarray(pc.fill_null(pc.is_in(trimmed, value_set=pa.array(sorted(values), pa.string())), False))


def _marker_masks(d: Distinct, mapping: DataMapping) -> tuple[np.ndarray | None, np.ndarray | None, np.ndarray]:
    """(not_shown, unanswered, blank-per-text) for a column's distinct texts."""
    is_ns, is_un, is_blank = _marker_masks_distinct(d, mapping)
    not_shown = d.per_cell(is_ns, False) if is_ns is not None else None
    unanswered = d.per_cell(is_un, False) if is_un is not None else None
    return not_shown, unanswered, is_blank


def _marker_masks_distinct(d: Distinct, mapping: DataMapping) -> tuple[np.ndarray | None, np.ndarray | None, np.ndarray]:
    """Per distinct text: (not_shown or None when no such marker is set, unanswered or
    None likewise, blank)."""
    trimmed = pc.utf8_trim_whitespace(d.dictionary)
    ns = {m.strip() for m in mapping.not_shown}
    un = {m.strip() for m in mapping.unanswered}
    is_ns, is_un = _in(trimmed, ns), _in(trimmed, un)
    is_blank = _in(trimmed, mapping.blank_markers()) | is_ns | is_un
    return (is_ns if ns else None), (is_un if un else None), is_blank


def _numbers_of(d: Distinct, is_blank: np.ndarray) -> tuple[np.ndarray, np.ndarray, np.ndarray]:
    """Per cell (present, value, parsed) from the distinct texts."""
    present, value, parsed = _numbers_distinct(d, is_blank)
    return d.per_cell(present, False), d.per_cell(value, np.nan), d.per_cell(parsed, True)


def _numbers_distinct(d: Distinct, is_blank: np.ndarray) -> tuple[np.ndarray, np.ndarray, np.ndarray]:
    """Per distinct text (present, value, parsed): one pyarrow cast of the dictionary, and
    a text-by-text look only when some text is not a number."""
    k = len(d.dictionary)
    try:
        trimmed = pc.utf8_trim_whitespace(d.dictionary)
        cleared = pc.if_else(pa.array(is_blank), pa.scalar(None, pa.string()), trimmed) if is_blank.any() else trimmed
        value = np.asarray(pc.cast(cleared, pa.float64()).to_numpy(zero_copy_only=False), dtype=np.float64)
        parsed = ~(np.isnan(value) & ~is_blank) & ~np.isinf(value)
        if not parsed.all():
            raise ValueError("some text is nan or inf")
    except (pa.ArrowInvalid, ValueError):
        value = np.full(k, np.nan)
        parsed = np.ones(k, dtype=bool)
        for i, text in enumerate(d.texts):
            if is_blank[i]:
                continue
            try:
                v = float(text.strip())
            except ValueError:
                parsed[i] = False
                continue
            if np.isnan(v) or np.isinf(v):
                parsed[i] = False
                continue
            value[i] = v
    parsed &= is_blank | strict_numbers(pc.utf8_trim_whitespace(d.dictionary))
    value = np.where(parsed, value, np.nan)
    return ~is_blank, value, parsed


# A survey number: ASCII digits, an optional sign, point and exponent. Wider notions
# (other scripts' digits, full-width digits, underscores) are not answers a survey
# system writes, so they are invalid rather than quietly read.
STRICT_NUMBER = r"^[+-]?([0-9]+(\.[0-9]*)?|\.[0-9]+)([eE][+-]?[0-9]+)?$"
_STRICT_NUMBER_RE = re.compile(STRICT_NUMBER)
_NONZERO_MANTISSA = r"^[+-]?[0-9.]*[1-9]"


def strict_numbers(trimmed: pa.Array) -> np.ndarray:
    """Per text: written as a survey number, and representable (a nonzero text that
    would read as 0, such as 1e-400, is not)."""
    if len(trimmed) == 0:
        return np.zeros(0, dtype=bool)
    ok = np.asarray(pc.fill_null(pc.match_substring_regex(trimmed, STRICT_NUMBER), False), dtype=bool)
    if ok.any():
        nonzero = np.asarray(pc.fill_null(pc.match_substring_regex(trimmed, _NONZERO_MANTISSA), False), dtype=bool)
        value = np.asarray(pc.cast(pc.if_else(pa.array(ok), trimmed, pa.scalar("0")), pa.float64()).to_numpy(zero_copy_only=False))
        ok &= ~(nonzero & (value == 0)) & np.isfinite(value)
    return ok


def strict_number(token: str) -> float | None:
    """One text as a survey number, or None."""
    if not _STRICT_NUMBER_RE.match(token):
        return None
    v = float(token)
    if not np.isfinite(v) or (v == 0 and re.match(_NONZERO_MANTISSA, token)):
        return None
    return v


def parse_numbers(arr: pa.Array | pa.ChunkedArray, blank: set[str]) -> tuple[np.ndarray, np.ndarray, np.ndarray]:
    """Cells → (present, value, parsed): `parsed` False where a present cell is no number."""
    if not _is_text(arr) and (pa.types.is_integer(arr.type) or pa.types.is_floating(arr.type) or pa.types.is_boolean(arr.type)):
        if isinstance(arr, pa.ChunkedArray):
            arr = arr.combine_chunks()
        value = np.asarray(pc.cast(arr, pa.float64()).to_numpy(zero_copy_only=False), dtype=np.float64)
        present = np.asarray(arr.is_valid()) & ~np.isnan(value)
        return present, value, np.ones(len(arr), dtype=bool)
    d = distinct(arr)
    is_blank = _in(pc.utf8_trim_whitespace(d.dictionary), blank)
    return _numbers_of(d, is_blank)


def type_cells(plan: NamePlan, table: pa.Table, mapping: DataMapping, memo: dict[tuple, Verdicts] | None = None) -> Cells:
    """One name's cells in one chunk. `memo`, when given, keeps each column's verdicts per
    distinct text from chunk to chunk, so a column whose texts repeat is judged once."""
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
    arr = table.column(plan.columns[0])
    not_shown = unanswered = None
    if plan.kind == "text":
        d = distinct(arr)
        not_shown, unanswered, is_blank = _marker_masks(d, mapping)
        present = d.per_cell(~is_blank, False)
        return Cells(plan, present, present.copy(), np.zeros(rows, dtype=np.int8), not_shown=not_shown, unanswered=unanswered)
    if _is_text(arr):
        # Judge each distinct text once (and, with a memo, once per run), then spread the
        # verdicts over the cells: one gather of a packed state byte and one of the value.
        v, state, value, not_shown, unanswered = _gather(plan, arr, mapping, memo)
        rows = len(state)
        return Cells(
            plan,
            (state & PRESENT_BIT).view(bool),
            (state & VALID_BIT) != 0,
            (state >> REASON_SHIFT).view(np.int8) if v.any_bad else np.zeros(rows, dtype=np.int8),
            value,
            (state & NR_BIT) != 0 if v.any_nr else None,
            not_shown=not_shown,
            unanswered=unanswered,
        )
    present, value, parsed = parse_numbers(arr, blank)
    reason, valid, value, nr = judge(plan, present, value, parsed)
    return Cells(plan, present, valid, reason, value, nr)


# A cell's verdict packed in one byte: bits for present, valid and non-response, and the
# reason code above them.
PRESENT_BIT, VALID_BIT, NR_BIT, REASON_SHIFT = 1, 2, 4, 3


# Above this many distinct texts a column's verdicts are not kept from chunk to chunk
# (a column of free numbers would otherwise grow its memo with every chunk).
MEMO_TEXTS = 50_000


@dataclass
class Verdicts:
    """A value column's verdicts per distinct text seen so far (`where`: text → slot)."""

    where: dict[str | None, int]
    state: np.ndarray  # uint8, packed as PRESENT_BIT | VALID_BIT | NR_BIT | reason << REASON_SHIFT
    value: np.ndarray  # float64, NaN where no number
    any_bad: bool
    any_nr: bool
    not_shown: np.ndarray | None = None  # bool per text, when not-shown markers are set
    unanswered: np.ndarray | None = None


def decode(plan: NamePlan, d: Distinct, mapping: DataMapping) -> tuple[Distinct, np.ndarray | None]:
    """The distinct texts as the judge reads them: answer labels as their codes (per the
    mapping's `values`), decimal commas as points. Also, per text, whether it is a word
    that matches no label (None when labels are not read)."""
    # Number items read their non-response labels ("Don't know") too.
    read_labels = mapping.values != "codes" and bool(plan.answers)
    coded = plan.allowed is not None
    if not read_labels and mapping.decimal == ".":
        return d, None
    texts = d.texts
    out: list[str] = []
    unmatched = np.zeros(len(texts), dtype=bool)
    for i, text in enumerate(texts):
        t = text.strip()
        if mapping.decimal == "," and t.count(",") == 1 and t.replace(",", "", 1).lstrip("+-").isdigit():
            t = t.replace(",", ".")
        if read_labels:
            code = plan.answers.get(t.casefold())
            numeric = _is_number(t)
            if code is not None and (mapping.values == "labels" or not numeric):
                t = str(code)
            elif not numeric and t and coded:
                unmatched[i] = True
        out.append(t)
    return Distinct(pa.array(out, pa.string()), d.index), (unmatched if read_labels else None)


def _is_number(text: str) -> bool:
    return strict_number(text) is not None


def label_hint(plan: NamePlan, text: str) -> str:
    """`; did you mean "Agree"?` for a cell close to one of the item's answer texts."""
    import difflib

    shown = {t.strip().casefold(): t for t in plan.answer_texts}
    close = difflib.get_close_matches(text.strip().casefold(), list(shown), n=1, cutoff=0.6)
    return f'; did you mean "{shown[close[0]]}"?' if close else ""


def verdicts(plan: NamePlan, d: Distinct, mapping: DataMapping) -> Verdicts:
    """Judge a value column's distinct texts."""
    is_ns, is_un, is_blank = _marker_masks_distinct(d, mapping)
    read, unmatched = decode(plan, d, mapping)
    present_d, value_d, parsed_d = _numbers_distinct(read, is_blank)
    reason_d, valid_d, value_d, nr_d = judge(plan, present_d, value_d, parsed_d)
    if unmatched is not None:
        reason_d[unmatched & (reason_d == NOT_A_NUMBER)] = NOT_A_LABEL
    state = (
        present_d.astype(np.uint8) * PRESENT_BIT
        | valid_d.astype(np.uint8) * VALID_BIT
        | nr_d.astype(np.uint8) * NR_BIT
        | (reason_d.astype(np.uint8) << REASON_SHIFT)
    ).astype(np.uint8)
    return Verdicts(
        {t: i for i, t in enumerate(d.dictionary.to_pylist())},
        state,
        np.asarray(value_d, dtype=np.float64),
        bool((present_d & ~valid_d).any()),
        bool(nr_d.any()),
        is_ns,
        is_un,
    )


def _merge(old: Verdicts, new: Verdicts) -> Verdicts:
    def cat(a: np.ndarray | None, b: np.ndarray | None) -> np.ndarray | None:
        return None if a is None or b is None else np.concatenate([a, b])

    base = len(old.where)
    return Verdicts(
        {**old.where, **{t: base + i for t, i in new.where.items()}},
        np.concatenate([old.state, new.state]),
        np.concatenate([old.value, new.value]),
        old.any_bad or new.any_bad,
        old.any_nr or new.any_nr,
        cat(old.not_shown, new.not_shown),
        cat(old.unanswered, new.unanswered),
    )


def _positions(plan: NamePlan, dictionary: pa.Array, mapping: DataMapping, memo: dict[tuple, Verdicts]) -> tuple[Verdicts, np.ndarray]:
    """The column's verdicts and where each text of `dictionary` sits in them; texts not
    seen before are judged now (a Python dict lookup per text: far cheaper than a
    pyarrow call on a dictionary of a few texts)."""
    key = judge_key(plan)
    v = memo.get(key)
    if v is None or len(v.where) > MEMO_TEXTS:
        v = verdicts(plan, Distinct(dictionary, np.zeros(0, dtype=np.intp)), mapping)
        memo[key] = v
        return v, np.arange(len(dictionary), dtype=np.intp)
    texts = dictionary.to_pylist()
    where = v.where
    pos = np.array([where.get(t, -1) for t in texts], dtype=np.intp)
    new = pos < 0
    if new.any():
        fresh_texts = [t for t, is_new in zip(texts, new.tolist(), strict=True) if is_new]
        fresh = verdicts(plan, Distinct(pa.array(fresh_texts, pa.string()), np.zeros(0, dtype=np.intp)), mapping)
        pos[new] = len(where) + np.arange(len(fresh_texts), dtype=np.intp)
        v = _merge(v, fresh)
        memo[key] = v
    return v, pos


def judge_key(plan: NamePlan) -> tuple:
    """What `judge` reads of a plan: columns with equal keys (a battery of items on one
    code list) share their verdicts, so a text new to the run is judged once."""
    strict = plan.entry.kind == "item" and bool(plan.entry.stmt.flags.strict)

    def values(a: np.ndarray | None) -> tuple[float, ...] | None:
        return None if a is None else tuple(a.tolist())

    return (values(plan.allowed), values(plan.nonresponse), values(plan.global_nr), plan.integer, plan.lo, plan.hi, strict,
            tuple(sorted(plan.answers.items())))


def _gather(
    plan: NamePlan, arr: pa.Array | pa.ChunkedArray, mapping: DataMapping, memo: dict[tuple, Verdicts] | None
) -> tuple[Verdicts, np.ndarray, np.ndarray, np.ndarray | None, np.ndarray | None]:
    """(verdicts, per-cell state byte, value, not-shown, unanswered) for a text column,
    Arrow chunk by Arrow chunk (each has its own dictionary)."""
    memo = memo if memo is not None else {}
    encoded = []
    for dictionary, indices in dictionary_chunks(arr):
        v, pos = _positions(plan, dictionary, mapping, memo)
        encoded.append((pos, indices))
    if not encoded:
        v, _ = _positions(plan, pa.array([], pa.string()), mapping, memo)
    rows = sum(len(ix) for _, ix in encoded)
    state = np.empty(rows, dtype=np.uint8)
    value = np.empty(rows, dtype=np.float64)
    not_shown = np.empty(rows, dtype=bool) if v.not_shown is not None else None
    unanswered = np.empty(rows, dtype=bool) if v.unanswered is not None else None
    start = 0
    for pos, indices in encoded:
        # This chunk's verdict tables, in its own dictionary order; the last slot is a
        # null cell (not present, not valid, no value, no marker).
        stop = start + len(indices)
        local = _index_part(indices, 0, len(pos))
        np.take(np.append(v.state[pos], np.uint8(0)), local, out=state[start:stop])
        np.take(np.append(v.value[pos], np.nan), local, out=value[start:stop])
        if not_shown is not None and v.not_shown is not None:
            np.take(np.append(v.not_shown[pos], False), local, out=not_shown[start:stop])
        if unanswered is not None and v.unanswered is not None:
            np.take(np.append(v.unanswered[pos], False), local, out=unanswered[start:stop])
        start = stop
    return v, state, value, not_shown, unanswered


def judge(
    plan: NamePlan, present: np.ndarray, value: np.ndarray, parsed: np.ndarray
) -> tuple[np.ndarray, np.ndarray, np.ndarray, np.ndarray]:
    """(reason, valid, value, nr) for a single, number or decimal item's cells (or for the
    distinct texts of its column)."""
    # A plan without non-response values matches none (as `np.isin` does with None).
    nonresponse = plan.nonresponse if plan.nonresponse is not None else np.empty(0)
    global_nr = plan.global_nr if plan.global_nr is not None else np.empty(0)
    reason = np.zeros(len(present), dtype=np.int8)
    reason[present & ~parsed] = NOT_A_NUMBER
    num = present & parsed
    is_nr = num & np.isin(value, nonresponse)
    if plan.allowed is not None:
        bad = num & ~is_nr & ~np.isin(value, plan.allowed)
        reason[bad & (reason == OK)] = NOT_A_CODE
    else:
        if plan.integer:
            reason[num & ~is_nr & (np.floor(value) != value)] = NOT_INTEGER
        lo = -np.inf if plan.lo is None else plan.lo
        hi = np.inf if plan.hi is None else plan.hi
        with np.errstate(invalid="ignore"):
            out = num & ~is_nr & ((value < lo) | (value > hi)) & (reason == OK)
        reason[out] = OUT_OF_RANGE
    if plan.entry.kind == "item" and plan.entry.stmt.flags.strict:
        # A non-response code on a strict item: name it as such rather than "not a code".
        strict_nr = num & (reason != OK) & np.isin(value, global_nr)
        reason[strict_nr] = NONRESPONSE_STRICT
    valid = present & (reason == OK)
    return reason, valid, np.where(num, value, np.nan), is_nr & valid


def _or(a: np.ndarray | None, b: np.ndarray | None) -> np.ndarray | None:
    if a is None:
        return b
    return a if b is None else a | b


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
            arr = table.column(col)
            if _is_text(arr):
                d = distinct(arr)
                ns, un, is_blank = _marker_masks(d, mapping)
                not_shown, unanswered = _or(not_shown, ns), _or(unanswered, un)
                present, value, parsed = _numbers_of(d, is_blank)
            else:
                present, value, parsed = parse_numbers(arr, blank)
            chosen[:, j] = present & parsed & (value == 1)
            bad |= present & ~(parsed & ((value == 1) | (value == 0)))
    elif not plan.missing:
        d = distinct(table.column(plan.columns[0]))
        not_shown, unanswered, is_blank = _marker_masks(d, mapping)
        position = {v: j for j, v in enumerate(plan.options)}
        d_chosen = np.zeros((len(d.texts) + 1, k), dtype=bool)
        d_bad = np.zeros(len(d.texts) + 1, dtype=bool)
        for i, text in enumerate(d.texts):
            if is_blank[i]:
                continue
            for token in text.split(mapping.multi.separator):
                token = token.strip()
                if token == "" or token in blank:
                    continue
                label = plan.answers.get(token.casefold()) if mapping.values != "codes" else None
                if label is not None and mapping.values == "labels":
                    v = float(label)
                else:
                    strict = strict_number(token)
                    if strict is not None:
                        v = strict
                    elif label is not None:
                        v = float(label)
                    else:
                        d_bad[i] = True
                        continue
                slot = position.get(int(v)) if v.is_integer() else None
                if slot is None:
                    d_bad[i] = True
                else:
                    d_chosen[i, slot] = True
        chosen = d_chosen[d.index]
        bad = d_bad[d.index]
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
            vals = table.column(col).take(take).to_pylist()
            parts.append((col, v, vals))
        out = []
        for i in range(len(rows)):
            cells = [f"{col}={vals[i]}" for col, _, vals in parts if vals[i] not in (None, "", "0", 0)]
            out.append(", ".join(cells))
        return out
    vals = table.column(plan.columns[0]).take(take).to_pylist()
    return ["" if v is None else str(v) for v in vals]


def is_multi(entry: Entry) -> bool:
    return isinstance(entry.stmt, (n.Item, n.Sample)) and entry.stmt.type.kind == "multi"
