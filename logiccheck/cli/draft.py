"""`logiccheck draft --data EXPORT [--out SPEC]`"""

from __future__ import annotations

import sys
import time
from pathlib import Path

import click
from rich.progress import BarColumn, Progress, TextColumn, TimeElapsedColumn

from logiccheck.atomic import write_atomic
from logiccheck.cli.common import color_option, fail, make_console
from logiccheck.data import DataReadError
from logiccheck.draft import draft_table
from logiccheck.draft.infer import read_table

PROGRESS_ROWS = 20_000  # exports at least this long get a progress bar (on a terminal)


@click.command("draft")
@click.option("--data", "data", required=True, type=click.Path(dir_okay=False), help="The export to draft from.")
@click.option("--out", "out", type=click.Path(dir_okay=False), help="Write the draft spec here; default: standard output.")
@click.option("--encoding", default=None, help="Text encoding of the export (default UTF-8), e.g. cp1252.")
@click.option("--decimal", type=click.Choice([".", ","]), default=".", show_default=True, help="Decimal mark of numbers in the export.")
@color_option
def draft_command(data: str, out: str | None, encoding: str | None, decimal: str, color: str) -> None:
    """Write a starting spec from an export: items, answer lists and the routing the
    answers follow. It is a draft to review, not a finished spec."""
    if out is not None:
        target = Path(out)
        if target.exists() and target.resolve() == Path(data).resolve():
            fail(f"{out}: that is the export itself; give --out another file name")
        if not target.parent.exists():
            fail(f"{out}: folder {target.parent} does not exist")
    try:
        table = read_table(data, encoding)
    except DataReadError as err:
        fail(str(err))
    console = make_console(color, stderr=True)
    bar: Progress | None = None
    if table.num_rows >= PROGRESS_ROWS and console.is_terminal:
        bar = Progress(TextColumn("drafting {task.fields[name]}"), BarColumn(), TextColumn("{task.completed}/{task.total} columns"),
                       TimeElapsedColumn(), console=console, transient=True)
    started = time.monotonic()
    try:
        if bar is not None:
            bar.start()
            task = bar.add_task("draft", total=None, name=Path(data).name)

            def progress(done: int, total: int) -> None:
                bar.update(task, completed=done, total=total)

            result = draft_table(table, Path(data).name, decimal=decimal, progress=progress)
        else:
            result = draft_table(table, Path(data).name, decimal=decimal)
    finally:
        if bar is not None:
            bar.stop()
    conditional = sum(1 for r in result.routed if r.condition.literals)
    stops = sum(1 for r in result.routed if r.stop is not None)
    summary = (f"drafted {len(result.routed)} items ({conditional} with a condition, {stops} stops) from "
               f"{table.num_rows} respondents in {time.monotonic() - started:.1f} s; review it before use")
    if out is None:
        sys.stdout.write(result.text)
        click.echo(f"logiccheck: note: {summary}", err=True)
        return
    write_atomic(out, result.text)
    click.echo(f"wrote {out}: {summary}", err=True)
