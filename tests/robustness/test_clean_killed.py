"""`clean` killed at random moments leaves the previous set or the new one, never a mix."""

from __future__ import annotations

import os
import random
import shutil
import signal
import subprocess
import sys
import time
from pathlib import Path

import pytest

from logiccheck.safety.csvfile import write_csv_file
from tests.robustness.common import HEADER, ROOT, export_rows, fingerprint, project

KILLS = 5


def _set(folder: Path) -> dict[str, bytes]:
    return {p.name: p.read_bytes() for p in sorted(folder.iterdir())} if folder.is_dir() else {}


def _clean(spec: Path, data: Path, out: Path) -> subprocess.Popen[bytes]:
    env = {**os.environ, "PYTHONPATH": str(ROOT)}
    return subprocess.Popen([sys.executable, "-m", "logiccheck.cli.main", "clean", str(spec), "--data", str(data),
                             "--out", str(out)], env=env, stdout=subprocess.DEVNULL, stderr=subprocess.DEVNULL)


@pytest.mark.skipif(not hasattr(signal, "SIGKILL"), reason="needs SIGKILL")
def test_killed_runs_never_leave_a_mixed_set(tmp_path: Path) -> None:
    spec, data = project(tmp_path, ["first", "=2+2", "x", "", "y", "z"])
    first = data.read_bytes()
    second_rows = export_rows(["second", "-x", "w", "v", "", "u", "t"])
    # Reference sets: the outputs of an uninterrupted run on each export.
    refs = []
    for content in ("first", "second"):
        if content == "second":
            write_csv_file(data, HEADER, second_rows)
        ref = tmp_path / f"ref-{content}"
        start = time.perf_counter()
        assert _clean(spec, data, ref).wait(timeout=300) == 0
        took = time.perf_counter() - start
        refs.append(_set(ref))
    assert refs[0] != refs[1]
    # Put the first set in place, then run the second export over it, killed at random.
    out = tmp_path / "out"
    data.write_bytes(first)
    assert _clean(spec, data, out).wait(timeout=300) == 0
    write_csv_file(data, HEADER, second_rows)
    before = fingerprint(spec, data)
    rng = random.Random(11)
    seen = set()
    for _ in range(KILLS):
        proc = _clean(spec, data, out)
        time.sleep(rng.uniform(0.3 * took, 1.1 * took))
        proc.send_signal(signal.SIGKILL)
        proc.wait(timeout=60)
        now = _set(out)
        assert now in refs, sorted(now)  # whole, and one run's set
        seen.add(refs.index(now))
        # Put the first set back so the next kill can catch the exchange again.
        if now == refs[1]:
            shutil.rmtree(out)
            data.write_bytes(first)
            assert _clean(spec, data, out).wait(timeout=300) == 0
            write_csv_file(data, HEADER, second_rows)
    assert fingerprint(spec, data) == before
    leftovers = [p for p in tmp_path.iterdir() if p.name.startswith(".out.")]
    # A killed run may leave its hidden staging folder beside --out; never inside it.
    assert all(p.name.endswith(".part") for p in leftovers)
    assert seen  # at least one outcome checked
