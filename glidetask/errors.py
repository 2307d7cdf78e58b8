"""Input errors that carry every problem found, each with its file and place.

A reader collects all the problems it finds into one :class:`InputError`; the
command line prints them one per line as ``glidetask: error: FILE: WHERE: WHAT``
and exits with status 2 (shared/CONTRACT.md section 7).
"""

from __future__ import annotations

from dataclasses import dataclass


@dataclass(frozen=True)
class Problem:
    """One problem in the user's input.

    Attributes
    ----------
    file : str
        The file as the user named it, or ``"command line"`` for an option.
    where : str
        Line number (``"line 12"``), key path (``"[glider] pilot_kg"``),
        feature index (``"feature 3"``) or option name (``"--wind"``).
    what : str
        What is wrong, in the user's terms.
    """

    file: str
    where: str
    what: str

    def __str__(self) -> str:
        return f"glidetask: error: {one_line(self.file)}: {one_line(self.where)}: {one_line(self.what)}"


def one_line(text: str) -> str:
    """``text`` safe to print as part of one line: line breaks and other control characters
    as backslash escapes (``\\n``), bytes of a non-UTF-8 file name as ``\\xNN``."""
    text = str(text)
    if text.isprintable():
        return text
    out = []
    for char in text:
        code = ord(char)
        if 0xDC80 <= code <= 0xDCFF:  # a byte that was not UTF-8 (surrogateescape)
            out.append(f"\\x{code - 0xDC00:02x}")
        elif char.isprintable():
            out.append(char)
        else:
            out.append(repr(char)[1:-1] if 0xD800 > code or code > 0xDFFF else f"\\u{code:04x}")
    return "".join(out)


class InputError(Exception):
    """Bad input: one or more :class:`Problem` s. Never an internal fault."""

    def __init__(self, problems: list[Problem] | Problem):
        if isinstance(problems, Problem):
            problems = [problems]
        self.problems: list[Problem] = list(problems)
        super().__init__("\n".join(str(p) for p in self.problems))

    @classmethod
    def one(cls, file: str, where: str, what: str) -> "InputError":
        return cls([Problem(str(file), where, what)])


class ProblemCollector:
    """Collects problems while a reader keeps going, then raises them together."""

    def __init__(self, file: str):
        self.file = str(file)
        self.problems: list[Problem] = []

    def add(self, where: str, what: str) -> None:
        self.problems.append(Problem(self.file, where, what))

    def extend(self, problems: list[Problem]) -> None:
        self.problems.extend(problems)

    def __bool__(self) -> bool:
        return bool(self.problems)

    def raise_if_any(self) -> None:
        if self.problems:
            raise InputError(self.problems)
