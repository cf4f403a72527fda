"""`simulate` on its own terms: a fault-free export keeps to the spec's `check` rules and
passes `validate` with no errors; open answers come from the spec; the faults file is
named as the README and `--help` say."""

from __future__ import annotations

import json
from pathlib import Path

import pandas as pd
import pytest

from logiccheck.data.simulate import answer_texts, simulate
from logiccheck.loader import load_text
from tests.cli_run import run_cli

ROOT = Path(__file__).resolve().parents[2]
DEMOS = sorted(ROOT.glob("specs/*.qlc"))


@pytest.mark.parametrize("spec", DEMOS, ids=lambda p: p.stem)
def test_a_fault_free_simulation_validates_without_errors(spec: Path, tmp_path: Path) -> None:
    out = tmp_path / "sim.csv"
    made = run_cli("simulate", str(spec), "-n", "500", "--seed", "1", "--faults", "0", "--out", str(out))
    assert made.returncode == 0, made.stderr
    done = run_cli("validate", str(spec), "--data", str(out), "--format", "json")
    doc = json.loads(done.stdout)
    assert doc["respondents"] == 500
    errors = [f for f in doc["findings"] if f["severity"] == "error"]
    assert errors == [], errors[:3]
    # Soft rules are kept too: a fault-free simulation is meant to pass its edit rules.
    assert not [f for f in doc["findings"] if f["check"] == "check-failed"]
    # Open answers are the spec's own texts, each found verbatim in the spec file.
    text = spec.read_text(encoding="utf-8")
    q = load_text(text, str(spec)).questionnaire
    frame = pd.read_csv(out, dtype=str, keep_default_na=False)
    for e in q.items():
        if e.stmt.type.kind == "text" and e.name in frame:
            given = {v for v in frame[e.name] if v}
            assert given, e.name
            assert given <= set(answer_texts(q)), e.name
            assert all(f'"{v}"' in text for v in given), e.name


RULES = """survey rules "Rules"

section about "About you"
  age: number 0..120 "How old are you?" strict required
  kids: number 0..12 "How many children live with you?" strict required
  student: single { yes = 1 "Yes", no = 2 "No" } "Are you a student?" strict required
  note_it: text "Anything else?"

check adult_parent "A parent of three or more is at least 20"
  when kids >= 3
  require age >= 20

check old_student "Students over 60 are rare"
  when student = yes
  require age <= 60
  soft
"""


def test_rows_that_break_a_rule_are_redrawn_checked_with_pandas() -> None:
    q = load_text(RULES, "rules.qlc").questionnaire
    sim = simulate(q, 2000, seed=7)
    frame = sim.table.to_pandas()
    assert len(frame) == 2000 and sim.notes == []
    # The rules, restated as pandas filters (the oracle): nobody breaks them.
    assert not ((frame.kids >= 3) & (frame.age < 20)).any()
    assert not ((frame.student == 1) & (frame.age > 60)).any()
    # Without the redraw both rules would bite: the domains alone allow it.
    assert (frame.kids >= 3).any() and (frame.student == 1).any()
    # Open answers are drawn from the answer texts of the spec (here the inline list).
    assert set(frame.note_it.dropna()) <= {"Yes", "No"}
    again = simulate(q, 2000, seed=7)
    assert again.table.equals(sim.table)


def test_a_rule_nobody_can_meet_is_named_not_looped_on() -> None:
    # No `when`: the rule applies to everybody and no answer meets it.
    q = load_text(RULES.replace("  when kids >= 3\n  require age >= 20", "  require age > 500"), "rules.qlc").questionnaire
    sim = simulate(q, 300, seed=1)
    assert sim.table.num_rows == 300
    assert len(sim.notes) == 1 and "adult_parent" in sim.notes[0]


def test_the_faults_file_is_named_as_documented(tmp_path: Path) -> None:
    spec = str(ROOT / "specs" / "bikeshare.qlc")
    for name in ("sim.csv", "wave.parquet"):
        out = tmp_path / name
        assert run_cli("simulate", spec, "-n", "200", "--seed", "2", "--faults", "0.1", "--out", str(out)).returncode == 0
        side = out.with_suffix(".faults.csv")
        assert side.is_file() and side.read_text(encoding="utf-8").startswith('"row","id","item","fault"')
    assert sorted(p.name for p in tmp_path.iterdir()) == ["sim.csv", "sim.faults.csv", "wave.faults.csv",
                                                           "wave.parquet"]
    helptext = " ".join(run_cli("simulate", "--help").stdout.split())
    readme = (ROOT / "README.md").read_text(encoding="utf-8")
    assert "extension replaced by .faults.csv (sim.csv -> sim.faults.csv)" in helptext
    assert "extension replaced by `.faults.csv` (`sim.csv` → `sim.faults.csv`)" in readme
