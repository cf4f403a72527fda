"""Deeply nested input without recursion limits: the work runs in a thread with a large
stack and a raised recursion limit, so a condition of thousands of terms or brackets is
walked like any other (the parse tree's walkers are plain recursive functions)."""

from __future__ import annotations

import sys
import threading
from collections.abc import Callable
from typing import TypeVar

T = TypeVar("T")

STACK_BYTES = 512 * 1024 * 1024  # address space reserved, not memory used
RECURSION_LIMIT = 200_000


def run_deep(fn: Callable[[], T]) -> T:
    """`fn()` in a big-stack thread; its result returned, its exception re-raised here."""
    box: dict[str, object] = {}

    def work() -> None:
        try:
            box["result"] = fn()
        except BaseException as err:  # noqa: BLE001 - handed back to the calling thread
            box["error"] = err

    old = threading.stack_size()
    try:
        threading.stack_size(STACK_BYTES)
    except (ValueError, RuntimeError):  # a platform without a settable stack: run here
        return fn()
    limit = sys.getrecursionlimit()
    sys.setrecursionlimit(max(limit, RECURSION_LIMIT))
    try:
        thread = threading.Thread(target=work, name="logiccheck-deep", daemon=True)
        thread.start()
    finally:
        threading.stack_size(old)
    try:
        thread.join()
    finally:
        sys.setrecursionlimit(limit)
    if "error" in box:
        raise box["error"]  # type: ignore[misc]
    return box["result"]  # type: ignore[return-value]
