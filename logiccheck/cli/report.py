"""`logiccheck report SPEC [--data EXPORT] --out report.html`: the self-contained HTML report
(also `validate --format html`)."""

from __future__ import annotations

from typing import Any

import click

from logiccheck.cli.common import fail
from logiccheck.loader import Loaded, SpecReadError, load_file
from logiccheck.report.extra import ReportExtraMissing, require_report_extra
from logiccheck.report.output import write_atomic


def write_html(loaded: Loaded, out: str | None, result: Any = None, mapping: Any = None, *, solver: bool = True) -> str:
    """Lint, gather the validation result (if any) and write the page; '-' or None: stdout."""
    from logiccheck.config import ConfigError, config_for

    try:
        require_report_extra()
        from logiccheck.checks.runner import run_checks
        from logiccheck.report.html import render_html
        from logiccheck.report.report_data import ReportData, from_validation, settings_used

        q = loaded.questionnaire
        config = config_for(q.file)  # the same configuration `lint` finds for this spec
        diagnostics = run_checks(loaded, solver=solver, disable=config.disabled, severity=config.severity)
        settings = settings_used(config, mapping)
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
@click.option("--data", "data", type=click.Path(dir_okay=False), default=None, help="The collected export.")
@click.option("--map", "map_file", type=click.Path(dir_okay=False), default=None, help="Data mapping (TOML).")
@click.option("--frame", type=click.Path(dir_okay=False), default=None, help="Sample-frame CSV.")
@click.option("--encoding", default=None, help="Text encoding of a CSV/TSV/JSON Lines export [default: UTF-8].")
@click.option("--out", required=True, type=click.Path(dir_okay=False), help="The HTML file to write ('-': stdout).")
@click.option("--no-solver", is_flag=True, help="Skip the routing analysis (static checks only).")
def report_command(spec: str, data: str | None, map_file: str | None, frame: str | None, encoding: str | None,
                   out: str, no_solver: bool) -> None:
    """One self-contained HTML page: summary, per-item chart and table, findings, diagnostics, routing."""
    try:
        require_report_extra()
        loaded = load_file(spec)
    except (SpecReadError, ReportExtraMissing) as err:
        fail(str(err))
    result = mapping = None
    if data is not None:
        from logiccheck.cli.validate import load_data_mapping, run_validation
        from logiccheck.data.readers import DEFAULT_CHUNK_ROWS

        mapping = load_data_mapping(map_file, frame, spec)
        result = run_validation(loaded, data, mapping, encoding, DEFAULT_CHUNK_ROWS, "auto")
    path = write_html(loaded, out, result, mapping, solver=not no_solver)
    click.echo(f"logiccheck: wrote {path}", err=True)
