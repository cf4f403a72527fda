"""`logiccheck clean SPEC --data EXPORT --out DIR [--policy FILE] [--map FILE] [--frame FILE] [--sample FILE]`"""

from __future__ import annotations

import sys
from pathlib import Path

import click

from logiccheck.clean.io import ExportError
from logiccheck.clean.policy import BIAS_WARNING, PolicyError, configured_policy, load_policy
from logiccheck.clean.run import clean_export
from logiccheck.cli.common import EXIT_OK, color_option, fail, make_console
from logiccheck.cli.rates import read_outcomes
from logiccheck.data.mapping import MappingError, load_mapping
from logiccheck.loader import SpecReadError, load_file
from logiccheck.quality.completeness import RuleError
from logiccheck.quality.rates import RatesError
from logiccheck.quality.route import RouteError
from logiccheck.report.weights_text import print_weights
from logiccheck.weights.margins import MarginsError, load_margins


@click.command("clean")
@click.argument("spec", type=click.Path(dir_okay=False))
@click.option("--data", "data", required=True, type=click.Path(dir_okay=False), help="The export (.csv, .parquet, .xlsx).")
@click.option("--out", "out", required=True, type=click.Path(file_okay=False), help="Folder for the cleaned export, audit.csv and summary.json.")
@click.option("--policy", "policy_file", type=click.Path(dir_okay=False), help="TOML with [clean] and [quality] tables [default: those of the logiccheck.toml found above the spec].")
@click.option("--map", "map_file", type=click.Path(dir_okay=False), help="Data mapping (TOML; keys top-level or under [data]).")
@click.option("--frame", "frame_file", type=click.Path(dir_okay=False), help="Sample frame CSV (column id, optionally email).")
@click.option("--sample", "sample_file", type=click.Path(dir_okay=False), help="Final outcome of every sampled case, for the outcome rates.")
@click.option("--margins", "margins_file", type=click.Path(dir_okay=False), help="Population margins (TOML): rake a `weight` column to them.")
@color_option
def clean_command(spec: str, data: str, out: str, policy_file: str | None, map_file: str | None,
                  frame_file: str | None, sample_file: str | None, margins_file: str | None, color: str) -> None:
    """Apply a cleaning policy to an export; write the cleaned file and an audit trail."""
    try:
        loaded = load_file(spec)
    except SpecReadError as err:
        fail(str(err))
    if loaded.syntax:
        d = loaded.syntax[0]
        fail(f"{d.file}:{d.line}:{d.column}: {d.message}; run `logiccheck lint {spec}` and fix the spec first")
    try:
        policy, config = load_policy(policy_file) if policy_file else configured_policy(spec)
        outcomes = read_outcomes(Path(sample_file)) if sample_file else None
        mapping = load_mapping(map_file) if map_file else None
        margins = load_margins(margins_file, loaded.questionnaire) if margins_file else None
        run = clean_export(loaded.questionnaire, Path(data), Path(out), policy, config,
                           Path(frame_file) if frame_file else None, outcomes, mapping, margins)
    except (PolicyError, ExportError, RuleError, RatesError, RouteError, MappingError, MarginsError) as err:
        fail(str(err))
    console = make_console(color)
    s = run.summary
    console.print(f"[bold]logiccheck clean[/bold] {data}: {s['input']['respondents']} respondents in, "
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
        print_weights(console, s["weights"])
    if s["repair_hints"]:
        console.print(f"  repair hints for {len(s['repair_hints'])} respondents failing checks (summary.json)")
    if s["output"]["removed"]:
        console.print(f"[bold yellow]note:[/bold yellow] {BIAS_WARNING}")
    else:
        console.print("  no respondent removed: every disqualification check only flags. " + BIAS_WARNING)
    for note in s["notes"][:-1]:
        console.print(f"  note: {note}")
    for p in run.outputs:
        console.print(f"  wrote {p}")
    sys.exit(EXIT_OK)
