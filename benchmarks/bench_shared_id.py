"""Benchmark: memory of `validate` on an export whose rows all share one respondent id.

Every duplicate finding used to list every other row, so 21,000 rows sharing one id grew
to gigabytes. This script writes a simulated export of the demo spec with N rows
(default 21,000), once with distinct ids (the baseline) and once with every id the same,
runs `logiccheck validate --format json` on each in a child process (as users run it),
and prints each run's peak memory, wall time and JSON size, and the ratio to the
baseline. Target: under 1.5 GB for the shared-id run.

    python benchmarks/bench_shared_id.py [--rows N]
"""

from __future__ import annotations

import argparse
import csv
import os
import subprocess
import sys
import tempfile
import time
from pathlib import Path

ROOT = Path(__file__).resolve().parent.parent
SPEC = ROOT / "specs" / "bikeshare.qlc"
TARGET_GB = 1.5


def run(args: list[str], out: Path) -> tuple[float, float, int]:
    """(peak RSS in MB, seconds, bytes written) of one command in a fresh child process."""
    env = {**os.environ, "PYTHONPATH": str(ROOT)}
    code = (
        "import resource, subprocess, sys\n"
        "with open(sys.argv[1], 'wb') as fh:\n"
        "    p = subprocess.run(sys.argv[2:], stdout=fh)\n"
        "print(resource.getrusage(resource.RUSAGE_CHILDREN).ru_maxrss)\n"
    )
    start = time.perf_counter()
    done = subprocess.run([sys.executable, "-c", code, str(out), *args], env=env, capture_output=True, text=True, check=True)
    seconds = time.perf_counter() - start
    return int(done.stdout.strip()) / 1024, seconds, out.stat().st_size


def main() -> None:
    parser = argparse.ArgumentParser(description=__doc__.splitlines()[0])
    parser.add_argument("--rows", type=int, default=21_000)
    rows = parser.parse_args().rows
    cli = [sys.executable, "-m", "logiccheck.cli.main"]
    with tempfile.TemporaryDirectory() as tmp:
        folder = Path(tmp)
        distinct = folder / "distinct.csv"
        subprocess.run([*cli, "simulate", str(SPEC), "-n", str(rows), "--seed", "3", "--out", str(distinct)],
                       env={**os.environ, "PYTHONPATH": str(ROOT)}, check=True, capture_output=True)
        shared = folder / "shared.csv"
        with open(distinct, newline="", encoding="utf-8") as src, open(shared, "w", newline="", encoding="utf-8") as dst:
            reader, writer = csv.reader(src), csv.writer(dst, lineterminator="\n")
            header = next(reader)
            at = header.index("id")
            writer.writerow(header)
            for row in reader:
                row[at] = "1"
                writer.writerow(row)
        results = {}
        for name, export in (("distinct ids (baseline)", distinct), ("one shared id", shared)):
            results[name] = run([*cli, "validate", str(SPEC), "--data", str(export), "--format", "json"], folder / f"{export.stem}.json")
        base = results["distinct ids (baseline)"]
        print(f"{rows:,} rows, validate --format json, each in a child process")
        for name, (mb, seconds, size) in results.items():
            print(f"  {name:<24} peak {mb:8.0f} MB  ({mb / base[0]:.2f}x)  {seconds:6.1f} s  JSON {size / 1e6:8.1f} MB")
        peak = results["one shared id"][0] / 1024
        print(f"shared-id peak {peak:.2f} GB: {'within' if peak < TARGET_GB else 'ABOVE'} the {TARGET_GB} GB target")


if __name__ == "__main__":
    main()
