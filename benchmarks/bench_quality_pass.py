"""Benchmark: the `validate` command's path (data validation plus the quality checks)
against plain validation of the same export, measured in the same run.

Uses the export and spec of `bench_validate.py` (cached in the same folder). Prints, per
mode, seconds and peak memory (each mode in a child process, the fastest of K runs), and the ratio of the
command path to plain validation (`keep_cells=False`), which is the baseline.

    python benchmarks/bench_quality_pass.py [--rows N] [--repeat K] [--cache DIR]
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

ROOT = Path(__file__).resolve().parent.parent
sys.path.insert(0, str(ROOT))

from benchmarks.bench_validate import prepare  # noqa: E402


def child(mode: str, path: str, spec: str) -> None:
    """One measurement in this process; prints a JSON line."""
    from logiccheck.data.validate import validate
    from logiccheck.loader import load_text

    loaded = load_text(Path(spec).read_text(), spec)
    q = loaded.questionnaire
    t0 = time.perf_counter()
    if mode == "plain":
        result = validate(q, path, keep_cells=False)
    elif mode == "cells":
        result = validate(q, path, keep_cells=True)
    else:  # the command's path: the pipeline (validation, dispositions, quality checks)
        from logiccheck.pipeline import RunOptions, run_pipeline

        result = run_pipeline(loaded, path, RunOptions(chunk_rows=50_000))
    out = {"seconds": time.perf_counter() - t0, "findings": result.finding_count,
           "peak_mb": resource.getrusage(resource.RUSAGE_SELF).ru_maxrss / 1024}
    print(json.dumps(out))


def measure(mode: str, path: Path, spec: Path, repeat: int) -> dict[str, float]:
    """The fastest of `repeat` child runs (small exports are noisy)."""
    runs = []
    for _ in range(repeat):
        res = subprocess.run([sys.executable, __file__, "--child", mode, str(path), str(spec)],
                             capture_output=True, text=True, check=True, cwd=ROOT)
        runs.append(json.loads(res.stdout.strip().splitlines()[-1]))
    return min(runs, key=lambda r: r["seconds"])


def main() -> None:
    if sys.argv[1:2] == ["--child"]:  # one measurement, started by `measure`
        child(*sys.argv[2:5])
        return
    parser = argparse.ArgumentParser()
    parser.add_argument("--cache", default=os.path.join(tempfile.gettempdir(), "logiccheck-bench"))
    parser.add_argument("--rows", type=int, default=3_000)
    parser.add_argument("--repeat", type=int, default=3)
    args = parser.parse_args()
    spec, path = prepare(Path(args.cache), args.rows)
    got = {mode: measure(mode, path, spec, args.repeat) for mode in ("plain", "cells", "command")}
    for mode, m in got.items():
        print(f"{mode:<8} {m['seconds']:7.2f} s   peak {m['peak_mb']:7.0f} MB   findings {m['findings']:,}")
    base = got["plain"]["seconds"]
    print(f"ratio cells / plain: {got['cells']['seconds'] / base:.2f}×   command / plain: {got['command']['seconds'] / base:.2f}×")


if __name__ == "__main__":
    main()
