"""`logiccheck graph SPEC --format dot|mermaid|svg|png [--out FILE]`"""

from __future__ import annotations

import sys

import click

from logiccheck.cli.common import fail
from logiccheck.loader import Loaded, SpecReadError, load_file
from logiccheck.report.extra import ReportExtraMissing
from logiccheck.report.graph_data import build_drawing
from logiccheck.report.graph_dot import to_dot
from logiccheck.report.graph_mermaid import to_mermaid
from logiccheck.report.output import numbered_paths, write_atomic

# Text formats over the drawing; picture formats are drawn by report/graph_picture.py.
GRAPH_FORMATS = {"dot": to_dot, "mermaid": to_mermaid}
PICTURE_FORMATS = ["svg", "png"]


def write_pictures(loaded: Loaded, spec: str, fmt: str, out: str | None, *, solver: bool, max_nodes: int) -> list[str]:
    """Draw the spec's routing; returns the files written (none when sent to stdout)."""
    try:
        from logiccheck.checks.runner import run_checks
        from logiccheck.report.graph_picture import MAX_NODES, figure_bytes, routing_pictures

        diagnostics = run_checks(loaded, solver=solver)  # unreachable marks come from the routing checks
        pictures = routing_pictures(loaded.questionnaire, diagnostics, max_nodes=max_nodes or MAX_NODES)
    except ReportExtraMissing as err:
        fail(str(err))
    if out is None:
        if len(pictures) > 1:
            fail(f"{spec}: {len(pictures)} pictures (one per section); give --out FILE to write them all")
        if fmt == "png" and sys.stdout.isatty():
            fail("a PNG picture is binary; give --out FILE or redirect standard output")
        sys.stdout.buffer.write(figure_bytes(pictures[0].figure, fmt))
        sys.stdout.flush()
        return []
    written = []
    for picture, path in zip(pictures, numbered_paths(out, [p.name for p in pictures]), strict=True):
        try:
            write_atomic(path, figure_bytes(picture.figure, fmt))
        except OSError as err:
            fail(f"{path}: cannot write ({err.strerror}); check the folder exists and is writable")
        written.append(str(path))
    return written


@click.command("graph")
@click.argument("spec", type=click.Path(dir_okay=False))
@click.option("--format", "fmt", type=click.Choice([*sorted(GRAPH_FORMATS), *PICTURE_FORMATS]), default="dot",
              show_default=True)
@click.option("--out", type=click.Path(dir_okay=False), default=None,
              help="Write here instead of standard output (pictures of large specs: one file per section).")
@click.option("--no-solver", is_flag=True, help="Pictures: skip the routing analysis (no unreachable marks).")
@click.option("--max-boxes", type=click.IntRange(min=1), default=None,
              help="Pictures: one per section above this many boxes [default: 120].")
def graph_command(spec: str, fmt: str, out: str | None, no_solver: bool, max_boxes: int | None) -> None:
    """Draw the routing: items grouped by section, edges from each value to the conditions
    that read it. dot and mermaid are text; svg and png are pictures (needs the report extra)."""
    try:
        loaded = load_file(spec)
    except SpecReadError as err:
        fail(str(err))
    if loaded.syntax:
        first = loaded.syntax[0]
        click.echo(
            f"logiccheck: note: {spec}:{first.line}:{first.column}: {first.message}; "
            "the graph leaves out what could not be parsed",
            err=True,
        )
    if fmt in PICTURE_FORMATS:
        for path in write_pictures(loaded, spec, fmt, out, solver=not no_solver, max_nodes=max_boxes or 0):
            click.echo(f"logiccheck: wrote {path}", err=True)
        return
    text = GRAPH_FORMATS[fmt](build_drawing(loaded.questionnaire))
    if out is None:
        click.echo(text, nl=False)
    else:
        try:
            write_atomic(out, text)
        except OSError as err:
            fail(f"{out}: cannot write ({err.strerror}); check the folder exists and is writable")
