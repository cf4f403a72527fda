"""Population margins: representativeness of the kept respondents and raked weights."""
