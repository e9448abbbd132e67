"""Problems found in a user's file, reported all at once and never as a traceback."""

from __future__ import annotations

from dataclasses import dataclass


@dataclass(frozen=True)
class Problem:
    """One problem: the file, where in it (a field path or a line and column), and what is wrong."""

    file: str
    where: str
    message: str
    #: For text that could not be read at all (broken TOML): the line it points at and a caret
    #: under the column, two lines ready to print under the problem; "" otherwise.
    excerpt: str = ""

    def __str__(self) -> str:
        return f"{self.file}: {self.located}" + (f"\n{self.excerpt}" if self.excerpt else "")

    @property
    def located(self) -> str:
        """"field: message" (or the message alone), for a screen that names the file once."""
        return f"{self.where}: {self.message}" if self.where else self.message


class RoomFileError(Exception):
    """Raised with every problem found in a room file or a catalogue file."""

    def __init__(self, problems):
        self.problems = tuple(problems)
        super().__init__("\n".join(str(p) for p in self.problems))
