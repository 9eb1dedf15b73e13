"""The one exception tree of motorlib.

Every error a user can meet is a :class:`MotorlibError`; each concrete error
also inherits the builtin a caller would expect, so ``except ValueError`` keeps
working. File errors carry the facts as attributes and build their text as
``path:line: field: problem`` so every message names the file and the field.

::

    MotorlibError
    +-- CurveError (ValueError)          source, field, line: a curve we cannot accept
    |   +-- CurveSyntaxError             not well-formed, refused as unsafe, or too large
    |   +-- SchemaValidationError        breaks the XSD
    |   +-- CurveDataError               readable, but an invariant fails (time not increasing)
    |   +-- CsvFormatError               a CSV file we cannot read as a thrust curve
    +-- DesignationError (ValueError)    a motor label that does not follow the trade's pattern
    +-- QuantityError (ValueError)       a quantity with a missing, unknown or wrong-kind unit
    +-- SimulationInputError (ValueError) an airframe, launch condition or setting we cannot fly
    +-- InputFileError (ValueError)      a file we cannot read at all: missing, not a regular file, too large
    +-- CatalogError                     a catalog that cannot be opened or changed as asked
        +-- MotorNotFoundError (LookupError)     (a duplicate add is data: AddResult status "duplicate")

Suspicious but usable input is data, not a warning: a :class:`~motorlib.motor.checks.Finding`.

Only the standard library is imported here.
"""

from __future__ import annotations

from dataclasses import dataclass

__all__ = [
    "CatalogError",
    "CsvFormatError",
    "CurveDataError",
    "CurveError",
    "CurveSyntaxError",
    "DesignationError",
    "InputFileError",
    "MotorNotFoundError",
    "MotorlibError",
    "Problem",
    "QuantityError",
    "SchemaValidationError",
    "SimulationInputError",
]


def _rebuild_error(cls: type, args: tuple, state: dict) -> BaseException:
    """Unpickle a motorlib error without calling its ``__init__`` (whose arguments differ from ``args``)."""
    error = cls.__new__(cls)
    error.args = args
    error.__dict__.update(state)
    return error


class MotorlibError(Exception):
    """Base class of every error raised by motorlib.

    Errors pickle with their attributes (so that worker processes can raise them):
    ``__init__`` takes the facts, ``args`` holds the message, so the default pickling would fail.
    """

    def __reduce__(self) -> tuple:
        return (_rebuild_error, (type(self), self.args, dict(self.__dict__)))


@dataclass(frozen=True)
class Problem:
    """One broken invariant of a record, with a stable ``code``.

    ``index`` is the 0-based sample index for sample problems, so that a reader
    can translate it into a line number of its own file.
    """

    code: str
    field: str
    message: str
    index: int | None = None
    line: int | None = None


class CurveError(MotorlibError, ValueError):
    """A thrust curve (file or record) that cannot be accepted."""

    def __init__(
        self,
        source: str,
        problem: str,
        *,
        field: str | None = None,
        line: int | None = None,
    ) -> None:
        self.source, self.problem, self.field, self.line = source, problem, field, line
        where = f"{source}:{line}" if line else source
        super().__init__(f"{where}: {field}: {problem}" if field else f"{where}: {problem}")


class CurveSyntaxError(CurveError):
    """The file is not well-formed XML, is refused as unsafe, or is too large."""


class SchemaValidationError(CurveError):
    """The XML is well-formed but does not follow the motor-record XSD."""


class CsvFormatError(CurveError):
    """A CSV file that cannot be read as a two-column time/thrust table."""


class CurveDataError(CurveError):
    """The data are readable but break an invariant of a motor record.

    ``problems`` lists every broken invariant found (not only the first), each
    with a stable code; the message text describes the first of them and how
    many more there are.
    """

    def __init__(
        self,
        source: str,
        problems: list[Problem] | tuple[Problem, ...],
    ) -> None:
        if not problems:
            raise ValueError("`problems` must not be empty")
        self.problems: tuple[Problem, ...] = tuple(problems)
        first = self.problems[0]
        text = first.message
        if len(self.problems) > 1:
            text += f" (and {len(self.problems) - 1} more problem(s))"
        super().__init__(source, text, field=first.field, line=first.line)


class DesignationError(MotorlibError, ValueError):
    """A motor designation such as ``C6-5`` that cannot be parsed.

    ``position`` is the 0-based character index where parsing stopped.
    """

    def __init__(self, text: str, position: int, expected: str) -> None:
        self.text, self.position, self.expected = text, position, expected
        found = repr(text[position:]) if position < len(text) else "the end of the label"
        super().__init__(
            f"designation {text!r}: at character {position + 1} expected {expected}, found {found}"
        )


class QuantityError(MotorlibError, ValueError):
    """A quantity string whose unit is missing, unknown, or of the wrong kind."""

    def __init__(self, field: str, problem: str) -> None:
        self.field, self.problem = field, problem
        super().__init__(f"{field}: {problem}")


class SimulationInputError(MotorlibError, ValueError):
    """An airframe, launch condition or flight setting that cannot be simulated.

    ``source`` is the file (or "airframe"), ``field`` the key, e.g. ``launch.rail_length``.
    """

    def __init__(self, source: str, field: str, problem: str) -> None:
        self.source, self.field, self.problem = source, field, problem
        super().__init__(f"{source}: {field}: {problem}")


class InputFileError(MotorlibError, ValueError):
    """A file that cannot be read at all: missing, unreadable, not a regular file, too large or not text.

    Readers that have an error class of their own (curves, airframes) raise that one instead, with the same text.
    """

    def __init__(self, source: str, problem: str) -> None:
        self.source, self.problem = source, problem
        super().__init__(f"{source}: {problem}")


class CatalogError(MotorlibError):
    """A catalog that cannot be opened or changed as asked."""


class MotorNotFoundError(CatalogError, LookupError):
    """No motor (or more than one) matches a reference."""
