"""Routing analysis speed: time and solver calls for generated specs of growing size.

    python benchmarks/bench_routing.py [SIZES...] [--naive-max N]

(the naive baseline runs for sizes up to N, default 2000; it takes minutes there)

Each spec has modules of gates nested 6 deep with follow-ups, grids, derived values,
skips, stops and a few planted unreachable items. The baseline, measured in the same
run, is the naive plan for reachability alone: one solver call per statement on one
solver holding everything; beside it, our batched plan for the same questions.
"""

from __future__ import annotations

import sys
import time
from pathlib import Path

sys.path.insert(0, str(Path(__file__).resolve().parents[1]))

import z3

from benchmarks.generate import routing_spec
from logiccheck.checks.context import LintContext
from logiccheck.checks.registry import all_checks
from logiccheck.checks.runner import run_checks
from logiccheck.loader import load_text
from logiccheck.logic.routing import RoutingAnalysis

REACH = ("asked", "reached", "block")


def naive_reach(analysis: RoutingAnalysis) -> tuple[float, int]:
    """The baseline: one call per reachability question on one solver for everything."""
    s = z3.Solver()
    s.add(*analysis.enc.facts())
    calls = 0
    start = time.perf_counter()
    for key, formula in analysis.questions.items():
        if key[0] in REACH:
            calls += 1
            s.check(formula)
    return time.perf_counter() - start, calls


def batched_reach(analysis: RoutingAnalysis) -> tuple[float, int]:
    """Ours, reachability only: independent parts, batched questions, models reused."""
    before = analysis.stats.calls
    start = time.perf_counter()
    analysis._solve(only=REACH)
    return time.perf_counter() - start, analysis.stats.calls - before


def main(sizes: list[int], naive_max: int = 2000) -> None:
    print(f"{'items':>6} {'load s':>7} {'static s':>8} {'routing s':>9} {'calls':>6} {'parts':>6} "
          f"{'reach s':>8} {'calls':>6} {'naive reach s':>13} {'calls':>6} {'speed-up':>8}")
    for size in sizes:
        text = routing_spec(size)
        t0 = time.perf_counter()
        loaded = load_text(text, f"gen{size}.qlc")
        t1 = time.perf_counter()
        static = run_checks(loaded, solver=False)
        t2 = time.perf_counter()
        ctx = LintContext(loaded.questionnaire, loaded.syntax)
        found = []
        for info in all_checks().values():
            if info.stage == "routing" and info.run is not None:
                found.extend(info.run(ctx))
        t3 = time.perf_counter()
        analysis = ctx.shared["routing"]
        reach_t, reach_calls = batched_reach(analysis)
        naive_t, naive_calls = naive_reach(analysis) if size <= naive_max else (float("nan"), 0)
        speedup = naive_t / reach_t if naive_calls else float("nan")
        print(f"{len(loaded.questionnaire.items()):>6} {t1 - t0:>7.2f} {t2 - t1:>8.2f} {t3 - t2:>9.2f} "
              f"{analysis.stats.calls:>6} {analysis.parts:>6} {reach_t:>8.2f} {reach_calls:>6} {naive_t:>13.2f} "
              f"{naive_calls:>6} {speedup:>8.1f}")
        counts: dict[str, int] = {}
        for d in [*static, *found]:
            counts[d.check] = counts.get(d.check, 0) + 1
        print("        findings:", ", ".join(f"{k} {v}" for k, v in sorted(counts.items())))
    print(f"z3 {z3.get_version_string()}; routing s = every routing check, solver calls included")


if __name__ == "__main__":
    args = sys.argv[1:]
    cap = 2000
    if "--naive-max" in args:
        at = args.index("--naive-max")
        cap = int(args[at + 1])
        del args[at : at + 2]
    main([int(a) for a in args] or [500, 1000, 2000, 5000], cap)
