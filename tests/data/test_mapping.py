"""The data mapping: defaults, TOML files, clear errors, renames, delimited multi
columns, shown / not-shown markers."""

from __future__ import annotations

from pathlib import Path

import pandas as pd
import pytest

from logiccheck.data import DataMapping, MappingError, load_mapping, validate
from logiccheck.data.mapping import mapping_from_dict
from logiccheck.loader import load_text

SPEC = """survey map "Mapping"

codes yesno
  yes = 1 "Yes"
  no  = 2 "No"

codes pets
  cat  = 1 "Cat"
  dog  = 2 "Dog"
  fish = 3 "Fish"

own: single yesno "Do you own a pet?" gate
kinds: multi pets "Which pets?" when own = yes
dog_walks: number 0..30 "Walks a week?" when kinds has dog
"""


def _q():
    return load_text(SPEC, "map.qlc").questionnaire


def test_defaults_match_design_section_6() -> None:
    m = DataMapping()
    assert m.id == "id" and m.duration == "duration" and m.multi.layout == "columns"
    assert m.option_column("purpose", 4) == "purpose_4"
    assert DataMapping.model_validate({}) == m


def test_toml_under_data_table_and_top_level(tmp_path: Path) -> None:
    nested = tmp_path / "a.toml"
    nested.write_text('[data]\nid = "resp"\n[data.columns]\nown = "Q1"\n', encoding="utf-8")
    flat = tmp_path / "b.toml"
    flat.write_text('id = "resp"\n[columns]\nown = "Q1"\n', encoding="utf-8")
    assert load_mapping(nested) == load_mapping(flat)
    assert load_mapping(nested).column_of("own") == "Q1"


@pytest.mark.parametrize(
    ("table", "needles"),
    [
        ({"idd": "x"}, ["`idd`", "allowed keys", "id"]),
        ({"multi": {"layout": "packed"}}, ["`multi.layout`", "columns", "delimited"]),
        ({"multi": {"colour": 1}}, ["`multi.colour`", "separator"]),
        ({"multi": {"column": "{name}"}}, ["`multi.column`", "{value}"]),
        ({"blank": "NA"}, ["`blank`"]),
    ],
)
def test_bad_mapping_names_key_and_what_is_allowed(table: dict, needles: list[str]) -> None:
    with pytest.raises(MappingError) as err:
        mapping_from_dict(table, "logiccheck.toml")
    text = str(err.value)
    assert text.startswith("logiccheck.toml: ") and "\n" not in text
    for needle in needles:
        assert needle in text, text


def test_bad_toml_file(tmp_path: Path) -> None:
    path = tmp_path / "m.toml"
    path.write_text("id = \n", encoding="utf-8")
    with pytest.raises(MappingError, match="not valid TOML"):
        load_mapping(path)


def test_renames_and_delimited_layout_give_the_default_layout_result() -> None:
    default = pd.DataFrame(
        {
            "id": ["r1", "r2", "r3"],
            "own": ["1", "2", "1"],
            "kinds_1": ["1", None, "0"],
            "kinds_2": ["1", "1", "0"],
            "kinds_3": ["0", None, "0"],
            "dog_walks": ["5", "3", None],
        }
    )
    other = pd.DataFrame(
        {
            "resp": ["r1", "r2", "r3"],
            "Q1": ["1", "2", "1"],
            "pets_owned": ["1;2", "2", ""],
            "dog_walks": ["5", "3", None],
        }
    )
    mapping = DataMapping.model_validate(
        {"id": "resp", "columns": {"own": "Q1", "kinds": "pets_owned"}, "multi": {"layout": "delimited"}}
    )
    a = validate(_q(), default)
    b = validate(_q(), other, mapping)
    assert a.table.equals(b.table)
    assert [(f.check, f.respondent, f.item) for f in a.findings] == [(f.check, f.respondent, f.item) for f in b.findings]
    # r2 chose dog although own = no: kinds and dog_walks are off the route.
    assert {(f.respondent, f.item) for f in a.findings if f.check == "out-of-path"} == {("r2", "kinds"), ("r2", "dog_walks")}


def test_markers_and_shown_mismatch() -> None:
    frame = pd.DataFrame(
        {
            "id": ["r1", "r2", "r3"],
            "own": ["1", "2", "1"],
            "kinds_1": ["1", "-7", "1"],
            "kinds_2": ["1", "-7", "0"],
            "kinds_3": ["0", "-7", "0"],
            # r1 has a dog: walks shown, but marked not shown; r2: correctly not shown;
            # r3 has no dog, but walks is marked shown and unanswered.
            "dog_walks": ["-7", "-7", "-9"],
        }
    )
    mapping = DataMapping.model_validate({"not_shown": ["-7"], "unanswered": ["-9"]})
    result = validate(_q(), frame, mapping)
    mismatches = sorted((f.respondent, f.item) for f in result.findings if f.check == "shown-mismatch")
    assert mismatches == [("r1", "dog_walks"), ("r3", "dog_walks")]
    # Markers are no value: no invalid values, and dog_walks is missing where due (r1).
    assert not [f for f in result.findings if f.check == "invalid-value"]
    assert result.table.set_index("item").loc["dog_walks"].missing_on_path == 1


def test_missing_and_unknown_columns() -> None:
    frame = pd.DataFrame({"id": ["r1"], "own": ["1"], "kinds_1": ["1"], "kinds_2": ["0"], "shoe_size": ["42"]})
    result = validate(_q(), frame)
    missing = sorted(f.message for f in result.findings if f.check == "missing-column")
    assert any("`kinds_3`" in m for m in missing) and any("`dog_walks`" in m for m in missing)
    unknown = [f for f in result.findings if f.check == "unknown-column"]
    assert len(unknown) == 1 and "`shoe_size`" in unknown[0].message and unknown[0].severity.value == "info"
    assert DataMapping.model_validate({"ignore": ["shoe_size"]}) is not None
    quiet = validate(_q(), frame, DataMapping.model_validate({"ignore": ["shoe_size"]}))
    assert not [f for f in quiet.findings if f.check == "unknown-column"]


def test_missing_and_unknown_columns_suggest_the_fix() -> None:
    renamed = pd.DataFrame({"id": ["r1"], "own": ["1"], "kinds": ["1;2"], "dog_walk": ["3"]})
    result = validate(_q(), renamed)
    messages = [f.message for f in result.findings]
    assert any("`kinds_1`" in m and 'layout = "delimited"' in m for m in messages)
    assert any("no column `dog_walks`" in m and 'dog_walks = "dog_walk"' in m for m in messages)
    assert any("column `dog_walk` is not in the spec" in m and "did you mean `dog_walks`?" in m for m in messages)
