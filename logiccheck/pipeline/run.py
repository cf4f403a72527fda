"""read once → route once → dispositions once → one `DataContext` → checks and analyses."""

from __future__ import annotations

import dataclasses
import sys
import tempfile
import time
from collections.abc import Callable, Iterator
from dataclasses import dataclass, field
from pathlib import Path
from typing import Any

import numpy as np
import pandas as pd
import pyarrow as pa
import pyarrow.compute as pc

from logiccheck.checks.analyses import Analysis, run_analyses
from logiccheck.checks.data_context import DataContext
from logiccheck.checks.data_runner import run_data_checks
from logiccheck.config import Config, ConfigError, config_for
from logiccheck.data.dispositions import tally
from logiccheck.data.frame import Cells, Layout, type_cells
from logiccheck.data.mapping import DataMapping, MappingError, check_mapping, load_mapping
from logiccheck.data.readers import (
    DELIMITER_NAMES,
    DataReadError,
    column_texts,
    open_export,
    parse_delimiter,
    prefetch,
    read_cells,
    rows_for,
)
from logiccheck.data.result import ValidationResult
from logiccheck.data.validate import Validator, table_from_frame
from logiccheck.loader import Loaded
from logiccheck.model.questionnaire import Questionnaire
from logiccheck.quality import completeness
from logiccheck.quality.bridge import state_from_validation
from logiccheck.quality.completeness import RuleError
from logiccheck.quality.config import QualityConfig
from logiccheck.quality.duplicates import MatchScores
from logiccheck.quality.route import RouteError, RouteState
from logiccheck.weights.margins import Margins, MarginsError, load_margins

Progress = Callable[[int, int], None]


class PipelineError(ValueError):
    """Input the pipeline cannot run on (one line naming the file or setting and what to do)."""


# Every error that means "bad input" rather than a bug: the CLI turns these into exit 2.
INPUT_ERRORS: tuple[type[Exception], ...] = (
    PipelineError,
    DataReadError,
    MappingError,
    ConfigError,
    RuleError,
    RouteError,
    MarginsError,
)


@dataclass
class RunOptions:
    """How to read and judge one export. Every command that reads an export takes these."""

    mapping: DataMapping | str | Path | None = None  # None: the configuration's [data] table
    frame: str | Path | None = None  # sample-frame CSV (overrides [data] frame)
    encoding: str | None = None
    delimiter: str | None = None  # None: [data] delimiter, else detected
    config: Config | None = None  # None: found above the spec, once
    quality: QualityConfig | None = None  # None: the configuration's [quality] table
    chunk_rows: int | None = None
    progress: Progress | None = None
    check_settings: bool = True  # apply the configuration's [checks] table to findings
    margins: Margins | str | Path | None = None  # population margins (TOML path or resolved)


@dataclass
class PipelineResult(ValidationResult):
    """A `ValidationResult` plus what the later stages read: the export's own cells, the
    route state, the settings used and the analyses."""

    config: Config | None = None
    mapping: DataMapping | None = None
    quality_config: QualityConfig | None = None
    export: pa.Table | None = None  # the export's cells as read (text; blanks null)
    export_format: str | None = None
    delimiter: str | None = None
    layout: Layout | None = None
    state: RouteState | None = None
    match: Any = None  # near-duplicate scores, where computed
    sample_frame: pd.DataFrame | None = None
    analyses: dict[str, Analysis] = field(default_factory=dict)
    # Seconds (wall) per stage, check and analysis, in the order they ran (`--timings`).
    timings: dict[str, float] = field(default_factory=dict)
    context: DataContext | None = None  # what the checks read; `clean` re-runs the weights on it

    def cells(self) -> pd.DataFrame:
        """Every cell of the export as text ("" where blank), columns in file order."""
        from logiccheck.data.readers import cells_frame

        if self.export is None:
            return pd.DataFrame()
        return cells_frame(self.export)

    def export_columns(self, item: str) -> list[str]:
        """The export columns holding `item` (option columns for a multi)."""
        if self.layout is None or item not in self.layout.plans:
            return []
        return list(self.layout.plans[item].columns)

    def disposition_counts(self) -> dict[str, int]:
        return dict(self.dispositions)

    def to_json(self, findings: Any = None) -> dict[str, Any]:
        out = super().to_json(findings)
        for analysis in self.analyses.values():
            for key, value in analysis.sections.items():
                out.setdefault(key, value)
        return out


def _configured(q: Questionnaire, opts: RunOptions) -> Config:
    if opts.config is not None:
        return opts.config
    return config_for(q.file) if q.file and Path(q.file).exists() else Config()


def _mapping(opts: RunOptions, config: Config) -> DataMapping:
    if isinstance(opts.mapping, DataMapping):
        mapping = opts.mapping
    elif opts.mapping is not None:
        mapping = load_mapping(opts.mapping)
    else:
        model = config.models.get("data")
        mapping = model if isinstance(model, DataMapping) else DataMapping()
    if opts.frame is not None:
        if not Path(opts.frame).is_file():
            raise PipelineError(f"{opts.frame}: no such sample frame file; give a CSV with an `id` column")
        mapping = mapping.model_copy(update={"frame": str(opts.frame)})
    return mapping


def _quality(opts: RunOptions, config: Config, mapping: DataMapping) -> QualityConfig:
    quality = opts.quality
    if quality is None:
        model = config.models.get("quality")
        quality = model if isinstance(model, QualityConfig) else QualityConfig()
    if quality.speed.duration_column == "duration" and mapping.duration != "duration":
        quality = quality.model_copy(
            update={"speed": quality.speed.model_copy(update={"duration_column": mapping.duration})}
        )
    return quality


def _kept(chunks: Iterator[pa.Table], store: list[pa.Table]) -> Iterator[pa.Table]:
    for chunk in chunks:
        yield chunk
        store.append(compact(chunk))


def _narrowest(lo: int, hi: int) -> pa.DataType | None:
    for t, lim in ((pa.int8(), 1 << 7), (pa.int16(), 1 << 15), (pa.int32(), 1 << 31)):
        if -lim <= lo and hi < lim:
            return t
    return None


def _compact_array(arr: pa.Array) -> pa.Array:
    if pa.types.is_dictionary(arr.type):
        narrow = _narrowest(0, len(arr.dictionary))
        if narrow is None or arr.type.index_type.bit_width <= narrow.bit_width:
            return arr
        return pa.DictionaryArray.from_arrays(arr.indices.cast(narrow), arr.dictionary)
    if pa.types.is_integer(arr.type) and arr.type.bit_width > 8 and len(arr) > arr.null_count:
        bounds = pc.min_max(arr)
        narrow = _narrowest(bounds["min"].as_py(), bounds["max"].as_py())
        if narrow is not None and narrow.bit_width < arr.type.bit_width:
            return arr.cast(narrow)
    return arr


def compact(table: pa.Table) -> pa.Table:
    """The same cells in less memory: dictionary indices and integers in the narrowest
    integer type that holds them (a column of five codes costs a byte a cell, not four
    or eight). Texts and values read back unchanged; chunks of one column may differ in
    width and are widened to one type when joined."""
    columns = []
    for col in table.columns:
        chunks = [_compact_array(c) for c in col.chunks]
        types = {c.type for c in chunks}
        columns.append(pa.chunked_array(chunks) if len(types) == 1 else col)
    return pa.table(columns, names=table.column_names)


def take_rows(table: pa.Table, rows: np.ndarray) -> pa.Table:
    """The given rows (sorted) of a table, batch by batch: the kept cells' chunks carry
    dictionaries of their own, narrowed, which one `take` over the whole table would
    have to unify (and cannot, once their union outgrows the narrow index type)."""
    parts: list[pa.RecordBatch] = []
    start = 0
    for batch in table.to_batches():
        stop = start + batch.num_rows
        lo, hi = np.searchsorted(rows, [start, stop])
        if hi > lo:
            parts.append(batch.take(pa.array(rows[lo:hi] - start, pa.int64())))
        start = stop
    return pa.Table.from_batches(parts, schema=table.schema) if parts else table.slice(0, 0)


def _joined(parts: list[pa.Table], header: list[str]) -> pa.Table:
    parts = [p for p in parts if p.num_rows] or parts[:1]
    if not parts:
        return pa.table({c: pa.array([], pa.string()) for c in header})
    try:
        return pa.concat_tables(parts)
    except pa.ArrowInvalid:  # chunks typed differently (e.g. a Parquet column all null in one)
        return pa.concat_tables(parts, promote_options="permissive")


def run_pipeline(
    spec: Loaded | Questionnaire,
    source: str | Path | pd.DataFrame,
    options: RunOptions | None = None,
) -> PipelineResult:
    """Judge one export against a loaded spec. Raises one of `INPUT_ERRORS` for bad input
    (a one-line message); never prints and never exits."""
    q = spec.questionnaire if isinstance(spec, Loaded) else spec
    opts = options or RunOptions()
    config = _configured(q, opts)
    mapping = _mapping(opts, config)
    check_mapping(mapping, q)
    quality = _quality(opts, config, mapping)
    if opts.margins is not None and not isinstance(opts.margins, Margins):
        opts = dataclasses.replace(opts, margins=load_margins(opts.margins, q))
    delimiter = parse_delimiter(opts.delimiter) if opts.delimiter else mapping.delimiter
    if isinstance(source, (str, Path)) and str(source) == "-":
        with tempfile.TemporaryDirectory(prefix="logiccheck-stdin-") as tmp:
            path = Path(tmp) / "standard-input.csv"
            path.write_bytes(sys.stdin.buffer.read())
            result = _run(q, path, opts, config, mapping, quality, delimiter)
            result.source = "-"
            return result
    return _run(q, source, opts, config, mapping, quality, delimiter)


def _run(
    q: Questionnaire,
    source: str | Path | pd.DataFrame,
    opts: RunOptions,
    config: Config,
    mapping: DataMapping,
    quality: QualityConfig,
    delimiter: str | None,
) -> PipelineResult:
    notes: list[str] = []
    kept: list[pa.Table] = []
    fmt = used_delimiter = None
    if isinstance(source, pd.DataFrame):
        table = table_from_frame(source)
        header = list(table.column_names)
        step = opts.chunk_rows or rows_for(len(header))
        chunks: Iterator[pa.Table] = (table.slice(s, step) for s in range(0, max(table.num_rows, 1), step))
        name = None
    else:
        export = open_export(source, encoding=opts.encoding, chunk_rows=opts.chunk_rows, delimiter=delimiter)
        header, name = export.columns, str(export.path)
        chunks = prefetch(export.chunks)
        fmt = export.path.suffix.lower().lstrip(".") or None
        used_delimiter = export.delimiter
        if used_delimiter not in (None, ",") and fmt not in ("tsv", "tab"):
            how = "as given" if delimiter else "detected from the header line; set --delimiter to override"
            notes.append(f"{export.path.name}: read as {DELIMITER_NAMES[used_delimiter]}-delimited ({how})")
    started = time.perf_counter()
    validator = Validator(q, mapping, header, keep_cells=True, keep_frame=False)
    base = validator.run(_kept(chunks, kept), name, opts.progress)
    read_and_route = time.perf_counter() - started
    raw = _joined(kept, header)
    result = PipelineResult(**{f.name: getattr(base, f.name) for f in dataclasses.fields(ValidationResult)})
    result.notes = [*notes, *result.notes]
    result.config, result.mapping, result.quality_config = config, mapping, quality
    result.export, result.export_format, result.delimiter, result.layout = raw, fmt, used_delimiter, validator.layout
    result.timings["read and route"] = read_and_route
    started = time.perf_counter()
    state = state_from_validation(q, result)
    result.state = state
    # Dispositions before the checks: the quality checks judge respondents by them.
    disposition = completeness.dispositions(q, state, quality.completeness).to_numpy(dtype=object)
    stops = [e.name for e in q.entries if e.kind == "stop"]
    result.disposition = disposition
    result.dispositions = tally(disposition, stops)
    result.measures = result.measures.assign(disposition=disposition)
    if mapping.frame is not None:
        result.sample_frame = read_cells(mapping.frame)
    ctx = _context(q, result, raw, config, mapping, quality, validator)
    result.context = ctx
    result.timings["route state, dispositions, context"] = time.perf_counter() - started
    if opts.margins is not None:
        ctx.options["margins"] = opts.margins
    # A check turned off in [checks] is not run at all (some cost real time on large exports).
    result.blocks.extend(run_data_checks(ctx, disable=config.disabled if opts.check_settings else (),
                                         timings=result.timings))
    # Who each near-duplicate matched, for the cleaner's keep-the-first rule.
    near = ctx.memo.get("quality.near")
    if near is not None:
        result.match = MatchScores(near.score, near.partner, near.compared)
    result.analyses = run_analyses(ctx, result.timings)
    result.notes.extend(ctx.notes)
    for analysis in result.analyses.values():
        result.notes.extend(analysis.notes)
    if opts.check_settings:
        result.apply_check_settings(config.disabled, config.severity)
    result._findings = None
    return result


def _typed_values(raw: pa.Table, validator: Validator, n: int) -> Callable[[str], np.ndarray]:
    """`value_of` for the context: a spec name's (or a multi option's `NAME_V`) values
    where valid, NaN elsewhere, typed from the kept cells when asked (with the run's
    verdicts per distinct text), so no typed copy of every cell is held."""
    plans = validator.layout.plans
    options = {
        f"{name}_{v}": (name, j)
        for name, plan in plans.items()
        if plan.kind == "multi"
        for j, v in enumerate(plan.options)
    }
    last: dict[str, Cells] = {}  # the last multi typed: its options are asked one after another

    def cells(name: str) -> Cells:
        if name not in last:
            plan = plans[name]
            last.clear()
            last[name] = type_cells(plan, raw.select([c for c in plan.columns if c in raw.column_names]),
                                    validator.mapping, validator.memo)
        return last[name]

    def value_of(name: str) -> np.ndarray:
        plan = plans.get(name)
        if name != "id" and plan is not None and not plan.missing:
            if plan.kind == "value":
                c = type_cells(plan, raw.select(plan.columns), validator.mapping, validator.memo)
                assert c.value is not None
                return np.where(c.valid, c.value, np.nan)
            if plan.kind == "text":
                c = type_cells(plan, raw.select(plan.columns), validator.mapping, validator.memo)
                texts = pd.Series(column_texts(raw, plan.columns[0]), dtype=object)
                return np.where(c.valid, pd.to_numeric(texts, errors="coerce").to_numpy(dtype=np.float64), np.nan)
        if name in options:
            owner, j = options[name]
            c = cells(owner)
            assert c.chosen is not None
            return np.where(c.valid, c.chosen[:, j].astype(np.float64), np.nan)
        return np.full(n, np.nan)

    return value_of


def _context(
    q: Questionnaire,
    result: PipelineResult,
    raw: pa.Table,
    config: Config,
    mapping: DataMapping,
    quality: QualityConfig,
    validator: Validator,
) -> DataContext:
    texts: dict[str, np.ndarray | None] = {}
    value_of = _typed_values(raw, validator, result.respondents)

    def text_of(column: str) -> np.ndarray | None:
        if column not in texts:
            texts[column] = (
                np.array(column_texts(raw, column), dtype=object) if column in raw.column_names else None
            )
        return texts[column]

    state = result.state
    assert state is not None
    return DataContext(
        q=q,
        ids=np.asarray(result.ids, dtype=object),
        items=list(result.items),
        due=state.due,
        has_value=state.has_value,
        valid=state.valid,
        nonresponse=state.nonresponse,
        stop=result.stop,
        disposition=result.disposition,
        value_of=value_of,
        text_of=text_of,
        config=quality,
        mapping=mapping,
        sample_frame=result.sample_frame,
        options={"settings": config},
        values_at=lambda rows: _typed_values(take_rows(raw, rows), validator, int(rows.size)),
    )
