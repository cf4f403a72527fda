"""An invented questionnaire (town allotment gardens) and a simulated export of it, with a
few answers planted off the route, for the draft and routing-mismatch tests."""

from __future__ import annotations

from pathlib import Path

import numpy as np
import pandas as pd

from logiccheck.data.simulate import simulate
from logiccheck.loader import load_file, load_text
from logiccheck.model.questionnaire import Questionnaire

SPEC = Path(__file__).with_name("allotments.qlc")
ITEMS = ["age", "holds_plot", "years", "grows", "grows_other", "water", "water_ok", "mentor", "shed", "shed_state",
         "waitlist", "wait_years", "visit", "events", "fee_fair", "fee_comment", "overall"]


def questionnaire(text: str | None = None) -> Questionnaire:
    if text is None:
        return load_file(SPEC).questionnaire
    return load_text(text, "allotments.qlc").questionnaire


def export(rows: int = 3000, seed: int = 7, planted: int = 10) -> tuple[pd.DataFrame, list[tuple[int, str]]]:
    """The export (codes, default layout) and the planted off-route cells (row, item)."""
    sim = simulate(questionnaire(), rows, seed=seed)
    frame = sim.table.to_pandas()
    for c in frame.columns:
        if pd.api.types.is_float_dtype(frame[c]) and np.allclose(frame[c].dropna() % 1, 0):
            frame[c] = frame[c].astype("Int64")
    rng = np.random.default_rng(seed + 1)
    out: list[tuple[int, str]] = []
    # Water adequacy answered by plot holders who said they do not use the water butts.
    not_due = np.flatnonzero((frame["water"] == 2).fillna(False).to_numpy())
    for r in rng.choice(not_due, size=min(planted, len(not_due)), replace=False).tolist():
        frame.loc[r, "water_ok"] = 4
        out.append((r, "water_ok"))
    # Open day answered by rare visitors.
    not_due = np.flatnonzero(frame["visit"].isin([3, 4]).fillna(False).to_numpy())
    for r in rng.choice(not_due, size=min(planted, len(not_due)), replace=False).tolist():
        frame.loc[r, "events"] = 1
        out.append((r, "events"))
    return frame, out
