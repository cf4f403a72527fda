"""The margins file: what it accepts, and a one-line error naming the key for what it does not."""

from __future__ import annotations

from pathlib import Path

import pytest

from logiccheck.loader import load_text
from logiccheck.weights.margins import MarginsError, load_margins
from tests.cli_run import run_cli
from tests.weights.scenario import SPEC, make

Q = load_text(SPEC, "library.qlc").questionnaire


def _load(tmp_path: Path, text: str):  # type: ignore[no-untyped-def]
    f = tmp_path / "m.toml"
    f.write_text(text, encoding="utf-8")
    return load_margins(f, Q)


def test_shares_and_counts(tmp_path: Path) -> None:
    m = _load(tmp_path, "[margins.area]\nnorth = 0.3\ncentre = 0.45\nsouth = 0.25\n"
                        "[margins.age_group]\nunder30 = 2100\nmid = 3900\nover60 = 2000\n")
    area, age = m.variables
    assert area.given_as == "shares" and [c.code for c in area.categories] == [1, 2, 3]
    assert age.given_as == "counts" and age.total == 8000
    assert [c.share for c in age.categories] == [2100 / 8000, 3900 / 8000, 2000 / 8000]
    assert m.settings.respondents == ["complete", "partial"] and m.settings.method == "rake"


def test_rounded_shares_within_tolerance_are_rescaled(tmp_path: Path) -> None:
    m = _load(tmp_path, "[margins.area]\nnorth = 0.33\ncentre = 0.33\nsouth = 0.33\n")
    assert sum(c.share for c in m.variables[0].categories) == pytest.approx(1.0, abs=1e-15)


@pytest.mark.parametrize(("text", "expected"), [
    ("[margins.area]\nnorth = 0.5\ncentre = 0.4\nsouth = 0.3\n",
     "key `margins.area`: the shares sum to 1.2, not 1"),
    ("[margins.aera]\nnorth = 0.5\nsouth = 0.5\n",
     "key `margins.aera`: the spec has no sample variable or item `aera`; did you mean `area`?"),
    ("[margins.area]\nnorht = 0.5\nsouth = 0.5\n",
     "key `margins.area.norht`: `area` has no code label `norht`; did you mean `north`?"),
    ("[margins.visits]\nlow = 0.5\nhigh = 0.5\n",
     "key `margins.visits`: `visits` is a number item; margins need a single item or a coded sample variable"),
    ("[margins.area]\nnorth = 0\ncentre = 0.6\nsouth = 0.4\n",
     "key `margins.area.north`: 0.0 is not a positive number"),
    ("[margins.area]\nnorth = 1.0\n", "key `margins.area`: list at least two categories"),
    ("[margins.area]\nnorth = 0.5\nsouth = 0.5\n[weights]\nrespondents = [\"complete\", \"partal\"]\n",
     "key `weights.respondents`: no disposition is called 'partal'; did you mean `partial`?"),
    ("[margins.area]\nnorth = 0.5\nsouth = 0.5\n[weights]\ntrim = [2.0, 3.0]\n",
     "key `weights.trim`: Value error, give [low, high] with 0 < low <= 1 <= high"),
    ("[margins.area]\nnorth = 0.5\nsouth = 0.5\n[weights]\nmethod = \"linear\"\n",
     "key `weights.method`: 'linear' is not allowed; use one of 'rake'"),
    ("[margins.area]\nnorth = 0.5\nsouth = 0.5\n[weight]\nbase = \"pw\"\n", "unknown key `weight`"),
    ("[margins.area\nnorth = 0.5\n", "not valid TOML"),
])
def test_one_line_errors(tmp_path: Path, text: str, expected: str) -> None:
    with pytest.raises(MarginsError) as err:
        _load(tmp_path, text)
    message = str(err.value)
    assert expected in message and "\n" not in message and str(tmp_path / "m.toml") in message


def test_command_stops_with_exit_2_on_a_bad_margins_file(tmp_path: Path) -> None:
    spec, export, margins, _ = make(tmp_path, n=60, margins="[margins.area]\nnorth = 0.9\nsouth = 0.9\n")
    for command in (["validate", str(spec), "--data", str(export)],
                    ["clean", str(spec), "--data", str(export), "--out", str(tmp_path / "out")]):
        ran = run_cli(*command, "--margins", str(margins))
        assert ran.returncode == 2
        assert "shares sum to 1.8" in ran.stderr and "Traceback" not in ran.stderr
    assert not (tmp_path / "out").exists()


def test_an_unlisted_category_in_use_stops_the_run(tmp_path: Path) -> None:
    spec, export, margins, _ = make(tmp_path, n=60, margins="[margins.area]\nnorth = 0.6\ncentre = 0.4\n")
    ran = run_cli("validate", str(spec), "--data", str(export), "--margins", str(margins))
    assert ran.returncode == 2
    assert "key `margins.area`" in ran.stderr and "`south`, which has no population share" in ran.stderr
