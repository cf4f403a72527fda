"""The one post-collection pipeline: `run_pipeline(spec, export, RunOptions()) -> PipelineResult`.

`validate`, `check`, `clean`, `report` and the notebook API all call it, so the
configuration is found once, the export is read once, routed once, dispositions are
computed once (with the configured completeness rule), and every data and quality
check and analysis reads the same `DataContext`.
"""

from logiccheck.pipeline.run import INPUT_ERRORS, PipelineError, PipelineResult, RunOptions, run_pipeline

__all__ = ["INPUT_ERRORS", "PipelineError", "PipelineResult", "RunOptions", "run_pipeline"]
