"""Every output file is written atomically: into a temporary file beside the target,
then renamed over it, so an interrupted run leaves the old file or none, never half."""

from __future__ import annotations

import os
import tempfile
from collections.abc import Callable, Iterator
from contextlib import contextmanager
from pathlib import Path
from typing import Any, TextIO


def output_mode(path: Path, new: int = 0o666, bits: int = 0o777) -> int:
    """Keep an existing path's mode; a new one gets `new` under the umask (temporary
    files and folders are created private, which an output should not stay)."""
    try:
        return path.stat().st_mode & bits
    except OSError:
        mask = os.umask(0)
        os.umask(mask)
        return new & ~mask


def _file_mode(path: Path) -> int:
    return output_mode(path)


@contextmanager
def atomic_path(path: str | Path) -> Iterator[Path]:
    """A temporary path to write to; on success it replaces `path` in one step."""
    target = Path(path)
    folder = target.parent if str(target.parent) else Path(".")
    fd, tmp = tempfile.mkstemp(prefix=f".{target.name}.", suffix=".part", dir=folder)
    os.close(fd)
    try:
        yield Path(tmp)
        os.chmod(tmp, _file_mode(target))
        os.replace(tmp, target)
    except BaseException:
        Path(tmp).unlink(missing_ok=True)
        raise


def atomic_write(path: str | Path, write: Callable[[Path], Any]) -> None:
    """`write(tmp)` fills a temporary file that then replaces `path`."""
    with atomic_path(path) as tmp:
        write(tmp)


def write_atomic(path: str | Path, data: bytes | str) -> Path:
    """Write bytes (or UTF-8 text) to `path` atomically."""
    payload = data.encode("utf-8") if isinstance(data, str) else data
    with atomic_path(path) as tmp:
        tmp.write_bytes(payload)
    return Path(path)


def write_text_atomic(path: str | Path, write: Callable[[TextIO], Any]) -> None:
    """`write(handle)` writes UTF-8 text (no newline translation) that replaces `path`."""
    with atomic_path(path) as tmp, open(tmp, "w", encoding="utf-8", newline="") as handle:
        write(handle)
