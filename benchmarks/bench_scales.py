"""What scales cost: `logiccheck validate SPEC --data EXPORT --format json` in a child process
on a spec with S scales of K items each, against the same spec without its `scale`
statements, on the same export, measured in the same run (wall time and peak memory of
each child).

    python benchmarks/bench_scales.py [--rows 20000] [--scales 6] [--items 6] [--repeat 2]

Runs alternate (without, with, without, with, ...) and the fastest of each is reported, so
load from other processes on the machine hits both alike.

The export is invented: one attitude per scale, five-point answers, 3 % blanks and 2 %
non-response codes; every other item is reversed in the data and marked so in the spec.
"""

from __future__ import annotations

import argparse
import json
import os
import resource
import subprocess
import sys
import tempfile
import time
from pathlib import Path

import numpy as np
import pandas as pd

ROOT = Path(__file__).resolve().parent.parent


def make_spec(scales: int, items: int, with_scales: bool) -> str:
    lines = ['survey bench "Benchmark: scales"', "", "codes agree5"]
    lines += [f'  c{v} = {v} "Option {v}"' for v in range(1, 6)]
    lines += ["", "nonresponse", '  dk = 98 "Don\'t know"', ""]
    for s in range(scales):
        for i in range(items):
            lines.append(f's{s}_i{i}: single agree5 "Scale {s}, item {i}"')
    if with_scales:
        for s in range(scales):
            lines.append(f'scale s{s} "Scale {s}"')
            lines += [f"  s{s}_i{i}" + (" reversed" if i % 2 else "") for i in range(items)]
    return "\n".join(lines) + "\n"


def make_export(rows: int, scales: int, items: int, seed: int = 7) -> pd.DataFrame:
    rng = np.random.default_rng(seed)
    cols: dict[str, object] = {"id": np.arange(1, rows + 1)}
    for s in range(scales):
        attitude = rng.normal(size=rows)
        for i in range(items):
            x = np.clip(np.round(3 + attitude + 0.8 * rng.normal(size=rows)), 1, 5)
            if i % 2:
                x = 6 - x
            cell = x.astype(int).astype(str).astype(object)
            roll = rng.random(rows)
            cell[roll < 0.03] = ""
            cell[(roll >= 0.03) & (roll < 0.05)] = "98"
            cols[f"s{s}_i{i}"] = cell
    return pd.DataFrame(cols)


def run_child(spec: Path, export: Path) -> tuple[float, float, dict]:
    """Wall seconds, CPU seconds of the child, and its JSON."""
    env = dict(os.environ, PYTHONPATH=str(ROOT))
    before = resource.getrusage(resource.RUSAGE_CHILDREN)
    start = time.perf_counter()
    done = subprocess.run([sys.executable, "-m", "logiccheck", "validate", str(spec), "--data", str(export),
                           "--format", "json"], capture_output=True, text=True, env=env)
    wall = time.perf_counter() - start
    after = resource.getrusage(resource.RUSAGE_CHILDREN)
    if done.returncode not in (0, 1):
        raise SystemExit(done.stderr)
    cpu = (after.ru_utime + after.ru_stime) - (before.ru_utime + before.ru_stime)
    return wall, cpu, json.loads(done.stdout)


def main() -> None:
    parser = argparse.ArgumentParser(description=__doc__.splitlines()[0])
    parser.add_argument("--rows", type=int, default=20_000)
    parser.add_argument("--repeat", type=int, default=2)
    parser.add_argument("--scales", type=int, default=6)
    parser.add_argument("--items", type=int, default=6)
    args = parser.parse_args()
    with tempfile.TemporaryDirectory() as tmp:
        folder = Path(tmp)
        export = folder / "export.csv"
        make_export(args.rows, args.scales, args.items).to_csv(export, index=False)
        plain, scaled = folder / "plain.qlc", folder / "scaled.qlc"
        plain.write_text(make_spec(args.scales, args.items, False))
        scaled.write_text(make_spec(args.scales, args.items, True))
        base: list[tuple[float, float]] = []
        scaled_runs: list[tuple[float, float]] = []
        out: dict = {}
        for _ in range(args.repeat):
            wall, cpu, _ = run_child(plain, export)
            base.append((wall, cpu))
            wall, cpu, out = run_child(scaled, export)
            scaled_runs.append((wall, cpu))
        (base_wall, base_cpu), (wall, cpu) = min(base), min(scaled_runs)
        print(f"{args.rows:,} respondents × {args.scales * args.items} items ({args.scales} scales of {args.items}), "
              f"fastest of {args.repeat}")
        print(f"  without scales: {base_wall:6.2f} s wall, {base_cpu:6.2f} s CPU")
        print(f"  with scales:    {wall:6.2f} s wall, {cpu:6.2f} s CPU")
        print(f"  ratio: {wall / base_wall:.2f}× wall, {cpu / base_cpu:.2f}× CPU of validation without scales")
        alphas = ", ".join(f"{s['scale']} {s['alpha']:.3f}" for s in out.get("scales", []))
        print(f"  alphas: {alphas}")


if __name__ == "__main__":
    main()
