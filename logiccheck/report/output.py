"""Report file names; writing goes through `logiccheck.atomic`."""

from __future__ import annotations

from pathlib import Path

from logiccheck.atomic import write_atomic

__all__ = ["numbered_paths", "write_atomic"]


def numbered_paths(path: str | Path, names: list[str]) -> list[Path]:
    """`routing.svg` + sections → `routing.screening.svg`, ... (one file per picture)."""
    path = Path(path)
    if len(names) == 1:
        return [path]
    safe = ["".join(c if c.isalnum() or c in "-_" else "_" for c in name) or "part" for name in names]
    return [path.with_name(f"{path.stem}.{name}{path.suffix}") for name in safe]
