"""Benchmark: `validate --margins` and `clean --margins` against the same commands
without margins, on the invented library-survey export of the weights tests, measured in
the same run. Each command runs as users run it (a child process); the fastest of K runs.
Also times the raking alone against a plain-Python loop on a sample of the rows.

    python benchmarks/bench_weights.py [--rows N] [--repeat K]
"""

from __future__ import annotations

import argparse
import subprocess
import sys
import tempfile
import time
from pathlib import Path

ROOT = Path(__file__).resolve().parent.parent
sys.path.insert(0, str(ROOT))

from tests.weights.oracles import plain_rake  # noqa: E402
from tests.weights.scenario import make  # noqa: E402


def timed(args: list[str], repeat: int) -> float:
    best = float("inf")
    for _ in range(repeat):
        t0 = time.perf_counter()
        subprocess.run([sys.executable, "-m", "logiccheck", *args], cwd=ROOT, capture_output=True, check=False)
        best = min(best, time.perf_counter() - t0)
    return best


def main() -> None:
    ap = argparse.ArgumentParser()
    ap.add_argument("--rows", type=int, default=20_000)
    ap.add_argument("--repeat", type=int, default=2)
    a = ap.parse_args()
    import numpy as np

    from logiccheck.weights.rake import rake

    with tempfile.TemporaryDirectory() as tmp:
        folder = Path(tmp)
        spec, export, margins, truth = make(folder, n=a.rows)
        base = ["validate", str(spec), "--data", str(export), "--format", "json"]
        v0 = timed(base, a.repeat)
        v1 = timed([*base, "--margins", str(margins)], a.repeat)
        clean = ["clean", str(spec), "--data", str(export), "--out", str(folder / "out")]
        c0 = timed(clean, a.repeat)
        c1 = timed([*clean, "--margins", str(margins)], a.repeat)
        print(f"{a.rows:,} respondents, 3 margin variables (fastest of {a.repeat})")
        print(f"  validate            {v0:7.2f} s   with --margins {v1:7.2f} s   ratio {v1 / v0:.2f}")
        print(f"  clean               {c0:7.2f} s   with --margins {c1:7.2f} s   ratio {c1 / c0:.2f}")
        sub = truth.dropna(subset=["area", "age_group", "member"])
        cells = [(sub[v].astype(int) - 1).to_numpy() for v in ("area", "age_group", "member")]
        shares = [np.array([0.3, 0.45, 0.25]), np.array([2100, 3900, 2000]) / 8000, np.array([0.35, 0.65])]
        t0 = time.perf_counter()
        r = rake(cells, shares)
        ours = time.perf_counter() - t0
        k = min(len(sub), 5_000)
        t0 = time.perf_counter()
        plain_rake([c[:k].tolist() for c in cells], [s.tolist() for s in shares])
        loop = (time.perf_counter() - t0) * len(sub) / k
        print(f"  raking alone        {ours:7.3f} s ({r.iterations} sweeps)   plain loop (scaled from {k:,} rows) "
              f"{loop:7.2f} s   ratio {loop / ours:.0f}×")


if __name__ == "__main__":
    main()
