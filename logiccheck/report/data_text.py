"""Terminal output for validate: the per-item table, then findings grouped by check."""

from __future__ import annotations

from rich.console import Console, JustifyMethod
from rich.markup import escape
from rich.table import Table
from rich.text import Text

from logiccheck.data.result import ValidationResult
from logiccheck.diagnostics import SEVERITY_ORDER
from logiccheck.report.bars import bar_text
from logiccheck.report.scale_text import render_scales
from logiccheck.report.textsafe import terminal_text

STYLE = {"error": "bold red", "warning": "yellow", "info": "cyan"}
BAR_WIDTH = 6  # cells of the route bar (fits an 80-column terminal with the flag); 12 on wide ones


def render_validation(console: Console, result: ValidationResult, *, show: int = 5, table_rows: int = 200) -> None:
    """The table (answered > expected highlighted), then up to `show` findings per check."""
    source = result.source or "export"
    table = Table(
        title=f"{escape(terminal_text(source))}: {result.respondents} respondents",
        title_justify="left",
        header_style="bold",
        show_edge=False,
        pad_edge=False,
        padding=(0, 1, 0, 0),  # right padding only: the route bar fits 80 columns
    )
    table.add_column("item", justify="left", no_wrap=True, overflow="fold")
    columns: tuple[tuple[str, JustifyMethod], ...] = (
        ("expected", "right"),
        ("answered", "right"),
        ("off path", "right"),
        ("missing", "right"),
        ("invalid", "right"),
        ("route", "left"),  # bar: █ answered on path, ░ missing, ▓ off path; then the flag
    )
    for col, justify in columns:
        table.add_column(col, justify=justify, no_wrap=True)
    bar_width = BAR_WIDTH if console.width < 100 else 2 * BAR_WIDTH
    for r in result.table.head(table_rows).itertuples(index=False):
        over = bool(r.over_expected)
        flag = "[bold red]> expected[/bold red]" if over else ""
        answered = f"[bold red]{r.answered}[/bold red]" if over else str(r.answered)
        table.add_row(
            escape(terminal_text(r.item)),
            str(r.expected),
            answered,
            f"[red]{r.out_of_path}[/red]" if r.out_of_path else "0",
            f"[cyan]{r.missing_on_path}[/cyan]" if r.missing_on_path else "0",
            f"[red]{r.invalid}[/red]" if r.invalid else "0",
            bar_text(int(r.expected), int(r.answered), int(r.out_of_path), int(r.missing_on_path), width=bar_width)
            + Text.from_markup(" " + flag if flag else ""),
        )
    console.print(table)
    if len(result.table) > table_rows:
        console.print(f"[dim]… {len(result.table) - table_rows} more items (use --format csv for all)[/dim]")
    for analysis in getattr(result, "analyses", {}).values():
        if analysis.sections.get("scales"):
            render_scales(console, analysis.sections["scales"])
    counts = result.counts_by_check()
    if not counts:
        console.print("[green]no findings[/green]")
    groups = sorted(counts.items(), key=lambda kv: (SEVERITY_ORDER[kv[0][1]], -kv[1], kv[0][0]))
    for (check, sev), count in groups:
        console.print()
        console.print(
            f"[{STYLE[sev]}]{sev}[/{STYLE[sev]}] [magenta]{check}[/magenta]: {count} finding{'s' if count != 1 else ''}",
            highlight=False,
        )
        # The first `show` findings by row, from block heads only, stopping at the first
        # block that starts after the rows already taken.
        mine = [b for b in result.blocks if b.check == check and b.severity.value == sev]
        mine.sort(key=lambda b: int(b.rows[0]) if b.rows.size else -1)
        heads: list = []
        for block in mine if show else []:
            if len(heads) >= show and block.rows.size and int(block.rows[0]) + 1 > (heads[show - 1].row or 0):
                break
            heads.extend(block.head(show))
            heads.sort(key=lambda f: (f.row is not None, f.row or 0))
        shown = 0
        for f in heads[:show]:
            where = f"row {f.row}, id {f.respondent}" if f.row is not None else "file"
            console.print(f"  [dim]{escape(terminal_text(where))}:[/dim] {escape(terminal_text(f.message))}", highlight=False, soft_wrap=True)
            shown += 1
        if count > shown:
            console.print(f"  [dim]… and {count - shown} more (--format json or csv lists all)[/dim]", highlight=False)
    console.print()
    disp = ", ".join(f"{k} {v}" for k, v in result.dispositions.items())
    console.print(f"dispositions: {disp}", highlight=False)
    totals = result.severity_counts()
    parts = [
        f"[{STYLE[k]}]{v} {k}{'s' if v != 1 else ''}[/{STYLE[k]}]" if v else f"0 {k}s" for k, v in totals.items()
    ]
    console.print(f"{result.respondents} respondents validated: " + ", ".join(parts), highlight=False)
    for note in result.notes:
        console.print(f"[dim]note: {escape(terminal_text(note))}[/dim]", highlight=False)
