"""An invented town-library survey with three margin variables, screen-outs, partials and
respondents missing a margin variable; each row's disposition is known by construction."""

from __future__ import annotations

from pathlib import Path

import numpy as np
import pandas as pd

SPEC = '''survey library_2026 "Town library users, 2026"

codes agree
  sd = 1 "Strongly disagree"
  d  = 2 "Disagree"
  a  = 3 "Agree"
  sa = 4 "Strongly agree"

sample area single { north = 1 "North", centre = 2 "Centre", south = 3 "South" }
sample age_group single { under30 = 1 "Under 30", mid = 2 "30 to 59", over60 = 3 "60 and over" }

section intro "About you"
  resident: single { yes = 1 "Yes", no = 2 "No" } "Do you live in town?" gate
  stop outsider "This survey is for town residents." when resident = no
  member: single { yes = 1 "Yes", no = 2 "No" } "Do you hold a library card?"
  visits: number 0..365 "About how many visits did you make last year?"

section opinions "Your library"
  q1: single agree "The opening hours suit me."
  q2: single agree "I find what I look for."
  q3: single agree "Staff are helpful."
  q4: single agree "The building is comfortable."
  q5: single agree "I would recommend the library."
'''

MARGINS = '''[margins.area]
north = 0.30
centre = 0.45
south = 0.25

[margins.age_group]   # population counts
under30 = 2100
mid = 3900
over60 = 2000

[margins.member]
yes = 0.35
no = 0.65

[weights]
respondents = ["complete", "partial"]
'''

ITEMS = ["member", "visits", "q1", "q2", "q3", "q4", "q5"]


def make(folder: Path, n: int = 400, seed: int = 7, margins: str = MARGINS) -> tuple[Path, Path, Path, pd.DataFrame]:
    """spec, export, margins paths, and the truth: each row's disposition and values."""
    rng = np.random.default_rng(seed)
    area = rng.choice([1, 2, 3], n, p=[0.45, 0.35, 0.2]).astype(float)
    age = rng.choice([1, 2, 3], n, p=[0.2, 0.45, 0.35]).astype(float)
    member = rng.choice([1, 2], n, p=[0.5, 0.5]).astype(float)
    kind = rng.choice(["complete", "partial", "outsider"], n, p=[0.8, 0.12, 0.08])
    rows = []
    for i in range(n):
        row: dict[str, object] = {"id": f"L{i + 1:04d}", "area": area[i], "age_group": age[i]}
        if kind[i] == "outsider":
            row["resident"] = 2
        else:
            row["resident"] = 1
            row["member"] = member[i]
            row["visits"] = int(rng.integers(0, 60))
            for q in ("q1", "q2", "q3", "q4", "q5"):
                row[q] = int(rng.integers(1, 5))
            if kind[i] == "partial":  # 5 of 8 due items answered: 0.625
                for q in ("q3", "q4", "q5"):
                    row[q] = None
        rows.append(row)
    truth = pd.DataFrame(rows, columns=["id", "area", "age_group", "resident", *ITEMS])
    truth["disposition"] = kind
    # Margin variables left blank for some respondents (none of them turns a complete into a partial).
    blank_area = rng.choice(np.flatnonzero(kind != "outsider"), 6, replace=False)
    truth.loc[blank_area, "area"] = np.nan
    blank_member = rng.choice(np.flatnonzero(kind == "complete"), 5, replace=False)
    truth.loc[blank_member, "member"] = np.nan
    spec = folder / "library.qlc"
    spec.write_text(SPEC, encoding="utf-8")
    export = folder / "library.csv"
    out = truth.drop(columns="disposition").copy()
    for c in out.columns[1:]:
        out[c] = out[c].map(lambda v: "" if v is None or (isinstance(v, float) and np.isnan(v)) else str(int(v)))
    out.to_csv(export, index=False)
    mfile = folder / "margins.toml"
    mfile.write_text(margins, encoding="utf-8")
    return spec, export, mfile, truth
