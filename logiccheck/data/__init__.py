"""Post-collection validation: read an export, map its columns, run the routing on it.

Public API: `validate(questionnaire, source, mapping=None)` → `ValidationResult`;
`DataMapping` (the `[data]` table of the configuration); `Finding`.
"""

from logiccheck.data.findings import Finding
from logiccheck.data.mapping import DataMapping, MappingError, load_mapping
from logiccheck.data.readers import DataReadError
from logiccheck.data.result import ValidationResult
from logiccheck.data.validate import validate, validate_frame

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
