"""HTML report size and write time for 10,000 respondents × 100 items.

    python benchmarks/bench_report.py [--respondents N] [--items K]

Targets (issue 7): the report under 2 MB, written in under 5 s. Baseline, measured in
the same run: writing the same findings as JSON records with pandas.
"""

from __future__ import annotations

import argparse
import importlib.util
import sys
import tempfile
import time
from dataclasses import dataclass
from pathlib import Path

import numpy as np
import pandas as pd

ROOT = Path(__file__).resolve().parents[1]
sys.path.insert(0, str(ROOT))

from logiccheck.api import Survey  # noqa: E402
from logiccheck.load import load_text  # noqa: E402
from tests.report.specgen import sixty_item_spec  # noqa: E402


@dataclass
class Result:
    table: pd.DataFrame
    findings: pd.DataFrame
    dispositions: pd.Series
    respondents: int


def synthetic_result(items: list[str], respondents: int, seed: int = 1) -> Result:
    """Per-item counts and ~3% findings per item, as a broken export would give."""
    rng = np.random.default_rng(seed)
    k = len(items)
    expected = rng.integers(respondents // 3, respondents, size=k)
    missing = rng.binomial(expected, 0.02)
    oop = rng.binomial(respondents - expected, 0.01)
    table = pd.DataFrame({"item": items, "expected": expected, "answered": expected - missing + oop,
                          "out_of_path": oop, "missing_on_path": missing, "invalid": rng.binomial(expected, 0.002)})
    n = int(missing.sum() + oop.sum())
    checks = np.where(rng.random(n) < missing.sum() / max(n, 1), "missing-on-path", "out-of-path")
    findings = pd.DataFrame({
        "check": checks,
        "severity": np.where(checks == "out-of-path", "error", "warning"),
        "respondent": [f"R{v:06d}" for v in rng.integers(0, respondents, size=n)],
        "row": rng.integers(2, respondents + 2, size=n),
        "item": rng.choice(items, size=n),
        "value": rng.choice(["1", "2", "98", "free text <b>answer</b>"], size=n),
        "message": "routing disagrees with the export",
    })
    dispositions = pd.Series(rng.choice(["complete", "partial", "break-off", "closed_1"], size=respondents,
                                        p=[0.8, 0.1, 0.07, 0.03]))
    return Result(table, findings, dispositions, respondents)


def main() -> None:
    parser = argparse.ArgumentParser()
    parser.add_argument("--respondents", type=int, default=10_000)
    parser.add_argument("--items", type=int, default=100)
    args = parser.parse_args()

    survey = Survey(load_text(sixty_item_spec(args.items), "bench.qlc"), None)
    survey.lint()
    raw = synthetic_result(survey.items, args.respondents)
    print(f"spec: {len(survey.items)} items; export: {args.respondents} respondents; findings: {len(raw.findings)}")
    with tempfile.TemporaryDirectory() as tmp:
        t0 = time.perf_counter()
        raw.findings.to_json(Path(tmp) / "findings.json", orient="records")
        baseline = time.perf_counter() - t0
        t0, c0 = time.perf_counter(), time.process_time()
        path = survey.validation_view(raw, export="synthetic.csv").report(Path(tmp) / "report.html")
        elapsed, cpu = time.perf_counter() - t0, time.process_time() - c0
        size = path.stat().st_size
    print(f"baseline (findings to JSON records): {baseline:.3f} s")
    print(f"report written: {elapsed:.3f} s  ({elapsed / baseline:.1f}× baseline)  target < 5 s: "
          f"{'ok' if elapsed < 5 else 'MISSED'}; CPU {cpu:.3f} s (wall exceeds CPU when the machine is busy)")
    print(f"report size: {size / 1e6:.2f} MB  target < 2 MB: {'ok' if size < 2e6 else 'MISSED'}")

    demo = ROOT / "specs" / "bikeshare_export.csv"
    if demo.exists() and importlib.util.find_spec("logiccheck.data") is not None:
        demo_survey = Survey.__new__(Survey)
        from logiccheck.load import load_file

        Survey.__init__(demo_survey, load_file(ROOT / "specs" / "bikeshare.qlc"), "specs/bikeshare.qlc")
        with tempfile.TemporaryDirectory() as tmp:
            t0 = time.perf_counter()
            out = demo_survey.report(Path(tmp) / "demo.html", data=demo)
            print(f"demo export report: {out.stat().st_size / 1e6:.2f} MB in {time.perf_counter() - t0:.3f} s")
    else:
        print("demo export report: skipped (needs specs/bikeshare_export.csv and the data stage)")


if __name__ == "__main__":
    main()
