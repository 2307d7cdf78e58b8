"""Sounding files (shared/CONTRACT.md 2.7) and the task file's sounding keys.

A sounding is CSV, UTF-8, with the header
``pressure_hpa,height_m,temperature_c,dewpoint_c,wind_from_deg,wind_speed_kmh`` (the
columns in any order) and one row per level from the ground up, heights MSL, at least
five levels. Problems name the level as ``row N``, row 1 being the first level under the
header; a problem with the header is placed at ``header``. Every problem in the file is
reported in one run: non-numbers, values out of range, heights that do not increase,
pressures that do not decrease, a dew point above the temperature, too few levels, rows of
the wrong width, cells or files too large to be a sounding.

A task's ``[day]`` may name a sounding and give the surface forecast
(:func:`read_day_sounding`):

``sounding = "file.csv"`` (relative to the task file), ``surface = [["HH:MM",
temperature_c, dewpoint_c], ...]`` (at least two times, increasing),
``surface_elevation_m`` (default: the sounding's lowest level), ``band_top_margin_m``
(default 200) and ``band_bottom_agl_m`` (default 600).
"""

from __future__ import annotations

import csv
import io
import math
import os
from dataclasses import dataclass
from pathlib import Path

import numpy as np

from glidetask.engine.forecast import Sounding, SurfaceForecast
from glidetask.engine.sounding import DEFAULT_BAND_BOTTOM_AGL_M, DEFAULT_BAND_TOP_MARGIN_M, SoundingTooShortError
from glidetask.errors import InputError, Problem, ProblemCollector
from glidetask.formats.files import file_problem, read_text
from glidetask.formats.toml_reader import TomlReader, show
from glidetask.units import KMH, format_clock

COLUMNS = ("pressure_hpa", "height_m", "temperature_c", "dewpoint_c", "wind_from_deg", "wind_speed_kmh")
#: Valid range of each column (inclusive); beyond these a value is a typing or unit error.
RANGES = {
    "pressure_hpa": (1.0, 1100.0),
    "height_m": (-500.0, 40000.0),
    "temperature_c": (-100.0, 60.0),
    "dewpoint_c": (-120.0, 60.0),
    "wind_from_deg": (0.0, 360.0),
    "wind_speed_kmh": (0.0, 500.0),
}
MIN_LEVELS = 5
#: Larger than any sounding: a longer cell, more rows or a bigger file is not one.
MAX_CELL_CHARS = 40
MAX_LEVELS = 5000
MAX_FILE_BYTES = 2_000_000
SURFACE_RANGE_C = (-60.0, 60.0)

#: The task file's [day] keys for a sounding (accepted by the task reader).
DAY_SOUNDING_KEYS = ("sounding", "surface", "surface_elevation_m", "band_top_margin_m", "band_bottom_agl_m")


# ---------------------------------------------------------------- the CSV


def parse_sounding(text: str, file: str = "<sounding>") -> Sounding:
    """A :class:`Sounding` from CSV text; InputError with every problem found."""
    problems = ProblemCollector(file)
    text = text.removeprefix("\ufeff")
    reader = csv.reader(io.StringIO(text))
    try:
        header = next(reader, None)
    except csv.Error as error:
        raise InputError.one(file, "header", f"not valid CSV: {error}") from None
    if header is None or not any(cell.strip() for cell in header):
        raise InputError.one(file, "header", f"no header row; expected {','.join(COLUMNS)}")
    header = [cell.strip().lower() for cell in header]
    for column in header:
        if column not in COLUMNS:
            problems.add("header", f"unknown column {column[:MAX_CELL_CHARS]!r}; expected {','.join(COLUMNS)}")
    missing = [column for column in COLUMNS if column not in header]
    if missing:
        problems.add("header", f"missing column(s): {', '.join(missing)}")
    if len(set(header)) != len(header):
        problems.add("header", "a column is named twice")
    problems.raise_if_any()
    index = {column: header.index(column) for column in COLUMNS}

    levels: list[tuple[int, dict[str, float]]] = []
    row_number = 0
    try:
        for row in reader:
            if not row or all(not cell.strip() for cell in row):
                continue
            row_number += 1
            if row_number > MAX_LEVELS:
                problems.add(f"row {row_number}", f"more than {MAX_LEVELS} levels: not a sounding")
                break
            level, ok = _level(problems, f"row {row_number}", row, index, len(header))
            if level is not None:
                levels.append((row_number, level, ok))
    except csv.Error as error:
        problems.add(f"row {row_number + 1}", f"not valid CSV: {error}")
    _check_order(problems, [(number, level) for number, level, _ in levels
                            if "height_m" in level and "pressure_hpa" in level])
    if row_number < MIN_LEVELS:
        problems.add("file", f"a sounding needs at least {MIN_LEVELS} levels, got {row_number}")
    problems.raise_if_any()
    column = {name: np.array([level[name] for _, level, _ in levels]) for name in COLUMNS}
    return Sounding(pressure_pa=column["pressure_hpa"] * 100.0, height_m=column["height_m"],
                    temperature_k=column["temperature_c"] + 273.15, dewpoint_k=column["dewpoint_c"] + 273.15,
                    wind_from_deg=column["wind_from_deg"] % 360.0, wind_speed_ms=column["wind_speed_kmh"] * KMH)


def _level(problems: ProblemCollector, where: str, row: list[str], index: dict[str, int],
           width: int) -> tuple[dict[str, float] | None, bool]:
    """One level's good values and whether all are good, after noting its problems."""
    if len(row) != width:
        problems.add(where, f"expected {width} values as in the header, got {len(row)}")
        return None, False
    values, ok = {}, True
    for name in COLUMNS:
        cell = row[index[name]].strip()
        if len(cell) > MAX_CELL_CHARS:
            problems.add(where, f"{name}: a value of {len(cell)} characters is not a number")
            ok = False
            continue
        try:
            value = float(cell)
        except ValueError:
            problems.add(where, f"{name} must be a number, got {cell!r}" if cell else f"{name} is empty")
            ok = False
            continue
        low, high = RANGES[name]
        if not math.isfinite(value) or not low <= value <= high:
            problems.add(where, f"{name} must be in [{low:g}, {high:g}], got {cell}")
            ok = False
            continue
        values[name] = value
    if "dewpoint_c" in values and "temperature_c" in values and values["dewpoint_c"] > values["temperature_c"]:
        problems.add(where, f"the dew point ({values['dewpoint_c']:g} C) is above the temperature "
                            f"({values['temperature_c']:g} C)")
        ok = False
    return values, ok


def _check_order(problems: ProblemCollector, levels: list[tuple[int, dict[str, float]]]) -> None:
    """Heights must increase and pressures decrease from each good level to the next."""
    for (_, below), (number, level) in zip(levels, levels[1:]):
        if level["height_m"] <= below["height_m"]:
            problems.add(f"row {number}", f"heights must increase from the ground up: {level['height_m']:g} m "
                                          f"is not above {below['height_m']:g} m")
        if level["pressure_hpa"] >= below["pressure_hpa"]:
            problems.add(f"row {number}", f"pressures must decrease with height: {level['pressure_hpa']:g} hPa "
                                          f"is not below {below['pressure_hpa']:g} hPa")


def read_sounding(path: str | os.PathLike, file: str | None = None) -> Sounding:
    """Read a sounding file (contract 2.7); InputError naming ``file`` (default ``path``)."""
    file = str(path) if file is None else file
    text = read_text(path, file, limit=MAX_FILE_BYTES)
    return parse_sounding(text, file)


def looks_like_sounding(path: str | os.PathLike) -> bool:
    """True if the file's first line names the sounding columns (used by ``check``)."""
    if file_problem(path) is not None:
        return False  # not a regular file: the reader that gets it says what it is
    try:
        with open(path, encoding="utf-8", errors="replace") as handle:
            first = handle.readline(4096).removeprefix("\ufeff")
    except OSError:
        return False
    return {cell.strip().lower() for cell in first.split(",")} == set(COLUMNS)


# ---------------------------------------------------------------- the task file's keys


@dataclass(frozen=True)
class DaySounding:
    """What a task's ``[day]`` says about its sounding.

    ``sounding_file`` is the path as resolved against the task file's folder (as the
    user can open it); the surface forecast is in deg C; heights and margins in metres
    (``surface_elevation_m`` None: the sounding's lowest level).
    """

    sounding_file: str
    surface: SurfaceForecast
    surface_elevation_m: float | None = None
    band_top_margin_m: float = DEFAULT_BAND_TOP_MARGIN_M
    band_bottom_agl_m: float = DEFAULT_BAND_BOTTOM_AGL_M


def _surface(reader: TomlReader, raw) -> SurfaceForecast | None:
    shape = "[\"HH:MM\", temperature_c, dewpoint_c]"
    low, high = SURFACE_RANGE_C

    def check(here: str, entry: list, values: tuple) -> bool:
        temperature, dewpoint = values
        if not all(v is not None and math.isfinite(v) and low <= v <= high for v in values):
            reader.add(here, f"temperature and dew point must be in [{low:g}, {high:g}] C, "
                             f"got {show(entry[1])} and {show(entry[2])}")
            return False
        if dewpoint > temperature:
            reader.add(here, f"the dew point ({dewpoint:g} C) is above the temperature ({temperature:g} C)")
            return False
        return True

    read = reader.timed_rows(raw, "[day] surface", listing=f"at least two {shape} entries", entry=shape, width=2,
                             least=2, check=check)
    if read is None:
        return None
    times, rows = read
    return SurfaceForecast(times, tuple(row[0] for row in rows), tuple(row[1] for row in rows))


def read_day_sounding(document: dict, task_path: str | os.PathLike) -> DaySounding | None:
    """The sounding keys of a parsed task file's ``[day]``; None if it names no sounding.

    Raises
    ------
    InputError
        Naming the task file and the key, for every bad key.
    """
    file = str(task_path)
    reader = TomlReader(file)
    day = document.get("day")
    if not isinstance(day, dict) or "sounding" not in day:
        return None
    name = reader.text(day, "[day]", "sounding", required=True)
    path = None
    if name is not None:
        candidate = Path(os.path.expanduser(name))
        path = candidate if candidate.is_absolute() else Path(os.path.normpath(Path(task_path).parent / candidate))
        if not path.is_file():
            reader.add("[day] sounding", f"no such file: {path}")
    surface = None
    if "surface" not in day:
        reader.add("[day] surface", "missing key: a sounding needs the surface forecast, "
                                    "[[\"HH:MM\", temperature_c, dewpoint_c], ...]")
    else:
        surface = _surface(reader, day["surface"])
    elevation = reader.number(day, "[day]", "surface_elevation_m", low=-500.0, high=9000.0)
    margin = reader.number(day, "[day]", "band_top_margin_m", default=DEFAULT_BAND_TOP_MARGIN_M, low=0.0, high=3000.0)
    bottom = reader.number(day, "[day]", "band_bottom_agl_m", default=DEFAULT_BAND_BOTTOM_AGL_M, low=0.0, high=5000.0)
    reader.problems.raise_if_any()
    return DaySounding(str(path), surface, elevation, margin, bottom)


def load_derived_day(task_path: str | os.PathLike):
    """Read a task file's sounding and surface forecast and derive the day.

    Returns ``(DaySounding, DerivedDay)``; InputError (naming the task file's key or the
    sounding file's row) for bad input, a sounding that does not reach the thermal top
    included.
    """
    from glidetask.formats.toml_reader import read_toml

    file = str(task_path)
    document, problems = read_toml(Path(task_path), file)
    if document is None:
        raise InputError(problems)
    settings, _, derived = derive_task_day(document, task_path)
    return settings, derived


def derive_task_day(document: dict, task_path: str | os.PathLike):
    """The day derived from a parsed task file's sounding keys (shared by ``glidetask day``
    and the task reader): ``(DaySounding, Sounding, DerivedDay)``.

    Raises
    ------
    InputError
        No ``[day] sounding``; a bad key; a bad sounding file (naming its row); a sounding
        that does not reach the thermal top.
    """
    from glidetask.engine.sounding import derive_day

    file = str(task_path)
    settings = read_day_sounding(document, task_path)
    if settings is None:
        raise InputError.one(file, "[day] sounding", "missing key: name a sounding file to derive the day from "
                                                     "(contract 2.7)")
    sounding = read_sounding(settings.sounding_file)
    elevation = settings.surface_elevation_m
    if elevation is not None and not sounding.height_m[0] <= elevation < sounding.height_m[-1]:
        raise InputError.one(file, "[day] surface_elevation_m",
                             f"{elevation:g} m lies outside the sounding ({sounding.height_m[0]:g} to "
                             f"{sounding.height_m[-1]:g} m); the sounding starts at the ground or below it")
    try:
        derived = derive_day(sounding, settings.surface, surface_elevation_m=elevation,
                             band_top_margin_m=settings.band_top_margin_m,
                             band_bottom_agl_m=settings.band_bottom_agl_m)
    except SoundingTooShortError as error:
        raise InputError([_too_short(settings.sounding_file, len(sounding.height_m), error)]) from None
    return settings, sounding, derived


#: How the plan text names each derived key.
_DERIVED_WORDS = {"band_top_m": "band top through the day", "band_bottom_m": "band bottom",
                  "thermal_strength_ms": "thermal strength", "lift_ends": "lift end",
                  "wind": "wind (the mean of the highest band)"}


def source_summary(source) -> str | None:
    """Where a derived day comes from, in words (the plan text, the briefing); None for a typed day."""
    if source is None:
        return None
    derived = ", ".join(_DERIVED_WORDS[key] for key in source.derived_keys) or "nothing"
    text = f"from sounding {Path(source.sounding_file).name}: {derived}"
    if source.overridden:
        text += f"; typed over it: {', '.join(source.overridden)}"
    return text


def _too_short(file: str, levels: int, error: SoundingTooShortError) -> Problem:
    if error.time_s is not None:
        what = (f"the sounding ends at {error.top_m:g} m, below the thermal top at {format_clock(error.time_s)} "
                f"(the surface air is still warmer than the sounding there): add levels above it")
    else:
        what = (f"the sounding ends at {error.top_m:g} m, below the {error.needed_m:.0f} m that a useful working "
                f"band needs (band bottom, band, margin): add levels above it")
    return Problem(file, f"row {levels}", what)


__all__ = ["COLUMNS", "DAY_SOUNDING_KEYS", "DaySounding", "parse_sounding", "read_sounding", "read_day_sounding",
           "load_derived_day", "derive_task_day", "looks_like_sounding",
           "source_summary"]
