"""Routing analysis speed: time and solver calls for generated specs of growing size.

    python benchmarks/bench_routing.py [SIZES...] [--naive-max N]

(the naive baseline runs for sizes up to N, default 2000; it takes minutes there)

Each spec has modules of gates nested 6 deep with follow-ups, grids, derived values,
skips, stops and a few planted unreachable items. The baseline, measured in the same
run, is the naive plan for reachability alone: one solver call per statement on one
solver holding everything; beside it, our batched plan for the same questions.
"""

from __future__ import annotations

import random
import sys
import time
from pathlib import Path

sys.path.insert(0, str(Path(__file__).resolve().parents[1]))

import z3

from logiccheck.checks.context import LintContext
from logiccheck.checks.registry import all_checks
from logiccheck.checks.runner import run_checks
from logiccheck.load import load_text
from logiccheck.logic.routing import RoutingAnalysis

HEADER = """survey bench "Generated routing benchmark"

codes yesno
  yes = 1 "Yes"
  no = 2 "No"

codes agree5
  sd = 1 "Strongly disagree"
  d = 2 "Disagree"
  n = 3 "Neither"
  a = 4 "Agree"
  sa = 5 "Strongly agree"

codes kinds
  food = 1 "Food"
  rent = 2 "Rent"
  travel = 3 "Travel"
  other = 4 "Other"

nonresponse
  dk = 98 "Don't know"
  refused = 99 "Refused"

sample region single { north = 1 "North", south = 2 "South" }
"""

DEPTH = 6


def module(k: int, rng: random.Random, plant: bool) -> list[str]:
    """One section of about 34 items."""
    when = f" when region = {'north' if k % 2 else 'south'}" if k % 3 == 0 else ""
    out = [f'section s{k} "Module {k}"{when}']
    out.append(f'  g{k}_1: single yesno "Gate {k}.1" gate required')
    for j in range(1, DEPTH + 1):
        if j > 1:
            out.append(f'  g{k}_{j}: single yesno "Gate {k}.{j}" when g{k}_{j - 1} = yes')
        out.append(f'  a{k}_{j}: number 0..100 "Amount {k}.{j}" when g{k}_{j} = yes')
        out.append(f'  grid m{k}_{j} single agree5 "Opinions {k}.{j}" when g{k}_{j} = yes')
        out.append(f'    r{k}_{j}_1 "Row 1"')
        out.append(f'    r{k}_{j}_2 "Row 2"')
        out.append(f'    r{k}_{j}_3 "Row 3" when a{k}_{j} > {rng.randint(5, 60)}')
        if j == 2:
            out.append(f"  skip to e{k} when g{k}_2 = no and a{k}_1 < {rng.randint(3, 20)}")
        if j == 3 and k % 4 == 1:
            out.append(f'  stop out{k} "Thank you." when a{k}_3 = 0 and g{k}_1 = yes')
    out.append(f"  let l{k} = (a{k}_1 >= 50 or g{k}_2 = yes)")
    out.append(f'  t{k}: text "Tell us more" when l{k}')
    out.append(f'  k{k}: multi kinds "Spending on?"')
    out.append(f'  ko{k}: text "Other spending?" when k{k} has other')
    if plant:
        out.append(f'  z{k}: text "Never asked" when g{k}_3 = yes and g{k}_2 = no')
    out.append(f'  e{k}: number 0..10 "Score {k}"')
    return out


def generate(items: int, seed: int = 1) -> str:
    rng = random.Random(seed)
    lines = HEADER.splitlines()
    k = 0
    count = 0
    while count < items:
        k += 1
        body = module(k, rng, plant=k % 10 == 5)
        count += sum(1 for line in body if ":" in line.split('"')[0] or line.startswith("    r"))
        lines.extend(body)
    return "\n".join(lines) + "\n"


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
        text = generate(size)
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
