"""Start-up of the command as users run it: `logiccheck --help` and `logiccheck lint` on
a small spec, each in a child process, against `python -c pass` measured in the same run.

Also times importing every command module (what each run paid before commands were
imported lazily) and lint with an empty parser cache (a first run).
Prints the best wall and CPU time (user + system of the child) over --repeat runs.
Run: python benchmarks/bench_startup.py [--repeat 7] [--spec specs/bikeshare.qlc]
"""

from __future__ import annotations

import argparse
import os
import resource
import shutil
import subprocess
import sys
import tempfile
import time
from pathlib import Path

ROOT = Path(__file__).resolve().parents[1]
HELP_BAR = 0.5  # seconds, wall, for `logiccheck --help`

EVERY_COMMAND = (
    "import logiccheck.cli.main as m, importlib\n"
    "for target, _ in m.COMMANDS.values(): importlib.import_module(target.split(':')[0])"
)


def command() -> list[str]:
    """The console script when it is installed, else the module."""
    script = shutil.which("logiccheck")
    return [script] if script else [sys.executable, "-m", "logiccheck"]


def timed(args: list[str], env: dict[str, str], fresh_cache: bool = False) -> tuple[float, float]:
    """(wall, cpu) of one child process."""
    if fresh_cache:
        env = {**env, "LOGICCHECK_CACHE_DIR": tempfile.mkdtemp(prefix="lc-bench-cache-")}
    before = resource.getrusage(resource.RUSAGE_CHILDREN)
    start = time.perf_counter()
    subprocess.run(args, cwd=ROOT, env=env, stdout=subprocess.DEVNULL, stderr=subprocess.DEVNULL, check=False)
    wall = time.perf_counter() - start
    after = resource.getrusage(resource.RUSAGE_CHILDREN)
    cpu = (after.ru_utime - before.ru_utime) + (after.ru_stime - before.ru_stime)
    if fresh_cache:
        shutil.rmtree(env["LOGICCHECK_CACHE_DIR"], ignore_errors=True)
    return wall, cpu


def best(repeat: int, args: list[str], env: dict[str, str], fresh_cache: bool = False) -> tuple[float, float]:
    runs = [timed(args, env, fresh_cache) for _ in range(repeat)]
    return min(w for w, _ in runs), min(c for _, c in runs)


def main() -> None:
    parser = argparse.ArgumentParser(description=__doc__)
    parser.add_argument("--repeat", type=int, default=7)
    parser.add_argument("--spec", default="specs/bikeshare.qlc")
    args = parser.parse_args()
    env = {**os.environ, "PYTHONPATH": str(ROOT)}
    cli = command()
    timed([*cli, "lint", args.spec], env)  # warm the parser cache and the file system
    cases = [
        ("python -c pass (baseline)", [sys.executable, "-c", "pass"], False),
        ("import every command module", [sys.executable, "-c", EVERY_COMMAND], False),
        ("logiccheck --help", [*cli, "--help"], False),
        (f"logiccheck lint {args.spec}", [*cli, "lint", args.spec], False),
        (f"logiccheck lint {args.spec} (empty parser cache)", [*cli, "lint", args.spec], True),
    ]
    print(f"load average {os.getloadavg()[0]:.1f}; best of {args.repeat}")
    print(f"{'command':<58} {'wall s':>7} {'cpu s':>7} {'wall ×base':>10}")
    base = None
    results = {}
    for name, argv, fresh in cases:
        wall, cpu = best(args.repeat, argv, env, fresh)
        base = base or wall
        results[name] = wall
        print(f"{name:<58} {wall:7.3f} {cpu:7.3f} {wall / base:10.1f}")
    help_wall = results["logiccheck --help"]
    verdict = "within" if help_wall < HELP_BAR else "over"
    print(f"`logiccheck --help` {help_wall:.3f} s: {verdict} the {HELP_BAR} s bar")


if __name__ == "__main__":
    main()
