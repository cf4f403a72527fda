"""Synthetic exports that follow the routing, for dry runs, tests and benchmarks.

Answers are drawn within each item's domain for the respondents the routing sends to it
(the evaluator decides, in questionnaire order), with some blanks and some non-response
codes where the item allows them. Text answers are taken from the spec's own answer texts.
Respondents who break a `check` rule (hard or soft) are redrawn, in whole batches, so a
fault-free export passes its own edit rules; a rule that random answers cannot meet within
`MAX_ROUNDS` batches is named in `Simulated.notes`. Optional faults — answers off the
route and invalid values — are listed in a sidecar so a test can check that validation
finds them. The same seed gives the same export.
"""

from __future__ import annotations

from dataclasses import dataclass, field
from pathlib import Path

import numpy as np
import pyarrow as pa
import pyarrow.compute as pc
import pyarrow.csv as pacsv

from logiccheck.atomic import atomic_write
from logiccheck.data.evaluate import Evaluator
from logiccheck.data.frame import OK, Cells, Layout, NamePlan, plan_layout
from logiccheck.data.mapping import DataMapping
from logiccheck.model.questionnaire import Entry, Questionnaire

BLANK_SHARE = 0.04  # share of due, non-required items left blank
NONRESPONSE_SHARE = 0.03  # share of due answers that are a non-response code, where allowed
OPTION_SHARE = 0.35  # chance each multi option is chosen
SECONDS_PER_ITEM = 10.0  # when an item gives no `seconds` estimate
MAX_ROUNDS = 20  # batches drawn to replace respondents who break a check rule


@dataclass
class Simulated:
    """A synthetic export as an Arrow table, and the faults planted in it."""

    table: pa.Table
    faults: list[tuple[int, str, str, str]] = field(default_factory=list)  # (row 1-based, id, item, fault)
    notes: list[str] = field(default_factory=list)  # e.g. a check rule random answers could not meet


def answer_texts(q: Questionnaire) -> list[str]:
    """Texts a simulated open answer is drawn from: the spec's own answer texts (every
    code list's option texts, in spec order), else its item texts."""
    out: dict[str, None] = {}
    lists = list(q.codes.values())
    for e in q.items():
        inline = getattr(e.stmt, "type", None)
        if inline is not None and inline.inline_codes is not None:
            lists.append(inline.inline_codes)
    for codes in lists:
        for option in codes.options:
            if option.text.strip():
                out.setdefault(option.text.strip())
    if not out:
        for e in q.items():
            text = getattr(e.stmt, "text", "")
            if text.strip():
                out.setdefault(text.strip())
    return list(out) or ["-"]


def _column_names(plan: NamePlan) -> list[str]:
    return plan.columns


class _Drawer:
    def __init__(self, q: Questionnaire, plans: dict[str, NamePlan], rows: int, rng: np.random.Generator,
                 texts: list[str]) -> None:
        self.q, self.plans, self.rows, self.rng = q, plans, rows, rng
        self.texts = np.array(texts, dtype=object)
        self.out: dict[str, np.ndarray] = {}  # column -> float64 (NaN blank) or object (text)
        self.nr = np.array([o.value for o in q.nonresponse], dtype=np.float64)

    def values(self, plan: NamePlan, k: int) -> np.ndarray:
        rng = self.rng
        stmt = plan.entry.stmt
        if plan.allowed is not None:
            return rng.choice(plan.allowed, size=k) if plan.allowed.size else np.full(k, np.nan)
        lo = stmt.type.lo if stmt.type.lo is not None else 0.0
        hi = stmt.type.hi if stmt.type.hi is not None else 100.0
        # A skewed draw: most values in the lower part of the range, as counts tend to be.
        v = lo + (hi - lo) * rng.beta(2.5, 4.0, size=k)
        return np.round(v) if plan.integer else np.round(v, 1)

    def __call__(self, e: Entry, due: np.ndarray) -> Cells | None:
        plan = self.plans.get(e.name)
        if plan is None:
            return None
        rng, n = self.rng, self.rows
        stmt = e.stmt
        required = e.kind == "item" and stmt.flags.required
        if plan.kind == "note":
            return None
        blank = 0.0 if required or e.kind == "sample" else BLANK_SHARE
        present = due & (rng.random(n) >= blank)
        reason = np.zeros(n, dtype=np.int8)
        if plan.kind == "multi":
            k = len(plan.options)
            chosen = (rng.random((n, k)) < OPTION_SHARE) & present[:, None]
            empty = present & ~chosen.any(axis=1)
            if k:
                pick = rng.integers(0, k, size=n)
                chosen[np.flatnonzero(empty), pick[empty]] = True
            else:
                present = np.zeros(n, dtype=bool)
            for j, col in enumerate(plan.columns):
                self.out[col] = np.where(present, chosen[:, j].astype(np.float64), np.nan)
            return Cells(plan, present, present.copy(), reason, chosen=chosen)
        if plan.kind == "text":
            words = self.texts[rng.integers(0, len(self.texts), size=n)]
            self.out[plan.columns[0]] = np.where(present, words, np.array(None, dtype=object))
            return Cells(plan, present, present.copy(), reason)
        value = np.where(present, self.values(plan, n), np.nan)
        nr = np.zeros(n, dtype=bool)
        if plan.nonresponse is not None and plan.nonresponse.size:
            nr = present & (rng.random(n) < NONRESPONSE_SHARE)
            value[nr] = rng.choice(plan.nonresponse, size=int(nr.sum()))
        self.out[plan.columns[0]] = value
        return Cells(plan, present, present.copy(), reason, value=value, nr=nr)


def simulate(
    q: Questionnaire, rows: int, seed: int = 0, faults: float = 0.0, mapping: DataMapping | None = None
) -> Simulated:
    """`rows` respondents in the default layout (or `mapping`'s), deterministic for `seed`."""
    mapping = mapping or DataMapping()
    rng = np.random.default_rng(seed)
    everything: list[str] = []
    layout = plan_layout(q, mapping, ["<all>"])
    for plan in layout.plans.values():
        everything += plan.columns
    layout = plan_layout(q, mapping, [mapping.id, *everything, mapping.duration])
    texts = answer_texts(q)
    out, due, notes = _draw_passing(q, layout, rows, rng, texts, everything)
    drawer = _Drawer(q, layout.plans, rows, rng, texts)
    drawer.out = out
    ids = np.arange(1, rows + 1)
    # Interview length: each due item's time estimate, with respondent-level noise.
    seconds = np.zeros(rows)
    for e in q.items():
        item_due = due.get(e.name)
        if item_due is not None:
            seconds += item_due * (e.stmt.flags.seconds or SECONDS_PER_ITEM)
    duration = np.round(seconds * rng.lognormal(0.0, 0.35, size=rows) + 20)
    planted = _plant(q, layout.plans, drawer, due, rows, faults, rng) if faults > 0 else []
    cols: dict[str, pa.Array] = {mapping.id: pa.array(ids, pa.int64())}
    bad_texts = {col for col, fault, _ in planted if fault == "not-a-number"}
    for col in everything:
        data = drawer.out.get(col)
        if data is None or (data.dtype == object and not any(v is not None for v in data)):
            cols[col] = pa.nulls(rows, pa.string())
        elif data.dtype == object:
            cols[col] = pa.array(data.tolist(), pa.string())
        else:
            plan_integer = not any(p.kind == "value" and not p.integer and col in p.columns for p in layout.plans.values())
            arr = pa.array(data, pa.float64(), from_pandas=True)
            cols[col] = pc.cast(arr, pa.int64()) if plan_integer else arr
        if col in bad_texts:
            cols[col] = _with_text_faults(cols[col], [(r, t) for c, t, r in planted if c == col and t == "not-a-number"])
    cols[mapping.duration] = pa.array(duration.astype(np.int64))
    table = pa.table(cols)
    found = [(r + 1, str(r + 1), item, fault) for item, fault, r in _fault_rows(planted, layout.plans)]
    return Simulated(table, sorted(found), notes)


def _draw_passing(
    q: Questionnaire, layout: Layout, rows: int, rng: np.random.Generator, texts: list[str], columns: list[str]
) -> tuple[dict[str, np.ndarray], dict[str, np.ndarray], list[str]]:
    """Draw respondents in batches, keeping those who pass every check rule, until there
    are `rows`; then fill any shortfall with the last failures (named in the notes).
    Returns (column -> cells, item -> due, notes)."""
    kept: list[tuple[dict[str, np.ndarray], dict[str, np.ndarray]]] = []
    spare: tuple[dict[str, np.ndarray], dict[str, np.ndarray]] | None = None
    have, batch, failing = 0, rows, np.zeros(0, dtype=bool)
    fail_names: dict[str, np.ndarray] = {}
    for _ in range(MAX_ROUNDS):
        drawer = _Drawer(q, layout.plans, batch, rng, texts)
        state = Evaluator(q, layout).run({}, batch, supply=drawer)
        failing = np.zeros(batch, dtype=bool)
        for fails in state.check_fails.values():
            failing |= fails
        fail_names = state.check_fails
        cells = {col: drawer.out[col] if col in drawer.out else _blank(batch) for col in columns}
        due = {name: np.asarray(d, dtype=bool) for name, d in state.env.due.items()}
        good = np.flatnonzero(~failing)[: rows - have]
        kept.append(_take((cells, due), good))
        have += good.size
        spare = _take((cells, due), np.flatnonzero(failing))
        if have >= rows:
            break
        # The next batch is sized by the pass rate seen so far, with some to spare.
        rate = max(good.size / max(batch, 1), 0.02)
        batch = min(int((rows - have) / rate * 1.25) + 16, 50 * rows + 100)
    notes: list[str] = []
    if have < rows and spare is not None:
        short = rows - have
        kept.append(_take(spare, np.arange(min(short, _length(spare[0])))))
        hard = sorted(name for name, fails in fail_names.items() if fails.any())
        notes.append(f"{short} respondent(s) still break check rule(s) {', '.join(hard)} after {MAX_ROUNDS} "
                     "batches of random answers; they are kept as drawn")
    cells = {col: np.concatenate([part[0][col] for part in kept])[:rows] for col in columns}
    names = set().union(*(part[1] for part in kept)) if kept else set()
    due = {name: np.concatenate([part[1].get(name, np.zeros(_length(part[0]), dtype=bool)) for part in kept])[:rows]
           for name in sorted(names)}
    return cells, due, notes


def _blank(n: int) -> np.ndarray:
    """A column the evaluator never asked the drawer for: no values."""
    return np.full(n, None, dtype=object)


def _length(cells: dict[str, np.ndarray]) -> int:
    return next((len(v) for v in cells.values()), 0)


def _take(part: tuple[dict[str, np.ndarray], dict[str, np.ndarray]], rows: np.ndarray
          ) -> tuple[dict[str, np.ndarray], dict[str, np.ndarray]]:
    cells, due = part
    return {k: v[rows] for k, v in cells.items()}, {k: v[rows] for k, v in due.items()}


def _with_text_faults(arr: pa.Array, cells: list[tuple[int, str]]) -> pa.Array:
    values = pc.cast(arr, pa.string()).to_pylist()
    for row, _ in cells:
        values[row] = f"{values[row] or '1'}a"
    return pa.array(values, pa.string())


def _fault_rows(planted: list[tuple[str, str, int]], plans: dict[str, NamePlan]) -> list[tuple[str, str, int]]:
    """(item, fault, row) from (column, fault, row)."""
    by_col = {col: name for name, p in plans.items() for col in p.columns}
    out = []
    seen = set()
    for col, fault, row in planted:
        key = (by_col[col], fault, row)
        if key not in seen:
            seen.add(key)
            out.append(key)
    return out


def _plant(
    q: Questionnaire,
    plans: dict[str, NamePlan],
    drawer: _Drawer,
    due: dict[str, np.ndarray],
    rows: int,
    rate: float,
    rng: np.random.Generator,
) -> list[tuple[str, str, int]]:
    """Plant one fault in a share `rate` of respondents; returns (column, fault, row)."""
    items = [p for p in plans.values() if p.entry.kind == "item" and p.kind in ("value", "multi", "text")]
    if not items:
        return []
    out: list[tuple[str, str, int]] = []
    for row in np.flatnonzero(rng.random(rows) < rate).tolist():
        plan = items[int(rng.integers(0, len(items)))]
        if not plan.columns:
            continue
        d = bool(due[plan.name][row])
        col = plan.columns[0]
        if not d:
            # An answer the routing did not ask for.
            if plan.kind == "multi":
                j = int(rng.integers(0, len(plan.columns)))
                for jj, c in enumerate(plan.columns):
                    drawer.out[c][row] = 1.0 if jj == j else 0.0
                out.append((col, "out-of-path", row))
            elif plan.kind == "text":
                drawer.out[col][row] = str(drawer.texts[0])
                out.append((col, "out-of-path", row))
            else:
                drawer.out[col][row] = float(drawer.values(plan, 1)[0])
                out.append((col, "out-of-path", row))
        elif plan.kind == "value":
            if rng.random() < 0.5:
                drawer.out[col][row] = _invalid_number(plan)
                out.append((col, "invalid-code", row))
            else:
                out.append((col, "not-a-number", row))
        elif plan.kind == "multi":
            drawer.out[plan.columns[0]][row] = 2.0
            out.append((col, "invalid-code", row))
    del q
    return out


def _invalid_number(plan: NamePlan) -> float:
    taken = set(plan.global_nr.tolist()) if plan.global_nr is not None else set()
    if plan.allowed is not None:
        v = float(max(plan.allowed.tolist(), default=0)) + 1
        while v in taken:
            v += 1
        return v
    v = float(plan.hi if plan.hi is not None else 100) + 1
    while v in taken:
        v += 1
    return v


def write_csv(table: pa.Table, path: str | Path) -> None:
    """Write an export atomically (temp file beside it, then replace)."""
    atomic_write(path, lambda tmp: pacsv.write_csv(table, tmp, write_options=pacsv.WriteOptions(quoting_style="needed")))


def write_faults(faults: list[tuple[int, str, str, str]], path: str | Path) -> None:
    rows: list[tuple[object, ...]] = list(zip(*faults, strict=True)) if faults else [(), (), (), ()]
    table = pa.table(
        {
            "row": pa.array(rows[0], pa.int64()),
            "id": pa.array(rows[1], pa.string()),
            "item": pa.array(rows[2], pa.string()),
            "fault": pa.array(rows[3], pa.string()),
        }
    )
    write_csv(table, path)


__all__ = ["OK", "Simulated", "simulate", "write_csv", "write_faults"]
