"""HTML report size and write time: the demo export, and 10,000 respondents × 100 items.

    python benchmarks/bench_report.py [--respondents N] [--items K] [--faults F]

Targets (issue 7): the demo report under 2 MB; the large report written in under 5 s.
The large export is simulated from a generated 100-item spec with planted faults and
validated first (validation is timed apart: it is not the report's cost). Baseline,
measured in the same run: writing the same findings as JSON records with pandas.
"""

from __future__ import annotations

import argparse
import sys
import tempfile
import time
from pathlib import Path

ROOT = Path(__file__).resolve().parents[1]
sys.path.insert(0, str(ROOT))

from benchmarks.generate import generate  # noqa: E402
from logiccheck.api import Survey  # noqa: E402
from logiccheck.data import validate  # noqa: E402
from logiccheck.data.simulate import simulate  # noqa: E402
from logiccheck.loader import load_file, load_text  # noqa: E402


def timed_report(survey: Survey, result: object, folder: Path, name: str) -> tuple[float, float, int]:
    """Wall and CPU seconds to gather, draw and write the report, and its size in bytes."""
    t0, c0 = time.perf_counter(), time.process_time()
    path = survey.validation_view(result).report(folder / name)
    return time.perf_counter() - t0, time.process_time() - c0, path.stat().st_size


def main() -> None:
    parser = argparse.ArgumentParser()
    parser.add_argument("--respondents", type=int, default=10_000)
    parser.add_argument("--items", type=int, default=100)
    parser.add_argument("--faults", type=float, default=0.02)
    args = parser.parse_args()

    with tempfile.TemporaryDirectory() as tmp:
        folder = Path(tmp)
        demo = Survey(load_file(ROOT / "specs" / "bikeshare.qlc"), "specs/bikeshare.qlc")
        demo.lint()
        demo_result = validate(demo.questionnaire, ROOT / "specs" / "bikeshare_export.csv", keep_cells=False)
        wall, cpu, size = timed_report(demo, demo_result, folder, "demo.html")
        print(f"demo export ({demo_result.respondents} respondents): report {size / 1e6:.3f} MB "
              f"(target < 2 MB: {'ok' if size < 2e6 else 'MISSED'}), written in {wall:.3f} s")

        survey = Survey(load_text(generate(items=args.items, skips=True, stops=True), "generated.qlc"), None)
        survey.lint()
        sim = simulate(survey.questionnaire, args.respondents, seed=3, faults=args.faults)
        t0 = time.perf_counter()
        result = validate(survey.questionnaire, sim.table.to_pandas(), keep_cells=False)
        validation = time.perf_counter() - t0
        items = len(result.table)
        print(f"large export: {result.respondents} respondents × {items} items, "
              f"{result.finding_count} findings; validation (not the report) {validation:.3f} s")
        view = survey.validation_view(result)
        t0 = time.perf_counter()
        view.findings.to_json(folder / "findings.json", orient="records")
        baseline = time.perf_counter() - t0
        wall, cpu, size = timed_report(survey, result, folder, "large.html")
    print(f"baseline (findings to JSON records): {baseline:.3f} s")
    print(f"large report: {size / 1e6:.3f} MB, written in {wall:.3f} s ({wall / baseline:.1f}× baseline), "
          f"CPU {cpu:.3f} s; target < 5 s: {'ok' if wall < 5 else 'MISSED'} "
          "(wall exceeds CPU when the machine is busy)")


if __name__ == "__main__":
    main()
