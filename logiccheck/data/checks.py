"""Docs of the data checks; the validator (`data/validate.py`) produces their findings."""

from __future__ import annotations

from logiccheck.checks.registry import describe

describe(
    "missing-column",
    severity="error",
    stage="data",
    summary="An item, grid row, option or the id has no column in the export.",
    what="A column the default layout (or the mapping) expects is absent: `NAME` for single, number and text items and sample variables, `NAME_N` for each option of a multi item, and the respondent id column.",
    why="Without the column every answer to that item is lost; the usual cause is a renamed variable in the fielding tool or a trimmed export.",
    bad="spec: trips: number 1..2000 \"Trips?\"\nexport header: id,age,used,trip_count",
    good="export header: id,age,used,trips\n(or map it: [data.columns] trips = \"trip_count\")",
)
describe(
    "unknown-column",
    severity="info",
    stage="data",
    summary="An export column matches nothing in the spec.",
    what="A column that is no item, grid row, option column, sample variable, id or duration column.",
    why="It is often an item added in the fielding tool but not in the spec, or a misspelt name; either way its answers are not checked.",
    bad="export header: id,age,used,age_group",
    good="add `age_group` to the spec, rename the column, or list it under `ignore` in the mapping",
)
describe(
    "invalid-value",
    severity="error",
    stage="data",
    summary="A cell holds a value the item cannot have.",
    what="Not a declared code, outside the number range, not a number (\"12a\"), not a whole number for a `number` item, a non-response code on a `strict` item, or a multi option cell other than 1, 0 or blank.",
    why="Impossible values distort every table they enter; an invalid value also opens no later item (cascade), so follow-ups behind it are judged as not due.",
    bad="used: single yesno \"Used a city bike?\"\nexport: used = 3",
    good="export: used = 1 (yes) or 2 (no)",
)
describe(
    "out-of-path",
    severity="error",
    stage="data",
    summary="An answer where the routing says the item is not asked.",
    what="A value in the export for a respondent the routing does not route to the item, with the root cause: which condition was false for them, and what the items it reads held.",
    why="Answers off the route come from platform glitches, the back button, paper forms or merged files; analysed as they are, they inflate the item's base.",
    bad="range_ok: single agree5 \"...\" when ebike = yes\nexport: ebike = 2 (no), range_ok = 4",
    good="export: ebike = 2 (no), range_ok blank",
)
describe(
    "missing-on-path",
    severity="info",
    stage="data",
    summary="The routing asks the item, but the export has no answer.",
    what="A respondent due the item (every condition true, no stop or skip) with a blank cell. Info by default, since respondents may leave items blank; an error for `required` items, which the form should have forced.",
    why="Item non-response where an answer was due; for a required item it means the form or the export dropped answers.",
    bad="age: number 0..120 \"How old are you?\" strict required\nexport: age blank",
    good="export: age = 34",
)
describe(
    "shown-mismatch",
    severity="warning",
    stage="data",
    summary="The export's shown / not-shown marker disagrees with the routing.",
    what="With `not_shown` or `unanswered` markers in the mapping: a cell marked not shown where the routing shows the item, or marked shown-but-unanswered where it does not.",
    why="The fielding tool routed differently from the spec: either the spec or the programmed questionnaire is wrong.",
    bad="mapping: not_shown = [\"-7\"]\nexport: used = 1 (yes), freq = -7",
    good="export: used = 1 (yes), freq = 2",
)
describe(
    "after-stop",
    severity="error",
    stage="data",
    summary="Answers recorded after a stop ended the interview.",
    what="A value for an item that comes after a `stop` that fired for this respondent.",
    why="A screened-out respondent should have no further answers; their presence means the screen-out did not work or files were merged.",
    bad="stop underage \"...\" when age < 16\nexport: age = 14, used = 1",
    good="export: age = 14, used blank",
)
describe(
    "check-failed",
    severity="error",
    stage="data",
    summary="An edit rule (`check`) does not hold for a respondent.",
    what="A `check` that applies to the respondent (reached, `when` true) whose `require` is false; `soft` checks give warnings. A `require` that is unknown because an input is blank is not a failure.",
    why="Edit rules state what consistent answers look like; failures point to misreporting or data-entry errors.",
    bad="check daily_needs_trips \"...\" when freq = daily require trips >= 100 soft\nexport: freq = 1 (daily), trips = 12",
    good="export: freq = 1 (daily), trips = 240",
)
