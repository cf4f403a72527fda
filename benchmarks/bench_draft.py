"""Benchmark: `logiccheck draft` on a large export (default 100,000 respondents of the
invented allotment questionnaire in tests/draft, 17 items in 22 columns; target: under a
minute), timed as users run it, in a child process. Baseline measured in the same run:
`logiccheck validate` of the same export with the real spec.

    python benchmarks/bench_draft.py [--rows N] [--wide K]

`--wide K` repeats the questionnaire's columns K times side by side (a wider export:
conditions are searched over every earlier column).
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


def make_export(path: Path, rows: int, wide: int) -> None:
    import pandas as pd

    from tests.draft.scenario import export

    frame, _ = export(rows=rows, seed=5, planted=rows // 300)
    if wide > 1:
        extra = [frame.drop(columns=["id", "duration"]).add_suffix(f"_w{k}") for k in range(1, wide)]
        frame = pd.concat([frame, *extra], axis=1)
    frame.to_csv(path, index=False)


def timed(args: list[str]) -> tuple[float, str]:
    start = time.perf_counter()
    done = subprocess.run([sys.executable, "-m", "logiccheck", *args], capture_output=True, text=True, cwd=ROOT)
    took = time.perf_counter() - start
    if done.returncode not in (0, 1):
        raise SystemExit(f"logiccheck {' '.join(args)} failed: {done.stderr.strip()}")
    return took, done.stderr.strip()


def main() -> None:
    parser = argparse.ArgumentParser(description=__doc__.splitlines()[0])
    parser.add_argument("--rows", type=int, default=100_000)
    parser.add_argument("--wide", type=int, default=1)
    opts = parser.parse_args()
    with tempfile.TemporaryDirectory() as tmp:
        data = Path(tmp) / "export.csv"
        make_export(data, opts.rows, opts.wide)
        spec = ROOT / "tests" / "draft" / "allotments.qlc"
        base, _ = timed(["validate", str(spec), "--data", str(data), "--format", "json"]) if opts.wide == 1 else (float("nan"), "")
        took, note = timed(["draft", "--data", str(data), "--out", str(Path(tmp) / "draft.qlc")])
        lint, _ = timed(["lint", str(Path(tmp) / "draft.qlc")])
        mb = data.stat().st_size / 1e6
    print(f"export: {opts.rows:,} respondents, {mb:.1f} MB")
    print(f"draft:    {took:6.1f} s  ({note})")
    print(f"validate: {base:6.1f} s  (baseline, the real spec, same export)")
    print(f"ratio draft / validate: {took / base:.2f}x" if base == base else "ratio: n/a with --wide")
    print(f"lint of the draft: {lint:.1f} s")
    print("target: draft under 60 s at 100,000 respondents:", "met" if took < 60 or opts.rows != 100_000 else "NOT met")


if __name__ == "__main__":
    main()
