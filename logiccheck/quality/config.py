"""Every quality threshold, with its source. `QualityConfig.model_validate(dict)` is the
entry point; the `[quality]` table of `logiccheck.toml` is handed to it as is."""

from __future__ import annotations

from typing import Any

from pydantic import BaseModel, ConfigDict, Field, field_validator


class _Strict(BaseModel):
    model_config = ConfigDict(extra="forbid")


class CompletenessConfig(_Strict):
    """Completeness and dispositions.

    Defaults: complete when more than 80 % of applicable items are answered, partial from
    50 % to 80 %, break-off below 50 %: the example thresholds given in the AAPOR Standard
    Definitions (from memory; a study should set its own).
    """

    # A rule in the condition language over the per-respondent measures; true = complete.
    complete_rule: str | None = None
    # true = partial (checked only when not complete); otherwise break-off.
    partial_rule: str | None = None
    complete_above: float = Field(default=0.80, ge=0, le=1)  # AAPOR Standard Definitions example (from memory)
    partial_from: float = Field(default=0.50, ge=0, le=1)  # AAPOR Standard Definitions example (from memory)
    nonresponse_counts_as_answered: bool = True
    weights: dict[str, float] = Field(default_factory=dict)  # item -> importance (default 1)


class DuplicateConfig(_Strict):
    """`duplicate-response` and `near-duplicate` compare the items BOTH respondents
    answered (non-response codes are answers, blanks never match, free text is not
    compared); `near-duplicate` finds every pair above the threshold exactly, at any size."""

    # Kuriakose & Robbins (2016): a maximum percent match above 85 % is unlikely by chance.
    near_threshold: float = Field(default=0.85, ge=0, le=1)
    # Pairs compared on fewer items both answered than this are not scored, so a
    # respondent with fewer answers is never a near-duplicate (common practice, no source).
    near_min_items: int = Field(default=10, ge=1)
    # Exact copies count only among respondents with at least this many answers: short
    # routes coincide by chance (common practice, no source).
    exact_min_answered: int = Field(default=10, ge=1)
    # Candidate pairs per respondent the exact near-duplicate search may compare (about
    # 0.5 µs each on 300 items); parts of the search beyond it are skipped, said in a
    # note, and the maximum percent match is then estimated on a sample. 0 = no limit.
    # Measured on this project's benchmarks, no outside source.
    near_search_budget: int = Field(default=10, ge=0)


class CarelessConfig(_Strict):
    # A grid is checked only with at least this many answered rows (common practice, no source).
    min_rows: int = Field(default=4, ge=2)
    # Within-grid standard deviation at or below this counts as straight-lining
    # (0 = all the same; common practice, no source).
    straightline_sd: float = Field(default=0.0, ge=0)
    # Longest run of identical answers, as a share of the grid's answered rows, at or
    # above which a grid is flagged (common practice, no source).
    longest_run_share: float = Field(default=1.0, gt=0, le=1)
    # A repeating cycle (1-2-1-2, 1-2-3-4-1-2-3-4) must cover at least this many rows
    # and repeat at least twice (common practice, no source).
    pattern_min_length: int = Field(default=6, ge=4)
    pattern_max_period: int = Field(default=5, ge=2)


class SpeedConfig(_Strict):
    # Faster than this fraction of the median seconds per item asked (among completes and
    # partials; screen-outs and break-offs are never speeders): common practice, no source.
    fraction_of_median: float = Field(default=1 / 3, gt=0, lt=1)
    duration_column: str = "duration"


class FrameConfig(_Strict):
    id_column: str = "id"
    email_column: str = "email"


class RepairConfig(_Strict):
    weights: dict[str, float] = Field(default_factory=dict)  # item -> cost of changing it (default 1)
    timeout_ms: int = Field(default=10_000, ge=100)


class QualityConfig(_Strict):
    completeness: CompletenessConfig = Field(default_factory=CompletenessConfig)
    duplicates: DuplicateConfig = Field(default_factory=DuplicateConfig)
    careless: CarelessConfig = Field(default_factory=CarelessConfig)
    speed: SpeedConfig = Field(default_factory=SpeedConfig)
    frame: FrameConfig = Field(default_factory=FrameConfig)
    repair: RepairConfig = Field(default_factory=RepairConfig)

    @field_validator("completeness")
    @classmethod
    def _order(cls, v: CompletenessConfig) -> CompletenessConfig:
        if v.partial_from > v.complete_above:
            raise ValueError("partial_from must not exceed complete_above")
        return v

    def thresholds(self) -> dict[str, Any]:
        """Every threshold as used, for summaries."""
        return self.model_dump(mode="json")


# Where each default comes from, shown beside it in summaries and docs.
SOURCES: dict[str, str] = {
    "completeness.complete_above": "AAPOR Standard Definitions, example threshold (from memory)",
    "completeness.partial_from": "AAPOR Standard Definitions, example threshold (from memory)",
    "duplicates.near_threshold": "Kuriakose & Robbins (2016)",
    "duplicates.near_min_items": "common practice, no source",
    "duplicates.exact_min_answered": "common practice, no source",
    "duplicates.near_search_budget": "measured on this project's benchmarks, no outside source",
    "careless.pattern_max_period": "common practice, no source",
    "completeness.nonresponse_counts_as_answered": "the issue's default: a non-response code is an answer",
    "careless.min_rows": "common practice, no source",
    "careless.straightline_sd": "common practice, no source",
    "careless.longest_run_share": "common practice, no source",
    "careless.pattern_min_length": "common practice, no source",
    "speed.fraction_of_median": "common practice, no source",
}
