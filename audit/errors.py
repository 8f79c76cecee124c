"""The project's one exception family.

:class:`LagauditError` is also a :class:`ValueError`, so callers that only know
the built-in still catch it.  Every error carries structured fields, so a
message can name the file, sheet, row and column, the value found and what was
expected, and so that many row problems can be collected before one is raised.
"""

from __future__ import annotations

from dataclasses import dataclass


@dataclass(frozen=True)
class Problem:
    """One thing wrong with one place in an input (a cell, a key, a file)."""

    message: str
    file: str | None = None
    sheet: str | None = None
    row: int | None = None
    column: str | None = None
    value: object = None
    expected: str | None = None

    def where(self) -> str:
        """``file:sheet, row N, column 'c'``, leaving out what is unknown."""
        head = ":".join(p for p in (self.file, self.sheet) if p)
        tail = []
        if self.row is not None:
            tail.append(f"row {self.row}")
        if self.column:
            tail.append(f"column {self.column!r}")
        return ", ".join(p for p in [head, *tail] if p)

    def __str__(self) -> str:
        text = self.message
        if self.value is not None:
            text += f" (found {self.value!r})"
        if self.expected:
            text += f"; expected {self.expected}"
        where = self.where()
        return f"{where}: {text}" if where else text


class LagauditError(ValueError):
    """Base of every error the tool raises on purpose; also a ``ValueError``.

    Parameters
    ----------
    message : str
        What went wrong, in the user's terms.
    file, sheet, row, column, value, expected
        Where, what was found and what was expected; any may be omitted.
    problems : list of Problem, optional
        Every problem found when several were collected before raising.
    """

    def __init__(self, message: str, *, file=None, sheet=None, row=None, column=None,
                 value=None, expected=None, problems=None):
        self.problem = Problem(message, file=file, sheet=sheet, row=row, column=column,
                               value=value, expected=expected)
        self.problems: list[Problem] = list(problems or [])
        self.file, self.sheet, self.row, self.column = file, sheet, row, column
        self.value, self.expected = value, expected
        super().__init__(str(self.problem))

    def __str__(self) -> str:
        head = str(self.problem)
        if not self.problems:
            return head
        return head + "".join(f"\n  - {p}" for p in self.problems)


class RegisterError(LagauditError):
    """A register file that cannot be read at all (not a single bad row)."""


class RuleError(LagauditError):
    """An invalid rule file: names the file, the key and what was expected."""


class EngineInputError(LagauditError):
    """Invalid arguments to an engine function called directly from Python."""
