"""Every output format gives the same bytes for the same inputs.

Python randomises string hashing per process, so anything that iterates a set or a
hash-ordered structure on its way to a witness, a related location or a message shows up
as a difference between two processes started with different `PYTHONHASHSEED` values.
Each child runs every format once (in-process, to keep the test short) and writes the
bytes to a folder; the two folders must be identical.
"""

from __future__ import annotations

import os
import subprocess
import sys
from pathlib import Path

ROOT = Path(__file__).resolve().parents[1]
SPECS = sorted(str(p.relative_to(ROOT)) for p in [*ROOT.glob("specs/*.qlc"), *ROOT.glob("specs/faulty/*.qlc")])
# Every format on the specs with witnesses, loops and related locations; JSON on all.
SOME = ["specs/bikeshare.qlc", "specs/clinic_visit.qlc", "specs/onboarding.qlc",
        "specs/faulty/routing.qlc", "specs/faulty/onboarding_loops.qlc"]
EXPORT = ("specs/bikeshare.qlc", "specs/bikeshare_export.csv")

DRIVER = r"""
import sys
from pathlib import Path
from click.testing import CliRunner
from logiccheck.cli.main import cli

out = Path(sys.argv[1])
specs = sys.argv[2].split(",")
some = sys.argv[3].split(",")
spec, export = sys.argv[4], sys.argv[5]
try:
    runner = CliRunner(mix_stderr=False)
except TypeError:
    runner = CliRunner()

def keep(name, args):
    result = runner.invoke(cli, args, catch_exceptions=False)
    (out / name).write_bytes(result.stdout_bytes + b"\n--exit " + str(result.exit_code).encode())

keep("lint.all.json", ["lint", *specs, "--format", "json"])
for fmt in ("text", "json", "sarif", "junit", "github"):
    keep(f"lint.{fmt}", ["lint", *some, "--format", fmt, "--color", "never"])
keep("validate.json", ["validate", spec, "--data", export, "--format", "json"])
keep("validate.csv.stdout", ["validate", spec, "--data", export, "--format", "csv", "--out", str(out / "csv")])
"""


def _start(seed: str, out: Path) -> subprocess.Popen[bytes]:
    out.mkdir()
    env = {**os.environ, "PYTHONHASHSEED": seed, "PYTHONPATH": str(ROOT), "NO_COLOR": "1"}
    return subprocess.Popen(
        [sys.executable, "-c", DRIVER, str(out), ",".join(SPECS), ",".join(SOME), *EXPORT],
        cwd=ROOT, env=env, stdout=subprocess.PIPE, stderr=subprocess.PIPE,
    )


def _files(folder: Path) -> dict[str, bytes]:
    return {str(p.relative_to(folder)): p.read_bytes() for p in sorted(folder.rglob("*")) if p.is_file()}


def test_every_format_is_byte_identical_across_hash_seeds(tmp_path: Path) -> None:
    children = [_start("1", tmp_path / "a"), _start("4242", tmp_path / "b")]  # side by side
    for child in children:
        _, err = child.communicate(timeout=600)
        assert child.returncode == 0, err.decode(errors="replace")
    a, b = _files(tmp_path / "a"), _files(tmp_path / "b")
    # The csv folder's name differs between the runs; the files inside are compared.
    assert sorted(a) == sorted(b)
    assert {"lint.all.json", "lint.text", "lint.json", "lint.sarif", "lint.junit", "lint.github", "validate.json", "csv/findings.csv", "csv/items.csv"} <= set(a)
    # Witnesses are what used to follow hash order: make sure the output has some.
    assert b'"witness"' in a["lint.json"]
    for name in a:
        if name == "validate.csv.stdout":
            continue  # names the output folder, which differs by design
        assert a[name] == b[name], f"{name} differs between PYTHONHASHSEED=1 and 4242"
