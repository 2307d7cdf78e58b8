"""Shared reading of our TOML files (polars and tasks): parsing with the place of a syntax
error, and typed access to values that notes a problem for each bad one and keeps going,
so that a pilot can fix a whole file in one go."""

from __future__ import annotations

import json
import math
import tomllib
from pathlib import Path
from typing import Any, Callable

from glidetask.errors import InputError, Problem, ProblemCollector
from glidetask.formats.files import read_text
from glidetask.units import format_clock, parse_clock


def is_number(value: Any) -> bool:
    """A TOML integer or float (TOML booleans are not numbers)."""
    return isinstance(value, (int, float)) and not isinstance(value, bool)


def as_float(value: Any) -> float | None:
    """A TOML number as a float; None for an integer too large for a float."""
    try:
        return float(value)
    except OverflowError:
        return None


def show(value: Any) -> str:
    """A value as the user wrote it, for messages."""
    if isinstance(value, str):
        return repr(value)
    if isinstance(value, dict):
        return "a table"
    if isinstance(value, list):
        return "a list"
    if isinstance(value, int) and not isinstance(value, bool) and abs(value) > 10**30:
        return f"an integer of {len(str(abs(value)))} digits"
    return json.dumps(value) if isinstance(value, (bool, int, float)) else repr(value)


def read_toml(path: Path, file: str) -> tuple[dict | None, list[Problem]]:
    """``(document, [])``, or ``(None, [problem])`` for an unreadable file or a syntax error
    (placed at its line, as :mod:`tomllib` reports it)."""
    try:
        text = read_text(path, file)
    except InputError as error:
        return None, error.problems
    try:
        return tomllib.loads(text), []
    except tomllib.TOMLDecodeError as error:
        message = str(error)
        marker = message.rfind(" (at line ")
        if marker < 0:
            return None, [Problem(file, "file", f"TOML syntax error: {message}")]
        line, _, column = message[marker + len(" (at line "):].rstrip(")").partition(", column ")
        return None, [Problem(file, f"line {line}", f"TOML syntax error: {message[:marker]} (column {column})")]
    except RecursionError:
        return None, [Problem(file, "file", "TOML nested too deeply (arrays or tables inside each other)")]
    except ValueError as error:  # Python's limit on the digits of an integer
        return None, [Problem(file, "file", f"TOML number too long: {str(error).split(':')[0]}")]


class TomlReader:
    """Typed access to a parsed TOML document, collecting a problem for each bad value.

    ``where`` arguments are the key path of the table (``"[glider]"``, ``"[[task.points]] 3"``);
    each problem's place is that path and the key.
    """

    def __init__(self, file: str):
        self.problems = ProblemCollector(file)

    def add(self, where: str, what: str) -> None:
        self.problems.add(where, what)

    def table(self, document: dict, name: str, *, required: bool) -> dict | None:
        value = document.get(name)
        if value is None:
            if required:
                self.add(f"[{name}]", "missing table")
            return None
        if not isinstance(value, dict):
            self.add(f"[{name}]", f"must be a table, got {type(value).__name__}")
            return None
        return value

    def unknown(self, table: dict, where: str, known: tuple[str, ...]) -> None:
        for key in table:
            if key not in known:
                self.add(f"{where} {key}", f"unknown key (expected one of: {', '.join(known)})")

    def number(self, table: dict, where: str, key: str, *, required: bool = False, default=None,
               positive: bool = False, low: float | None = None, high: float | None = None):
        """A finite float, or ``default`` when absent; None (with a problem) when bad."""
        here = f"{where} {key}"
        if key not in table:
            if required:
                self.add(here, "missing key")
            return default
        value = table[key]
        if not is_number(value):
            self.add(here, f"must be a number, got {show(value)}")
            return None
        number = as_float(value)
        if number is None or not math.isfinite(number):
            self.add(here, f"must be a finite number, got {show(value)}")
            return None
        value = number
        if positive and value <= 0.0:
            self.add(here, f"must be greater than 0, got {value:g}")
            return None
        if low is not None and high is not None and not low <= value <= high:
            self.add(here, f"must be in [{low:g}, {high:g}], got {value:g}")
            return None
        if low is not None and high is None and value < low:
            self.add(here, f"must be at least {low:g}, got {value:g}")
            return None
        if high is not None and (low is None) and value > high:
            self.add(here, f"must be at most {high:g}, got {value:g}")
            return None
        return value

    def text(self, table: dict, where: str, key: str, *, required: bool = False, default=None):
        """Non-empty text (stripped), or ``default`` when absent; None (with a problem) when bad."""
        here = f"{where} {key}"
        if key not in table:
            if required:
                self.add(here, "missing key")
            return default
        value = table[key]
        if not isinstance(value, str) or not value.strip():
            self.add(here, f"must be non-empty text, got {show(value)}")
            return None
        return value.strip()

    def timed_rows(self, raw: Any, where: str, *, listing: str, entry: str, width: int, least: int = 1,
                   check: Callable[[str, list, tuple], bool]) -> tuple[tuple[float, ...], list[tuple]] | None:
        """A quantity through the day, ``[["HH:MM", value, ...], ...]`` (a task's lift and
        band-top profiles, the surface forecast): ``(times_s, rows)`` with the times strictly
        increasing and ``width`` numbers after each time, or None with a problem per bad entry
        (placed ``where[n]``, entries counted from 1).

        ``listing`` and ``entry`` word the expected list and entry in messages; ``check(here,
        entry, values)`` reports a row whose values (floats, None for a number too large) are
        out of range and returns False for it.
        """
        if not isinstance(raw, list) or len(raw) < least:
            self.add(where, f"must be a list of {listing}, got {show(raw)}")
            return None
        times: list[float] = []
        rows: list[tuple] = []
        ok = True
        for number, item in enumerate(raw, start=1):
            here = f"{where}[{number}]"
            if not (isinstance(item, list) and len(item) == width + 1 and isinstance(item[0], str)
                    and all(is_number(v) for v in item[1:])):
                self.add(here, f"must be {entry}, got {show(item)}")
                ok = False
                continue
            try:
                time_s = parse_clock(item[0])
            except ValueError:
                self.add(here, f"expected a local time as HH:MM, got {item[0][:20]!r}")
                ok = False
                continue
            values = tuple(as_float(v) for v in item[1:])
            ok = check(here, item, values) and ok
            if times and time_s <= times[-1]:
                self.add(here, f"times must increase: {item[0]} is not after {format_clock(times[-1])}")
                ok = False
            times.append(time_s)
            rows.append(values)
        return (tuple(times), rows) if ok else None
