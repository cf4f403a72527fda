"""`logiccheck validate SPEC --data EXPORT ...`"""

from __future__ import annotations

import sys
import time
from pathlib import Path

import click
from rich.progress import BarColumn, Progress, SpinnerColumn, TextColumn, TimeElapsedColumn

from logiccheck.cli.common import color_option, fail, fail_on_option, make_console
from logiccheck.data import DataMapping, DataReadError, MappingError, ValidationResult, load_mapping, validate
from logiccheck.diagnostics import Severity
from logiccheck.loader import Loaded, SpecReadError, load_file
from logiccheck.quality.attach import attach_quality
from logiccheck.quality.config import QualityConfig
from logiccheck.report.data_csv import items_csv, write_csv_dir
from logiccheck.report.data_json import validation_json
from logiccheck.report.data_text import render_validation
from logiccheck.scales.bridge import attach_scales

DATA_FORMATS = ["text", "json", "csv", "sarif", "junit", "github", "html"]
PROGRESS_AFTER = 1.5  # seconds before a progress bar appears


def data_options(fn):  # type: ignore[no-untyped-def]
    """Options `validate` and `check` share."""
    for option in reversed(
        [
            click.option("--data", "data", required=True, type=click.Path(dir_okay=False), help="The export: .csv, .tsv, .xlsx, .parquet or .jsonl."),
            click.option("--map", "map_file", type=click.Path(dir_okay=False), help="Data mapping (TOML; keys top-level or under [data])."),
            click.option("--frame", "frame", type=click.Path(dir_okay=False), help="Sample frame CSV (column id, optionally email)."),
            click.option("--encoding", default=None, help="Text encoding of a CSV/TSV/JSON Lines export [default: UTF-8, with or without BOM]."),
            click.option("--show", default=5, show_default=True, type=click.IntRange(0), help="Findings shown per check in terminal output."),
            click.option("--chunk-rows", default=None, hidden=True, type=click.IntRange(1)),
        ]
    ):
        fn = option(fn)
    return fn


def _configured_mapping(spec: str | None) -> DataMapping:
    from logiccheck.config import ConfigError, config_for

    if spec is None:
        return DataMapping()
    try:
        config = config_for(spec)
    except ConfigError as err:
        fail(str(err))
    model = config.models.get("data")
    return model if isinstance(model, DataMapping) else DataMapping()


def _apply_check_settings(result: ValidationResult, spec: str) -> None:
    """`[checks]` of the configuration found above the spec applies to findings too."""
    from logiccheck.config import ConfigError, config_for

    try:
        config = config_for(spec)
    except ConfigError as err:
        fail(str(err))
    result.apply_check_settings(config.disabled, config.severity)


def _configured_quality(loaded: Loaded) -> QualityConfig:
    from logiccheck.clean.policy import PolicyError, configured_policy

    try:
        return configured_policy(loaded.questionnaire.file)[1]
    except PolicyError as err:
        fail(str(err))


def load_data_mapping(map_file: str | None, frame: str | None, spec: str | None = None) -> DataMapping:
    """--map FILE; else the [data] table of the configuration found above the spec."""
    try:
        mapping = load_mapping(map_file) if map_file else _configured_mapping(spec)
    except MappingError as err:
        fail(str(err))
    if frame is not None:
        if not Path(frame).is_file():
            fail(f"{frame}: no such sample frame file; give a CSV with an `id` column")
        mapping = mapping.model_copy(update={"frame": frame})
    return mapping


def run_validation(
    loaded: Loaded, data: str, mapping: DataMapping, encoding: str | None, chunk_rows: int | None, color: str
) -> ValidationResult:
    """Validate with a progress bar on stderr once the run takes more than a moment."""
    err_console = make_console(color, stderr=True)
    started = time.monotonic()
    state: dict[str, object] = {}

    def progress(rows: int, _bytes: int) -> None:
        if "bar" not in state:
            if time.monotonic() - started < PROGRESS_AFTER or not err_console.is_terminal:
                return
            bar = Progress(
                SpinnerColumn(),
                TextColumn("validating {task.fields[name]}"),
                BarColumn(),
                TextColumn("{task.completed:,.0f} rows"),
                TimeElapsedColumn(),
                console=err_console,
                transient=True,
            )
            bar.start()
            state["bar"] = bar
            state["task"] = bar.add_task("validate", total=None, name=Path(data).name)
        bar = state["bar"]
        bar.update(state["task"], completed=rows)  # type: ignore[attr-defined]

    try:
        # The quality checks read the cells: keep them, so the export is validated once.
        result = validate(
            loaded.questionnaire, data, mapping, encoding=encoding, chunk_rows=chunk_rows, keep_cells=True, progress=progress
        )
        result = attach_quality(loaded.questionnaire, result, data, mapping, _configured_quality(loaded), encoding=encoding)
        attach_scales(loaded.questionnaire, result)
        _apply_check_settings(result, loaded.questionnaire.file)
        return result
    except DataReadError as err:
        fail(str(err))
    finally:
        if "bar" in state:
            state["bar"].stop()  # type: ignore[attr-defined]


def emit_validation(
    result: ValidationResult,
    fmt: str,
    color: str,
    show: int,
    out: str | None,
    loaded: Loaded | None = None,
    fail_on: str | None = None,
) -> None:
    if fmt != "text":
        # Machine formats go to standard output; the notes go to standard error.
        for note in result.notes:
            click.echo(f"logiccheck: note: {note}", err=True)
    if fmt in ("sarif", "junit", "github"):
        from logiccheck.report.machine import emit_findings

        click.echo(emit_findings(result, fmt, loaded.questionnaire if loaded else None, Severity(fail_on or "error")))
    elif fmt == "json":
        click.echo(validation_json(result))
    elif fmt == "csv":
        if out:
            paths = write_csv_dir(result, out)
            click.echo("wrote " + " and ".join(str(p) for p in paths), err=True)
        else:
            click.echo(items_csv(result), nl=False)
    else:
        render_validation(make_console(color), result, show=show)


def validation_status(result: ValidationResult, fail_on: str | None) -> int:
    return 1 if result.worst_at_least(Severity(fail_on or "error")) else 0


def load_spec(spec: str) -> Loaded:
    try:
        return load_file(spec)
    except SpecReadError as err:
        fail(str(err))


def spec_note(loaded: Loaded) -> str | None:
    """None if the spec is fine to validate with; a note if it has errors but is usable."""
    q = loaded.questionnaire
    if not q.items():
        fail(f"{q.file}: the spec defines no items, so there is nothing to validate; run `logiccheck lint {q.file}`")
    errors = len(loaded.syntax) + len([p for p in q.problems])
    if errors:
        return f"the spec has {errors} problem(s); validation used the statements that resolved (run `logiccheck lint {q.file}`)"
    return None


@click.command("validate")
@click.argument("spec", type=click.Path(dir_okay=False))
@data_options
@click.option("--format", "fmt", type=click.Choice(DATA_FORMATS), default="text", show_default=True)
@click.option("--out", "out", type=click.Path(), help="With --format csv: write items.csv and findings.csv in this folder; with --format html: the report file.")
@fail_on_option
@color_option
def validate_command(
    spec: str,
    data: str,
    map_file: str | None,
    frame: str | None,
    encoding: str | None,
    show: int,
    chunk_rows: int | None,
    fmt: str,
    out: str | None,
    fail_on: str | None,
    color: str,
) -> None:
    """Check an export against the spec's routing: off-route answers, missing, invalid values."""
    loaded = load_spec(spec)
    note = spec_note(loaded)
    mapping = load_data_mapping(map_file, frame, spec)
    result = run_validation(loaded, data, mapping, encoding, chunk_rows, color)
    if note:
        click.echo(f"logiccheck: note: {note}", err=True)
    if fmt == "html":
        from logiccheck.cli.report import write_html

        path = write_html(loaded, out, result, mapping)
        if out:
            click.echo(f"logiccheck: wrote {path}", err=True)
    else:
        emit_validation(result, fmt, color, show, out, loaded, fail_on)
    sys.exit(validation_status(result, fail_on))
