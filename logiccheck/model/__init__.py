"""Stage 2: typed nodes (`nodes`), built from the tree (`build`), resolved (`resolve`)."""

from logiccheck.model.questionnaire import Entry, Questionnaire
from logiccheck.model.resolve import resolve

__all__ = ["Entry", "Questionnaire", "resolve"]
