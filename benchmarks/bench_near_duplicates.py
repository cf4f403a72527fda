"""Maximum percent match for 50,000 respondents × 100 items (target: under 60 s).

Prints the vectorised time, peak block memory, and the time a naive pairwise loop takes
on a sample, extrapolated to all pairs, for the ratio. Run: python benchmarks/bench_near_duplicates.py [N] [M]
"""

from __future__ import annotations

import os
import sys
import time
from pathlib import Path

import numpy as np
import pandas as pd

sys.path.insert(0, str(Path(__file__).resolve().parents[1]))

from logiccheck.quality.duplicates import max_percent_match


def naive(values: np.ndarray, asked: np.ndarray, rows: int) -> None:
    n = values.shape[0]
    for a in range(rows):
        best = -1.0
        for b in range(n):
            if a == b:
                continue
            cols = asked[a] | asked[b]
            va, vb = values[a, cols], values[b, cols]
            same = (va == vb) | (np.isnan(va) & np.isnan(vb))
            best = max(best, same.mean())


def main() -> None:
    n = int(sys.argv[1]) if len(sys.argv) > 1 else 50_000
    m = int(sys.argv[2]) if len(sys.argv) > 2 else 100
    chunk = 2000
    rng = np.random.default_rng(0)
    values = rng.integers(1, 6, size=(n, m)).astype(float)  # five-point scales
    asked = rng.random((n, m)) < 0.8
    values[~asked] = np.nan
    frame = pd.DataFrame(values, columns=[f"q{i}" for i in range(m)])

    t0, c0 = time.perf_counter(), time.process_time()
    scores = max_percent_match(frame, asked, basis="asked", min_items=10, chunk_size=chunk)
    vec, vec_cpu = time.perf_counter() - t0, time.process_time() - c0
    t0, c0 = time.perf_counter(), time.process_time()
    max_percent_match(frame, basis="all", chunk_size=chunk)
    vec_all, all_cpu = time.perf_counter() - t0, time.process_time() - c0

    sample = 20
    t0 = time.perf_counter()
    naive(values, asked, sample)
    per_row = (time.perf_counter() - t0) / sample
    naive_total = per_row * n

    block_mb = 3 * chunk * chunk * 4 / 1e6  # three reused chunk × chunk float32 tiles
    print(f"respondents {n}, items {m}, chunk {chunk}")
    print(f"vectorised, asked basis: {vec:.1f} s wall, {vec_cpu:.1f} s CPU (target < 60 s wall); "
          f"all-items basis: {vec_all:.1f} s wall, {all_cpu:.1f} s CPU")
    print(f"load average now {os.getloadavg()[0]:.1f} on {os.cpu_count()} cores (wall time grows with other work)")
    print(f"tile buffers {block_mb:.0f} MB (3 × chunk² × float32) plus the one-hot matrices")
    print(f"naive pairwise loop: {per_row * 1000:.0f} ms per respondent on a {sample}-row sample, "
          f"extrapolated {naive_total / 3600:.1f} h; ratio naive / vectorised = {naive_total / vec:.0f}×")
    print(f"max percent match: median {np.nanmedian(scores.score):.3f}, max {np.nanmax(scores.score):.3f}")


if __name__ == "__main__":
    main()
