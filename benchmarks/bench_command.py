"""Benchmark the command as users run it: `logiccheck validate SPEC --data EXPORT --format json`
in a child process, with its default checks (quality included), against a bare pyarrow
read of the same file and an analyst's own per-item counts in DuckDB SQL and in polars,
all measured in the same run. Each measurement is its own child process, so its wall
time, CPU time and peak memory (from the kernel's rusage of that child) are its own.

The spec has G gates with two follow-ups each (3·G items; `--gates 100` = 300 items,
`--gates 400` = 1,200); the export is simulated with 0.1 % planted off-path answers and
no duration column, and is cached between runs.

    python benchmarks/bench_command.py --rows 100000 300000 1000000 [--gates 100] [--formats csv parquet]
    python benchmarks/bench_command.py --rows 100000 --gates 400

The DuckDB competitor loads the file once (as text: the export has stray texts such as
"98a") and counts with `count_if` aggregates, ten gates per query; on the 100,000-row
export its counts equal `validate`'s per-item table and polars' exactly.

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

from benchmarks.bench_validate import generate, make_spec  # noqa: E402 - after the path set-up


# Per-item counts an analyst would write by hand for this spec: due (with the cascade:
# only a valid, routed answer opens a follow-up), answered, off-path, missing, invalid.
def _item_exprs(g: int) -> dict[str, tuple[str, str]]:
    """item → (due, valid) as SQL conditions over text columns (the export has stray
    texts such as "98a", so columns are loaded as text and read as numbers with
    `try_cast`: a text that is no number is invalid, and opens no follow-up)."""
    gate, a, b = (f"try_cast({c} AS DOUBLE)" for c in (f"g{g}", f"g{g}_a", f"g{g}_b"))
    return {
        f"g{g}": ("TRUE", f"{gate} IN (1, 2, 98)"),
        f"g{g}_a": (f"{gate} = 1", f"{a} IN (1, 2, 3, 4, 5, 98)"),
        f"g{g}_b": (f"({gate} = 1 AND {a} IN (3, 4, 5))", f"({b} BETWEEN 0 AND 500 AND {b} = floor({b}))"),
    }


def _sql_batches(gates: int, table: str, per_query: int = 10) -> list[str]:
    """The counts as `count_if` aggregates, a few gates per query over a table loaded
    once: DuckDB reads only the columns a query names, and many short queries keep
    its planner and every thread busy (one query with 1,500 aggregates did not)."""
    out = []
    for first in range(0, gates, per_query):
        aggs = []
        for g in range(first, min(gates, first + per_query)):
            for item, (due, valid) in _item_exprs(g).items():
                aggs += [
                    f"count_if({due})",
                    f"count({item})",
                    f"count_if({item} IS NOT NULL AND NOT coalesce({due}, FALSE))",
                    f"count_if(coalesce({due}, FALSE) AND {item} IS NULL)",
                    f"count_if({item} IS NOT NULL AND NOT coalesce({valid}, FALSE))",
                ]
        out.append(f"SELECT {', '.join(aggs)} FROM {table}")
    return out


def _polars_items(pl, frame, gates: int):  # type: ignore[no-untyped-def]
    exprs = []
    for g in range(gates):
        # Text columns read as numbers, a stray text ("98a") as null: invalid, opens nothing.
        gate, a, b = (pl.col(c).cast(pl.Float64, strict=False) for c in (f"g{g}", f"g{g}_a", f"g{g}_b"))
        always = pl.col(f"g{g}").is_null() | pl.col(f"g{g}").is_not_null()  # a column of True (a literal sums to 1)
        dues = {f"g{g}": always, f"g{g}_a": (gate == 1).fill_null(False),
                f"g{g}_b": ((gate == 1) & a.is_in([3.0, 4.0, 5.0])).fill_null(False)}
        valid = {f"g{g}": gate.is_in([1.0, 2.0, 98.0]), f"g{g}_a": a.is_in([1.0, 2.0, 3.0, 4.0, 5.0, 98.0]),
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

        fn = "read_parquet" if path.endswith(".parquet") else "read_csv"
        con = duckdb.connect()
        con.execute(f"SET threads = {os.cpu_count() or 1}")
        # Load once (typed columns), then count: what an analyst would do in a notebook.
        text = ", all_varchar = true" if fn == "read_csv" else ""
        con.execute(f"CREATE TABLE export AS SELECT * FROM {fn}('{path}'{text})")
        for sql in _sql_batches(gates, "export"):
            con.execute(sql).fetchall()
    elif mode == "polars":
        import polars as pl

        frame = pl.read_parquet(path) if path.endswith(".parquet") else pl.read_csv(path, infer_schema=False)
        _polars_items(pl, frame, gates)


def run_measured(cmd: list[str], ok: tuple[int, ...] = (0, 1)) -> dict[str, float]:
    """Wall, CPU and peak memory of one child process (rusage of that child alone).
    `ok`: exit codes that count as a run (validate exits 1 when it finds errors)."""
    t0 = time.perf_counter()
    with open(os.devnull, "wb") as null:
        proc = subprocess.Popen(cmd, stdout=null, stderr=subprocess.PIPE, cwd=ROOT)
        _, status, usage = os.wait4(proc.pid, 0)
        proc.returncode = os.waitstatus_to_exitcode(status)
        err = proc.stderr.read().decode(errors="replace") if proc.stderr else ""
    wall = time.perf_counter() - t0
    if proc.returncode not in ok:
        raise SystemExit(f"{' '.join(cmd)} failed ({proc.returncode}):\n{err}")
    out: dict[str, float] = {"wall": wall, "cpu": usage.ru_utime + usage.ru_stime, "peak_mb": usage.ru_maxrss / 1024}
    # `validate --timings` lines: the command's own split by stage and check.
    for text in err.splitlines():
        if text.startswith("logiccheck: time: "):
            name, _, seconds = text[len("logiccheck: time: "):].rstrip(" s").rpartition(" ")
            out[f"time: {name.strip()}"] = float(seconds)
    return out


def prepare(cache: Path, rows: int, gates: int, parquet: bool) -> tuple[Path, Path]:
    cache.mkdir(parents=True, exist_ok=True)
    spec = cache / f"bench_{gates}.qlc"
    spec.write_text(make_spec(gates), encoding="utf-8")
    data = cache / f"export_{gates}_{rows}.csv"
    # Made in a child process: Linux keeps a process's peak memory across exec, so the
    # measured children must not be forked from a parent that held a whole export.
    if not data.exists():
        t = time.perf_counter()
        subprocess.run([sys.executable, __file__, "--make", str(data), str(rows), str(gates)], check=True, cwd=ROOT)
        print(f"generated {data.name} in {time.perf_counter() - t:.1f} s", file=sys.stderr)
    if parquet:
        pq_path = data.with_suffix(".parquet")
        if not pq_path.exists():
            subprocess.run([sys.executable, __file__, "--make", str(pq_path), "0", str(gates)], check=True, cwd=ROOT)
        data = pq_path
    return spec, data


def make(path: Path, rows: int, gates: int) -> None:
    """The export (CSV), or a Parquet copy of the CSV beside it (rows = 0)."""
    if path.suffix == ".parquet":
        import pyarrow.csv as pacsv
        import pyarrow.parquet as pq

        pq.write_table(pacsv.read_csv(path.with_suffix(".csv")), path)
        return
    from logiccheck.loader import load_text

    generate(path, rows, load_text(make_spec(gates), "bench.qlc").questionnaire, faults=0.001)


def line(name: str, m: dict[str, float], base: dict[str, float] | None) -> str:
    ratio = f"   {m['wall'] / base['wall']:5.2f}× wall  {m['cpu'] / base['cpu']:5.2f}× cpu" if base else ""
    return f"  {name:<28} {m['wall']:8.2f} s  cpu {m['cpu']:8.2f} s  peak {m['peak_mb']:7.0f} MB{ratio}"


def main() -> None:
    parser = argparse.ArgumentParser(description=__doc__.split("\n\n")[0])
    parser.add_argument("--rows", type=int, nargs="+", default=[100_000])
    parser.add_argument("--gates", type=int, default=100, help="items = 3 × gates")
    parser.add_argument("--formats", nargs="+", choices=["csv", "parquet"], default=["csv"],
                        help="measure the CSV export, a Parquet copy of it, or both")
    parser.add_argument("--no-competitors", action="store_true", help="skip the DuckDB and polars figures")
    parser.add_argument("--cache", default=os.path.join(tempfile.gettempdir(), "logiccheck-bench"))
    parser.add_argument("--child", nargs=4, help=argparse.SUPPRESS)
    parser.add_argument("--make", nargs=3, help=argparse.SUPPRESS)
    args = parser.parse_args()
    if args.make:
        make(Path(args.make[0]), int(args.make[1]), int(args.make[2]))
        return
    if args.child:
        mode, path, spec, gates = args.child
        child(mode, path, spec, int(gates))
        return
    me = [sys.executable, __file__, "--child"]
    for rows, fmt in ((r, f) for r in args.rows for f in args.formats):
        spec, data = prepare(Path(args.cache), rows, args.gates, fmt == "parquet")
        size = data.stat().st_size / 1e6
        print(f"{rows:,} respondents × {3 * args.gates} items, {data.suffix[1:]} {size:,.0f} MB")
        bare = run_measured([*me, "pyarrow", str(data), str(spec), str(args.gates)], ok=(0,))
        print(line("bare pyarrow read", bare, None))
        cmd = run_measured([sys.executable, "-m", "logiccheck", "validate", str(spec), "--data", str(data), "--format", "json",
                            "--timings"])
        print(line("logiccheck validate (command)", cmd, bare))
        split = sorted(((k[6:], v) for k, v in cmd.items() if k.startswith("time: ") and "total" not in k), key=lambda kv: -kv[1])
        print("    of which: " + ", ".join(f"{k} {v:.1f} s" for k, v in split[:6]))
        routing = run_measured([sys.executable, str(ROOT / "benchmarks" / "bench_validate.py"), "--child", "validate",
                                str(data), str(spec)])
        print(line("routing stage only (library)", routing, bare))
        if not args.no_competitors:
            for mode, name in (("duckdb", "DuckDB SQL per-item counts"), ("polars", "polars per-item counts")):
                try:
                    m = run_measured([*me, mode, str(data), str(spec), str(args.gates)], ok=(0,))
                except SystemExit as err:
                    print(f"  {name}: not measured ({str(err).splitlines()[0]})")
                    continue
                print(line(name, m, bare) + f"   command / this {cmd['wall'] / m['wall']:5.2f}×")
        print(json.dumps({"rows": rows, "items": 3 * args.gates, "format": fmt, "bare": bare, "command": cmd,
                          "routing": routing}),
              file=sys.stderr)


if __name__ == "__main__":
    main()
