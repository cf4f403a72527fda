"""`logiccheck lint SPEC...`"""

from __future__ import annotations

import sys

import click

from logiccheck.checks.registry import all_checks
from logiccheck.checks.runner import STAGE_ORDER, run_checks
from logiccheck.cli.common import color_option, exit_status, fail, fail_on_option, make_console
from logiccheck.config import Config, ConfigError, config_for
from logiccheck.diagnostics import Diagnostic, Severity
from logiccheck.loader import Loaded, SpecReadError, load_file
from logiccheck.report.github import github_text
from logiccheck.report.junit import junit_text
from logiccheck.report.lint_json import lint_json
from logiccheck.report.lint_text import render_lint
from logiccheck.report.sarif import sarif_text
from logiccheck.report.source import SourceCache

LINT_FORMATS = ["text", "json", "sarif", "junit", "github"]


def lint_files(
    paths: list[str],
    *,
    solver: bool = True,
    config: Config | None = None,
    config_file: str | None = None,
) -> tuple[list[Diagnostic], SourceCache]:
    """Lint every spec, each with its configuration (the one given, the named file, or
    the nearest one above it); a file that cannot be read stops the run (exit 2)."""
    diagnostics: list[Diagnostic] = []
    texts: dict[str, str] = {}
    for path in paths:
        try:
            loaded = load_file(path)
        except SpecReadError as err:
            fail(str(err))
        texts[path] = loaded.questionnaire.text
        diagnostics.extend(lint_loaded(loaded, path, solver=solver, config=config, config_file=config_file))
    return diagnostics, SourceCache(texts)


def lint_loaded(
    loaded: Loaded,
    path: str,
    *,
    solver: bool = True,
    config: Config | None = None,
    config_file: str | None = None,
) -> list[Diagnostic]:
    """Every check on a spec already loaded, with its configuration applied."""
    try:
        spec_config = config or config_for(path, config_file)
    except ConfigError as err:
        fail(str(err))
    return run_checks(loaded, solver=solver, disable=spec_config.disabled, severity=spec_config.severity)


def emit(
    diagnostics: list[Diagnostic],
    paths: list[str],
    fmt: str,
    color: str,
    sources: SourceCache,
    *,
    fail_on: str = "error",
    solver: bool = True,
    disabled: set[str] | None = None,
) -> None:
    if fmt == "json":
        click.echo(lint_json(diagnostics))
    elif fmt == "sarif":
        click.echo(sarif_text(diagnostics))
    elif fmt == "github":
        text = github_text(diagnostics)
        if text:
            click.echo(text)
    elif fmt == "junit":
        stages = STAGE_ORDER if solver else ("spec",)
        ran = list(all_checks(stages))
        click.echo(junit_text(diagnostics, paths, ran, disabled=disabled or set(), fail_on=Severity(fail_on)))
    else:
        render_lint(make_console(color), diagnostics, paths, sources)


@click.command("lint")
@click.argument("specs", nargs=-1, required=True, type=click.Path(dir_okay=False))
@click.option(
    "--format", "fmt", type=click.Choice(LINT_FORMATS), default=None, help="Output format [default: text, or the configuration's]."
)
@fail_on_option
@click.option("--no-solver", is_flag=True, help="Skip the routing analysis (static checks only).")
@click.option(
    "--config",
    "config_file",
    type=click.Path(dir_okay=False),
    default=None,
    help="Configuration file (logiccheck.toml or pyproject.toml) [default: the nearest one above each spec].",
)
@color_option
def lint_command(
    specs: tuple[str, ...], fmt: str | None, fail_on: str | None, no_solver: bool, config_file: str | None, color: str
) -> None:
    """Check questionnaire specs: syntax, names, codes, order and routing."""
    paths = list(specs)
    try:
        # Format and fail-on come from the first spec's configuration (or --config).
        first = config_for(paths[0], config_file)
    except ConfigError as err:
        fail(str(err))
    fmt = fmt or first.format or "text"
    if fmt not in LINT_FORMATS:
        fail(f"{first.source}: key `format`: `lint` cannot write {fmt!r}; use one of {', '.join(LINT_FORMATS)}")
    level = fail_on or first.fail_on or "error"
    diagnostics, sources = lint_files(paths, solver=not no_solver, config=first if config_file else None, config_file=config_file)
    disabled = first.disabled
    emit(diagnostics, paths, fmt, color, sources, fail_on=level, solver=not no_solver, disabled=disabled)
    sys.exit(exit_status(diagnostics, level))
