"""`logiccheck graph SPEC --format svg|png [--out FILE]`: the routing picture."""

from __future__ import annotations

import sys

import click

from logiccheck.checks.runner import run_checks
from logiccheck.cli.common import fail
from logiccheck.load import SpecReadError, load_file
from logiccheck.report.extra import ReportExtraMissing
from logiccheck.report.output import numbered_paths, write_atomic

PICTURE_FORMATS = ["svg", "png"]


def write_pictures(spec: str, fmt: str, out: str | None, *, solver: bool, max_nodes: int) -> list[str]:
    """Draw the spec's routing; returns the files written (none when sent to stdout)."""
    try:
        from logiccheck.report.graph_picture import MAX_NODES, figure_bytes, routing_pictures

        loaded = load_file(spec)
        diagnostics = run_checks(loaded, solver=solver)
        pictures = routing_pictures(loaded.questionnaire, diagnostics, max_nodes=max_nodes or MAX_NODES)
    except (SpecReadError, ReportExtraMissing) as err:
        fail(str(err))
    if loaded.syntax:
        click.echo(f"logiccheck: note: {spec} has syntax errors; the picture shows what could be read", err=True)
    if out is None:
        if len(pictures) > 1:
            fail(f"{spec}: {len(pictures)} pictures (one per section); give --out FILE to write them all")
        if fmt == "png" and sys.stdout.isatty():
            fail("a PNG picture is binary; give --out FILE or redirect standard output")
        sys.stdout.buffer.write(figure_bytes(pictures[0].figure, fmt))
        sys.stdout.flush()
        return []
    written = []
    for picture, path in zip(pictures, numbered_paths(out, [p.name for p in pictures]), strict=False):
        try:
            write_atomic(path, figure_bytes(picture.figure, fmt))
        except OSError as err:
            fail(f"{path}: cannot write ({err.strerror}); check the folder exists and is writable")
        written.append(str(path))
    return written


@click.command("graph")
@click.argument("spec", type=click.Path(dir_okay=False))
@click.option("--format", "fmt", type=click.Choice(PICTURE_FORMATS), default="svg", show_default=True)
@click.option("--out", type=click.Path(dir_okay=False), default=None,
              help="Write here instead of standard output (large specs: one file per section).")
@click.option("--no-solver", is_flag=True, help="Do not run the routing analysis (no unreachable marks).")
@click.option("--max-boxes", type=click.IntRange(min=1), default=None,
              help="Split into one picture per section above this many boxes [default: 120].")
def graph_command(spec: str, fmt: str, out: str | None, no_solver: bool, max_boxes: int | None) -> None:
    """Draw the routing: sections as bands, items as boxes, arrows from each condition's inputs."""
    for path in write_pictures(spec, fmt, out, solver=not no_solver, max_nodes=max_boxes or 0):
        click.echo(f"logiccheck: wrote {path}", err=True)
