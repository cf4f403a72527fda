"""Rebuild the scale fixtures' exports (invented respondents; fixed seeds):
`python tests/data_checks/make_fixtures.py`. The expected findings are written by hand."""

from __future__ import annotations

from pathlib import Path

import numpy as np
import pandas as pd

HERE = Path(__file__).parent


def likert(trait: np.ndarray, load: float, rng: np.random.Generator, flip: bool = False) -> np.ndarray:
    x = np.clip(np.round(3 + load * trait + rng.normal(size=trait.size)), 1, 5).astype(int)
    return 6 - x if flip else x


def low_reliability() -> None:
    rng = np.random.default_rng(11)
    n = 40
    t = rng.normal(size=n)
    frame = pd.DataFrame({
        "id": [f"r{i:02d}" for i in range(1, n + 1)],
        "calm_1": likert(t, 1.5, rng), "calm_2": likert(t, 1.5, rng), "calm_3": likert(t, 1.5, rng, flip=True),
        "tidy_1": rng.integers(1, 6, n), "tidy_2": rng.integers(1, 6, n), "tidy_3": rng.integers(1, 6, n),
    })
    frame.to_csv(HERE / "low-reliability" / "export.csv", index=False)


def scale_misfit() -> None:
    rng = np.random.default_rng(12)
    n = 60
    t = rng.normal(size=n)
    frame = pd.DataFrame({
        "id": [f"s{i:02d}" for i in range(1, n + 1)],
        "hall_light": likert(t, 1.4, rng), "hall_quiet": likert(t, 1.4, rng),
        "hall_warm": likert(t, 1.4, rng), "hall_cramped": likert(t, 1.4, rng, flip=True),
    }).astype(object)
    frame.loc[4, "hall_quiet"] = 98  # a non-response code is no answer
    frame.loc[9, "hall_warm"] = ""  # nor is a blank
    frame.to_csv(HERE / "scale-misfit" / "export.csv", index=False)


if __name__ == "__main__":
    low_reliability()
    scale_misfit()
