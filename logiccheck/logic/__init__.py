"""Conditions as z3 formulas (Kleene three-valued) and the solver queries on them."""

from logiccheck.logic.encoding import Conjunct, Encoding, EncodingError, Reading, Value

__all__ = ["Conjunct", "Encoding", "EncodingError", "Reading", "Value"]
