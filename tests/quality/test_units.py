"""The quality checks as units, over a DataContext built from the data stage."""

from __future__ import annotations

import numpy as np
import pandas as pd

from logiccheck.loader import load_text
from logiccheck.quality import completeness
from logiccheck.quality.config import QualityConfig
from tests.quality.context import build_context, flagged, quality_blocks
from tests.quality.planted import SPEC, build_routed


def test_every_planted_case_is_found_and_nobody_else_is_flagged() -> None:
    export, frame, expected = build_routed()
    ctx = build_context(SPEC, export, sample_frame=frame)
    disp = dict(zip(ctx.ids.tolist(), ctx.disposition.tolist(), strict=True))
    # The respondents the speeder rule must leave alone are what they claim to be.
    assert {disp[f"s-minor{i}"] for i in range(6)} == {"minor"}
    assert {disp[f"s-break{i}"] for i in range(6)} == {"break-off"}
    assert {disp[f"s-part{i}"] for i in range(4)} == {"partial"}
    assert disp["p-fastpart"] == "partial" and disp["p-fast2"] == "complete"
    got = flagged(ctx)
    assert {rid: got.get(rid, set()) for rid in expected} == expected
    clean = [rid for rid, checks in expected.items() if not checks]
    assert len(clean) > 40


def test_speeder_message_compares_seconds_per_item_asked() -> None:
    export, frame, _ = build_routed()
    ctx = build_context(SPEC, export, sample_frame=frame)
    block = next(b for b in quality_blocks(ctx) if b.check == "speeder")
    rows = {f.respondent: f for f in block.records()}
    fast = rows["p-fast2"]
    asked = int(ctx.due[list(ctx.ids).index("p-fast2")].sum())
    assert f"120 s for {asked} items asked" in fast.message and fast.item == "duration"
    # The median is taken over completes and partials only (by hand, with pandas).
    seconds = pd.to_numeric(export["duration"], errors="coerce").to_numpy()
    per_item = seconds / ctx.due.sum(axis=1)
    timed = np.isin(ctx.disposition.astype(str), ["complete", "partial"]) & ~np.isnan(seconds)
    assert f"median {np.median(per_item[timed]):.2f} s per item" in fast.message


def test_no_duration_column_gives_a_note_and_no_speeders() -> None:
    export, _, _ = build_routed()
    ctx = build_context(SPEC, export.drop(columns=["duration"]))
    assert not [b for b in quality_blocks(ctx) if b.check == "speeder"]
    assert any("duration" in note for note in ctx.notes)


def test_duplicate_id_output_stays_small_for_a_huge_group() -> None:
    spec = 'survey s "S"\nq1: number 0..9 "Q?"\n'
    n = 21_000
    export = pd.DataFrame({"id": ["same"] * n + ["other"], "q1": ["1"] * (n + 1)})
    ctx = build_context(spec, export)
    block = next(b for b in quality_blocks(ctx) if b.check == "duplicate-id")
    assert block.rows.size == n
    assert block.messages is not None
    longest = max(len(m) for m in block.messages)
    assert longest < 120
    assert block.messages[0] == "id same appears on 21,000 rows; also on row 2, row 3, row 4, row 5, row 6 and 20,994 more"
    assert "row 1," in block.messages[1]


def test_duplicate_response_compares_answers_not_blanks() -> None:
    # Two break-offs with the same two answers are not copies (fewer than 10 answers);
    # two full records that agree everywhere are.
    items = "\n".join(f"q{i}: number 0..9 \"Q{i}?\"" for i in range(12))
    spec = f'survey s "S"\n{items}\n'
    full = [str(i % 7) for i in range(12)]
    rows = [["a", *full], ["b", *full], ["c", "1", "2", *[""] * 10], ["d", "1", "2", *[""] * 10],
            ["e", *full[:11], "9"]]
    export = pd.DataFrame(dict(zip(["id", *[f"q{i}" for i in range(12)]], map(list, zip(*rows, strict=True)), strict=True)))
    got = flagged(build_context(spec, export))
    assert got == {"a": {"duplicate-response"}, "b": {"duplicate-response"}, "e": {"near-duplicate"}}


def test_thresholds_come_from_the_configuration() -> None:
    export, frame, _ = build_routed()
    strict = QualityConfig.model_validate({"duplicates": {"near_threshold": 0.99}, "speed": {"fraction_of_median": 0.01}})
    got = flagged(build_context(SPEC, export, config=strict, sample_frame=frame))
    assert not any("near-duplicate" in c or "speeder" in c for c in got.values())


def test_dispositions_used_are_the_completeness_stage_ones() -> None:
    export, _, _ = build_routed()
    q = load_text(SPEC, "t.qlc").questionnaire
    ctx = build_context(q, export)
    from logiccheck.quality.bridge import route_state

    state = route_state(q, export)
    assert ctx.disposition.tolist() == completeness.dispositions(q, state, QualityConfig().completeness).tolist()


def test_the_validate_command_finds_every_planted_case_and_nothing_else(tmp_path) -> None:  # type: ignore[no-untyped-def]
    import json

    from click.testing import CliRunner

    from logiccheck.cli.main import cli
    from tests.quality.context import QUALITY

    export, frame, expected = build_routed()
    export.to_csv(tmp_path / "export.csv", index=False)
    frame.to_csv(tmp_path / "frame.csv", index=False)
    (tmp_path / "lib.qlc").write_text(SPEC)
    res = CliRunner().invoke(cli, ["validate", str(tmp_path / "lib.qlc"), "--data", str(tmp_path / "export.csv"),
                                   "--frame", str(tmp_path / "frame.csv"), "--format", "json"])
    assert res.exit_code in (0, 1), res.output
    got: dict[str, set[str]] = {rid: set() for rid in expected}
    for f in json.loads(res.stdout)["findings"]:
        if f["check"] in QUALITY:
            got[f["respondent"]].add(f["check"])
    assert got == expected
