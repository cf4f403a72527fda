"""`logiccheck diff OLD NEW`"""

from __future__ import annotations

import sys

import click

from logiccheck.cli.common import EXIT_FINDINGS, EXIT_OK, color_option, fail, make_console
from logiccheck.diff import diff_questionnaires
from logiccheck.loader import SpecReadError, load_file
from logiccheck.report.diff_json import diff_json
from logiccheck.report.diff_markdown import diff_markdown
from logiccheck.report.diff_text import render_diff

DIFF_FORMATS = ["text", "json", "markdown"]


def _load(path: str):  # type: ignore[no-untyped-def]
    try:
        loaded = load_file(path)
    except SpecReadError as err:
        fail(str(err))
    if loaded.syntax:
        first = loaded.syntax[0]
        fail(f"{first.file}:{first.line}:{first.column}: {first.message}; fix the spec (`logiccheck lint {path}`) before comparing")
    return loaded.questionnaire


@click.command("diff")
@click.argument("old", type=click.Path(dir_okay=False))
@click.argument("new", type=click.Path(dir_okay=False))
@click.option("--format", "fmt", type=click.Choice(DIFF_FORMATS), default="text", show_default=True)
@click.option("--fail-on-routing-change", is_flag=True, help="Exit 1 when who is asked changed for any item.")
@click.option(
    "--fail-on-break", is_flag=True, help="Exit 1 on any breaking change (removed item, recode, routing, type)."
)
@click.option("--no-solver", is_flag=True, help="Compare items, answers and wording only, not who is asked.")
@color_option
def diff_command(
    old: str, new: str, fmt: str, fail_on_routing_change: bool, fail_on_break: bool, no_solver: bool, color: str
) -> None:
    """Compare two versions of a spec: items, answer lists, wording and who is asked."""
    result = diff_questionnaires(_load(old), _load(new), routing=not no_solver)
    if fmt == "json":
        click.echo(diff_json(result))
    elif fmt == "markdown":
        click.echo(diff_markdown(result), nl=False)
    else:
        render_diff(make_console(color), result)
    failed = (fail_on_routing_change and result.routing_changed) or (fail_on_break and result.counts()["break"] > 0)
    sys.exit(EXIT_FINDINGS if failed else EXIT_OK)
