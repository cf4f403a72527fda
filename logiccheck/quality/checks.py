"""Docs of the quality checks; their findings come from the modules beside this one."""

from __future__ import annotations

from logiccheck.checks.registry import describe

describe(
    "duplicate-id",
    severity="error",
    stage="quality",
    summary="The same respondent id appears on more than one row.",
    what="Every row whose id is shared with another row of the export, with the rows that share it.",
    why="Merged files, re-imports and re-opened interviews duplicate cases; every count and rate is then off, "
    "and answers cannot be traced to one sampled case.",
    bad="id,age\n1007,34\n1007,35",
    good="id,age\n1007,34\n1008,35",
)

describe(
    "duplicate-response",
    severity="warning",
    stage="quality",
    summary="Two or more respondents gave identical answers on every substantive item.",
    what="Respondents with at least `[quality.duplicates] exact_min_answered` answers (default 10; common "
    "practice, no source) whose answers match another respondent's on all substantive items, blanks "
    "included; each is shown with the respondents it copies.",
    why="An exact copy is rarely chance: a record entered twice, a fabricated interview, or one person "
    "answering twice. Whether to drop it is the study's decision; this check only points at it.",
    bad="id,q1,q2,q3\n11,2,5,1\n12,2,5,1",
    good="id,q1,q2,q3\n11,2,5,1\n12,3,5,1",
)

describe(
    "near-duplicate",
    severity="warning",
    stage="quality",
    summary="A respondent's maximum percent match with another respondent is above the threshold (default 85 %).",
    what="For each respondent, the largest share of compared items on which they agree with any other "
    "respondent (Kuriakose & Robbins 2016), flagged above `[quality.duplicates] near_threshold`, with the "
    "matched respondent. By default only items asked of either respondent of the pair are compared, so two "
    "people routed past the same section do not look alike; `near_basis = \"all\"` gives the published "
    "all-items statistic (blanks match blanks).",
    why="Near-copies point at interviews fabricated by editing a real one; exact copies are reported by "
    "`duplicate-response` instead.",
    bad="two respondents agreeing on 18 of 20 asked items (90 %)",
    good="respondents agreeing on about a third of their items, as chance gives on five-point scales",
)

describe(
    "straightline",
    severity="warning",
    stage="quality",
    summary="A grid answered with (nearly) the same answer on every row.",
    what="Grids where a respondent's answers have a standard deviation at or below "
    "`[quality.careless] straightline_sd` (default 0) or the longest run of identical answers covers at least "
    "`longest_run_share` of the answered rows (default: all), among respondents with at least `min_rows` "
    "answered rows; the standard deviation and the longest run are shown. Thresholds: common practice, no source.",
    why="Giving one answer down a grid is a common sign of inattention; the answers then carry no "
    "information about the statements.",
    bad="docks: 4, 4, 4, 4, 4, 4",
    good="docks: 4, 2, 5, 4, 3, 4",
)

describe(
    "pattern-response",
    severity="warning",
    stage="quality",
    summary="A grid answered in a repeating cycle, such as 1-2-3-4-1-2-3-4 or a see-saw 1-5-1-5.",
    what="Grids whose answered rows repeat a cycle of 2 to `pattern_max_period` answers (not all the same) "
    "over at least `pattern_min_length` rows and at least two full cycles. Thresholds: common practice, no source.",
    why="Drawing a pattern through a grid is inattentive responding that a standard-deviation test misses.",
    bad="1, 5, 1, 5, 1, 5",
    good="1, 5, 2, 4, 4, 5",
)

describe(
    "speeder",
    severity="warning",
    stage="quality",
    summary="The interview was much faster than the median (default: under a third of it).",
    what="Respondents whose interview length (column `duration`, seconds) is below "
    "`[quality.speed] fraction_of_median` × the median length of all respondents with a recorded length. "
    "The default 1/3 is common practice, no source.",
    why="Nobody reads and answers the questions in a third of the usual time; the answers are unlikely to "
    "be considered ones.",
    bad="median 600 s; this respondent 150 s",
    good="median 600 s; this respondent 420 s",
)

describe(
    "not-in-frame",
    severity="error",
    stage="quality",
    summary="A respondent's id (or e-mail) is not in the sample frame.",
    what="With `--frame FILE` (a CSV with column `id`, optionally `email`), respondents whose id is not in "
    "the frame, or whose e-mail is not, where both files have e-mails. E-mails are compared ignoring case and "
    "spaces.",
    why="A case that was never sampled (a forwarded link, a test interview, a typo in the id) does not "
    "belong to the sample the weights and rates describe.",
    bad="frame ids 1, 2, 3; export id 9",
    good="frame ids 1, 2, 3; export id 2",
)
