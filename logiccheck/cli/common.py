"""What every command shares: consoles, colour choice, exit codes, input errors."""

from __future__ import annotations

import os
import sys
from typing import NoReturn

import click
from rich.console import Console

from logiccheck.diagnostics import Diagnostic, Severity

EXIT_OK, EXIT_FINDINGS, EXIT_ERROR = 0, 1, 2

color_option = click.option(
    "--color",
    type=click.Choice(["auto", "always", "never"]),
    default="auto",
    show_default=True,
    help="Colour in terminal output (NO_COLOR is respected with auto).",
)
fail_on_option = click.option(
    "--fail-on",
    type=click.Choice(["error", "warning", "info"]),
    default=None,
    help="Exit 1 when a record at or above this level exists [default: error].",
)


def make_console(color: str = "auto", stderr: bool = False) -> Console:
    stream = sys.stderr if stderr else sys.stdout
    if color == "always":
        return Console(file=stream, force_terminal=True, no_color=False, highlight=False)
    if color == "never" or os.environ.get("NO_COLOR"):
        return Console(file=stream, no_color=True, highlight=False, color_system=None)
    return Console(file=stream, highlight=False)


def fail(message: str) -> NoReturn:
    """A usage or input error that stops the run: one line, exit 2."""
    click.echo(f"logiccheck: error: {message}", err=True)
    sys.exit(EXIT_ERROR)


def exit_status(records: list[Diagnostic], fail_on: str | None) -> int:
    level = Severity(fail_on or "error")
    return EXIT_FINDINGS if any(r.severity.at_least(level) for r in records) else EXIT_OK


def export_options(required: bool = True):  # type: ignore[no-untyped-def]
    """The options every command that reads an export takes, in one place."""
    import click as _click

    def wrap(fn):  # type: ignore[no-untyped-def]
        for option in reversed(
            [
                _click.option("--data", "data", required=required, default=None, type=_click.Path(dir_okay=False, allow_dash=True),
                              help="The export: .csv, .tsv, .xlsx, .parquet or .jsonl ('-': CSV on standard input)."),
                _click.option("--map", "map_file", type=_click.Path(dir_okay=False), help="Data mapping (TOML; keys top-level or under [data])."),
                _click.option("--frame", "frame", type=_click.Path(dir_okay=False), help="Sample frame CSV (column id, optionally email)."),
                _click.option("--encoding", default=None, help="Text encoding of a CSV/TSV/JSON Lines export [default: UTF-8, with or without BOM]."),
                _click.option("--delimiter", default=None, help="CSV delimiter: ',', ';', tab or '|' [default: detected from the header line]."),
                _click.option("--chunk-rows", default=None, hidden=True, type=_click.IntRange(1)),
            ]
        ):
            fn = option(fn)
        return fn

    return wrap
