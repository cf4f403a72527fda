"""`logiccheck report SPEC [--data EXPORT] --out report.html`: the self-contained HTML report
(also `validate --format html`)."""

from __future__ import annotations

from typing import Any

import click

from logiccheck.cli.common import export_options, fail
from logiccheck.loader import Loaded, SpecReadError, load_file
from logiccheck.report.extra import ReportExtraMissing, require_report_extra
from logiccheck.report.output import write_atomic


def write_html(loaded: Loaded, out: str | None, result: Any = None, *, solver: bool = True) -> str:
    """Lint, gather the pipeline's result (if any) and write the page; '-' or None: stdout.
    The configuration is the one the pipeline found (else found here, once)."""
    from logiccheck.config import ConfigError, config_for

    try:
        require_report_extra()
        from logiccheck.checks.runner import run_checks
        from logiccheck.report.html import render_html
        from logiccheck.report.report_data import ReportData, from_validation, settings_used

        q = loaded.questionnaire
        config = getattr(result, "config", None) or config_for(q.file)
        diagnostics = run_checks(loaded, solver=solver, disable=config.disabled, severity=config.severity)
        settings = settings_used(config, getattr(result, "mapping", None))
        if result is None:
            data = ReportData(q, diagnostics, settings=settings)
        else:
            data = from_validation(q, result, diagnostics, settings=settings)
        page = render_html(data)
    except (ReportExtraMissing, ConfigError) as err:
        fail(str(err))
    if out is None or out == "-":
        click.echo(page, nl=False)
        return "standard output"
    try:
        write_atomic(out, page)
    except OSError as err:
        fail(f"{out}: cannot write the report ({err.strerror}); check the folder exists and is writable")
    return out


@click.command("report")
@click.argument("spec", type=click.Path(dir_okay=False))
@export_options(required=False)
@click.option("--out", required=True, type=click.Path(dir_okay=False), help="The HTML file to write ('-': stdout).")
@click.option("--no-solver", is_flag=True, help="Skip the routing analysis (static checks only).")
def report_command(spec: str, data: str | None, map_file: str | None, frame: str | None, encoding: str | None,
                   delimiter: str | None, chunk_rows: int | None, out: str, no_solver: bool) -> None:
    """One self-contained HTML page: summary, per-item chart and table, findings, diagnostics, routing."""
    try:
        require_report_extra()
        loaded = load_file(spec)
    except (SpecReadError, ReportExtraMissing) as err:
        fail(str(err))
    result = None
    if data is not None:
        from logiccheck.cli.validate import run_options, run_validation

        result = run_validation(loaded, data, run_options(map_file, frame, encoding, delimiter, chunk_rows))
    path = write_html(loaded, out, result, solver=not no_solver)
    click.echo(f"logiccheck: wrote {path}", err=True)
