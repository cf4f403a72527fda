"""`logiccheck diff OLD NEW`: a semantic comparison of two versions of a spec.

    from logiccheck.diff import diff_questionnaires
    result = diff_questionnaires(load_file(old).questionnaire, load_file(new).questionnaire)
    result.changes        # list[Change]: kind, impact, item, message, spans, witness
    result.routing_changed
"""

from logiccheck.diff.compare import diff_questionnaires
from logiccheck.diff.model import KINDS, Change, SpecDiff

__all__ = ["KINDS", "Change", "SpecDiff", "diff_questionnaires"]
