"""The bar: every planted case is caught by exactly the intended check; clean
respondents are left alone. Run on the pipeline, the path every command takes."""

from __future__ import annotations

from logiccheck.loader import load_text
from logiccheck.pipeline import RunOptions, run_pipeline
from tests.quality.context import QUALITY
from tests.quality.planted import SPEC, build


def test_every_planted_case_and_only_it(tmp_path) -> None:  # type: ignore[no-untyped-def]
    export, frame, expected = build()
    export.to_csv(tmp_path / "export.csv", index=False)
    frame.to_csv(tmp_path / "frame.csv", index=False)
    result = run_pipeline(load_text(SPEC, "libvisit.qlc"), tmp_path / "export.csv",
                          RunOptions(frame=tmp_path / "frame.csv"))
    quality = [f for f in result.findings if f.check in QUALITY]
    got: dict[str, set[str]] = {rid: set() for rid in expected}
    for f in quality:
        got[str(f.respondent)].add(f.check)
    assert got == expected
    near = [f for f in quality if f.check == "near-duplicate"]
    assert {float(str(f.value)) for f in near} == {round(12 / 14, 4)}
    assert "p-near2" in next(f.message for f in near if f.respondent == "p-near1")

    assert result.state is not None
    disp = dict(zip(result.state.ids, result.disposition.tolist(), strict=True))
    assert disp["p-break"] == "break-off"
    # With the default thresholds (AAPOR Standard Definitions example thresholds, from
    # memory) nobody else is a break-off: everyone else answered at least 80 % of the
    # items asked of them (a blank free-text comment makes some partial).
    assert {rid for rid, d in disp.items() if d == "break-off"} == {"p-break"}
    assert {d for rid, d in disp.items() if rid != "p-break"} == {"complete", "partial"}
    # The break-off answered only the first gate of its route.
    row = result.state.ids.index("p-break")
    assert result.measures.loc[row, "gates_answered"] == 1 and result.measures.loc[row, "gates_due"] == 2
