"""Writing report files: atomically (temp file in the same folder, then os.replace)."""

from __future__ import annotations

import os
import tempfile
from pathlib import Path


def write_atomic(path: str | Path, data: bytes | str) -> Path:
    """Write `data` to `path` so readers never see a half-written file."""
    path = Path(path)
    payload = data.encode("utf-8") if isinstance(data, str) else data
    folder = path.parent if str(path.parent) else Path(".")
    fd, tmp = tempfile.mkstemp(prefix=f".{path.name}.", suffix=".tmp", dir=folder)
    try:
        with os.fdopen(fd, "wb") as handle:
            handle.write(payload)
        os.chmod(tmp, _file_mode(path))
        os.replace(tmp, path)
    except BaseException:
        Path(tmp).unlink(missing_ok=True)
        raise
    return path


def _file_mode(path: Path) -> int:
    """Keep an existing file's mode; a new file gets the usual mode under the umask."""
    try:
        return path.stat().st_mode & 0o777
    except OSError:
        mask = os.umask(0)
        os.umask(mask)
        return 0o666 & ~mask


def numbered_paths(path: str | Path, names: list[str]) -> list[Path]:
    """`routing.svg` + sections → `routing.screening.svg`, ... (one file per picture)."""
    path = Path(path)
    if len(names) == 1:
        return [path]
    safe = ["".join(c if c.isalnum() or c in "-_" else "_" for c in name) or "part" for name in names]
    return [path.with_name(f"{path.stem}.{name}{path.suffix}") for name in safe]
