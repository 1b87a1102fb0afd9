"""Claims: the claim-file loader and the safe expression language.

* :mod:`.expression` parses and type-checks expressions (never ``eval``/``exec``);
* :mod:`.evaluate` evaluates them exactly, within limits;
* :mod:`.functions` is the function table (one entry per function);
* :mod:`.loader` reads claim files (TOML) into :class:`Claim` objects;
* :mod:`.errors` holds the error types, each naming file, line and column.
"""

from .errors import ClaimError, ClaimFileError, EvaluationError, ExpressionError, LimitExceeded
from .evaluate import Context, Limits, Outcome, evaluate, evaluate_claim
from .expression import parse

__all__ = ["ClaimError", "ClaimFileError", "EvaluationError", "ExpressionError",
           "LimitExceeded", "Context", "Limits", "Outcome", "evaluate", "evaluate_claim",
           "parse"]
