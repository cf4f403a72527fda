"""`logiccheck rates SAMPLE [--e E] [--format text|json]`"""

from __future__ import annotations

import json
from pathlib import Path

import click
import pandas as pd

from logiccheck.cli.common import color_option, fail, make_console
from logiccheck.quality.rates import OutcomeCounts, RatesError, outcome_rates


def read_outcomes(path: Path, column: str = "outcome") -> OutcomeCounts:
    """A CSV with one row per sampled case (column `outcome`), or with columns
    `outcome,count`."""
    try:
        frame = pd.read_csv(path, dtype=str, keep_default_na=False)
    except FileNotFoundError:
        raise RatesError(f"{path}: no such sample file") from None
    except (OSError, UnicodeDecodeError, pd.errors.ParserError, pd.errors.EmptyDataError) as err:
        raise RatesError(f"{path}: cannot read ({str(err).splitlines()[0]})") from None
    if column not in frame.columns:
        raise RatesError(f"{path}: no column {column!r}; give each case's final outcome in it")
    try:
        if "count" in frame.columns:
            counts: dict[str, int] = {}
            for i, (word, n) in enumerate(zip(frame[column], frame["count"], strict=True), start=2):
                if not n.strip().isdigit():
                    raise RatesError(f"{path}, line {i}: count {n!r} is not a whole number")
                counts[word] = counts.get(word, 0) + int(n)
            return OutcomeCounts.from_mapping(counts)
        return OutcomeCounts.from_outcomes(frame[column])
    except RatesError as err:
        raise RatesError(f"{path}: {err}") if not str(err).startswith(str(path)) else err from None


@click.command("rates")
@click.argument("sample", type=click.Path(dir_okay=False))
@click.option("--e", "e", type=float, default=None, help="Share of unknown-eligibility cases taken as eligible [default: estimated].")
@click.option("--column", default="outcome", show_default=True, help="Column holding each case's final outcome.")
@click.option("--format", "fmt", type=click.Choice(["text", "json"]), default="text", show_default=True)
@color_option
def rates_command(sample: str, e: float | None, column: str, fmt: str, color: str) -> None:
    """Response, cooperation, refusal and contact rates from final case outcomes."""
    try:
        counts = read_outcomes(Path(sample), column)
        rates = outcome_rates(counts, e)
    except RatesError as err:
        fail(str(err))
    if fmt == "json":
        click.echo(json.dumps({"counts": counts.as_dict(), "rates": rates}, indent=2))
        return
    console = make_console(color)
    console.print("cases: " + ", ".join(f"{k} {v}" for k, v in counts.as_dict().items()))
    console.print(f"e = {rates['e']:.4f}" + (" (given)" if e is not None else " (estimated: eligible / known eligibility)"))
    for group in (("RR1", "RR2", "RR3", "RR4", "RR5", "RR6"), ("COOP1", "COOP2", "COOP3", "COOP4"),
                  ("REF1", "REF2", "REF3"), ("CON1", "CON2", "CON3")):
        console.print("  ".join(f"{k} {'—' if rates[k] is None else f'{rates[k]:.4f}'}" for k in group))
