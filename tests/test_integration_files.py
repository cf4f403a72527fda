"""The pre-commit hook and the example CI workflow name commands and formats that exist."""

from __future__ import annotations

import shlex
from pathlib import Path

import yaml
from click.testing import CliRunner

from logiccheck.cli.main import cli
from tests.conftest import ROOT


def _command_works(words: list[str], spec: str) -> int:
    assert words[0] == "logiccheck"
    return CliRunner().invoke(cli, [*words[1:], spec]).exit_code


def test_pre_commit_hooks_run_our_lint(tmp_path: Path) -> None:
    hooks = yaml.safe_load((ROOT / ".pre-commit-hooks.yaml").read_text())
    assert {h["id"] for h in hooks} == {"logiccheck-lint", "logiccheck-lint-strict", "logiccheck-format"}
    clean = str(ROOT / "tests" / "checks" / "unknown-name" / "good.qlc")
    broken = str(ROOT / "tests" / "checks" / "unknown-name" / "bad.qlc")
    # The layout hook: a formatted demo spec passes, a carelessly spaced copy fails.
    formatted = str(ROOT / "specs" / "bikeshare.qlc")
    messy = tmp_path / "messy.qlc"
    messy.write_text(Path(formatted).read_text(encoding="utf-8").replace(" = ", "=", 3), encoding="utf-8")
    for hook in hooks:
        assert hook["language"] == "python" and hook["files"] == r"\.qlc$"
        words = shlex.split(hook["entry"])
        good, bad = (formatted, str(messy)) if hook["id"] == "logiccheck-format" else (clean, broken)
        assert _command_works(words, good) == 0
        assert _command_works(words, bad) == 1
    assert messy.read_text(encoding="utf-8").count(" = ") < Path(formatted).read_text(encoding="utf-8").count(" = ")


def test_example_workflow_uses_real_commands() -> None:
    flow = yaml.safe_load((ROOT / "examples" / "ci" / "lint-specs.yml").read_text())
    steps = flow["jobs"]["lint"]["steps"]
    runs = "\n".join(s.get("run", "") for s in steps)
    assert "--format sarif" in runs and "--format github" in runs and "--format markdown" in runs
    assert any(s.get("uses", "").split("@")[0].endswith("upload-sarif") for s in steps)
    assert flow["permissions"]["security-events"] == "write"
    for fmt in ("sarif", "github"):
        result = CliRunner().invoke(cli, ["lint", str(ROOT / "specs" / "bikeshare.qlc"), "--format", fmt])
        assert result.exit_code == 0, result.output
