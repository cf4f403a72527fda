"""The optional `[report]` extra (jinja2, matplotlib): one clear error when it is missing."""

from __future__ import annotations

import importlib.util

INSTALL_HINT = 'pip install "logiccheck[report]"'


class ReportExtraMissing(RuntimeError):
    """Pictures and HTML need the report extra; the message says how to install it."""


def require_report_extra(*modules: str) -> None:
    for module in modules or ("matplotlib", "jinja2"):
        if importlib.util.find_spec(module) is None:
            raise ReportExtraMissing(
                f"pictures and HTML reports need {module}; install the report extra: {INSTALL_HINT}"
            )
