"""The bar: every planted case is caught by exactly the intended check; clean
respondents are left alone."""

from __future__ import annotations

from logiccheck.data.readers import read_cells as read_export
from logiccheck.loader import load_text
from logiccheck.quality.run import run_quality
from tests.quality.planted import SPEC, build


def test_every_planted_case_and_only_it(tmp_path) -> None:  # type: ignore[no-untyped-def]
    export, frame, expected = build()
    export.to_csv(tmp_path / "export.csv", index=False)
    frame.to_csv(tmp_path / "frame.csv", index=False)
    q = load_text(SPEC, "libvisit.qlc").questionnaire
    data = read_export(tmp_path / "export.csv")
    result = run_quality(q, data, sample_frame=read_export(tmp_path / "frame.csv"))
    got: dict[str, set[str]] = {rid: set() for rid in expected}
    for f in result.findings:
        got[f.respondent].add(f.check)
    assert got == expected
    near = [f for f in result.findings if f.check == "near-duplicate"]
    assert {float(f.value) for f in near} == {round(12 / 14, 4)}
    assert "p-near2" in next(f.message for f in near if f.respondent == "p-near1")

    disp = dict(zip(result.state.ids, result.dispositions.tolist(), strict=True))
    assert disp["p-break"] == "break-off"
    # With the default thresholds (AAPOR Standard Definitions example thresholds, from
    # memory) nobody else is a break-off: everyone else answered at least 80 % of the
    # items asked of them (a blank free-text comment makes some partial).
    assert {rid for rid, d in disp.items() if d == "break-off"} == {"p-break"}
    assert {d for rid, d in disp.items() if rid != "p-break"} == {"complete", "partial"}
    # The break-off answered only the first gate of its route.
    row = result.state.ids.index("p-break")
    assert result.measures.loc[row, "gates_answered"] == 1 and result.measures.loc[row, "gates_due"] == 2


def test_near_duplicates_over_the_work_budget_are_skipped_with_a_note(tmp_path) -> None:  # type: ignore[no-untyped-def]
    from logiccheck.quality.config import QualityConfig
    from logiccheck.quality.run import near_duplicate_work

    export, _frame, _ = build()
    export.to_csv(tmp_path / "export.csv", index=False)
    q = load_text(SPEC, "libvisit.qlc").questionnaire
    data = read_export(tmp_path / "export.csv")
    small = QualityConfig.model_validate({"duplicates": {"near_max_work": 1.0}})
    result = run_quality(q, data, config=small)
    assert not [f for f in result.findings if f.check == "near-duplicate"]
    assert any("near_max_work" in note for note in result.notes)
    # Worked by hand: 3 rows, two items with 2 and 3 distinct values (blank counts) →
    # 3 pairs × 5 one-hot columns.
    import pandas as pd

    tiny = pd.DataFrame({"a": ["1", "2", "1"], "b": ["1", None, "3"]})
    assert near_duplicate_work(tiny) == 3 * 5
