"""Static checks: what can be judged from names, codes, types and order alone."""

from logiccheck.checks.static import codes, cycles, names, order, scales  # noqa: F401
