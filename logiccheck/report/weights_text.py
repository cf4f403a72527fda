"""Terminal tables for margins: the sample against the population per category, the fit
per variable, response rates, and the weighting diagnostics."""

from __future__ import annotations

from typing import Any

from rich.console import Console
from rich.markup import escape
from rich.table import Table


def percent(x: float | None) -> str:
    return "–" if x is None else f"{100 * x:.1f}%"


def _signed(x: float | None) -> str:
    return "–" if x is None else f"{100 * x:+.1f}"


def print_margins(console: Console, sections: dict[str, Any]) -> None:
    """validate --margins: one table, a row per category; the fit under each variable."""
    fit = sections.get("fit", {})
    rates = {(r["variable"], r["category"]): r for r in sections.get("response_rates", [])}
    table = Table(title="sample against population (kept respondents)", title_justify="left", header_style="bold",
                  show_edge=False, pad_edge=False)
    for col, justify in (("variable", "left"), ("category", "left"), ("n", "right"), ("sample", "right"),
                         ("population", "right"), ("diff (pts)", "right")):
        table.add_column(col, justify=justify, no_wrap=True)  # type: ignore[arg-type]
    if rates:
        table.add_column("response rate", justify="right", no_wrap=True)
    last = None
    for r in sections.get("representativeness", []):
        diff = r["difference"]
        style = "red" if diff is not None and abs(diff) >= 0.05 else ""
        cells = [escape(r["variable"]) if r["variable"] != last else "", escape(r["category"]), str(r["sample_count"]),
                 percent(r["sample_share"]), percent(r["population_share"]),
                 f"[{style}]{_signed(diff)}[/{style}]" if style else _signed(diff)]
        if rates:
            rr = rates.get((r["variable"], r["category"]))
            cells.append("–" if rr is None else f"{percent(rr['response_rate'])} of {rr['frame']}")
        table.add_row(*cells)
        last = r["variable"]
    console.print()
    console.print(table)
    for var, f in fit.items():
        if f["chi2"] is None:
            console.print(f"  {escape(var)}: no kept respondent with a value", highlight=False)
        else:
            console.print(f"  {escape(var)}: chi-square {f['chi2']:.2f}, df {f['df']}, p {f['p']:.3g} (n {f['n']})",
                          highlight=False)


def print_weights(console: Console, w: dict[str, Any]) -> None:
    """clean --margins: the weighting diagnostics in one line (the caution is among the notes)."""
    if w.get("deff") is None:
        console.print(f"  weights: none ({escape(w.get('note', 'no respondent to weight'))})", highlight=False)
    else:
        state = "converged" if w["converged"] else "[bold red]not converged[/bold red]"
        console.print(f"  weights ({w['method']}): {w['n']} respondents, {w['iterations']} sweeps, {state}; "
                      f"min {w['min']:.3f}, max {w['max']:.3f}, deff {w['deff']:.3f}, effective n {w['effective_n']:.1f}",
                      highlight=False)
