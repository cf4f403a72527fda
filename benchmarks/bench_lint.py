"""The `lint` command as users run it, on generated routing specs of 2,000 and 5,000 items.

    python benchmarks/bench_lint.py [--sizes 2000 5000] [--repeat 1] [--no-split] [--against DIR]

Each spec comes from `generate.routing_spec` (modules of gates nested 6 deep, grids,
derived values, skips, stops, planted unreachable items) and is written to a temporary
folder. For each size, in the same run and each in a child process:

* `logiccheck lint SPEC --format json` (every check, the solver included; bars: under
  10 s at 2,000 items and 20 s at 5,000),
* the baseline `logiccheck lint SPEC --format json --no-solver` (static checks only),
* unless `--no-split`: a child that times each stage in-process (load, the static checks,
  building the routing analysis, each routing check), since the command prints no timings,
* with `--against DIR` (another checkout, e.g. a worktree of main): the same command run
  from that checkout right after ours, for a before/after under the same load.

Wall time suffers from other work on a shared machine; CPU time (user + system of the
child) is the steadier figure. The load average is printed with every row.
"""

from __future__ import annotations

import argparse
import json
import os
import resource
import shutil
import subprocess
import sys
import tempfile
import time
from pathlib import Path

ROOT = Path(__file__).resolve().parents[1]
sys.path.insert(0, str(ROOT))

from benchmarks.generate import routing_spec  # noqa: E402

BARS = {2000: 10.0, 5000: 20.0}  # seconds, wall, for the whole command

SPLIT = r"""
import json, sys, time
from logiccheck.checks.context import LintContext
from logiccheck.checks.registry import all_checks
from logiccheck.loader import load_file
from logiccheck.checks.routing.common import analysis
out = {}
t = time.process_time()
loaded = load_file(sys.argv[1])
out["load"] = time.process_time() - t
ctx = LintContext(loaded.questionnaire, loaded.syntax)
checks = all_checks(("spec", "routing"))
t = time.process_time()
for info in checks.values():
    if info.stage == "spec" and info.run is not None:
        list(info.run(ctx))
out["static checks"] = time.process_time() - t
t = time.process_time()
a = analysis(ctx)
out["routing analysis (encode + solve)"] = time.process_time() - t
for info in checks.values():
    if info.stage == "routing" and info.run is not None:
        t = time.process_time()
        list(info.run(ctx))
        out["check " + info.name] = time.process_time() - t
out["solver calls"] = a.stats.calls
print(json.dumps(out))
"""


def command() -> list[str]:
    """The console script when it is installed, else the module."""
    script = shutil.which("logiccheck")
    return [script] if script else [sys.executable, "-m", "logiccheck"]


def timed(args: list[str], env: dict[str, str]) -> tuple[float, float, bytes]:
    """(wall, cpu, stdout) of one child process."""
    before = resource.getrusage(resource.RUSAGE_CHILDREN)
    start = time.perf_counter()
    done = subprocess.run(args, cwd=ROOT, env=env, stdout=subprocess.PIPE, stderr=subprocess.DEVNULL, check=False)
    wall = time.perf_counter() - start
    after = resource.getrusage(resource.RUSAGE_CHILDREN)
    cpu = (after.ru_utime - before.ru_utime) + (after.ru_stime - before.ru_stime)
    return wall, cpu, done.stdout


def best(repeat: int, args: list[str], env: dict[str, str]) -> tuple[float, float, bytes]:
    runs = [timed(args, env) for _ in range(repeat)]
    return min(r[0] for r in runs), min(r[1] for r in runs), runs[0][2]


def counts(stdout: bytes) -> str:
    """Findings per check from `lint --format json`."""
    try:
        found = json.loads(stdout)
    except ValueError:
        return "(no JSON)"
    rows = found.get("diagnostics", found) if isinstance(found, dict) else found
    tally: dict[str, int] = {}
    for d in rows:
        tally[d["check"]] = tally.get(d["check"], 0) + 1
    return ", ".join(f"{k} {v}" for k, v in sorted(tally.items()))


def main() -> None:
    parser = argparse.ArgumentParser(description=__doc__, formatter_class=argparse.RawDescriptionHelpFormatter)
    parser.add_argument("--sizes", type=int, nargs="+", default=[2000, 5000])
    parser.add_argument("--repeat", type=int, default=1)
    parser.add_argument("--no-split", action="store_true", help="skip the per-stage split")
    parser.add_argument("--against", help="another checkout to time the same command from")
    args = parser.parse_args()
    env = {**os.environ, "PYTHONPATH": str(ROOT)}
    cli = command()
    other = {**os.environ, "PYTHONPATH": str(Path(args.against).resolve())} if args.against else None
    folder = Path(tempfile.mkdtemp(prefix="lc-bench-lint-"))
    try:
        print(f"{'items':>6} {'command':<38} {'wall s':>7} {'cpu s':>7} {'cpu ×base':>9} {'bar':>5} {'load':>5}")
        for size in args.sizes:
            spec = folder / f"routing{size}.qlc"
            spec.write_text(routing_spec(size), encoding="utf-8")
            timed([*cli, "lint", str(spec), "--no-solver", "--format", "json"], env)  # warm the parser cache
            base_w, base_c, _ = best(args.repeat, [*cli, "lint", str(spec), "--format", "json", "--no-solver"], env)
            print(f"{size:>6} {'lint --format json --no-solver (base)':<38} {base_w:7.2f} {base_c:7.2f} {1.0:9.1f} "
                  f"{'':>5} {os.getloadavg()[0]:5.1f}")
            wall, cpu, out = best(args.repeat, [*cli, "lint", str(spec), "--format", "json"], env)
            bar = BARS.get(size)
            verdict = "" if bar is None else ("ok" if wall < bar else "over")
            print(f"{size:>6} {'lint --format json':<38} {wall:7.2f} {cpu:7.2f} {cpu / base_c:9.1f} {verdict:>5} "
                  f"{os.getloadavg()[0]:5.1f}")
            print(f"{'':>6} findings: {counts(out)}")
            if other is not None:
                o_wall, o_cpu, o_out = best(args.repeat, [*cli, "lint", str(spec), "--format", "json"], other)
                print(f"{size:>6} {'lint --format json (' + Path(args.against).name + ')':<38} {o_wall:7.2f} "
                      f"{o_cpu:7.2f} {o_cpu / base_c:9.1f} {'':>5} {os.getloadavg()[0]:5.1f}")
                print(f"{'':>6} findings: {counts(o_out)}; ours/theirs CPU {cpu / o_cpu:.2f}")
            if not args.no_split:
                _, _, raw = timed([sys.executable, "-c", SPLIT, str(spec)], env)
                try:
                    split = json.loads(raw)
                except ValueError:
                    print(f"{'':>6} (split failed)")
                    continue
                calls = split.pop("solver calls")
                top = sorted(split.items(), key=lambda kv: -kv[1])
                print(f"{'':>6} CPU split ({calls} solver calls): "
                      + ", ".join(f"{k} {v:.2f}" for k, v in top if v >= 0.01))
    finally:
        shutil.rmtree(folder, ignore_errors=True)
    print("bars: wall under 10 s at 2,000 items, 20 s at 5,000 (the command in a child process)")


if __name__ == "__main__":
    main()
