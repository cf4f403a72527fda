"""`logiccheck simulate SPEC -n N --seed S [--faults RATE] [--out FILE]`"""

from __future__ import annotations

import io
import sys
from pathlib import Path

import click
import pyarrow.csv as pacsv

from logiccheck.atomic import atomic_write
from logiccheck.cli.common import fail
from logiccheck.cli.validate import load_spec, spec_note
from logiccheck.data.simulate import simulate, write_csv, write_faults


def faults_path(out: Path) -> Path:
    """The planted faults' file: the export's name with its extension replaced by
    `.faults.csv` (`sim.csv` and `sim.parquet` both give `sim.faults.csv`)."""
    return out.with_suffix(".faults.csv")


@click.command("simulate")
@click.argument("spec", type=click.Path(dir_okay=False))
@click.option("-n", "rows", type=click.IntRange(0), default=100, show_default=True, help="Respondents to generate.")
@click.option("--seed", type=int, default=0, show_default=True, help="Random seed: the same seed gives the same export.")
@click.option("--faults", type=click.FloatRange(0, 1), default=0.0, show_default=True, help="Share of respondents given one planted fault.")
@click.option("--out", "out", type=click.Path(dir_okay=False), help="Write the export here (.csv or .parquet) and the planted faults beside it, the extension replaced by .faults.csv (sim.csv -> sim.faults.csv); default: CSV to standard output.")
def simulate_command(spec: str, rows: int, seed: int, faults: float, out: str | None) -> None:
    """Write a synthetic export that follows the routing, optionally with planted faults.

    Answers keep to every `check` rule (respondents who break one are redrawn), and open
    answers are taken from the spec's own answer texts. With --faults, a share of
    respondents get one planted fault each (an answer off the route or an invalid value),
    listed in the faults file."""
    loaded = load_spec(spec)
    note = spec_note(loaded)
    if note:
        click.echo(f"logiccheck: note: {note}", err=True)
    sim = simulate(loaded.questionnaire, rows, seed=seed, faults=faults)
    for line in sim.notes:
        click.echo(f"logiccheck: note: {line}", err=True)
    if out is None:
        buf = io.BytesIO()
        pacsv.write_csv(sim.table, buf, write_options=pacsv.WriteOptions(quoting_style="needed"))
        sys.stdout.buffer.write(buf.getvalue())
        if sim.faults:
            click.echo(f"logiccheck: note: {len(sim.faults)} faults planted; give --out FILE.csv to get them listed in FILE.faults.csv", err=True)
        return
    path = Path(out)
    if not path.parent.exists():
        fail(f"{out}: folder {path.parent} does not exist")
    if path.suffix.lower() in (".parquet", ".pq"):
        import pyarrow.parquet as pq

        atomic_write(path, lambda tmp: pq.write_table(sim.table, tmp))
    else:
        write_csv(sim.table, path)
    side = faults_path(path)
    write_faults(sim.faults, side)
    click.echo(f"wrote {path} ({rows} respondents) and {side} ({len(sim.faults)} faults)", err=True)
