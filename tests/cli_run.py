"""Run the command line in-process (fast), with stdout and stderr kept apart."""

from __future__ import annotations

from dataclasses import dataclass

from click.testing import CliRunner

from logiccheck.cli.main import cli


@dataclass
class Ran:
    returncode: int
    stdout: str
    stderr: str


def run_cli(*args: str) -> Ran:
    try:
        runner = CliRunner(mix_stderr=False)  # click < 8.2
    except TypeError:
        runner = CliRunner()
    result = runner.invoke(cli, list(args), catch_exceptions=False)
    return Ran(result.exit_code, result.stdout, result.stderr)
