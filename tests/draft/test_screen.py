"""The vectorised screen counts a literal's errors exactly as the miner does."""

from __future__ import annotations

import numpy as np
import pytest

from logiccheck.draft.mine import Var, _best_literal
from logiccheck.draft.screen import single_errors


def random_vars(rng: np.random.Generator, n: int) -> list[Var]:
    present = rng.random((n, 4)) > 0.2
    coded = np.where(present[:, 0], rng.choice([1, 2, 3, 4, 9], n), np.nan)
    yesno = np.where(present[:, 1], rng.choice([1, 2], n), np.nan)
    number = np.where(present[:, 2], rng.integers(0, 12, n).astype(float), np.nan)
    chosen = (rng.random((n, 3)) > 0.6) & present[:, 3:4]
    return [
        Var("c", "coded", present[:, 0], coded, present[:, 0] & (coded == 9), options=[1, 2, 3, 4], nr_codes=[9],
            position=0),
        Var("y", "coded", present[:, 1], yesno, np.zeros(n, bool), options=[1, 2], position=1),
        Var("x", "number", present[:, 2], number, np.zeros(n, bool), position=2),
        Var("m", "multi", present[:, 3], chosen=chosen, options=[1, 2, 3], position=3),
        Var("t", "text", rng.random(n) > 0.5, position=4),
    ]


@pytest.mark.parametrize("seed", range(6))
def test_single_literal_errors_equal_the_miners_own(seed: int) -> None:
    rng = np.random.default_rng(seed)
    n, items = 400, 5
    vars_ = random_vars(rng, n)
    # Targets that depend on the columns (so good literals exist) and some noise.
    answered = np.column_stack([
        vars_[0].value == 2, vars_[2].value >= 5, vars_[3].chosen[:, 1],  # type: ignore[index,operator]
        rng.random(n) > 0.5, vars_[1].present,
    ]) ^ (rng.random((n, items)) > 0.95)
    alive = rng.random((n, items)) > 0.1
    got = single_errors(vars_, answered, alive)
    for j in range(items):
        for c, v in enumerate(vars_):
            want = _best_literal(v, alive[:, j], answered[:, j])
            assert got[j, c] == (np.inf if want is None else want[0]), (j, v.name)
