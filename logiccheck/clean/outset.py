"""`clean` writes its outputs as one set.

Every file is written into a staging folder beside `--out` (same parent, so the same
file system), and the staging folder then takes the place of `--out` in one step:
a rename when `--out` does not exist yet, an atomic exchange of the two folders
(Linux `renameat2` with RENAME_EXCHANGE) when it does. Other files already in `--out`
are carried into the new folder as hard links (copies where links are not possible)
before the exchange, so nothing else in the folder changes. A run killed at any moment
leaves either the previous set or the new one under `--out`, never a mix; at worst a
hidden `.NAME.*.part` folder is left beside it.

Where the folder cannot be exchanged (it is, or holds, the working folder; the exchange
is not supported), the previous set is removed first and the new files are renamed in
one by one, `summary.json` last: a killed run leaves part of the new set, never old and
new files side by side.
"""

from __future__ import annotations

import ctypes
import errno
import os
import shutil
import tempfile
from collections.abc import Callable
from pathlib import Path

from logiccheck.atomic import output_mode

SUMMARY = "summary.json"
_AT_FDCWD = -100
_RENAME_EXCHANGE = 2


# The cleaned export's stem when the export came on standard input (`--data -`).
STDIN_STEM = "standard-input"


def output_names(export: Path, ext: str | None = None) -> list[str]:
    """The files `clean` writes for this export, in the order they are put in place.
    `ext`: the cleaned export's suffix where the export's name gives none (a pipe: the
    format read from it)."""
    stem = STDIN_STEM if str(export) == "-" else export.stem
    ext = (ext if ext is not None else export.suffix).lower()
    names = [f"{stem}.cleaned{ext}"]
    if ext != ".csv":
        names.append(f"{stem}.cleaned.csv")
    return [*names, "audit.csv", "findings.csv", SUMMARY]


def _exchange(a: Path, b: Path) -> bool:
    """Swap two paths in one step; False where the system cannot."""
    try:
        libc = ctypes.CDLL(None, use_errno=True)
        renameat2 = libc.renameat2
    except (OSError, AttributeError):
        return False
    renameat2.argtypes = [ctypes.c_int, ctypes.c_char_p, ctypes.c_int, ctypes.c_char_p, ctypes.c_uint]
    renameat2.restype = ctypes.c_int
    if renameat2(_AT_FDCWD, os.fsencode(a), _AT_FDCWD, os.fsencode(b), _RENAME_EXCHANGE) == 0:
        return True
    code = ctypes.get_errno()
    if code in (errno.EINVAL, errno.ENOSYS, errno.EXDEV, errno.ENOTSUP, errno.EPERM):
        return False
    raise OSError(code, os.strerror(code), str(b))


def _carry(entry: Path, into: Path) -> None:
    """Put another file of the output folder into the new folder without copying data."""
    target = into / entry.name
    if entry.is_symlink():
        os.symlink(os.readlink(entry), target)
    elif entry.is_dir():
        shutil.copytree(entry, target, symlinks=True, copy_function=_link_or_copy)
    else:
        _link_or_copy(str(entry), str(target))


def _link_or_copy(src: str, dst: str) -> None:
    try:
        os.link(src, dst)
    except OSError:
        shutil.copy2(src, dst)


def _holds_working_folder(out: Path) -> bool:
    try:
        cwd = Path.cwd().resolve()
    except OSError:
        return True
    resolved = out.resolve()
    return cwd == resolved or resolved in cwd.parents


def _folder_mode(out: Path) -> int:
    return output_mode(out, new=0o777, bits=0o7777)


def write_set(out: Path, writers: dict[str, Callable[[Path], None]]) -> list[Path]:
    """Write `writers` (file name -> function filling that path) as one set in `out`."""
    out = Path(os.path.abspath(out))
    out.parent.mkdir(parents=True, exist_ok=True)
    staging = Path(tempfile.mkdtemp(prefix=f".{out.name}.", suffix=".part", dir=out.parent))
    try:
        for name, write in writers.items():
            write(staging / name)
        os.chmod(staging, _folder_mode(out))
        if not out.exists():
            os.rename(staging, out)
            return [out / n for n in writers]
        if not out.is_dir():
            raise NotADirectoryError(errno.ENOTDIR, "is a file, not a folder", str(out))
        if not _holds_working_folder(out):
            for entry in out.iterdir():
                if entry.name not in writers:
                    _carry(entry, staging)
            if _exchange(staging, out):
                shutil.rmtree(staging, ignore_errors=True)  # now the previous set
                return [out / n for n in writers]
            for entry in staging.iterdir():  # undo the carried links before the file-by-file way
                if entry.name not in writers:
                    shutil.rmtree(entry) if entry.is_dir() and not entry.is_symlink() else entry.unlink()
        _one_by_one(staging, out, list(writers))
        return [out / n for n in writers]
    finally:
        if staging.exists():
            shutil.rmtree(staging, ignore_errors=True)


def _one_by_one(staging: Path, out: Path, names: list[str]) -> None:
    ordered = [n for n in names if n != SUMMARY] + [n for n in names if n == SUMMARY]
    for name in reversed(ordered):  # the previous summary first: an old set is never left looking whole
        (out / name).unlink(missing_ok=True)
    for name in ordered:
        try:
            os.replace(staging / name, out / name)
        except OSError as err:
            if err.errno != errno.EXDEV:
                raise
            shutil.move(str(staging / name), str(out / name))
