"""Exports as they come: answer labels in cells, delimited label lists, decimal commas.
An export written with labels gives exactly the results of the same export with codes."""

from __future__ import annotations

from pathlib import Path

import pandas as pd
import pytest

from logiccheck.data import DataMapping, validate
from logiccheck.data.mapping import mapping_from_dict
from logiccheck.loader import load_file, load_text

ROOT = Path(__file__).resolve().parents[2]


def to_labels(frame: pd.DataFrame, q, *, scramble: bool = True) -> pd.DataFrame:  # type: ignore[no-untyped-def]
    """The export with every coded cell that is a declared code written as its answer text
    (case and spaces varied, as exports come); anything else left as it was."""
    out = frame.copy()
    for e in q.entries:
        if e.kind not in ("item", "sample") or e.stmt.type.kind != "single" or e.name not in out.columns:
            continue
        codes = q.item_codes(e.stmt)
        texts = {o.value: o.text for o in [*(codes.options if codes else []), *q.nonresponse]}
        col = out[e.name].astype(object)
        for i, v in enumerate(col.tolist()):
            try:
                code = int(float(v))
            except (TypeError, ValueError):
                continue
            if code in texts and float(v) == code:
                t = texts[code]
                col.iloc[i] = (f"  {t.upper()} " if i % 3 == 0 else t.lower()) if scramble else t
        out[e.name] = col
    return out


def _key(result) -> list[tuple]:  # type: ignore[no-untyped-def]
    return sorted((f.check, f.row, f.item, f.severity.value) for f in result.findings)


def test_demo_export_in_labels_gives_the_same_table_findings_and_dispositions(tmp_path: Path) -> None:
    q = load_file(ROOT / "specs" / "bikeshare.qlc").questionnaire
    frame = pd.read_csv(ROOT / "specs" / "bikeshare_export.csv", dtype=str, keep_default_na=False)
    labelled = to_labels(frame, q)
    assert (labelled["used"] != frame["used"]).sum() > 100  # the conversion did something
    path = tmp_path / "labels.csv"
    labelled.to_csv(path, index=False)
    codes = validate(q, ROOT / "specs" / "bikeshare_export.csv", DataMapping())
    for values in ("labels", "auto"):
        got = validate(q, path, mapping_from_dict({"values": values}))
        pd.testing.assert_frame_equal(got.table, codes.table)
        assert _key(got) == _key(codes)
        assert got.dispositions == codes.dispositions
        # Messages name the same things; only the cell as written differs.
        assert len(got.findings) == len(codes.findings)
    # Read as codes, the labels are all invalid: the setting is what makes them count.
    plain = validate(q, path, DataMapping())
    assert plain.table.set_index("item").loc["used", "invalid"] > 100


SPEC = """survey lab "Labels"

codes agree
  sd = 1 "Strongly disagree"
  d  = 2 "Disagree"
  a  = 3 "Agree"
  sa = 4 "Strongly agree"

nonresponse
  dk = 98 "Don't know"

codes topics
  lang = 1 "Languages"
  comp = 2 "Computing"
  art  = 3 "Art"

likes: single agree "I like the course."
topics: multi topics "Which topics?"
hours: decimal 0..40 "Hours a week?"
"""


def _run(rows: list[dict], tmp_path: Path, **data: object):  # type: ignore[no-untyped-def]
    q = load_text(SPEC, "lab.qlc").questionnaire
    path = tmp_path / "e.csv"
    pd.DataFrame(rows).to_csv(path, index=False)
    return validate(q, path, mapping_from_dict(data))


def test_labels_trimmed_and_case_free_nonresponse_and_delimited_multi(tmp_path: Path) -> None:
    rows = [
        {"id": 1, "likes": " strongly AGREE ", "topics": "Languages; Computing", "hours": "2,5"},
        {"id": 2, "likes": "don't know", "topics": "art", "hours": "10"},
        {"id": 3, "likes": "2", "topics": "1;3", "hours": "0,25"},
        {"id": 4, "likes": "DISAGREE", "topics": "Computing", "hours": "Don't know"},
    ]
    r = _run(rows, tmp_path, values="auto", decimal=",", multi={"layout": "delimited"})
    assert _key(r) == []
    assert r.frame["likes"].tolist() == [4.0, 98.0, 2.0, 2.0]
    assert r.frame[["topics_1", "topics_2", "topics_3"]].to_numpy().tolist() == [[1, 1, 0], [0, 0, 1], [1, 0, 1], [0, 1, 0]]
    assert r.frame["hours"].tolist() == [2.5, 10.0, 0.25, 98.0]


def test_a_cell_matching_no_label_is_invalid_with_a_did_you_mean(tmp_path: Path) -> None:
    rows = [{"id": 1, "likes": "Strongly agre", "topics": "Art", "hours": "1"},
            {"id": 2, "likes": "Maybe", "topics": "Art", "hours": "1"}]
    r = _run(rows, tmp_path, values="labels", multi={"layout": "delimited"})
    msgs = {f.row: f.message for f in r.findings if f.check == "invalid-value"}
    assert 'did you mean "Strongly agree"?' in msgs[1]
    assert "neither one of its codes nor one of its answer labels" in msgs[2] and "did you mean" not in msgs[2]


def test_codes_mode_reads_labels_as_invalid_and_points_stay_decimal(tmp_path: Path) -> None:
    rows = [{"id": 1, "likes": "Agree", "topics": "Art", "hours": "2,5"}]
    r = _run(rows, tmp_path, multi={"layout": "delimited"})
    assert {(f.item, f.check) for f in r.findings} >= {("likes", "invalid-value"), ("hours", "invalid-value")}


def test_mapping_rejects_an_unknown_values_setting() -> None:
    from logiccheck.data import MappingError

    with pytest.raises(MappingError, match="values"):
        mapping_from_dict({"values": "words"})
