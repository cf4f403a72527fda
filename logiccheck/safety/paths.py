"""No output replaces an input: every output path is compared with every input path
after resolving symbolic links, `..`, hard links and letter case (via the file system's
own identity of the files), before anything is written."""

from __future__ import annotations

import os
from collections.abc import Iterable
from pathlib import Path


class PathClash(ValueError):
    """An output that would replace an input, or an output folder that cannot be one."""


def _same(a: Path, b: Path) -> bool:
    try:
        return os.path.samefile(a, b)
    except OSError:
        pass
    try:
        ra, rb = a.resolve(), b.resolve()
    except (OSError, RuntimeError):
        return False
    return os.path.normcase(str(ra)) == os.path.normcase(str(rb))


def _labelled(items: Iterable[tuple[str, str | Path | None]]) -> list[tuple[str, Path]]:
    return [(label, Path(p)) for label, p in items if p is not None and str(p) not in ("", "-")]


def guard_outputs(outputs: Iterable[tuple[str, str | Path | None]], inputs: Iterable[tuple[str, str | Path | None]]) -> None:
    """Raise PathClash naming both files when an output is an input.

    `outputs` and `inputs` are (label, path) pairs, e.g. ("--out", "g.dot"),
    ("the export", "x.csv"); None and "-" (standard streams) are skipped."""
    ins = _labelled(inputs)
    for out_label, out in _labelled(outputs):
        for in_label, src in ins:
            if _same(out, src):
                raise PathClash(
                    f"{out}: {out_label} would replace {in_label} {src}; write the output somewhere else"
                )


def guard_folder(folder: str | Path, label: str = "--out") -> None:
    """An output folder must not be a file, nor lie under one."""
    path = Path(folder)
    for part in (path, *path.parents):
        if part.exists() and not part.is_dir():
            where = "is a file" if part == path else f"lies under {part}, which is a file"
            raise PathClash(f"{path}: {label} {where}; give a folder")



def guard_file_target(path: str | Path, label: str = "--out") -> None:
    """An output file must not be a folder, and its folder must not be a file."""
    target = Path(path)
    if str(target) == "-":
        return
    if target.is_dir():
        raise PathClash(f"{target}: {label} is a folder; give a file name")
    for part in target.parents:
        if part.exists() and not part.is_dir():
            raise PathClash(f"{target}: {label} lies under {part}, which is a file; give another path")
