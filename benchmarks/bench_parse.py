"""Time parsing plus every static check on a generated spec (default 5,000 items).

Prints items/second for each stage and the ratio of the whole run to a baseline measured
in the same run (lark parsing alone), so the figure travels between machines.
Run: python benchmarks/bench_parse.py [-n 5000] [--repeat 3] [--profile]
"""

from __future__ import annotations

import argparse
import cProfile
import pstats
import sys
import time
from pathlib import Path

sys.path.insert(0, str(Path(__file__).resolve().parents[1]))

from benchmarks.generate import Shape, generate
from logiccheck.checks.runner import run_checks
from logiccheck.loader import load_text
from logiccheck.syntax.grammar import spec_parser

BAR_SECONDS = 2.0  # the bar for 5,000 items on the 2-core CI machine


def best_of(repeat: int, fn) -> tuple[float, float]:  # type: ignore[no-untyped-def]
    """Best wall time and best CPU time of this process over `repeat` runs. On a shared
    machine the CPU time is the steadier figure; on an idle one the two agree."""
    wall, cpu = [], []
    for _ in range(repeat):
        start, start_cpu = time.perf_counter(), time.process_time()
        fn()
        wall.append(time.perf_counter() - start)
        cpu.append(time.process_time() - start_cpu)
    return min(wall), min(cpu)


def main() -> None:
    parser = argparse.ArgumentParser(description=__doc__)
    parser.add_argument("-n", "--items", type=int, default=5000)
    parser.add_argument("--depth", type=int, default=3)
    parser.add_argument("--repeat", type=int, default=3)
    parser.add_argument("--profile", action="store_true", help="print the top cProfile entries")
    args = parser.parse_args()

    text = generate(Shape(items=args.items, depth=args.depth))
    spec_parser()  # build the grammar once, outside the timings
    loaded = load_text(text, "generated.qlc")
    items = len(loaded.questionnaire.items())
    problems = [d for d in run_checks(loaded, solver=False) if d.severity.value == "error"]
    if problems:
        print(f"generated spec is not clean: {problems[0].message}", file=sys.stderr)
        sys.exit(1)

    lark_only, lark_cpu = best_of(args.repeat, lambda: spec_parser().parse(text))
    load, load_cpu = best_of(args.repeat, lambda: load_text(text, "generated.qlc"))
    full, full_cpu = best_of(args.repeat, lambda: run_checks(load_text(text, "generated.qlc"), solver=False))

    print(f"items: {items} ({len(text.splitlines())} lines); best of {args.repeat}; wall s / CPU s")
    rows = [
        ("lark parse only (baseline)", lark_only, lark_cpu),
        ("parse + build + resolve", load, load_cpu),
        ("parse + all static checks", full, full_cpu),
    ]
    for label, wall, cpu in rows:
        print(
            f"{label:28s} {wall:6.3f} / {cpu:6.3f}  {items / wall:8.0f} items/s  "
            f"({cpu / lark_cpu:.2f}x baseline CPU)"
        )
    for label, seconds in (("wall", full), ("CPU", full_cpu)):
        scaled = seconds * 5000 / items
        verdict = "under" if scaled < BAR_SECONDS else "OVER"
        print(f"scaled to 5,000 items ({label}): {scaled:.3f} s ({verdict} the {BAR_SECONDS:g} s bar)")

    if args.profile:
        prof = cProfile.Profile()
        prof.enable()
        run_checks(load_text(text, "generated.qlc"), solver=False)
        prof.disable()
        pstats.Stats(prof).sort_stats("cumulative").print_stats(25)


if __name__ == "__main__":
    main()
