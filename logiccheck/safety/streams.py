"""Exports from a pipe: `--data -` (standard input) or a named pipe is copied once into
a temporary file, which every reader then opens as often as it needs (a pipe can be read
only once; opening it twice waits forever for a second writer)."""

from __future__ import annotations

import atexit
import os
import shutil
import stat
import sys
import tempfile
from pathlib import Path

_SPOOLED: dict[str, Path] = {}


def is_stream(path: str | Path) -> bool:
    if str(path) == "-":
        return True
    try:
        mode = os.stat(path).st_mode
    except OSError:
        return False
    return stat.S_ISFIFO(mode) or stat.S_ISCHR(mode)


def spool(path: str | Path) -> Path:
    """A regular file holding what `path` holds: `path` itself unless it is a stream."""
    key = str(path)
    if not is_stream(path):
        return Path(path)
    if key in _SPOOLED:
        return _SPOOLED[key]
    suffix = ".csv" if key == "-" else "".join(Path(key).suffixes[-1:]) or ".csv"
    fd, name = tempfile.mkstemp(prefix="logiccheck-stdin-" if key == "-" else "logiccheck-pipe-", suffix=suffix)
    with os.fdopen(fd, "wb") as out:
        if key == "-":
            shutil.copyfileobj(sys.stdin.buffer, out, 1 << 20)
        else:
            with open(path, "rb") as src:
                shutil.copyfileobj(src, out, 1 << 20)
    copy = Path(name)
    atexit.register(lambda: copy.unlink(missing_ok=True))
    _SPOOLED[key] = copy
    return copy
