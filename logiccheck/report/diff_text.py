"""Terminal output for `diff`: one line per change, witnesses below, a summary line."""

from __future__ import annotations

from rich.console import Console
from rich.markup import escape

from logiccheck.diff.model import SpecDiff

STYLE = {"break": "bold red", "caution": "yellow", "info": "cyan"}


def _where(diff: SpecDiff, change) -> str:  # type: ignore[no-untyped-def]
    span = change.new or change.old
    return f"{span.file}:{span.line}:{span.column}" if span else diff.new_file


def render_diff(console: Console, diff: SpecDiff) -> None:
    for change in diff.changes:
        style = STYLE[change.impact]
        console.print(
            f"[bold]{escape(_where(diff, change))}[/bold] [{style}]{change.impact}[/{style}] "
            f"[magenta]{change.kind}[/magenta] {escape(change.message)}",
            highlight=False,
            soft_wrap=True,
        )
        if change.witness is not None:
            shown = ", ".join(f"{k} = {v}" for k, v in change.witness.items()) or "(any respondent)"
            console.print(f"  [dim]witness:[/dim] {escape(shown)}", highlight=False, soft_wrap=True)
    counts = diff.counts()
    parts = [f"[{STYLE[k]}]{v} {k}[/{STYLE[k]}]" if v else f"{v} {k}" for k, v in counts.items()]
    console.print(
        f"{escape(diff.old_file)} → {escape(diff.new_file)}: {len(diff.changes)} change"
        f"{'' if len(diff.changes) == 1 else 's'} (" + ", ".join(parts) + "); "
        f"routing compared for {diff.compared} items, {diff.routing_same} proven the same",
        highlight=False,
        soft_wrap=True,
    )
