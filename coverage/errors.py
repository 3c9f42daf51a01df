"""One error family for lobeplan.

Everything the user can get wrong raises a ``LobeplanError`` subclass; the
command line turns it into one line on stderr and exit status 2.
"""
from __future__ import annotations

__all__ = ["LobeplanError", "SiteError", "UsageError", "OutputError"]


class LobeplanError(Exception):
    """Base of every error the user can cause and fix."""


class SiteError(ValueError, LobeplanError):
    """A site file (or a file it names) is wrong.

    Parameters
    ----------
    file : str
        The site file (or region file) concerned.
    key : str
        The key path, such as ``goal[2].region``; empty for the whole file.
    reason : str
        What is wrong and what is expected.
    """

    def __init__(self, file: str, key: str, reason: str) -> None:
        self.file = str(file)
        self.key = key
        self.reason = reason
        where = f"{self.file}: {key}: " if key else f"{self.file}: "
        super().__init__(where + reason)


class UsageError(ValueError, LobeplanError):
    """A command-line argument is wrong (names the option and the value)."""


class OutputError(OSError, LobeplanError):
    """An output folder or file cannot be written."""
