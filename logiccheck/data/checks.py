"""The data stage's checks are declared in `data/validate.py`, beside the evaluator pass
that finds them; importing this module registers them."""

from logiccheck.data import validate as _validate  # noqa: F401 - registers the declarations
