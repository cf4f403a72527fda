"""`logiccheck format [--check] SPEC...`"""

from __future__ import annotations

import sys
from pathlib import Path

import click

from logiccheck.atomic import atomic_path
from logiccheck.cli.common import EXIT_ERROR, EXIT_FINDINGS, EXIT_OK
from logiccheck.fmt import FormatError, format_text
from logiccheck.loader import SpecReadError, read_spec_text


@click.command("format")
@click.argument("specs", nargs=-1, required=True, type=click.Path(dir_okay=False))
@click.option("--check", is_flag=True, help="Change nothing; exit 1 when a file would be reformatted.")
def format_command(specs: tuple[str, ...], check: bool) -> None:
    """Lay out specs one way: indentation, spacing, aligned answer lists, blank lines.

    Comments stay where they are, and a file is only rewritten when its meaning is
    proved unchanged. A file that cannot be read or parsed is reported and left alone
    (exit 2); the other files are still formatted."""
    status = EXIT_OK
    for spec in specs:
        try:
            text = read_spec_text(spec)
            out = format_text(text, spec)
        except (SpecReadError, FormatError) as err:
            click.echo(f"logiccheck: error: {err}", err=True)
            status = EXIT_ERROR
            continue
        if out == text:
            continue
        if check:
            click.echo(f"would reformat {spec}")
            status = max(status, EXIT_FINDINGS)
        else:
            with atomic_path(spec) as tmp:
                Path(tmp).write_bytes(out.encode("utf-8"))
            click.echo(f"reformatted {spec}", err=True)
    sys.exit(status)
