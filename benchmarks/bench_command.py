"""Benchmark the command as users run it: `logiccheck validate SPEC --data EXPORT --format json`
in a child process, with its default checks (quality included), against a bare pyarrow
read of the same file and an analyst's own per-item counts in DuckDB SQL and in polars,
all measured in the same run. Each measurement is its own child process, so its wall
time, CPU time and peak memory (from the kernel's rusage of that child) are its own.

The spec has G gates with two follow-ups each (3·G items; `--gates 100` = 300 items,
`--gates 400` = 1,200); the export is simulated with 0.1 % planted off-path answers and
no duration column, and is cached between runs.

    python benchmarks/bench_command.py --rows 100000 300000 1000000 [--gates 100] [--parquet]
    python benchmarks/bench_command.py --rows 100000 --gates 400

Figures go to standard output; keep a log of them in benchmarks/RESULTS.md.
"""

from __future__ import annotations

import argparse
import json
import os
import subprocess
import sys
import tempfile
import time
from pathlib import Path

ROOT = Path(__file__).resolve().parent.parent
sys.path.insert(0, str(ROOT))

from benchmarks.bench_validate import generate  # noqa: E402 - after the path set-up


def make_spec(gates: int) -> str:
    """The benchmark spec: `gates` yes/no gates, each opening a scale and a number item."""
    lines = [
        f'survey bench "Benchmark: {gates} gates, two follow-ups each"',
        "",
        "codes yesno",
        '  yes = 1 "Yes"',
        '  no  = 2 "No"',
        "",
        "codes scale",
        '  s1 = 1 "One"',
        '  s2 = 2 "Two"',
        '  s3 = 3 "Three"',
        '  s4 = 4 "Four"',
        '  s5 = 5 "Five"',
        "",
        "nonresponse",
        '  dk = 98 "Don\'t know"',
        "",
    ]
    for g in range(gates):
        lines.append(f'g{g}: single yesno "Gate {g}?" gate')
        lines.append(f'g{g}_a: single scale "Follow-up {g} a" when g{g} = yes')
        lines.append(f'g{g}_b: number 0..500 "Follow-up {g} b" when g{g} = yes and g{g}_a >= s3')
    return "\n".join(lines) + "\n"


# Per-item counts an analyst would write by hand for this spec: due (with the cascade:
# only a valid, routed answer opens a follow-up), answered, off-path, missing, invalid.
def _sql_items(gates: int, source: str) -> str:
    """One scan: every count of every item as one aggregate column."""
    aggs = []
    for g in range(gates):
        gate, a, b = f"g{g}", f"g{g}_a", f"g{g}_b"
        dues = {gate: "TRUE", a: f"{gate} = 1", b: f"({gate} = 1 AND {a} IN (3, 4, 5))"}
        valid = {gate: f"{gate} IN (1, 2, 98)", a: f"{a} IN (1, 2, 3, 4, 5, 98)", b: f"({b} BETWEEN 0 AND 500 AND {b} = floor({b}))"}
        for item, due in dues.items():
            aggs += [
                f"count(*) FILTER (WHERE {due}) AS \"{item}|expected\"",
                f"count({item}) AS \"{item}|answered\"",
                f"count({item}) FILTER (WHERE NOT coalesce({due}, FALSE)) AS \"{item}|out_of_path\"",
                f"count(*) FILTER (WHERE coalesce({due}, FALSE) AND {item} IS NULL) AS \"{item}|missing_on_path\"",
                f"count({item}) FILTER (WHERE NOT coalesce({valid[item]}, FALSE)) AS \"{item}|invalid\"",
            ]
    return f"SELECT {', '.join(aggs)} FROM {source}"


def _polars_items(pl, frame, gates: int):  # type: ignore[no-untyped-def]
    exprs = []
    for g in range(gates):
        gate, a, b = pl.col(f"g{g}"), pl.col(f"g{g}_a"), pl.col(f"g{g}_b")
        dues = {f"g{g}": pl.lit(True), f"g{g}_a": (gate == 1).fill_null(False),
                f"g{g}_b": ((gate == 1) & a.is_in([3, 4, 5])).fill_null(False)}
        valid = {f"g{g}": gate.is_in([1, 2, 98]), f"g{g}_a": a.is_in([1, 2, 3, 4, 5, 98]),
                 f"g{g}_b": b.is_between(0, 500) & (b == b.floor())}
        for name, due in dues.items():
            col = pl.col(name)
            exprs += [
                due.sum().alias(f"{name}|expected"),
                col.is_not_null().sum().alias(f"{name}|answered"),
                (col.is_not_null() & ~due).sum().alias(f"{name}|out_of_path"),
                (col.is_null() & due).sum().alias(f"{name}|missing_on_path"),
                (col.is_not_null() & ~valid[name].fill_null(False)).sum().alias(f"{name}|invalid"),
            ]
    return frame.select(exprs)


def child(mode: str, path: str, spec: str, gates: int) -> None:
    """One measurement (a child process of the benchmark); prints nothing the parent needs."""
    if mode == "pyarrow":
        if path.endswith(".parquet"):
            import pyarrow.parquet as pq

            pq.read_table(path)
        else:
            import pyarrow.csv as pacsv

            pacsv.read_csv(path)
    elif mode == "duckdb":
        import duckdb

        fn = "read_parquet" if path.endswith(".parquet") else "read_csv_auto"
        con = duckdb.connect()
        con.execute(f"SET threads = {os.cpu_count() or 1}")
        con.execute(_sql_items(gates, f"{fn}('{path}')")).fetchall()
    elif mode == "polars":
        import polars as pl

        frame = pl.read_parquet(path) if path.endswith(".parquet") else pl.read_csv(path, infer_schema_length=10_000)
        _polars_items(pl, frame, gates)


def run_measured(cmd: list[str]) -> dict[str, float]:
    """Wall, CPU and peak memory of one child process (rusage of that child alone)."""
    t0 = time.perf_counter()
    with open(os.devnull, "wb") as null:
        proc = subprocess.Popen(cmd, stdout=null, stderr=subprocess.PIPE, cwd=ROOT)
        _, status, usage = os.wait4(proc.pid, 0)
        proc.returncode = os.waitstatus_to_exitcode(status)
        err = proc.stderr.read().decode(errors="replace") if proc.stderr else ""
    wall = time.perf_counter() - t0
    if proc.returncode not in (0, 1):  # validate exits 1 when it finds errors
        raise SystemExit(f"{' '.join(cmd)} failed ({proc.returncode}):\n{err}")
    return {"wall": wall, "cpu": usage.ru_utime + usage.ru_stime, "peak_mb": usage.ru_maxrss / 1024}


def prepare(cache: Path, rows: int, gates: int, parquet: bool) -> tuple[Path, Path]:
    cache.mkdir(parents=True, exist_ok=True)
    spec = cache / f"bench_{gates}.qlc"
    spec.write_text(make_spec(gates), encoding="utf-8")
    data = cache / f"export_{gates}_{rows}.csv"
    if not data.exists():
        from logiccheck.loader import load_text

        t = time.perf_counter()
        generate(data, rows, load_text(make_spec(gates), spec.name).questionnaire, faults=0.001)
        print(f"generated {data.name} in {time.perf_counter() - t:.1f} s", file=sys.stderr)
    if parquet:
        pq_path = data.with_suffix(".parquet")
        if not pq_path.exists():
            import pyarrow.csv as pacsv
            import pyarrow.parquet as pq

            pq.write_table(pacsv.read_csv(data), pq_path)
        data = pq_path
    return spec, data


def line(name: str, m: dict[str, float], base: dict[str, float] | None) -> str:
    ratio = f"   {m['wall'] / base['wall']:5.2f}× wall  {m['cpu'] / base['cpu']:5.2f}× cpu" if base else ""
    return f"  {name:<28} {m['wall']:8.2f} s  cpu {m['cpu']:8.2f} s  peak {m['peak_mb']:7.0f} MB{ratio}"


def main() -> None:
    parser = argparse.ArgumentParser(description=__doc__.split("\n\n")[0])
    parser.add_argument("--rows", type=int, nargs="+", default=[100_000])
    parser.add_argument("--gates", type=int, default=100, help="items = 3 × gates")
    parser.add_argument("--parquet", action="store_true", help="measure a Parquet copy of the export")
    parser.add_argument("--no-competitors", action="store_true", help="skip the DuckDB and polars figures")
    parser.add_argument("--cache", default=os.path.join(tempfile.gettempdir(), "logiccheck-bench"))
    parser.add_argument("--child", nargs=4, help=argparse.SUPPRESS)
    args = parser.parse_args()
    if args.child:
        mode, path, spec, gates = args.child
        child(mode, path, spec, int(gates))
        return
    me = [sys.executable, __file__, "--child"]
    for rows in args.rows:
        spec, data = prepare(Path(args.cache), rows, args.gates, args.parquet)
        size = data.stat().st_size / 1e6
        print(f"{rows:,} respondents × {3 * args.gates} items, {data.suffix[1:]} {size:,.0f} MB")
        bare = run_measured([*me, "pyarrow", str(data), str(spec), str(args.gates)])
        print(line("bare pyarrow read", bare, None))
        cmd = run_measured([sys.executable, "-m", "logiccheck", "validate", str(spec), "--data", str(data), "--format", "json"])
        print(line("logiccheck validate (command)", cmd, bare))
        routing = run_measured([sys.executable, str(ROOT / "benchmarks" / "bench_validate.py"), "--child", "validate",
                                str(data), str(spec)])
        print(line("routing stage only (library)", routing, bare))
        if not args.no_competitors:
            for mode, name in (("duckdb", "DuckDB SQL per-item counts"), ("polars", "polars per-item counts")):
                try:
                    m = run_measured([*me, mode, str(data), str(spec), str(args.gates)])
                except SystemExit as err:
                    print(f"  {name}: not measured ({str(err).splitlines()[0]})")
                    continue
                print(line(name, m, bare) + f"   command / this {cmd['wall'] / m['wall']:5.2f}×")
        print(json.dumps({"rows": rows, "items": 3 * args.gates, "bare": bare, "command": cmd, "routing": routing}),
              file=sys.stderr)


if __name__ == "__main__":
    main()
