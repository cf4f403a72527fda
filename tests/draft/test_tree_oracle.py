"""Outside check: the miner against scikit-learn's decision-tree learner (depth <= 2).

On generated exports whose routing is a condition of the kinds the draft writes (one
literal or a conjunction of two, over coded, number and multi columns, with item
non-response and answers off the route as noise), a depth-2 tree can express every such
condition. Both learn on one half of the respondents and are scored on the other half;
where the tree's rule explains more respondents, the miner's must explain at least as many.
"""

from __future__ import annotations

import numpy as np
import pytest
from sklearn.tree import DecisionTreeClassifier

from logiccheck.draft.mine import Literal, Var, mine

N = 2400


def _columns(rng: np.random.Generator) -> list[Var]:
    cols: list[Var] = []
    for i in range(3):
        k = int(rng.integers(2, 6))
        value = rng.integers(1, k + 1, size=N).astype(float)
        present = rng.random(N) > 0.05
        value[~present] = np.nan
        cols.append(Var(f"c{i}", "coded", present, value, np.zeros(N, bool), options=list(range(1, k + 1)),
                        labels={c: f"v{c}" for c in range(1, k + 1)}, position=len(cols)))
    value = np.round(rng.uniform(0, 100, size=N))
    present = rng.random(N) > 0.05
    value[~present] = np.nan
    cols.append(Var("num", "number", present, value, np.zeros(N, bool), position=len(cols)))
    present = rng.random(N) > 0.05
    chosen = (rng.random((N, 3)) < 0.4) & present[:, None]
    cols.append(Var("multi", "multi", present, chosen=chosen, options=[1, 2, 3], labels={1: "a", 2: "b", 3: "c"},
                    position=len(cols)))
    return cols


def _truth(rng: np.random.Generator, cols: list[Var]) -> np.ndarray:
    def literal(v: Var) -> Literal:
        if v.kind == "coded":
            k = len(v.options)
            pick = rng.choice(v.options, size=int(rng.integers(1, k)), replace=False)
            return Literal(v.name, "in", tuple(float(x) for x in sorted(pick)))
        if v.kind == "number":
            return Literal(v.name, str(rng.choice(["ge", "lt"])), (float(rng.integers(20, 80)),))
        return Literal(v.name, "has", (float(rng.integers(1, 4)),))

    picks = rng.choice(len(cols), size=int(rng.integers(1, 3)), replace=False)
    rule = np.ones(N, dtype=bool)
    for p in picks.tolist():
        rule &= literal(cols[p]).mask(cols[p])
    answered = rule & (rng.random(N) > 0.04)  # item non-response on the path
    answered |= ~rule & (rng.random(N) < 0.01)  # answers off the route
    return answered


def _features(cols: list[Var]) -> np.ndarray:
    feats = []
    for v in cols:
        if v.kind == "multi":
            assert v.chosen is not None
            for j in range(v.chosen.shape[1]):
                feats.append(np.where(v.present, v.chosen[:, j], -1).astype(float))
        else:
            assert v.value is not None
            feats.append(np.where(v.present, v.value, -1.0))
    return np.column_stack(feats)


@pytest.mark.parametrize("seed", range(30))
def test_the_miner_explains_at_least_as_many_as_a_depth_two_tree(seed: int) -> None:
    rng = np.random.default_rng(seed)
    cols = _columns(rng)
    answered = _truth(rng, cols)
    train = np.zeros(N, dtype=bool)
    train[rng.choice(N, size=N // 2, replace=False)] = True
    test = ~train
    x = _features(cols)
    tree = DecisionTreeClassifier(max_depth=2, random_state=0).fit(x[train], answered[train])
    tree_right = int((tree.predict(x[test]) == answered[test]).sum())
    got = mine([v.subset(np.flatnonzero(train)) for v in cols], answered[train], np.ones(int(train.sum()), bool))
    ours = got.condition.mask({v.name: v for v in cols}, N)
    ours_right = int((ours[test] == answered[test]).sum())
    if tree_right > ours_right:
        pytest.fail(f"tree explains {tree_right}, the miner's `{got.condition.text({v.name: v for v in cols})}` {ours_right}")
    # Not vacuous: both found real structure (far above the better constant guess).
    constant = max(int(answered[test].sum()), int((~answered[test]).sum()))
    assert ours_right > constant or tree_right <= constant
