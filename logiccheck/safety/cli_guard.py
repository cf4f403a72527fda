"""Every command runs behind one guard: before it starts, no output may be one of its
inputs; while it runs, an operating-system error (read-only or full folder, a path under
a file), a nesting too deep to follow, or any other failure ends the run with one line
on standard error and exit status 2, never a traceback. Set LOGICCHECK_DEBUG=1 to see
the traceback of an unexpected failure."""

from __future__ import annotations

import errno
import functools
import os
from collections.abc import Callable, Iterable
from pathlib import Path
from typing import Any

import click

from logiccheck.safety.deep import run_deep
from logiccheck.safety.paths import PathClash, guard_file_target, guard_folder, guard_outputs

# Parameters that name an output; every other path parameter is an input.
OUTPUT_PARAMS = ("out",)
# How an input parameter is named in the one-line error.
INPUT_LABELS = {"spec": "the spec", "specs": "the spec", "data": "the export", "old": "the old spec", "new": "the new spec"}
# Commands whose --out is a folder, and the files they may write in it.
FOLDER_OUTPUTS: dict[str, Callable[[dict[str, Any]], list[str]]] = {}


def folder_outputs(command: str) -> Callable[[Callable[[dict[str, Any]], list[str]]], Callable[[dict[str, Any]], list[str]]]:
    """Declare the files a command writes inside its --out folder (from its parameters)."""

    def mark(fn: Callable[[dict[str, Any]], list[str]]) -> Callable[[dict[str, Any]], list[str]]:
        FOLDER_OUTPUTS[command] = fn
        return fn

    return mark


@folder_outputs("clean")
def _clean_outputs(params: dict[str, Any]) -> list[str]:
    from logiccheck.clean.outset import output_names

    if not params.get("data"):
        return []
    data = Path(params["data"])
    if str(data) == "-" or not data.suffix:
        # A pipe's cleaned export is named by the delimiter read from it: either may be written.
        return list(dict.fromkeys(output_names(data, ".csv") + output_names(data, ".tsv")))
    return output_names(data)


@folder_outputs("validate")
def _validate_outputs(params: dict[str, Any]) -> list[str]:
    return ["items.csv", "findings.csv"] if params.get("fmt") == "csv" else []


def _path_params(command: click.Command) -> list[str]:
    return [p.name for p in command.params if p.name and isinstance(p.type, click.Path)]


def _values(value: Any) -> Iterable[str]:
    if isinstance(value, (list, tuple)):
        yield from (str(v) for v in value if v)
    elif value:
        yield str(value)


def _config_files(paths: Iterable[str]) -> list[str]:
    """The configuration files `lint`, `validate` and the rest find above each spec."""
    from logiccheck.config import find_config

    found: list[str] = []
    for p in paths:
        try:
            hit = find_config(p)
        except Exception:  # noqa: BLE001 - a broken configuration is reported by the command itself
            hit = None
        if hit is not None:
            found.append(str(hit))
    return found


def check_paths(command: click.Command, params: dict[str, Any]) -> None:
    """Raise PathClash when an output of this invocation would replace an input."""
    names = _path_params(command)
    inputs: list[tuple[str, str]] = []
    for name in names:
        if name in OUTPUT_PARAMS:
            continue
        label = INPUT_LABELS.get(name, f"--{name.replace('_file', '').replace('_', '-')}")
        inputs += [(label, v) for v in _values(params.get(name))]
    specs = [v for n in ("spec", "specs") for v in _values(params.get(n))]
    inputs += [("the configuration", c) for c in _config_files(specs)]
    outputs: list[tuple[str, str]] = []
    for name in OUTPUT_PARAMS:
        out = params.get(name)
        if not out or out == "-":
            continue
        inner = FOLDER_OUTPUTS.get(command.name or "")
        files = inner(params) if inner else []
        if files:
            guard_folder(out)
            outputs += [("--out", str(Path(out) / f)) for f in files]
            continue
        guard_file_target(out)
        outputs.append(("--out", out))
        if command.name == "simulate":
            from logiccheck.cli.simulate import faults_path

            outputs.append(("--out", str(faults_path(Path(out)))))
    guard_outputs(outputs, inputs)


def _one_line(text: str) -> str:
    return " ".join(str(text).split())


def os_error_line(err: OSError) -> str:
    where = err.filename or ""
    if err.errno == errno.ENOSPC:
        why = "no space left on the device; free some space or write elsewhere"
    elif err.errno in (errno.EACCES, errno.EPERM, errno.EROFS):
        why = "permission denied (the folder or file is read-only); choose a writable place"
    elif err.errno == errno.ENOTDIR:
        why = "a part of this path is a file, not a folder; give another path"
    elif err.errno == errno.ENOENT:
        why = "no such file or folder"
    else:
        why = _one_line(err.strerror or str(err))
    return f"{where}: {why}" if where else why


def guarded(command: click.Command) -> click.Command:
    """Wrap a command's callback in the path check and the one-line error net."""
    callback = command.callback
    if callback is None or getattr(callback, "_guarded", False):
        return command

    @functools.wraps(callback)
    def run(*args: Any, **kwargs: Any) -> Any:
        from logiccheck.cli.common import fail

        try:
            check_paths(command, kwargs)
            return run_deep(lambda: callback(*args, **kwargs))
        except (click.exceptions.Exit, click.exceptions.Abort, click.ClickException, SystemExit, KeyboardInterrupt):
            raise
        except PathClash as err:
            fail(str(err))
        except OSError as err:
            fail(os_error_line(err))
        except RecursionError:
            fail("the input is nested too deeply to follow (e.g. a condition of thousands of brackets); simplify it")
        except MemoryError:
            fail("out of memory; the input is larger than this machine can hold")
        except Exception as err:
            if os.environ.get("LOGICCHECK_DEBUG"):
                raise
            fail(f"internal error ({type(err).__name__}: {_one_line(str(err))[:300]}); "
                 "please report it with the command you ran (LOGICCHECK_DEBUG=1 shows the traceback)")

    run._guarded = True  # type: ignore[attr-defined]
    command.callback = run
    return command
