"""The near-duplicate and duplicate-response checks on large exports, each run in a
child process as the pipeline runs them (a `DataContext` in, findings out).

Generated answers: five-point and eleven-point items in sections of ten; each section
after the first is asked of about 70 % of respondents (routing blanks, all or nothing);
`--blanks` adds scattered item non-response. Planted: near-copies (5 % of answers
changed) and exact copies. Printed per size: wall and CPU time of the checks, peak
memory, whether every planted pair was found, and, on a sample of rows, the maximum
percent match by direct comparison against every respondent (the naive check): no row
above the threshold may be missed, none below flagged. The naive all-pairs time is
extrapolated from that sample, for the ratio.

Run: python benchmarks/bench_near_duplicates.py [--sizes 50000x150,300000x200] [--blanks 0.0]
"""

from __future__ import annotations

import argparse
import json
import resource
import subprocess
import sys
import time
from pathlib import Path

import numpy as np

ROOT = Path(__file__).resolve().parents[1]
sys.path.insert(0, str(ROOT))

THRESHOLD = 0.85
MIN_ITEMS = 10


def generate(n: int, m: int, blanks: float, seed: int = 7) -> tuple[np.ndarray, np.ndarray, list[tuple[int, int]], list[tuple[int, int]]]:
    """Answers (n × m, float, NaN blank), due (n × m), planted near pairs and exact pairs."""
    rng = np.random.default_rng(seed)
    levels = np.where(np.arange(m) % 4 == 3, 11, 5)
    values = (rng.integers(0, 1 << 30, size=(n, m)) % levels[None, :] + 1).astype(np.float32)
    sections = np.arange(m) // 10
    asked_section = rng.random((n, sections.max() + 1)) < 0.7
    asked_section[:, 0] = True
    due = asked_section[:, sections]
    values[~due] = np.nan
    if blanks:
        values[rng.random((n, m)) < blanks] = np.nan
    pairs = n // 1000
    src = rng.choice(n, size=2 * pairs, replace=False)
    near = [(int(a), int(b)) for a, b in zip(src[:pairs], src[pairs:], strict=True)]
    for a, b in near:
        values[b] = values[a]
        due[b] = due[a]
        change = np.flatnonzero(~np.isnan(values[b]))
        change = rng.choice(change, size=max(1, len(change) // 20), replace=False)
        values[b, change] = values[b, change] % levels[change] + 1
    left = np.setdiff1d(np.arange(n), src)
    copies = rng.choice(left, size=2 * (pairs // 4), replace=False)
    exact = [(int(a), int(b)) for a, b in zip(copies[::2], copies[1::2], strict=True)]
    for a, b in exact:
        values[b] = values[a]
        due[b] = due[a]
    return values, due, near, exact


def spec_text(m: int) -> str:
    lines = ['survey bench "Generated ratings"', "codes five", *[f'  c{k} = {k} "{k}"' for k in range(1, 6)]]
    lines += [f'q{j}: number 1..11 "Rate thing {j}"' if j % 4 == 3 else f'q{j}: single five "Rate thing {j}"'
              for j in range(m)]
    return "\n".join(lines) + "\n"


def child(n: int, m: int, blanks: float, sample: int) -> None:
    from logiccheck.checks.data_context import DataContext
    from logiccheck.checks.data_runner import run_data_checks
    from logiccheck.loader import load_text
    from logiccheck.quality.answers import answer_codes
    from logiccheck.quality.config import QualityConfig
    from logiccheck.quality.nearmatch import max_match_of

    values, due, near, exact = generate(n, m, blanks)
    q = load_text(spec_text(m), "bench.qlc").questionnaire
    items = [f"q{j}" for j in range(m)]
    valid = ~np.isnan(values)
    ctx = DataContext(
        q=q, ids=np.array([f"r{i}" for i in range(n)], dtype=object), items=items, due=due, has_value=valid,
        valid=valid, nonresponse=np.zeros_like(valid), stop=np.full(n, "", dtype=object),
        disposition=np.full(n, "complete", dtype=object), value_of=lambda name: values[:, int(name[1:])],
        text_of=lambda column: None, config=QualityConfig(),
    )
    before = resource.getrusage(resource.RUSAGE_SELF).ru_maxrss / 1024
    others = ["duplicate-id", "straightline", "pattern-response", "speeder", "not-in-frame"]
    t0, c0 = time.perf_counter(), time.process_time()
    blocks = run_data_checks(ctx, stages=("quality",), disable=others)
    wall, cpu = time.perf_counter() - t0, time.process_time() - c0
    peak = resource.getrusage(resource.RUSAGE_SELF).ru_maxrss / 1024
    errors = [b.message for b in blocks if b.check == "internal-error"]
    near_rows = {int(r) for b in blocks if b.check == "near-duplicate" for r in b.rows}
    exact_rows = {int(r) for b in blocks if b.check == "duplicate-response" for r in b.rows}
    scores = {int(r): float(v) for b in blocks if b.check == "near-duplicate" for r, v in zip(b.rows, b.values or [], strict=True)}
    found_near = sum(a in near_rows and b in near_rows for a, b in near)
    found_exact = sum(a in exact_rows and b in exact_rows for a, b in exact)
    # Naive check on a sample: every sampled row against every respondent.
    rng = np.random.default_rng(1)
    rows = np.unique(np.concatenate([rng.choice(n, size=sample, replace=False), [a for a, _ in near[: sample // 4]]]))
    codes = answer_codes(ctx).codes
    t1 = time.perf_counter()
    direct = max_match_of(codes, rows, MIN_ITEMS)
    per_row = (time.perf_counter() - t1) / rows.size
    missed = [int(r) for r, s in zip(rows, direct, strict=True) if s > THRESHOLD and r not in near_rows and r not in exact_rows]
    wrong = [int(r) for r, s in zip(rows, direct, strict=True) if r in scores and abs(scores[r] - s) > 1e-4]
    print(json.dumps({
        "n": n, "m": m, "blanks": blanks, "wall": wall, "cpu": cpu, "peak_mb": peak, "before_mb": before,
        "near_planted": len(near), "near_found": found_near, "exact_planted": len(exact), "exact_found": found_exact,
        "flagged_near": len(near_rows), "flagged_exact": len(exact_rows), "sample": int(rows.size),
        "sample_above": int((direct > THRESHOLD).sum()), "missed": missed, "wrong_score": wrong,
        "naive_all_pairs_s": per_row * n / 2, "errors": errors,
    }))


def main() -> None:
    parser = argparse.ArgumentParser()
    parser.add_argument("--sizes", default="50000x150,300000x200")
    parser.add_argument("--blanks", type=float, default=0.0)
    parser.add_argument("--sample", type=int, default=60)
    parser.add_argument("--child", default=None)
    args = parser.parse_args()
    if args.child:
        n, m = map(int, args.child.split("x"))
        child(n, m, args.blanks, args.sample)
        return
    print(f"threshold {THRESHOLD}, at least {MIN_ITEMS} items both answered, scattered blanks {args.blanks:.1%}")
    print("| respondents × items | checks wall s | CPU s | peak MB (before checks) | planted near found | planted exact found "
          "| sample rows (above 85 %) | missed | naive all-pairs s (extrapolated) | ratio |")
    print("|---|---|---|---|---|---|---|---|---|---|")
    for size in args.sizes.split(","):
        out = subprocess.run([sys.executable, __file__, "--child", size, "--blanks", str(args.blanks),
                              "--sample", str(args.sample)], capture_output=True, text=True, cwd=ROOT)
        if out.returncode:
            print(out.stderr[-2000:])
            continue
        r = json.loads(out.stdout.strip().splitlines()[-1])
        print(f"| {r['n']:,} × {r['m']} | {r['wall']:.1f} | {r['cpu']:.1f} | {r['peak_mb']:.0f} ({r['before_mb']:.0f}) | "
              f"{r['near_found']}/{r['near_planted']} | {r['exact_found']}/{r['exact_planted']} | "
              f"{r['sample']} ({r['sample_above']}) | {len(r['missed']) + len(r['wrong_score'])} | "
              f"{r['naive_all_pairs_s']:.0f} | {r['naive_all_pairs_s'] / r['wall']:.0f}× |")
        if r["errors"]:
            print("internal errors:", r["errors"])


if __name__ == "__main__":
    main()
