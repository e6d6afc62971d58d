"""One exception hierarchy for everything a user can get wrong.

The CLI turns any :class:`InputError` into one line on standard error and
exit code 2. Every error that comes from a file names the file and line.

>>> str(InputError("bad number '1x'", "board.cir", 12))
"board.cir:12: bad number '1x'"
"""

from __future__ import annotations

__all__ = ["InputError", "NetlistError", "ProfileError", "ReadingError", "EngineError"]


class InputError(Exception):
    """Bad input from the user: a netlist, a profile, an option, a reading."""

    def __init__(self, message: str, path: str | None = None, line: int | None = None):
        self.message = message
        self.path = path
        self.line = line
        super().__init__(str(self))

    def __str__(self) -> str:
        where = ""
        if self.path is not None:
            where = f"{self.path}:{self.line}: " if self.line is not None else f"{self.path}: "
        return f"{where}{self.message}"


class NetlistError(InputError):
    """A netlist that cannot be imported."""


class ProfileError(InputError):
    """An instrument profile or pin-role file that cannot be used."""


class ReadingError(InputError):
    """A typed reading that cannot be understood."""


class EngineError(Exception):
    """A simulation that failed for one part (not the user's fault).

    ``hint`` tells the user what to try; the caller records the failure
    for that part and goes on with the others.
    """

    def __init__(self, message: str, hint: str = ""):
        self.message = message
        self.hint = hint
        super().__init__(message + (f" ({hint})" if hint else ""))
