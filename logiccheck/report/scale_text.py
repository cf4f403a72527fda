"""Terminal table of a run's scales: alpha with its interval, then per item alpha if deleted
and the corrected item-total correlation as a bar (red left of the centre = negative)."""

from __future__ import annotations

from typing import Any

from rich.console import Console
from rich.markup import escape
from rich.table import Table
from rich.text import Text

from logiccheck.report.bars import signed_bar_text


def _num(x: float | None, digits: int = 2) -> str:
    return "–" if x is None else f"{x:.{digits}f}"


def scale_heading(s: dict[str, Any]) -> tuple[str, str]:
    """Two short lines per scale (plain text): alpha with its interval and the respondents
    it rests on; the composite's scored count, mean and sd."""
    ci = s.get("alpha_ci")
    interval = f" (95 % {_num(ci[0])} to {_num(ci[1])})" if ci else ""
    return (f"scale {s['scale']}: alpha {_num(s['alpha'])}{interval}, {s['n']} answered every item",
            f"  score_{s['scale']}: {s['scored']} scored, mean {_num(s['mean'])}, sd {_num(s['sd'])}")


def render_scales(console: Console, scales: list[dict[str, Any]], *, floor: float = 0.7, rise: float = 0.05) -> None:
    """One table per scale. An alpha under `floor` and an alpha-if-deleted `rise` above the
    scale's alpha are highlighted, as the checks judge them."""
    for s in scales:
        console.print()
        alpha = s["alpha"]
        style = "yellow" if alpha is not None and alpha < floor else "green"
        first, second = scale_heading(s)
        head = Text(first, style="bold")
        at = first.find(" alpha ") + 7
        head.stylize(style, at, at + len(_num(alpha)))
        console.print(head)
        console.print(second, style="dim", highlight=False)
        table = Table(show_edge=False, pad_edge=False, header_style="bold", padding=(0, 1, 0, 0))
        table.add_column("item", no_wrap=True)
        table.add_column("alpha if deleted", justify="right", no_wrap=True)
        table.add_column("item-total", justify="right", no_wrap=True)
        table.add_column("", no_wrap=True)
        reversed_ = set(s.get("reversed", []))
        for item in s["items"]:
            without = s["alpha_if_deleted"].get(item)
            r = s["item_total"].get(item)
            w = _num(without)
            if without is not None and alpha is not None and without - alpha >= rise:
                w = f"[yellow]{w} ▲[/yellow]"
            rt = _num(r)
            if r is not None and r < 0:
                rt = f"[red]{rt}[/red]"
            name = escape(item) + (" [dim](reversed)[/dim]" if item in reversed_ else "")
            table.add_row(name, w, rt, signed_bar_text(r))
        console.print(table)
