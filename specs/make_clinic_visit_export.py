"""Rebuild the demo export `specs/clinic_visit_export.csv`: a simulated fielding of the
clinic visit survey (400 patients, seed 2026). The answers to the two scales' items are
drawn from one attitude per patient, so the items hang together as real ones do, except
`bld_privacy`, which patients answer on its own (it measures something else: the scale
check `scale-misfit` points at it). Run from the repository root:

    python specs/make_clinic_visit_export.py
"""

from __future__ import annotations

import sys
from pathlib import Path

import numpy as np
import pandas as pd
import pyarrow as pa

ROOT = Path(__file__).resolve().parent.parent
sys.path.insert(0, str(ROOT))

from logiccheck.atomic import write_text_atomic  # noqa: E402
from logiccheck.data.simulate import simulate  # noqa: E402
from logiccheck.loader import load_file  # noqa: E402

SPEC = ROOT / "specs" / "clinic_visit.qlc"
OUT = ROOT / "specs" / "clinic_visit_export.csv"
ROWS, SEED = 400, 2026

# item -> (how strongly it follows the patient's attitude, worded the other way round)
STAFF = {"staff_listen": (1.3, False), "staff_explain": (1.2, False), "staff_respect": (1.1, False),
         "staff_time": (1.0, False)}
BUILDING = {"bld_clean": (1.1, False), "bld_signs": (1.0, False), "bld_privacy": (0.1, False),
            "bld_access": (1.0, False), "bld_crowded": (1.0, True)}


def _theme(frame: pd.DataFrame, items: dict[str, tuple[float, bool]], rng: np.random.Generator) -> None:
    """Replace the substantive answers (codes 1..4) of one theme's items; blanks and
    non-response codes stay as the simulation drew them."""
    attitude = rng.normal(size=len(frame))
    for item, (load, flip) in items.items():
        latent = load * attitude + 0.7 * rng.normal(size=len(frame))
        code = np.digitize(latent, [-1.0, 0.0, 1.0]) + 1  # four points: 1..4
        if flip:
            code = 5 - code
        answered = frame[item].isin(["1", "2", "3", "4"])
        frame.loc[answered, item] = pd.Series(code.astype(str), index=frame.index)[answered]


def build() -> pd.DataFrame:
    q = load_file(SPEC).questionnaire
    frame = simulate(q, ROWS, seed=SEED).table.to_pandas(types_mapper={pa.int64(): pd.Int64Dtype()}.get)
    frame = frame.astype("string")
    rng = np.random.default_rng(SEED)
    _theme(frame, STAFF, rng)
    _theme(frame, BUILDING, rng)
    return frame


def main() -> None:
    frame = build()
    write_text_atomic(OUT, lambda fh: frame.to_csv(fh, index=False, lineterminator="\n"))
    print(f"wrote {OUT.relative_to(ROOT)} ({len(frame)} respondents)")


if __name__ == "__main__":
    main()
