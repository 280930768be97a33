"""Typed errors: every failure a user can cause names where it happened.

One base, :class:`PullproofError`. Each subclass also inherits the builtin it
resembles, stores its fields and builds its text in ``__str__``, and owns the
process exit code the CLI returns for it. Positions are kept as file plus
line/column (computed from an offset only when the error is raised).
"""

from __future__ import annotations

from dataclasses import dataclass

__all__ = [
    "EXIT_FINDINGS",
    "EXIT_INPUT",
    "EXIT_INTERNAL",
    "EXIT_OK",
    "AnnotateError",
    "Location",
    "PullproofError",
    "RulesError",
    "SchematicError",
    "SchematicSyntaxError",
    "SourceText",
    "ValueParseError",
    "excerpt",
]

EXIT_OK = 0
EXIT_FINDINGS = 1  # review found verdicts at or above the --fail-on threshold
EXIT_INPUT = 2  # bad input: unreadable file, malformed schematic, bad value, bad rules, bad usage
EXIT_INTERNAL = 3  # a bug in pullproof itself; reported in one line, never a traceback


EXCERPT_CHARS = 40  # the most of a file's text an error message quotes


def excerpt(text: str, limit: int = EXCERPT_CHARS) -> str:
    """``text`` quoted for an error message: escaped (``repr``) and cut to ``limit`` characters.

    ``repr`` writes control characters, C1 controls and bidirectional marks as escapes
    (``\\x1b``, ``\\u202e``), so a quoted excerpt cannot drive a terminal.
    """
    if len(text) <= limit:
        return repr(text)
    return repr(text[:limit]) + "…"


@dataclass(frozen=True)
class Location:
    """A point in a source file, 1-based line and column."""

    file: str
    line: int
    col: int

    def __str__(self) -> str:
        return f"{self.file}:{self.line}:{self.col}"


class SourceText:
    """A file's text with lazy offset → line/column translation."""

    __slots__ = ("_line_starts", "name", "text")

    def __init__(self, name: str, text: str) -> None:
        self.name = name
        self.text = text
        self._line_starts: list[int] | None = None

    def locate(self, offset: int) -> Location:
        """Return the 1-based line and column (in characters) of ``offset``."""
        if self._line_starts is None:
            starts = [0]
            find = self.text.find
            i = find("\n")
            while i >= 0:
                starts.append(i + 1)
                i = find("\n", i + 1)
            self._line_starts = starts
        import bisect

        offset = max(0, min(offset, len(self.text)))
        row = bisect.bisect_right(self._line_starts, offset) - 1
        return Location(self.name, row + 1, offset - self._line_starts[row] + 1)


class PullproofError(Exception):
    """Base of every error pullproof reports to a user."""

    exit_code = EXIT_INPUT

    def __init__(self, message: str, location: Location | None = None) -> None:
        super().__init__(message)
        self.message = message
        self.location = location

    def __str__(self) -> str:
        if self.location is None:
            return self.message
        return f"{self.location}: {self.message}"


class SchematicError(PullproofError, ValueError):
    """The schematic (or one of its sheets) cannot be read as a schematic."""


class SchematicSyntaxError(SchematicError):
    """The S-expression text itself is malformed."""


class AnnotateError(PullproofError, RuntimeError):
    """Results cannot be written into the schematic safely; nothing was written."""


class RulesError(PullproofError, ValueError):
    """The project rules file is malformed or names an unknown key."""


class ValueParseError(PullproofError, ValueError):
    """A value written in a part field, rules file or family table cannot be read.

    Carries the text, the field it was read from, the part (or file) that holds
    the field, and what was expected.
    """

    def __init__(
        self,
        text: str,
        *,
        expected: str,
        field: str | None = None,
        part: str | None = None,
        location: Location | None = None,
    ) -> None:
        self.text = text
        self.expected = expected
        self.field = field
        self.part = part
        where = ""
        if field is not None and part is not None:
            where = f"field {field!r} of {part}: "
        elif field is not None:
            where = f"field {field!r}: "
        elif part is not None:
            where = f"{part}: "
        super().__init__(f"{where}cannot read {excerpt(text)}; expected {expected}", location)
