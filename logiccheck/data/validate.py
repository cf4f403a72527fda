"""Validate an export against a questionnaire: read in chunks, evaluate, collect findings."""

from __future__ import annotations

import time
from collections.abc import Callable, Iterable
from pathlib import Path

import numpy as np
import pandas as pd
import pyarrow as pa
import pyarrow.compute as pc

from logiccheck.checks.registry import CheckInfo, describe
from logiccheck.data import causes
from logiccheck.data.dispositions import answered_share, default_dispositions, tally
from logiccheck.data.evaluate import ChunkState, Evaluator, reads_of
from logiccheck.data.findings import FindingBlock
from logiccheck.data.frame import (
    NOT_A_LABEL,
    REASON_TEXT,
    Cells,
    Layout,
    NamePlan,
    Verdicts,
    cell_texts,
    label_hint,
    parse_numbers,
    plan_layout,
    type_cells,
)
from logiccheck.data.mapping import DataMapping
from logiccheck.data.readers import DEFAULT_CHUNK_ROWS, open_export, prefetch, rows_for
from logiccheck.data.result import TABLE_COLUMNS, ValidationResult
from logiccheck.diagnostics import Severity
from logiccheck.model.questionnaire import Questionnaire
from logiccheck.suggest import closest, did_you_mean

Progress = Callable[[int, int], None]  # (rows done, bytes done)

# The data stage's checks: declared here, beside the evaluator pass that finds them (one
# vectorised pass finds them all, so they are `describe`d rather than `data_check`s). The
# code below names them only through these objects.
MISSING_COLUMN = describe(
    "missing-column",
    severity="error",
    stage="data",
    summary="An item, grid row, option or the id has no column in the export.",
    what="A column the default layout (or the mapping) expects is absent: `NAME` for single, number and text items and sample variables, `NAME_N` for each option of a multi item, and the respondent id column.",
    why="Without the column every answer to that item is lost; the usual cause is a renamed variable in the fielding tool or a trimmed export.",
    bad="spec: trips: number 1..2000 \"Trips?\"\nexport header: id,age,used,trip_count",
    good="export header: id,age,used,trips\n(or map it: [data.columns] trips = \"trip_count\")",
)
UNKNOWN_COLUMN = describe(
    "unknown-column",
    severity="info",
    stage="data",
    summary="An export column matches nothing in the spec.",
    what="A column that is no item, grid row, option column, sample variable, id or duration column.",
    why="It is often an item added in the fielding tool but not in the spec, or a misspelt name; either way its answers are not checked.",
    bad="export header: id,age,used,age_group",
    good="add `age_group` to the spec, rename the column, or list it under `ignore` in the mapping",
)
INVALID_VALUE = describe(
    "invalid-value",
    severity="error",
    stage="data",
    summary="A cell holds a value the item cannot have.",
    what="Not a declared code, outside the number range, not a number (\"12a\"), not a whole number for a `number` item, a non-response code on a `strict` item, or a multi option cell other than 1, 0 or blank.",
    why="Impossible values distort every table they enter; an invalid value also opens no later item (cascade), so follow-ups behind it are judged as not due.",
    bad="used: single yesno \"Used a city bike?\"\nexport: used = 3",
    good="export: used = 1 (yes) or 2 (no)",
)
OUT_OF_PATH = describe(
    "out-of-path",
    severity="error",
    stage="data",
    summary="An answer where the routing says the item is not asked.",
    what="A value in the export for a respondent the routing does not route to the item, with the root cause: which condition was false for them, and what the items it reads held.",
    why="Answers off the route come from platform glitches, the back button, paper forms or merged files; analysed as they are, they inflate the item's base.",
    bad="range_ok: single agree5 \"...\" when ebike = yes\nexport: ebike = 2 (no), range_ok = 4",
    good="export: ebike = 2 (no), range_ok blank",
)
MISSING_ON_PATH = describe(
    "missing-on-path",
    severity="info",
    stage="data",
    summary="The routing asks the item, but the export has no answer.",
    what="A respondent due the item (every condition true, no stop or skip) with a blank cell. Info by default, since respondents may leave items blank; an error for `required` items, which the form should have forced.",
    why="Item non-response where an answer was due; for a required item it means the form or the export dropped answers.",
    bad="age: number 0..120 \"How old are you?\" strict required\nexport: age blank",
    good="export: age = 34",
)
SHOWN_MISMATCH = describe(
    "shown-mismatch",
    severity="warning",
    stage="data",
    summary="The export's shown / not-shown marker disagrees with the routing.",
    what="With `not_shown` or `unanswered` markers in the mapping: a cell marked not shown where the routing shows the item, or marked shown-but-unanswered where it does not.",
    why="The fielding tool routed differently from the spec: either the spec or the programmed questionnaire is wrong.",
    bad="mapping: not_shown = [\"-7\"]\nexport: used = 1 (yes), freq = -7",
    good="export: used = 1 (yes), freq = 2",
)
AFTER_STOP = describe(
    "after-stop",
    severity="error",
    stage="data",
    summary="Answers recorded after a stop ended the interview.",
    what="A value for an item that comes after a `stop` that fired for this respondent.",
    why="A screened-out respondent should have no further answers; their presence means the screen-out did not work or files were merged.",
    bad="stop underage \"...\" when age < 16\nexport: age = 14, used = 1",
    good="export: age = 14, used blank",
)
CHECK_FAILED = describe(
    "check-failed",
    severity="error",
    stage="data",
    summary="An edit rule (`check`) does not hold for a respondent.",
    what="A `check` that applies to the respondent (reached, `when` true) whose `require` is false; `soft` checks give warnings. A `require` that is unknown because an input is blank is not a failure.",
    why="Edit rules state what consistent answers look like; failures point to misreporting or data-entry errors.",
    bad="check daily_needs_trips \"...\" when freq = daily require trips >= 100 soft\nexport: freq = 1 (daily), trips = 12",
    good="export: freq = 1 (daily), trips = 240",
)

OFF_ROUTE = {"stop": AFTER_STOP}  # the guard that kept an item off the route → its check


def validate(
    q: Questionnaire,
    source: str | Path | pd.DataFrame | pa.Table,
    mapping: DataMapping | None = None,
    *,
    encoding: str | None = None,
    chunk_rows: int | None = DEFAULT_CHUNK_ROWS,
    keep_cells: bool = True,
    stream: bool | None = None,
    delimiter: str | None = None,
    progress: Progress | None = None,
    timings: dict[str, float] | None = None,
) -> ValidationResult:
    """Run the routing on an export. `source` is a file path, a DataFrame or an Arrow table.

    Results do not depend on `chunk_rows`: respondents are independent of each other.
    Raises `DataReadError` for an export that cannot be read. `timings`, when given, is
    filled with seconds spent reading and evaluating.
    """
    mapping = mapping or DataMapping()
    if isinstance(source, (str, Path)):
        export = open_export(source, encoding=encoding, chunk_rows=chunk_rows, stream=stream, delimiter=delimiter)
        header, chunks, name = export.columns, prefetch(export.chunks), str(export.path)
    else:
        table = source if isinstance(source, pa.Table) else table_from_frame(source)
        header = list(table.column_names)
        chunk_rows = chunk_rows or rows_for(len(header))
        chunks = (table.slice(s, chunk_rows) for s in range(0, max(table.num_rows, 1), chunk_rows))
        name = None
    return Validator(q, mapping, header, keep_cells=keep_cells).run(chunks, name, progress, timings)


def validate_frame(q: Questionnaire, frame: pd.DataFrame, mapping: DataMapping | None = None) -> ValidationResult:
    return validate(q, frame, mapping)


def table_from_frame(frame: pd.DataFrame) -> pa.Table:
    """A DataFrame as text columns (numbers keep their own type), blanks as null."""
    cols = {}
    for c in frame.columns:
        s = frame[c]
        if pd.api.types.is_numeric_dtype(s) or pd.api.types.is_bool_dtype(s):
            cols[str(c)] = pa.array(s.to_numpy(dtype=np.float64, na_value=np.nan), from_pandas=True)
        else:
            vals = [None if (v is None or (isinstance(v, float) and np.isnan(v)) or v == "") else str(v) for v in s]
            cols[str(c)] = pa.array(vals, type=pa.string())
    return pa.table(cols)


def _joined_rows(parts: list[np.ndarray], k: int) -> np.ndarray:
    """Chunks' respondents × items arrays as one, releasing each chunk as it is copied
    (so joining costs one extra chunk, not a second copy of the whole)."""
    if not parts:
        return np.zeros((0, k), dtype=bool)
    out = np.empty((sum(p.shape[0] for p in parts), parts[0].shape[1]), dtype=parts[0].dtype)
    start = 0
    parts.reverse()
    while parts:
        part = parts.pop()
        out[start : start + part.shape[0]] = part
        start += part.shape[0]
    return out


class Validator:
    def __init__(
        self, q: Questionnaire, mapping: DataMapping, header: list[str], *, keep_cells: bool, keep_frame: bool | None = None
    ) -> None:
        """`keep_frame` (default: as `keep_cells`) keeps the typed pandas frame of every
        cell; the pipeline does not, and types a column again from its cells when asked."""
        self.q = q
        self.mapping = mapping
        self.layout: Layout = plan_layout(q, mapping, header)
        self.evaluator = Evaluator(q, self.layout)
        self.keep = keep_cells
        self.keep_frame = keep_cells if keep_frame is None else keep_frame
        self.memo: dict[tuple, Verdicts] = {}  # verdicts per distinct text, by `judge_key`
        self.items = [e.name for e in q.items() if e.stmt.type.kind != "note" and e.name in self.layout.plans]
        self.gates = np.array([q.symbols[i].stmt.flags.gate for i in self.items], dtype=bool)
        self.stop_names = [e.name for e in q.entries if e.kind == "stop"]
        self.stop_index = {e.index: e.name for e in q.entries if e.kind == "stop"}
        self.unjudged = self._unjudged()

    def _unjudged(self) -> dict[str, list[str]]:
        """Items whose routing reads, directly or through other items and derived values,
        an item with a missing column → the missing items. Their conditions are unknown,
        so their answers are judged neither off-route nor missing (reported once, as
        `missing-column`)."""
        tainted: dict[str, set[str]] = {name: {name} for name, _ in self.layout.missing if name != "id"}
        out: dict[str, list[str]] = {}
        if not tainted:
            return out
        for e in self.q.entries:
            if e.kind == "let":
                exprs = [e.own] if e.own is not None else []
            elif e.kind == "item":
                exprs = [g.expr for g in self.evaluator.guards_of(e) if g.expr is not None]
            else:
                continue
            roots: set[str] = set()
            for expr in exprs:
                for _how, name in reads_of(self.q, expr):
                    roots |= tainted.get(name, set())
            if roots:
                tainted[e.name] = tainted.get(e.name, set()) | roots
                if e.kind == "item" and e.name in self.layout.plans and not self.layout.plans[e.name].missing:
                    out[e.name] = sorted(roots)
        return out

    def run(
        self,
        chunks: Iterable[pa.Table],
        source: str | None,
        progress: Progress | None,
        timings: dict[str, float] | None = None,
    ) -> ValidationResult:
        _q, layout = self.q, self.layout
        k = len(self.items)
        counts = np.zeros((k, 5), dtype=np.int64)
        blocks: list[FindingBlock] = self._file_blocks()
        ids: list[np.ndarray] = []
        stops: list[np.ndarray] = []
        durations: list[np.ndarray] = []
        measures: list[np.ndarray] = []
        kept: dict[str, list[np.ndarray]] = {"due": [], "has": [], "valid": [], "nr": []}
        frames: list[pd.DataFrame] = []
        offset = 0
        t_read = t_eval = 0.0
        it = iter(chunks)
        memo = self.memo
        while True:
            t0 = time.perf_counter()
            table = next(it, None)
            t1 = time.perf_counter()
            t_read += t1 - t0
            if table is None:
                break
            rows = table.num_rows
            cells = {name: type_cells(plan, table, self.mapping, memo) for name, plan in layout.plans.items()}
            state = self.evaluator.run(cells, rows)
            chunk_ids = self._ids(table, offset)
            answered = np.zeros(rows, dtype=np.int32)
            n_due = np.zeros(rows, dtype=np.int32)
            gates_due = np.zeros(rows, dtype=np.int32)
            gates_answered = np.zeros(rows, dtype=np.int32)
            cols_due, cols_has, cols_valid, cols_nr = [], [], [], []
            for j, item in enumerate(self.items):
                c = cells[item]
                d = state.env.due[item]
                on = d & c.present
                n_on = int(np.count_nonzero(on))
                n_d = int(np.count_nonzero(d))
                n_p = int(np.count_nonzero(c.present))
                n_valid = int(np.count_nonzero(c.valid))
                if item in self.unjudged:
                    counts[j] += (n_d, n_p, 0, 0, n_p - n_valid)  # routing unknown: not judged
                else:
                    counts[j] += (n_d, n_p, n_p - n_on, n_d - n_on, n_p - n_valid)
                answered += on
                n_due += d
                if self.gates[j]:
                    gates_due += d
                    gates_answered += d & c.valid
                if self.keep:
                    cols_due.append(d)
                    cols_has.append(c.present)
                    cols_valid.append(c.valid)
                    cols_nr.append(c.nr if c.nr is not None else np.zeros(rows, dtype=bool))
                blocks += self._item_blocks(
                    item, c, d, state, table, offset, chunk_ids, n_p > n_valid, n_d > n_on
                )
            blocks += self._check_blocks(state, offset, chunk_ids)
            stop = np.array(["", *self.stop_names], dtype=object)[
                np.searchsorted([-1, *self.stop_index], state.stop_at)
            ] if self.stop_names else np.full(rows, "", dtype=object)
            measures.append(np.column_stack([answered, n_due, gates_due, gates_answered]))
            ids.append(chunk_ids)
            stops.append(stop)
            durations.append(self._duration(table))
            if self.keep:
                empty = np.zeros((rows, 0), dtype=bool)
                kept["due"].append(np.column_stack(cols_due) if cols_due else empty)
                kept["has"].append(np.column_stack(cols_has) if cols_has else empty)
                kept["valid"].append(np.column_stack(cols_valid) if cols_valid else empty)
                kept["nr"].append(np.column_stack(cols_nr) if cols_nr else empty)
                if self.keep_frame:
                    frames.append(self._typed(cells, chunk_ids, table))
            offset += rows
            t_eval += time.perf_counter() - t1
            if progress is not None:
                progress(offset, 0)
        if timings is not None:
            timings["read"] = t_read
            timings["evaluate"] = t_eval
        all_ids = np.concatenate(ids) if ids else np.array([], dtype=object)
        stop_all = np.concatenate(stops) if stops else np.array([], dtype=object)
        duration = np.concatenate(durations) if durations else np.array([], dtype=np.float64)
        m = np.concatenate(measures) if measures else np.zeros((0, 4), dtype=np.int64)
        share = answered_share(m[:, 0], m[:, 1])
        disposition = default_dispositions(share, stop_all)
        table = pd.DataFrame(
            {
                "item": self.items,
                "expected": counts[:, 0],
                "answered": counts[:, 1],
                "out_of_path": counts[:, 2],
                "missing_on_path": counts[:, 3],
                "invalid": counts[:, 4],
            }
        )
        table["over_expected"] = table["answered"] > table["expected"]
        table = table[TABLE_COLUMNS]
        measure_frame = pd.DataFrame(
            {
                "id": all_ids,
                "answered": m[:, 0],
                "due": m[:, 1],
                "answered_share": share,
                "gates_due": m[:, 2],
                "gates_answered": m[:, 3],
                "stop": stop_all,
                "disposition": disposition,
                "duration": duration,
            }
        )
        result = ValidationResult(
            respondents=offset,
            ids=all_ids,
            items=self.items,
            table=table,
            blocks=blocks,
            stop=stop_all,
            disposition=disposition,
            dispositions=tally(disposition, self.stop_names),
            measures=measure_frame,
            missing_columns=list(layout.missing),
            unknown_columns=list(layout.unknown),
            unjudged=dict(self.unjudged),
            source=source,
        )
        if self.keep:
            result.due = _joined_rows(kept.pop("due"), k)
            result.has_value = _joined_rows(kept.pop("has"), k)
            result.valid = _joined_rows(kept.pop("valid"), k)
            result.nonresponse = _joined_rows(kept.pop("nr"), k)
            result.frame = pd.concat(frames, ignore_index=True) if frames else None
        return result

    # ------------------------------------------------------------ pieces
    def _duration(self, table: pa.Table) -> np.ndarray:
        """Interview length in seconds per respondent; NaN where blank, not a number or negative."""
        col = self.layout.duration_column
        if col is None:
            return np.full(table.num_rows, np.nan)
        present, value, parsed = parse_numbers(table.column(col), self.mapping.blank_markers())
        return np.where(present & parsed & (value >= 0), value, np.nan)

    def _ids(self, table: pa.Table, offset: int) -> np.ndarray:
        col = self.layout.id_column
        if col is None:
            return np.arange(offset + 1, offset + table.num_rows + 1).astype(str).astype(object)
        arr = table.column(col)
        if pa.types.is_floating(arr.type):
            vals = arr.to_pylist()
            return np.array(
                ["" if v is None else (str(int(v)) if float(v).is_integer() else str(v)) for v in vals], dtype=object
            )
        text = pc.fill_null(pc.cast(arr, pa.string()), "")
        return np.asarray(text.to_numpy(zero_copy_only=False), dtype=object)

    def _file_blocks(self) -> list[FindingBlock]:
        out = []
        empty = np.array([], dtype=np.int64)
        missing_cols = [col for _, col in self.layout.missing]
        unknown = set(self.layout.unknown)
        for name, col in self.layout.missing:
            if name == "id":
                msg = f"the export has no respondent id column `{col}`; rows are numbered instead (set `id` in the mapping)"
                out.append(FindingBlock(MISSING_COLUMN.name, MISSING_COLUMN.severity, None, msg, empty))
                continue
            hint = ""
            plan = self.layout.plans.get(name)
            if plan is not None and plan.kind == "multi" and name in unknown and self.mapping.multi.layout == "columns":
                hint = f" (the export has one column `{name}`: if it lists the chosen codes, set `layout = \"delimited\"` under [data.multi])"
            else:
                key, cutoff = name, 0.75
                if plan is not None and plan.kind == "multi" and col in plan.columns:
                    # One option column: its own key, so the other options keep theirs; option
                    # columns are often shortened, so a looser match is still worth naming.
                    key = self.mapping.multi.column.format(name=name, value=plan.options[plan.columns.index(col)])
                    cutoff = 0.6
                close = closest(col, self.layout.unknown, cutoff=cutoff)
                if close:
                    hint = f" (is `{close}` the same? map it under [data.columns]: {key} = \"{close}\")"
            after = sorted(i for i, roots in self.unjudged.items() if name in roots)
            shown = ", ".join(f"`{i}`" for i in after[:8]) + (f" and {len(after) - 8} more" if len(after) > 8 else "")
            depends = f"; not judged for routing, as their conditions read it: {shown}" if after else ""
            msg = f"the export has no column `{col}` for `{name}`; every answer to it counts as missing{depends}{hint}"
            out.append(FindingBlock(MISSING_COLUMN.name, MISSING_COLUMN.severity, name, msg, empty))
        for col in self.layout.unknown:
            hint = did_you_mean(col, missing_cols, cutoff=0.75)
            msg = f"column `{col}` is not in the spec (no item, grid row or sample variable of that name); it is ignored{hint}"
            out.append(FindingBlock(UNKNOWN_COLUMN.name, UNKNOWN_COLUMN.severity, None, msg, empty))
        return out

    def _item_blocks(
        self,
        item: str,
        c: Cells,
        due: np.ndarray,
        state: ChunkState,
        table: pa.Table,
        offset: int,
        ids: np.ndarray,
        any_invalid: bool = True,
        any_missing: bool = True,
    ) -> list[FindingBlock]:
        """Findings for one item in one chunk; the counts say which kinds can exist."""
        q, plan = self.q, c.plan
        out: list[FindingBlock] = []
        bad = c.present & ~c.valid if any_invalid else None
        if bad is not None and bad.any():
            for reason in np.unique(c.reason[bad]).tolist():
                rows = np.flatnonzero(bad & (c.reason == reason))
                vals = cell_texts(table, plan, rows, self.mapping)
                msg = f"`{item}` = {{value}} {REASON_TEXT[reason]}{self._allowed(plan)}"
                block = FindingBlock(INVALID_VALUE.name, INVALID_VALUE.severity, item, msg, rows + offset, ids[rows], vals)
                if reason == NOT_A_LABEL:
                    block.messages = [msg.replace("{value}", v) + label_hint(plan, v) for v in vals]
                out.append(block)
        judged = item not in self.unjudged
        blocked = state.blocked.get(item) if judged else None
        if blocked is not None:
            guards = self.evaluator.guards_of(plan.entry)
            key = np.column_stack([blocked.reason.astype(np.float64), blocked.keys])
            groups, inverse = np.unique(key, axis=0, return_inverse=True)
            inverse = inverse.reshape(-1)
            vals_all = cell_texts(table, plan, blocked.rows, self.mapping)
            for gi, group in enumerate(groups):
                sel = np.flatnonzero(inverse == gi)
                g = guards[int(group[0])] if int(group[0]) >= 0 else None
                rows = blocked.rows[sel]
                info: CheckInfo
                if g is None:
                    msg = f"`{item}` answered, but the routing does not ask it here"
                    info = OUT_OF_PATH
                else:
                    msg = causes.off_route_message(q, item, g, group[1:])
                    info = OFF_ROUTE.get(g.kind, OUT_OF_PATH)
                out.append(
                    FindingBlock(info.name, info.severity, item, msg, rows + offset, ids[rows], [vals_all[i] for i in sel])
                )
        if plan.kind != "note" and not plan.missing and any_missing and judged:
            missing = due & ~c.present
            if missing.any():
                rows = np.flatnonzero(missing)
                required = plan.entry.kind == "item" and plan.entry.stmt.flags.required
                sev = Severity.error if required else MISSING_ON_PATH.severity
                extra = " (the item is `required`)" if required else ""
                msg = f"`{item}` was due but has no answer{extra}"
                out.append(FindingBlock(MISSING_ON_PATH.name, sev, item, msg, rows + offset, ids[rows], None))
        if c.not_shown is not None:
            rows = np.flatnonzero(c.not_shown & due)
            if rows.size:
                msg = f"`{item}` is marked not shown, but the routing shows it to this respondent"
                out.append(FindingBlock(SHOWN_MISMATCH.name, SHOWN_MISMATCH.severity, item, msg, rows + offset, ids[rows], None))
        if c.unanswered is not None:
            rows = np.flatnonzero(c.unanswered & ~due)
            if rows.size:
                msg = f"`{item}` is marked shown, but the routing does not show it to this respondent"
                out.append(FindingBlock(SHOWN_MISMATCH.name, SHOWN_MISMATCH.severity, item, msg, rows + offset, ids[rows], None))
        return out

    def _allowed(self, plan: NamePlan) -> str:
        nr = ""
        if plan.nonresponse is not None and plan.nonresponse.size:
            nr = " or a non-response code (" + ", ".join(f"{int(v)}" for v in plan.nonresponse) + ")"
        if plan.kind == "multi":
            return "; option cells hold 1 (chosen), 0 (not chosen) or blank"
        if plan.allowed is not None:
            codes = ", ".join(f"{int(v)}" for v in plan.allowed)
            return f"; allowed: {codes}{nr}"
        if plan.lo is not None:
            whole = "a whole number " if plan.integer else ""
            return f"; allowed: {whole}{plan.lo:g}..{plan.hi:g}{nr}"
        return ""

    def _check_blocks(self, state: ChunkState, offset: int, ids: np.ndarray) -> list[FindingBlock]:
        out = []
        for e in self.q.entries:
            if e.kind != "check":
                continue
            fails = state.check_fails.get(e.name)
            if fails is None or not fails.any():
                continue
            rows = np.flatnonzero(fails)
            sev = Severity.warning if e.stmt.soft else Severity.error
            req = causes.source_of(self.q, e.require) if e.require is not None else ""
            msg = f"check `{e.name}` failed: {e.stmt.text} (requires `{req}`, line {e.span.line})"
            out.append(FindingBlock(CHECK_FAILED.name, sev, e.name, msg, rows + offset, ids[rows], None))
        return out

    def _typed(self, cells: dict[str, Cells], ids: np.ndarray, table: pa.Table) -> pd.DataFrame:
        cols: dict[str, object] = {"id": ids}
        for name, c in cells.items():
            if c.chosen is not None:
                for j, v in enumerate(c.plan.options):
                    cols[f"{name}_{v}"] = np.where(c.valid, c.chosen[:, j].astype(np.float64), np.nan)
            elif c.value is not None:
                cols[name] = np.where(c.valid, c.value, np.nan)
            elif c.plan.kind == "text" and not c.plan.missing:
                texts = table.column(c.plan.columns[0]).to_pylist()
                cols[name] = pd.array([t if ok else None for t, ok in zip(texts, c.valid.tolist(), strict=False)], dtype="string")
        return pd.DataFrame(cols)
