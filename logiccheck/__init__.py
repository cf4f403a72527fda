"""logiccheck: questionnaire routing, stated once, linted before fielding and
enforced on the collected export."""

from __future__ import annotations

from typing import Any

__version__ = "0.1.0"

# The notebook API, imported on first use so `import logiccheck` stays fast.
# `logiccheck.load` is also the submodule logiccheck/load.py, made callable there, so
# `logiccheck.load(path)` works whether or not that module was imported first.
_API = {"loads", "Survey", "Validation", "Cleaning", "Diagnostics"}
__all__ = ["__version__", "load", *sorted(_API)]


def __getattr__(name: str) -> Any:
    if name == "load":
        import importlib

        return importlib.import_module("logiccheck.load")
    if name in _API:
        from logiccheck import api

        return getattr(api, name)
    raise AttributeError(f"module 'logiccheck' has no attribute {name!r}")
