"""Shared pieces of the bad-input suite: a small invented spec and export, a command
runner that keeps stdout and stderr apart, and input fingerprints."""

from __future__ import annotations

import hashlib
import os
import subprocess
import sys
from pathlib import Path

from tests.cli_run import Ran, run_cli

ROOT = Path(__file__).resolve().parents[2]

# An invented ferry-passenger survey: one gate, a follow-up, a free-text comment.
SPEC = '''survey ferry "Harbour ferry passenger survey"

codes yn
  yes = 1 "Yes"
  no  = 2 "No"

age: number 0..120 "How old are you?" strict
regular: single yn "Do you take the ferry at least once a week?" gate
trips: number 0..50 "How many crossings last week?" when regular = yes
comment: text "Anything else you would like to tell us?"
'''
HEADER = ["id", "age", "regular", "trips", "comment"]


def export_rows(comments: list[str]) -> list[list[str]]:
    """One respondent per comment; every third one also answered a question not asked."""
    rows = []
    for i, text in enumerate(comments):
        regular = "1" if i % 2 == 0 else "2"
        trips = str(i % 7) if regular == "1" or i % 3 == 0 else ""
        rows.append([f"r{i}", str(20 + i % 50), regular, trips, text])
    return rows


def write_export(path: Path, comments: list[str]) -> Path:
    from logiccheck.safety.csvfile import write_csv_file

    write_csv_file(path, HEADER, export_rows(comments))
    return path


def project(tmp: Path, comments: list[str] | None = None) -> tuple[Path, Path]:
    spec = tmp / "ferry.qlc"
    spec.write_text(SPEC, encoding="utf-8")
    data = write_export(tmp / "ferry.csv", comments or ["fine", "late again", "", "=1+2", "ok"])
    return spec, data


def fingerprint(*paths: Path) -> dict[str, str]:
    return {str(p): hashlib.sha256(p.read_bytes()).hexdigest() for p in paths if p.is_file()}


def one_line_error(ran: Ran) -> str:
    """The run stopped with exit 2 and exactly one line on stderr, no traceback."""
    lines = [ln for ln in ran.stderr.splitlines() if ln.strip() and not ln.startswith("logiccheck: note:")]
    assert ran.returncode == 2, (ran.returncode, ran.stderr[-2000:])
    assert "Traceback" not in ran.stderr and "internal error" not in ran.stderr, ran.stderr[-2000:]
    assert len(lines) == 1, ran.stderr
    return lines[0]


def cli(*args: str) -> Ran:
    return run_cli(*args)


def cli_process(*args: str, stdin: bytes | None = None, cwd: Path | None = None, timeout: float = 120) -> Ran:
    """The command as users run it, in a child process."""
    env = {**os.environ, "PYTHONPATH": str(ROOT)}
    done = subprocess.run([sys.executable, "-m", "logiccheck.cli.main", *args], input=stdin, capture_output=True,
                          env=env, cwd=cwd, timeout=timeout)
    return Ran(done.returncode, done.stdout.decode("utf-8", "replace"), done.stderr.decode("utf-8", "replace"))
