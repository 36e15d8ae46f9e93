"""Exceptions couplet raises.

Every one carries ``kind`` (the same stable names the command line reports: ``syntax``,
``unknown_element``, ``limit``, ``usage``, ``chemistry``, ``not_found``, ``ambiguous``,
``not_unique``, ``impossible``, the oxidation-number kinds, ``file``), ``message`` (one line),
and ``line`` / ``column`` (1-based place of the fault in the text you typed, ``None`` when it
has none).
"""

from typing import Optional

__all__ = ["CoupletError", "InputError", "ChemistryError", "FileError"]


class CoupletError(Exception):
    """Base class of every couplet exception."""

    def __init__(self, kind: str, message: str, line: Optional[int] = None,
                 column: Optional[int] = None) -> None:
        super().__init__(message)
        self.kind = kind
        self.message = message
        self.line = line
        self.column = column

    def __str__(self) -> str:
        where = f" at line {self.line}, column {self.column}" if self.line is not None else ""
        return f"{self.kind}: {self.message}{where}"


class InputError(CoupletError, ValueError):
    """What was given cannot be read as meant (syntax, unknown element, limits, bad values)."""


class ChemistryError(CoupletError):
    """The input was read, and the chemistry says no (no couple fits, no single balance, ...)."""


class FileError(CoupletError, OSError):
    """A file could not be read."""
