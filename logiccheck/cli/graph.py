"""`logiccheck graph SPEC --format dot|mermaid`"""

from __future__ import annotations

import click

from logiccheck.cli.common import fail
from logiccheck.load import SpecReadError, load_file
from logiccheck.report.graph_data import build_drawing
from logiccheck.report.graph_dot import to_dot
from logiccheck.report.graph_mermaid import to_mermaid

# Text formats; image formats plug in here with an emitter of their own.
GRAPH_FORMATS = {"dot": to_dot, "mermaid": to_mermaid}


@click.command("graph")
@click.argument("spec", type=click.Path(dir_okay=False))
@click.option("--format", "fmt", type=click.Choice(sorted(GRAPH_FORMATS)), default="dot", show_default=True)
def graph_command(spec: str, fmt: str) -> None:
    """Write the routing dependency graph: items grouped by section, edges labelled
    with the condition that reads each value. Output goes to standard output."""
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
    click.echo(GRAPH_FORMATS[fmt](build_drawing(loaded.questionnaire)), nl=False)
