"""Routing checks: exact answers from the solver (stage "routing", skipped by --no-solver)."""

from logiccheck.checks.routing import conditions, length, reach, scales, stops  # noqa: F401
