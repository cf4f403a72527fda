"""Terminal output for lint: `file:line:col severity check message`, the source line
with a marker, related locations, and a summary line."""

from __future__ import annotations

from rich.console import Console
from rich.markup import escape

from logiccheck.diagnostics import Diagnostic, count_by_severity
from logiccheck.report.source import SourceCache
from logiccheck.report.textsafe import terminal_text

STYLE = {"error": "bold red", "warning": "yellow", "info": "cyan"}


def _marker(source: str, column: int, end_column: int | None, same_line: bool) -> str:
    width = 1
    if same_line and end_column is not None and end_column > column:
        width = end_column - column
    prefix = "".join(ch if ch == "\t" else " " for ch in source[: max(column - 1, 0)])
    return prefix + "^" + "~" * (width - 1)


def render_diagnostic(console: Console, diag: Diagnostic, sources: SourceCache) -> None:
    sev = diag.severity.value
    head = (
        f"[bold]{escape(terminal_text(diag.file))}:{diag.line}:{diag.column}[/bold] "
        f"[{STYLE[sev]}]{sev}[/{STYLE[sev]}] [magenta]{diag.check}[/magenta] {escape(terminal_text(diag.message))}"
    )
    console.print(head, highlight=False, soft_wrap=True)
    source = terminal_text(sources.line(diag.file, diag.line), keep_tabs=True)
    if source.strip():
        same = diag.span.end_line in (None, diag.line)
        console.print(f"  [dim]{diag.line:>4} |[/dim] {escape(source)}", highlight=False, soft_wrap=True)
        marker = _marker(source, diag.column, diag.span.end_column, same)
        console.print(f"  [dim]     |[/dim] [{STYLE[sev]}]{marker}[/{STYLE[sev]}]", highlight=False, soft_wrap=True)
    for rel in diag.related:
        console.print(
            f"  [dim]note:[/dim] {escape(terminal_text(rel.span.file))}:{rel.span.line}:{rel.span.column} {escape(terminal_text(rel.message))}",
            highlight=False,
            soft_wrap=True,
        )
    if diag.witness:
        shown = ", ".join(f"{k} = {v}" for k, v in diag.witness.items())
        console.print(f"  [dim]witness:[/dim] {escape(terminal_text(shown))}", highlight=False, soft_wrap=True)
    for note in diag.notes:
        console.print(f"  [dim]note:[/dim] {escape(terminal_text(note))}", highlight=False, soft_wrap=True)


def render_lint(console: Console, diagnostics: list[Diagnostic], files: list[str], sources: SourceCache) -> None:
    for diag in diagnostics:
        render_diagnostic(console, diag, sources)
    counts = count_by_severity(diagnostics)
    parts = [
        f"[{STYLE[k]}]{v} {k}{'s' if v != 1 else ''}[/{STYLE[k]}]" if v else f"{v} {k}s"
        for k, v in counts.items()
    ]
    noun = "file" if len(files) == 1 else "files"
    console.print(f"{len(files)} {noun} checked: " + ", ".join(parts), highlight=False)
