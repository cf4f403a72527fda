"""logiccheck: questionnaire routing, stated once, linted before fielding and
enforced on the collected export."""

__version__ = "0.1.0"
