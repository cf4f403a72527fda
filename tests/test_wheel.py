"""The wheel ships the grammar: installed into a fresh virtual environment, `logiccheck
lint` works from a folder outside the checkout and reads the grammar from the package."""

from __future__ import annotations

import importlib.util
import os
import shutil
import site
import subprocess
import sys
from pathlib import Path

import pytest

from tests.conftest import ROOT, SPECS

pytestmark = pytest.mark.slow


def _run(cmd: list[str], **kwargs) -> subprocess.CompletedProcess[str]:  # type: ignore[no-untyped-def]
    return subprocess.run(cmd, capture_output=True, text=True, timeout=300, **kwargs)


def _clean_env() -> dict[str, str]:
    env = {k: v for k, v in os.environ.items() if k not in ("PYTHONPATH", "PYTHONHOME", "VIRTUAL_ENV")}
    env["NO_COLOR"] = "1"
    return env


def test_wheel_installs_and_lints_outside_the_checkout(tmp_path: Path) -> None:
    dist = tmp_path / "dist"
    build = [sys.executable, "-m", "build", "--wheel", "--outdir", str(dist)]
    if importlib.util.find_spec("hatchling") is not None:
        build.append("--no-isolation")  # the build backend is here: no download needed
    # Build from a copy, so the checkout is never written to.
    src = tmp_path / "src"
    shutil.copytree(ROOT, src, ignore=shutil.ignore_patterns(".git", ".venv*", "__pycache__", "dist", "build", "*.egg-info"))
    result = _run([*build, str(src)], cwd=tmp_path)
    assert result.returncode == 0, result.stderr[-2000:]
    wheels = list(dist.glob("logiccheck-*.whl"))
    assert len(wheels) == 1

    venv = tmp_path / "venv"
    result = _run([sys.executable, "-m", "venv", "--system-site-packages", str(venv)])
    assert result.returncode == 0, result.stderr
    bindir = venv / ("Scripts" if os.name == "nt" else "bin")
    python = bindir / ("python.exe" if os.name == "nt" else "python")
    # The dependencies come from the environment running the tests (which may itself be
    # a virtual environment, whose packages --system-site-packages does not see).
    purelib = _run([str(python), "-c", "import sysconfig; print(sysconfig.get_paths()['purelib'])"]).stdout.strip()
    Path(purelib, "_outer_site.pth").write_text("\n".join(site.getsitepackages()) + "\n")
    result = _run([str(python), "-m", "pip", "install", "--no-deps", "--no-index", "--quiet", str(wheels[0])], env=_clean_env())
    assert result.returncode == 0, result.stderr

    work = tmp_path / "elsewhere"
    work.mkdir()
    shutil.copy(SPECS / "bikeshare.qlc", work / "survey.qlc")
    result = _run([str(bindir / "logiccheck"), "lint", "survey.qlc"], cwd=work, env=_clean_env())
    assert result.returncode == 0, result.stdout + result.stderr
    assert "0 errors" in result.stdout

    probe = "import logiccheck; from logiccheck.syntax.grammar import grammar_location; print(logiccheck.__file__); print(grammar_location())"
    result = _run([str(python), "-c", probe], cwd=work, env=_clean_env())
    assert result.returncode == 0, result.stderr
    package_file, grammar = result.stdout.strip().splitlines()
    installed = Path(package_file).resolve().parent
    assert installed.is_relative_to(venv.resolve()), package_file
    assert Path(grammar).resolve() == installed / "_grammar" / "qlc.lark"
    assert not Path(grammar).resolve().is_relative_to(ROOT)
