"""Quality measures and checks: completeness, dispositions, outcome rates, duplicates,
careless responding and edit-rule repair. Plain inputs (DataFrames, numpy arrays) in,
records out; nothing here prints or reads files."""
