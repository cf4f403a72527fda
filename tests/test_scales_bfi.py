"""Scales on real data no one here wrote: the 25 personality items of the `bfi` data set that
ships with R's psych package (2,800 respondents, five scales of five items, some reversed),
against psych's own `alpha()` as the reference implementation.

Needs `Rscript` with psych (Debian: `r-cran-psych`; `.ci/run` installs it where it can);
skips with a message otherwise. R writes the data and its figures at test time.
"""

from __future__ import annotations

import shutil
import subprocess
from pathlib import Path

import numpy as np
import pandas as pd
import pytest

from logiccheck.loader import load_text
from logiccheck.pipeline import run_pipeline

# The keys of the five scales as psych's documentation of bfi gives them (a minus = reversed).
SCALES = {
    "agree": ["-A1", "A2", "A3", "A4", "A5"],
    "conscientious": ["C1", "C2", "C3", "-C4", "-C5"],
    "extraversion": ["-E1", "-E2", "E3", "E4", "E5"],
    "neuroticism": ["N1", "N2", "N3", "N4", "N5"],
    "openness": ["O1", "-O2", "O3", "O4", "-O5"],
}

R_SCRIPT = r"""
suppressMessages(library(psych))
args <- commandArgs(trailingOnly = TRUE)
data(bfi)
items <- bfi[, 1:25]
out <- data.frame(id = seq_len(nrow(items)), items)
names(out) <- tolower(names(out))  # spec names are lower case
write.csv(out, file.path(args[1], "bfi.csv"), row.names = FALSE, na = "")
keys <- list(agree = c("A1", "A2", "A3", "A4", "A5"), conscientious = c("C1", "C2", "C3", "C4", "C5"),
             extraversion = c("E1", "E2", "E3", "E4", "E5"), neuroticism = c("N1", "N2", "N3", "N4", "N5"),
             openness = c("O1", "O2", "O3", "O4", "O5"))
rev <- c("A1", "C4", "C5", "E1", "E2", "O2", "O5")
rows <- list()
for (name in names(keys)) {
  cols <- keys[[name]]
  complete <- na.omit(items[, cols])
  # psych::alpha on the respondents who answered every item; reversed items by key.
  a <- alpha(complete, keys = intersect(cols, rev), check.keys = FALSE, warnings = FALSE)
  rows[[name]] <- data.frame(scale = name, item = cols, n = nrow(complete),
                             alpha = a$total$raw_alpha, lower = a$feldt$lower.ci$raw_alpha,
                             upper = a$feldt$upper.ci$raw_alpha,
                             alpha_drop = a$alpha.drop$raw_alpha, r_drop = a$item.stats$r.drop)
}
write.csv(do.call(rbind, rows), file.path(args[1], "psych.csv"), row.names = FALSE)
"""


def _spec(marked: bool) -> str:
    lines = ['survey bfi "Personality items"', "", "codes six",
             '  vi = 1 "Very inaccurate"', '  mi = 2 "Moderately inaccurate"', '  si = 3 "Slightly inaccurate"',
             '  sa = 4 "Slightly accurate"', '  ma = 5 "Moderately accurate"', '  va = 6 "Very accurate"', ""]
    for keys in SCALES.values():
        for key in keys:
            lines.append(f'{key.lstrip("-").lower()}: single six "Item {key.lstrip("-")}"')
    lines.append("")
    for name, keys in SCALES.items():
        lines.append(f'scale {name} "{name.title()}"')
        for key in keys:
            flag = " reversed" if marked and key.startswith("-") else ""
            lines.append(f"  {key.lstrip('-').lower()}{flag}")
    return "\n".join(lines) + "\n"


@pytest.fixture(scope="module")
def bfi(tmp_path_factory: pytest.TempPathFactory) -> Path:
    if shutil.which("Rscript") is None:
        pytest.skip("Rscript is not installed (Debian: apt-get install r-cran-psych)")
    folder = tmp_path_factory.mktemp("bfi")
    script = folder / "export.R"
    script.write_text(R_SCRIPT)
    done = subprocess.run(["Rscript", str(script), str(folder)], capture_output=True, text=True, timeout=300)
    if done.returncode != 0:
        pytest.skip(f"R's psych package is not available: {done.stderr.strip()[-200:]}")
    return folder


def _run(folder: Path, marked: bool) -> tuple[dict[str, dict], list]:
    """The pipeline every command runs: each scale's JSON entry, and the finding blocks."""
    q = load_text(_spec(marked), "bfi.qlc").questionnaire
    result = run_pipeline(q, folder / "bfi.csv")
    scales = {s["scale"]: s for s in result.analyses["scales"].sections["scales"]}
    return scales, result.blocks


def test_bfi_figures_equal_psych(bfi: Path) -> None:
    ref = pd.read_csv(bfi / "psych.csv")
    results, blocks = _run(bfi, marked=True)
    assert len(pd.read_csv(bfi / "bfi.csv")) == 2800
    for name, rows in ref.groupby("scale", sort=False):
        rel = results[name]
        items = [i.lower() for i in rows["item"]]
        assert rel["n"] == rows["n"].iloc[0]
        assert rel["alpha"] == pytest.approx(rows["alpha"].iloc[0], abs=1e-6)
        assert rel["alpha_ci"] == pytest.approx([rows["lower"].iloc[0], rows["upper"].iloc[0]], abs=1e-3)
        got_drop = [rel["alpha_if_deleted"][i] for i in items]
        got_r = [rel["item_total"][i] for i in items]
        np.testing.assert_allclose(got_drop, rows["alpha_drop"].to_numpy(), rtol=0, atol=1e-6)
        np.testing.assert_allclose(got_r, rows["r_drop"].to_numpy(), rtol=0, atol=1e-6)
    low = [b.item for b in blocks if b.check == "low-reliability"]
    under = sorted(ref.loc[ref["alpha"] < 0.7, "scale"].unique())
    assert low == under == ["openness"]


def test_unmarked_reversed_items_are_misfits(bfi: Path) -> None:
    _, blocks = _run(bfi, marked=False)
    misfits = {b.item for b in blocks if b.check == "scale-misfit"}
    reversed_items = {k.lstrip("-").lower() for keys in SCALES.values() for k in keys if k.startswith("-")}
    assert reversed_items <= misfits, sorted(reversed_items - misfits)
