"""Source lines for diagnostics, shared by the terminal and HTML reporters."""

from __future__ import annotations

from functools import lru_cache
from pathlib import Path


@lru_cache(maxsize=64)
def _file_lines(path: str) -> tuple[str, ...]:
    try:
        text = Path(path).read_text(encoding="utf-8", errors="replace")
        return tuple(text.replace("\r\n", "\n").replace("\r", "\n").split("\n"))
    except OSError:
        return ()


class SourceCache:
    """Lines of each spec, from texts already in memory or read once from disk."""

    def __init__(self, texts: dict[str, str] | None = None) -> None:
        self.texts = {k: tuple(v.replace("\r\n", "\n").replace("\r", "\n").split("\n")) for k, v in (texts or {}).items()}

    def line(self, file: str, line: int) -> str:
        lines = self.texts.get(file) or _file_lines(file)
        return lines[line - 1] if 1 <= line <= len(lines) else ""
