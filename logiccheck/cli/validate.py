"""`logiccheck validate SPEC --data EXPORT ...`"""

from __future__ import annotations

import dataclasses
import sys
import time
from pathlib import Path
from typing import Any, BinaryIO

import click
from rich.progress import BarColumn, Progress, SpinnerColumn, TextColumn, TimeElapsedColumn

from logiccheck.cli.common import color_option, export_options, fail, fail_on_option, make_console
from logiccheck.data import ValidationResult
from logiccheck.diagnostics import Severity
from logiccheck.loader import Loaded, SpecReadError, load_file
from logiccheck.pipeline import INPUT_ERRORS, PipelineResult, RunOptions, run_pipeline
from logiccheck.report.data_csv import items_csv, write_csv_dir
from logiccheck.report.data_json import write_validation_json
from logiccheck.report.data_text import render_validation

DATA_FORMATS = ["text", "json", "csv", "sarif", "junit", "github", "html"]
PROGRESS_AFTER = 1.5  # seconds before a progress bar appears


def data_options(fn):  # type: ignore[no-untyped-def]
    """Options `validate` and `check` share: the export options, and --show."""
    fn = click.option("--show", default=5, show_default=True, type=click.IntRange(0), help="Findings shown per check in terminal output.")(fn)
    return export_options()(fn)


def run_validation(
    loaded: Loaded, data: str, options: RunOptions, color: str = "auto"
) -> PipelineResult:
    """The pipeline, with a progress bar on stderr once the run takes more than a moment;
    bad input stops the command with one line (exit 2)."""
    err_console = make_console(color, stderr=True)
    started = time.monotonic()
    state: dict[str, Any] = {}

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
        bar.update(state["task"], completed=rows)

    try:
        return run_pipeline(loaded, data, dataclasses.replace(options, progress=progress))
    except INPUT_ERRORS as err:
        fail(str(err))
    finally:
        if "bar" in state:
            state["bar"].stop()


def run_options(map_file: str | None, frame: str | None, encoding: str | None, delimiter: str | None,
                chunk_rows: int | None = None, **extra: Any) -> RunOptions:
    """RunOptions from the shared export options."""
    return RunOptions(mapping=map_file, frame=frame, encoding=encoding, delimiter=delimiter, chunk_rows=chunk_rows, **extra)


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
        out_bytes: BinaryIO = sys.stdout.buffer
        write_validation_json(result, out_bytes.write)
        out_bytes.write(b"\n")
        out_bytes.flush()
    elif fmt == "csv":
        if out:
            paths = write_csv_dir(result, out)
            click.echo("wrote " + " and ".join(str(p) for p in paths), err=True)
        else:
            click.echo(items_csv(result), nl=False)
    else:
        console = make_console(color)
        render_validation(console, result, show=show)
        weights = getattr(result, "analyses", {}).get("weights")
        if weights is not None:
            from logiccheck.report.weights_text import print_margins

            print_margins(console, weights.sections)


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
@click.option("--margins", "margins_file", type=click.Path(dir_okay=False), help="Population margins (TOML): the sample against the population, per category.")
@click.option("--timings", is_flag=True, help="After the output, print seconds per stage, check and analysis to standard error.")
@fail_on_option
@color_option
def validate_command(
    spec: str,
    data: str,
    map_file: str | None,
    frame: str | None,
    encoding: str | None,
    delimiter: str | None,
    chunk_rows: int | None,
    show: int,
    fmt: str,
    out: str | None,
    margins_file: str | None,
    timings: bool,
    fail_on: str | None,
    color: str,
) -> None:
    """Check an export against the spec's routing: off-route answers, missing, invalid values."""
    started = time.perf_counter()
    loaded = load_spec(spec)
    note = spec_note(loaded)
    options = run_options(map_file, frame, encoding, delimiter, chunk_rows, margins=margins_file)
    result = run_validation(loaded, data, options, color)
    if note:
        click.echo(f"logiccheck: note: {note}", err=True)
    if fmt == "html":
        from logiccheck.cli.report import write_html

        path = write_html(loaded, out, result)
        if out:
            click.echo(f"logiccheck: wrote {path}", err=True)
    else:
        emit_validation(result, fmt, color, show, out, loaded, fail_on)
    if timings:
        write_timings(result.timings, time.perf_counter() - started)
    sys.exit(validation_status(result, fail_on))


def write_timings(timings: dict[str, float], total: float) -> None:
    """Seconds per stage, check and analysis, slowest first, then the rest and the total
    (standard error, so the output itself stays as it is)."""
    rows = sorted(timings.items(), key=lambda kv: -kv[1])
    width = max((len(k) for k, _ in rows), default=10)
    for name, seconds in rows:
        if seconds >= 0.005:
            click.echo(f"logiccheck: time: {name:<{width}} {seconds:8.2f} s", err=True)
    rest = total - sum(timings.values())
    click.echo(f"logiccheck: time: {'spec, output and the rest':<{width}} {rest:8.2f} s", err=True)
    click.echo(f"logiccheck: time: {'total (command)':<{width}} {total:8.2f} s", err=True)
