"""logiccheck: questionnaire routing, stated once, linted before fielding and
enforced on the collected export."""

from __future__ import annotations

from typing import Any

__version__ = "0.1.0"

# The notebook API, imported on first use so `import logiccheck` stays fast.
_API = {"load", "loads", "Survey", "Validation", "Diagnostics", "StageMissing"}
__all__ = ["__version__", *sorted(_API)]


def __getattr__(name: str) -> Any:
    if name in _API:
        from logiccheck import api

        return getattr(api, name)
    raise AttributeError(f"module 'logiccheck' has no attribute {name!r}")
