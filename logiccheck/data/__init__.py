"""Post-collection validation: read an export, map its columns, run the routing on it.

Public API: `validate(questionnaire, source, mapping=None)` → `ValidationResult`;
`DataMapping` (the `[data]` table of the configuration); `Finding`.
"""

from __future__ import annotations

import importlib
import sys
import types
from typing import TYPE_CHECKING, Any

if TYPE_CHECKING:
    from logiccheck.data.findings import Finding
    from logiccheck.data.mapping import DataMapping, MappingError, load_mapping
    from logiccheck.data.readers import DataReadError
    from logiccheck.data.result import ValidationResult
    from logiccheck.data.validate import validate, validate_frame

# Public names and the module each lives in. Imported on first use: `lint` loads this
# package for the data checks' docs and must not pay for pandas and pyarrow.
_PUBLIC = {
    "DataMapping": "logiccheck.data.mapping",
    "DataReadError": "logiccheck.data.readers",
    "Finding": "logiccheck.data.findings",
    "MappingError": "logiccheck.data.mapping",
    "ValidationResult": "logiccheck.data.result",
    "load_mapping": "logiccheck.data.mapping",
    "validate": "logiccheck.data.validate",
    "validate_frame": "logiccheck.data.validate",
}

__all__ = [
    "DataMapping",
    "DataReadError",
    "Finding",
    "MappingError",
    "ValidationResult",
    "load_mapping",
    "validate",
    "validate_frame",
]


def __getattr__(name: str) -> Any:
    module = _PUBLIC.get(name)
    if module is None:
        raise AttributeError(f"module 'logiccheck.data' has no attribute {name!r}")
    value = getattr(importlib.import_module(module), name)
    globals()[name] = value
    return value


class _Package(types.ModuleType):
    """Importing the submodule `validate` would bind the package's `validate` to that
    module; the public name is the function, so that binding is refused."""

    def __setattr__(self, name: str, value: Any) -> None:
        if name in _PUBLIC and isinstance(value, types.ModuleType):
            return
        super().__setattr__(name, value)


sys.modules[__name__].__class__ = _Package
