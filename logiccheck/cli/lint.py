"""`logiccheck lint SPEC...`"""

from __future__ import annotations

import sys

import click

from logiccheck.checks.runner import run_checks
from logiccheck.cli.common import color_option, exit_status, fail, fail_on_option, make_console
from logiccheck.diagnostics import Diagnostic
from logiccheck.load import SpecReadError, load_file
from logiccheck.report.lint_json import lint_json
from logiccheck.report.lint_text import render_lint
from logiccheck.report.source import SourceCache

LINT_FORMATS = ["text", "json"]


def lint_files(paths: list[str], *, solver: bool = True) -> tuple[list[Diagnostic], SourceCache]:
    """Lint every spec; a file that cannot be read stops the run (exit 2)."""
    diagnostics: list[Diagnostic] = []
    texts: dict[str, str] = {}
    for path in paths:
        try:
            loaded = load_file(path)
        except SpecReadError as err:
            fail(str(err))
        texts[path] = loaded.questionnaire.text
        diagnostics.extend(run_checks(loaded, solver=solver))
    return diagnostics, SourceCache(texts)


def emit(diagnostics: list[Diagnostic], paths: list[str], fmt: str, color: str, sources: SourceCache) -> None:
    if fmt == "json":
        click.echo(lint_json(diagnostics))
    else:
        render_lint(make_console(color), diagnostics, paths, sources)


@click.command("lint")
@click.argument("specs", nargs=-1, required=True, type=click.Path(dir_okay=False))
@click.option("--format", "fmt", type=click.Choice(LINT_FORMATS), default="text", show_default=True)
@fail_on_option
@click.option("--no-solver", is_flag=True, help="Skip the routing analysis (static checks only).")
@color_option
def lint_command(specs: tuple[str, ...], fmt: str, fail_on: str | None, no_solver: bool, color: str) -> None:
    """Check questionnaire specs: syntax, names, codes, order and routing."""
    paths = list(specs)
    diagnostics, sources = lint_files(paths, solver=not no_solver)
    emit(diagnostics, paths, fmt, color, sources)
    sys.exit(exit_status(diagnostics, fail_on))
