"""Errors a claim file or an expression can cause, each naming where it happened.

Every error a user can cause is a ``ClaimError``; the command line prints it as one line
(``file:line:column: message``) and exits with status 2.  Anything else is our own bug.
"""

from __future__ import annotations

__all__ = ["ClaimError", "ClaimFileError", "ExpressionError", "EvaluationError",
           "LimitExceeded", "Undecided", "Place"]


class Place:
    """Where something stands: a file, a line and a column (1-based), any of them unknown."""

    __slots__ = ("file", "line", "column")

    def __init__(self, file: str | None = None, line: int | None = None,
                 column: int | None = None):
        self.file, self.line, self.column = file, line, column

    def shifted(self, line_offset: int, column_offset: int) -> "Place":
        return Place(self.file, (self.line or 1) + line_offset, (self.column or 1) + column_offset)

    def __str__(self) -> str:
        parts = [self.file or "<expression>"]
        if self.line is not None:
            parts.append(str(self.line))
            if self.column is not None:
                parts.append(str(self.column))
        return ":".join(parts)


class ClaimError(Exception):
    """Base of every error a claim file or expression can cause."""

    def __init__(self, message: str, place: Place | None = None):
        super().__init__(message)
        self.message = message
        self.place = place

    def at(self, place: Place) -> "ClaimError":
        """The same error, located at ``place`` (keeps a more precise place if it has one)."""
        if self.place is None or self.place.file is None:
            self.place = place if self.place is None else Place(
                place.file, self.place.line if self.place.line is not None else place.line,
                self.place.column if self.place.column is not None else place.column)
        return self

    def __str__(self) -> str:
        return f"{self.place}: {self.message}" if self.place else self.message


class ClaimFileError(ClaimError):
    """A claim file is malformed: bad TOML, a missing or unknown key, a bad family."""


class ExpressionError(ClaimError):
    """An expression is not valid: syntax, a name not in the registry, wrong arity or type."""


class EvaluationError(ClaimError):
    """An expression could not be evaluated on one case (e.g. a singular matrix)."""


class LimitExceeded(EvaluationError):
    """An evaluation went past a size or time limit (names the limit)."""

    def __init__(self, message: str, limit: str, place: Place | None = None):
        super().__init__(message, place)
        self.limit = limit


class Undecided(EvaluationError):
    """A certified comparison that the maximum precision cannot settle (SPEC §6).

    The case is recorded as ``undecided``: never as a pass or a fail.
    """
