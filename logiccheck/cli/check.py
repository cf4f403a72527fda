"""`logiccheck check SPEC --data EXPORT`: lint, then validate; the main job."""

from __future__ import annotations

import json
import sys

import click

from logiccheck.cli.common import color_option, exit_status, fail_on_option, make_console
from logiccheck.cli.lint import emit, lint_loaded
from logiccheck.cli.validate import (
    data_options,
    load_spec,
    run_options,
    run_validation,
    spec_note,
    validation_status,
)
from logiccheck.diagnostics import count_by_severity
from logiccheck.report.data_text import render_validation
from logiccheck.report.source import SourceCache


@click.command("check")
@click.argument("spec", type=click.Path(dir_okay=False))
@data_options
@click.option("--format", "fmt", type=click.Choice(["text", "json"]), default="text", show_default=True)
@click.option("--no-solver", is_flag=True, help="Skip the routing analysis (static checks only).")
@fail_on_option
@color_option
def check_command(
    spec: str,
    data: str,
    map_file: str | None,
    frame: str | None,
    encoding: str | None,
    delimiter: str | None,
    chunk_rows: int | None,
    show: int,
    fmt: str,
    no_solver: bool,
    fail_on: str | None,
    color: str,
) -> None:
    """Lint the spec, then validate the export against it; exit status is the worse of the two."""
    loaded = load_spec(spec)  # once, for both the lint and the validation
    diagnostics = lint_loaded(loaded, spec, solver=not no_solver)
    sources = SourceCache({spec: loaded.questionnaire.text})
    note = spec_note(loaded)
    result = run_validation(loaded, data, run_options(map_file, frame, encoding, delimiter, chunk_rows), color)
    if fmt == "json":
        payload = {
            "lint": {"diagnostics": [d.to_json() for d in diagnostics], "summary": count_by_severity(diagnostics)},
            "validate": result.to_json(),
        }
        click.echo(json.dumps(payload, indent=2, ensure_ascii=False))
    else:
        console = make_console(color)
        console.rule("[bold]lint[/bold]", align="left")
        emit(diagnostics, [spec], "text", color, sources)
        console.print()
        console.rule("[bold]validate[/bold]", align="left")
        render_validation(console, result, show=show)
    if note:
        click.echo(f"logiccheck: note: {note}", err=True)
    sys.exit(max(exit_status(diagnostics, fail_on), validation_status(result, fail_on)))
