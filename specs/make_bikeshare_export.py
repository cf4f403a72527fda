"""Rebuild the demo export `specs/bikeshare_export.csv`: a simulated fielding of the
bike-share survey (300 respondents, seed 2026) with a handful of hand-planted faults of
the kinds real exports show. Run from the repository root:

    python specs/make_bikeshare_export.py
"""

from __future__ import annotations

import os
import sys
from pathlib import Path

import pandas as pd
import pyarrow as pa

ROOT = Path(__file__).resolve().parent.parent
sys.path.insert(0, str(ROOT))

from logiccheck.data.simulate import simulate  # noqa: E402
from logiccheck.loader import load_file  # noqa: E402

SPEC = ROOT / "specs" / "bikeshare.qlc"
OUT = ROOT / "specs" / "bikeshare_export.csv"

# The planted faults, one respondent each (what a test of the demo expects to find).
PLANTED = {
    "range_ok": "out-of-path",  # battery rated by someone who rode no e-bike
    "freq": "invalid-value",  # code 5 on a four-point list
    "age": "missing-on-path",  # the required age left blank
    "trips": "check-failed",  # an almost-daily rider with 12 trips
    "trips_typo": "invalid-value",  # "3O" typed with a letter O
    "overall": "after-stop",  # an under-age respondent who answered on
    "why_not": "out-of-path",  # a rider answering the lapsed-riders question
    "purpose_other": "out-of-path",  # text kept after "other" was unticked (4 riders)
}


def build() -> pd.DataFrame:
    q = load_file(SPEC).questionnaire
    frame = simulate(q, 300, seed=2026).table.to_pandas(types_mapper={pa.int64(): pd.Int64Dtype()}.get)
    frame = frame.astype("string")
    used = frame["used"] == "1"
    rider = frame.index[used & frame["age"].astype("Int64").ge(16)]
    picks = iter(rider.tolist())

    def pick(condition: pd.Series | None = None) -> int:
        for row in picks:
            if condition is None or bool(condition.loc[row]):
                return row
        raise RuntimeError("not enough riders to plant the faults")

    row = pick(frame["ebike"] == "2")
    frame.loc[row, "range_ok"] = "4"
    row = pick(frame["freq"].notna())
    frame.loc[row, "freq"] = "5"
    row = pick()
    frame.loc[row, "age"] = pd.NA
    row = pick((frame["freq"] == "2") & frame["trips"].notna())
    frame.loc[row, ["freq", "trips"]] = ["1", "12"]
    row = pick(frame["trips"].notna() & (frame["freq"] != "1"))
    frame.loc[row, "trips"] = "3O"
    row = pick()
    frame.loc[row, "why_not_2"] = "1"
    frame.loc[row, ["why_not_1", "why_not_3"]] = ["0", "0"]
    for _ in range(4):
        row = pick((frame["purpose_4"] == "0") & frame["purpose_other"].isna())
        frame.loc[row, "purpose_other"] = "to the gym"
    young = frame.index[frame["age"].astype("Int64").lt(16).fillna(False)]
    frame.loc[young[0], ["used", "overall"]] = ["2", "7"]
    return frame


def main() -> None:
    frame = build()
    # Minimal quoting (only text that needs it), written beside the target then moved.
    tmp = OUT.with_name(f".{OUT.name}.tmp")
    frame.to_csv(tmp, index=False, lineterminator="\n")
    os.replace(tmp, OUT)
    print(f"wrote {OUT.relative_to(ROOT)} ({len(frame)} respondents)")


if __name__ == "__main__":
    main()
