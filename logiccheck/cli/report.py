"""`logiccheck report SPEC [--data EXPORT] --out report.html`: the self-contained HTML report."""

from __future__ import annotations

import click

from logiccheck.api import StageMissing, Survey
from logiccheck.cli.common import fail
from logiccheck.load import SpecReadError, load_file
from logiccheck.report.extra import ReportExtraMissing, require_report_extra


def build_report(spec: str, out: str, data: str | None = None, mapping: str | None = None,
                 frame: str | None = None, *, solver: bool = True) -> str:
    """Lint (and validate, with an export) and write the report; errors exit 2 with one line."""
    try:
        require_report_extra()
        survey = Survey(load_file(spec), spec)
        survey.lint(solver=solver)
        if data is None:
            path = survey.report(out)
        else:
            path = survey.validate(data, mapping=mapping, frame=frame).report(out)
    except (SpecReadError, ReportExtraMissing, StageMissing) as err:
        fail(str(err))
    except OSError as err:
        fail(f"{out}: cannot write the report ({err.strerror}); check the folder exists and is writable")
    return str(path)


@click.command("report")
@click.argument("spec", type=click.Path(dir_okay=False))
@click.option("--data", "data", type=click.Path(dir_okay=False), default=None, help="The collected export.")
@click.option("--map", "mapping", type=click.Path(dir_okay=False), default=None, help="Data mapping (TOML).")
@click.option("--frame", type=click.Path(dir_okay=False), default=None, help="Sample-frame CSV.")
@click.option("--out", required=True, type=click.Path(dir_okay=False), help="The HTML file to write.")
@click.option("--no-solver", is_flag=True, help="Skip the routing analysis (static checks only).")
def report_command(spec: str, data: str | None, mapping: str | None, frame: str | None, out: str,
                   no_solver: bool) -> None:
    """One self-contained HTML page: summary, per-item chart and table, findings, diagnostics, routing."""
    path = build_report(spec, out, data, mapping, frame, solver=not no_solver)
    click.echo(f"logiccheck: wrote {path}", err=True)
