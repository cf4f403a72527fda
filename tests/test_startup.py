"""Start-up: commands are imported when run, heavy libraries only where a command needs
them, and the parser is kept on disk between runs."""

from __future__ import annotations

import json
import os
import subprocess
import sys
from pathlib import Path

import click
from click.testing import CliRunner

from logiccheck.cli.main import COMMANDS, cli
from logiccheck.syntax import grammar

ROOT = Path(__file__).resolve().parents[1]
HEAVY = ("pandas", "numpy", "pyarrow", "z3", "networkx", "matplotlib", "jinja2")


def _child(code: str, env: dict[str, str] | None = None) -> subprocess.CompletedProcess[str]:
    full = {**os.environ, "PYTHONPATH": str(ROOT), **(env or {})}
    return subprocess.run([sys.executable, "-c", code], cwd=ROOT, env=full, capture_output=True, text=True,
                          timeout=300, check=False)


def _imported_after(args: list[str]) -> set[str]:
    code = (
        "import sys, json\n"
        "from logiccheck.cli.main import cli\n"
        f"try:\n    cli.main({args!r}, prog_name='logiccheck')\nexcept SystemExit:\n    pass\n"
        f"print(json.dumps([m for m in {list(HEAVY)!r} if m in sys.modules]), file=sys.stderr)\n"
    )
    done = _child(code)
    return set(json.loads(done.stderr.strip().splitlines()[-1]))


def test_every_listed_command_loads_and_its_help_line_is_its_own() -> None:
    assert set(COMMANDS) >= {"lint", "explain", "graph", "validate", "check", "simulate", "diff", "report",
                             "clean", "rates"}
    ctx = click.Context(cli)
    eager = click.Group("logiccheck", help=cli.help)
    for name, (target, summary) in COMMANDS.items():
        cmd = cli.get_command(ctx, name)
        assert isinstance(cmd, click.Command), target
        assert cmd.name == name
        first = (cmd.help or "").split("\n\n")[0]
        assert " ".join(first.split()).startswith(summary.rstrip(".")), f"{name}: table says {summary!r}"
        eager.add_command(cmd, name)
    # The lazy listing must print what click prints with every command loaded.
    lazy_help = CliRunner().invoke(cli, ["--help"]).output
    eager_help = CliRunner().invoke(eager, ["--help"], prog_name="logiccheck").output
    assert lazy_help.split("Commands:")[1] == eager_help.split("Commands:")[1]


def test_help_imports_no_heavy_library() -> None:
    assert _imported_after(["--help"]) == set()


def test_lint_imports_only_what_routing_needs(tmp_path: Path) -> None:
    spec = tmp_path / "tiny.qlc"
    spec.write_text('survey tiny "Tiny"\n\nused: single (yes = 1 "Yes", no = 2 "No") "Used it?"\n'
                    'why: text "Why?" when used = yes\n', encoding="utf-8")
    got = _imported_after(["lint", str(spec), "--format", "json"])
    assert got <= {"z3", "networkx"}, got
    assert "z3" in got  # the routing checks ran


PARSE = (
    "from pathlib import Path\n"
    "from logiccheck.syntax.grammar import spec_parser\n"
    "print(spec_parser().parse(Path('specs/clinic_visit.qlc').read_text(encoding='utf-8')).pretty())\n"
)


def test_parser_is_cached_on_disk_and_parses_as_a_fresh_one(tmp_path: Path) -> None:
    folder = tmp_path / "cache"
    fresh = _child(PARSE, {"LOGICCHECK_CACHE_DIR": str(tmp_path / "file" / "sub")})  # see below
    first = _child(PARSE, {"LOGICCHECK_CACHE_DIR": str(folder)})
    files = list(folder.iterdir())
    assert len(files) == 1 and files[0].name.startswith("qlc-parser-"), files
    stamp = files[0].stat().st_mtime_ns
    second = _child(PARSE, {"LOGICCHECK_CACHE_DIR": str(folder)})
    assert first.returncode == second.returncode == fresh.returncode == 0, first.stderr + second.stderr
    assert first.stdout == second.stdout == fresh.stdout
    assert files[0].stat().st_mtime_ns == stamp  # read, not rewritten
    assert list(folder.iterdir()) == files  # no temporary file left behind


def test_an_unwritable_cache_folder_is_silently_skipped(tmp_path: Path) -> None:
    # A folder under a regular file cannot be created, even by root (unlike a read-only
    # folder, which root may still write).
    blocker = tmp_path / "file"
    blocker.write_text("not a folder", encoding="utf-8")
    done = _child(PARSE, {"LOGICCHECK_CACHE_DIR": str(blocker / "sub")})
    assert done.returncode == 0 and done.stderr == ""
    assert "survey" in done.stdout


def test_cache_file_name_changes_with_the_grammar(monkeypatch) -> None:  # type: ignore[no-untyped-def]
    monkeypatch.setenv("LOGICCHECK_CACHE_DIR", "/somewhere")
    a = grammar.cache_file("start: A\nA: \"a\"\n")
    b = grammar.cache_file("start: B\nB: \"b\"\n")
    assert a != b and a.parent == b.parent == Path("/somewhere")


def test_the_data_package_still_exports_its_public_names() -> None:
    import importlib

    import logiccheck.data as data

    assert sorted(data.__all__) == sorted(data._PUBLIC)
    for module in set(data._PUBLIC.values()):
        importlib.import_module(module)  # a submodule import must not rebind `validate`
    assert callable(data.validate) and data.validate.__module__ == "logiccheck.data.validate"
    for name in data.__all__:
        assert getattr(data, name) is getattr(importlib.import_module(data._PUBLIC[name]), name)
