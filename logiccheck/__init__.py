"""logiccheck: questionnaire routing, stated once, linted before fielding and
enforced on the collected export."""

from __future__ import annotations

from typing import Any

__version__ = "0.1.0"

# The notebook API, imported on first use so `import logiccheck` stays fast.
_API = {"loads", "Survey", "Validation", "Cleaning", "Diagnostics"}
__all__ = ["__version__", "load", *sorted(_API)]


def __getattr__(name: str) -> Any:
    if name in _API or name == "load":
        from logiccheck import api

        return getattr(api, name)
    raise AttributeError(f"module 'logiccheck' has no attribute {name!r}")
