"""Benchmark: validate a large CSV export (default 100,000 respondents; the target case is
`--rows 1000000`) of a spec with 100 gates and two follow-ups each (300 items).

Prints the time split read / evaluate / report, the ratio against a bare pyarrow read of
the same file measured in the same run (target ≤ 1.5×), the peak memory of the validate
run (target < 3 GB), and, on a sample, the ratios against the DuckDB-SQL implementation
and the row-by-row interpreter of the test suite. Each measurement runs in a child
process so peak memory is its own.

    python benchmarks/bench_validate.py [--rows N] [--sample N] [--cache DIR]
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

GATES = 100
GEN_CHUNK = 100_000


def make_spec(gates: int = GATES) -> str:
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


def generate(path: Path, rows: int, q: object = None, faults: float = 0.01) -> None:
    """Simulated export in chunks (with planted faults), appended to one CSV."""
    import pyarrow.csv as pacsv

    from logiccheck.data.simulate import simulate
    from logiccheck.loader import load_text

    if q is None:
        q = load_text(make_spec(), "bench.qlc").questionnaire
    tmp = path.with_name(path.name + ".part")
    writer = None
    done = 0
    while done < rows:
        n = min(GEN_CHUNK, rows - done)
        table = simulate(q, n, seed=done, faults=faults).table  # type: ignore[arg-type]
        import pyarrow as pa
        import pyarrow.compute as pc

        ids = pc.add(table.column("id"), pa.scalar(done, pa.int64()))
        table = table.set_column(0, "id", ids)
        if writer is None:
            writer = pacsv.CSVWriter(str(tmp), table.schema, write_options=pacsv.WriteOptions(quoting_style="needed"))
        writer.write_table(table)
        done += n
    writer.close()
    os.replace(tmp, path)


def child(mode: str, path: str, spec: str) -> None:
    """One measurement in this process; prints a JSON line."""
    t0 = time.perf_counter()
    out: dict[str, float] = {}
    if mode == "pyarrow":
        import pyarrow.csv as pacsv

        table = pacsv.read_csv(path)
        out["rows"] = table.num_rows
    elif mode == "validate":
        from rich.console import Console

        from logiccheck.data.validate import validate
        from logiccheck.loader import load_text
        from logiccheck.report.data_csv import items_csv, write_findings_csv
        from logiccheck.report.data_text import render_validation

        q = load_text(Path(spec).read_text(), spec).questionnaire
        timings: dict[str, float] = {}
        result = validate(q, path, keep_cells=False, timings=timings)
        t_report = time.perf_counter()
        with open(os.devnull, "w") as null:
            render_validation(Console(file=null, width=120), result)
            null.write(items_csv(result))
            write_findings_csv(result, null)  # every finding, as `--format csv --out` writes them
        out.update(timings)
        out["report"] = time.perf_counter() - t_report
        out["findings"] = result.finding_count
        out["rows"] = result.respondents
    elif mode in ("sample-ours", "sample-duckdb", "sample-rowwise"):
        from logiccheck.loader import load_text

        q = load_text(Path(spec).read_text(), spec).questionnaire
        t0 = time.perf_counter()
        if mode == "sample-ours":
            from logiccheck.data.validate import validate

            validate(q, path, keep_cells=False)
        elif mode == "sample-duckdb":
            from tests.data.sqloracle import sql_validate

            sql_validate(q, path)
        else:
            from tests.data.rowwise import interpret_csv

            interpret_csv(q, path)
    out["seconds"] = time.perf_counter() - t0
    usage = resource.getrusage(resource.RUSAGE_SELF)
    out["cpu"] = usage.ru_utime + usage.ru_stime
    out["peak_mb"] = resource.getrusage(resource.RUSAGE_SELF).ru_maxrss / 1024
    print(json.dumps(out))


def measure(mode: str, path: Path, spec: Path) -> dict[str, float]:
    res = subprocess.run(
        [sys.executable, __file__, "--child", mode, str(path), str(spec)],
        capture_output=True,
        text=True,
        check=True,
        cwd=ROOT,
    )
    return json.loads(res.stdout.strip().splitlines()[-1])


def prepare(cache: Path, rows: int) -> tuple[Path, Path]:
    """The spec and the export of `rows` respondents in `cache` (made once, then reused)."""
    cache.mkdir(parents=True, exist_ok=True)
    spec = cache / "bench.qlc"
    spec.write_text(make_spec(), encoding="utf-8")
    data = cache / f"export_{rows}.csv"
    if not data.exists():
        t = time.perf_counter()
        generate(data, rows)
        print(f"generated {data} in {time.perf_counter() - t:.1f} s")
    return spec, data


def main() -> None:
    parser = argparse.ArgumentParser()
    parser.add_argument("--rows", type=int, default=100_000)
    parser.add_argument("--sample", type=int, default=5_000, help="rows for the oracle comparison")
    parser.add_argument("--cache", default=os.path.join(tempfile.gettempdir(), "logiccheck-bench"))
    parser.add_argument("--child", nargs=3, help=argparse.SUPPRESS)
    args = parser.parse_args()
    if args.child:
        child(*args.child)
        return
    cache = Path(args.cache)
    spec, data = prepare(cache, args.rows)
    size = data.stat().st_size / 1e6
    print(f"export: {args.rows:,} respondents × {3 * GATES} items, {size:,.0f} MB ({data})")

    bare = measure("pyarrow", data, spec)
    ours = measure("validate", data, spec)
    print(f"bare pyarrow read     {bare['seconds']:7.2f} s   cpu {bare['cpu']:7.2f} s   peak {bare['peak_mb']:6.0f} MB")
    print(
        f"validate (whole)      {ours['seconds']:7.2f} s   cpu {ours['cpu']:7.2f} s   peak {ours['peak_mb']:6.0f} MB   "
        f"read {ours['read']:.2f} s · evaluate {ours['evaluate']:.2f} s · report {ours['report']:.2f} s"
    )
    print(f"findings              {int(ours['findings']):,}")
    ratio = ours["seconds"] / bare["seconds"]
    print(f"ratio validate / bare read: {ratio:.2f}×  (target ≤ 1.5×); cpu time ratio {ours['cpu'] / bare['cpu']:.2f}×")
    print(f"peak memory: {ours['peak_mb'] / 1024:.2f} GB  (target < 3 GB)")

    sample = cache / f"sample_{args.sample}.csv"
    if not sample.exists():
        with data.open("r", encoding="utf-8") as src, sample.open("w", encoding="utf-8") as dst:
            for i, line in enumerate(src):
                if i > args.sample:
                    break
                dst.write(line)
    s_ours = measure("sample-ours", sample, spec)
    s_sql = measure("sample-duckdb", sample, spec)
    s_row = measure("sample-rowwise", sample, spec)
    print(f"sample of {args.sample:,} rows: ours {s_ours['seconds']:.2f} s · DuckDB-SQL {s_sql['seconds']:.2f} s · row-by-row {s_row['seconds']:.2f} s")
    print(
        f"ratio DuckDB-SQL / ours: {s_sql['seconds'] / s_ours['seconds']:.1f}×   "
        f"row-by-row / ours: {s_row['seconds'] / s_ours['seconds']:.1f}×"
    )


if __name__ == "__main__":
    main()
