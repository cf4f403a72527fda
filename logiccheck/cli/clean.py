"""`logiccheck clean SPEC --data EXPORT --out DIR [--policy FILE] [--map FILE] [--frame FILE] [--encoding E] [--delimiter D] [--sample FILE]`"""

from __future__ import annotations

import sys
from pathlib import Path

import click
from rich.markup import escape

from logiccheck.clean.io import ExportError
from logiccheck.clean.policy import BIAS_WARNING, CleanPolicy, PolicyError, load_policy
from logiccheck.clean.run import clean_export
from logiccheck.cli.common import EXIT_OK, color_option, export_options, fail, make_console
from logiccheck.cli.rates import read_outcomes
from logiccheck.cli.validate import run_options
from logiccheck.config import config_for
from logiccheck.loader import SpecReadError, load_file
from logiccheck.pipeline import INPUT_ERRORS
from logiccheck.quality.rates import RatesError


@click.command("clean")
@click.argument("spec", type=click.Path(dir_okay=False))
@export_options()
@click.option("--out", "out", required=True, type=click.Path(file_okay=False), help="Folder for the cleaned export, audit.csv, findings.csv and summary.json.")
@click.option("--policy", "policy_file", type=click.Path(dir_okay=False), help="TOML with [clean] and [quality] tables [default: those of the logiccheck.toml found above the spec].")
@click.option("--sample", "sample_file", type=click.Path(dir_okay=False), help="Final outcome of every sampled case, for the outcome rates.")
@click.option("--margins", "margins_file", type=click.Path(dir_okay=False), help="Population margins (TOML): rake a `weight` column to them.")
@color_option
def clean_command(spec: str, data: str, map_file: str | None, frame: str | None, encoding: str | None,
                  delimiter: str | None, chunk_rows: int | None, out: str, policy_file: str | None,
                  sample_file: str | None, margins_file: str | None, color: str) -> None:
    """Apply a cleaning policy to an export; write the cleaned file and an audit trail."""
    try:
        loaded = load_file(spec)
    except SpecReadError as err:
        fail(str(err))
    if loaded.syntax:
        d = loaded.syntax[0]
        fail(f"{d.file}:{d.line}:{d.column}: {d.message}; run `logiccheck lint {spec}` and fix the spec first")
    try:
        config = config_for(spec)  # found once: [data], [quality], [clean] and [checks] all come from it
        if policy_file:
            policy, quality = load_policy(policy_file)
        else:
            model = config.models.get("clean")
            policy, quality = (model if isinstance(model, CleanPolicy) else CleanPolicy()), None
        outcomes = read_outcomes(Path(sample_file)) if sample_file else None
        options = run_options(map_file, frame, encoding, delimiter, chunk_rows, config=config, quality=quality,
                              margins=margins_file)
        run = clean_export(loaded, Path(data), Path(out), policy, sample_outcomes=outcomes, options=options)
    except (PolicyError, ExportError, RatesError) as err:
        fail(str(err))
    except INPUT_ERRORS as err:
        fail(str(err))
    console = make_console(color)
    s = run.summary
    shown = "standard input" if data == "-" else data
    console.print(f"[bold]logiccheck clean[/bold] {shown}: {s['input']['respondents']} respondents in, "
                  f"{s['output']['respondents']} out; {s['output']['cells_blanked']} cells blanked")
    for check, count in s["blanked"].items():
        console.print(f"  blanked  {check:<20} {count}")
    for check, count in s["findings"].items():
        action = "removed" if check in s["removed"] else "flagged"
        console.print(f"  {action:<8} {check:<20} {s['removed'].get(check, count)}")
    if "disposition" in s["removed"]:
        console.print(f"  removed  {'disposition':<20} {s['removed']['disposition']}")
    console.print("  dispositions: " + ", ".join(f"{k} {v}" for k, v in s["dispositions"].items()))
    rr = s["rates"]
    if rr.get("RR1") is not None:
        console.print(f"  outcome rates ({rr['basis']}): RR1 {rr['RR1']:.3f}, COOP1 {rr['COOP1'] or 0:.3f}")
    if "weights" in s:
        from logiccheck.report.weights_text import print_weights

        print_weights(console, s["weights"])
    if s["repair_hints"]:
        console.print(f"  repair hints for {len(s['repair_hints'])} respondents failing checks (summary.json)")
    if s["output"]["removed"]:
        console.print(f"[bold yellow]note:[/bold yellow] {BIAS_WARNING}")
    else:
        console.print("  no respondent removed: every disqualification check only flags. " + BIAS_WARNING)
    for note in s["notes"][:-1]:
        console.print(f"  note: {escape(note)}")
    for p in run.outputs:
        console.print(f"  wrote {p}")
    sys.exit(EXIT_OK)
