"""Task files: the TOML of shared/CONTRACT.md 2.3, read into a Scenario and written back.

A task file names a turnpoint file and a polar file (paths relative to the task file),
lists the task points with their zones, and describes the glider's loading, the forecast
day, the safety margins and optionally a terrain model. :func:`load_scenario` validates
all of it and reports every problem at once, each with its key path:
``[[task.points]] 3 zone`` (points counted from 1), ``[day] climb_ms[2]`` (pairs counted
from 1), ``[glider] polar``. Problems inside the turnpoint or polar file carry that file's
name. :func:`save_task` writes a scenario back (atomically), keeping the referenced files
relative to the new task file, over the previous text so that comments, order and spelling
stay for what did not change.

Zone keys, sizes in km (contract 2.3):

* start and finish: ``line`` (``length_km``) or ``cylinder`` (``radius_km``);
* racing turns: ``cylinder`` (``radius_km``), ``sector`` (``radius_km``, ``angle_deg``
  default 90), ``keyhole`` (``radius_km`` default 10, ``angle_deg`` default 90,
  ``cylinder_radius_km`` default 0.5);
* area turns: ``cylinder`` (``radius_km``) or ``sector`` (``radius_km``,
  ``inner_radius_km`` default 0, ``radial_from_deg``, ``radial_to_deg``).

``[day] thermal_radius_m`` (optional), the radius of the thermal core for the circling model;
absent, the typical radius for the day's convective layer (Allen 2006,
:func:`glidetask.engine.thermals.thermal_radii`), the layer being the band top above the
ground: ``[day] surface_elevation_m`` where given, else the task's lowest turnpoint.
``[day] stall_margin`` (optional, 1.05-1.5, default 1.15, common practice): the circling
model's speed over the banked stall speed.
"""

from __future__ import annotations

import dataclasses
import difflib
import json
import math
import os
from pathlib import Path
from typing import Any

from glidetask.engine.circling import DEFAULT_STALL_MARGIN
from glidetask.engine.scenario import (
    DEFAULT_AIRSPACE_MARGIN_M, MAX_WIND_SPEED_KMH, Day, GliderSetup, Profile, Safety, Scenario, Wind, WindLevel,
    WindProfile,
)
from glidetask.engine.task import Task, TaskPoint, Turnpoint, task_problems
from glidetask.engine.zones import Zone
from glidetask.errors import InputError
from glidetask.formats.atomic import write_atomic
from glidetask.formats.files import file_problem
from glidetask.formats.toml_reader import TomlReader, as_float, is_number, read_toml, show
from glidetask.units import KMH, format_clock, parse_clock

TABLES = ("task", "glider", "day", "safety", "terrain", "airspace")
TASK_KEYS = ("name", "kind", "turnpoints", "min_time_min", "points")
GLIDER_KEYS = ("polar", "pilot_kg", "ballast_kg", "bugs_percent")
DAY_KEYS = ("start_time", "start_height_m", "band_top_m", "band_bottom_m", "wind", "climb_ms",
            "thermal_strength_ms", "lift_ends", "glide_airmass_ms", "isa_deviation_c", "mc_ms", "thermal_radius_m",
            "centring_s", "detour_percent", "stall_margin",
            # the day from a sounding (contract 2.7), read by glidetask.formats.sounding_file
            "sounding", "surface", "surface_elevation_m", "band_top_margin_m", "band_bottom_agl_m")
#: The typed [day] keys that override a derived day's values (climb_ms overrides the
#: derived thermal strength).
OVERRIDING_KEYS = ("band_top_m", "band_bottom_m", "thermal_strength_ms", "climb_ms", "lift_ends", "wind")
SAFETY_KEYS = ("arrival_margin_m", "terrain_clearance_m", "final_glide_mc_ms", "airspace_margin_m")
TERRAIN_KEYS = ("file",)
AIRSPACE_KEYS = ("file",)
DEFAULT_PILOT_KG = 90.0
ZONE_SIZE_LIMIT_KM = 1000.0  # far beyond any observation zone (common practice: cylinders of a few tens of km)
PILOT_LIMIT_KG = 400.0  # two heavy pilots with parachutes in a two-seater, and then some
DEFAULT_CENTRING_S = 30.0  # time lost centring each thermal [s] (common practice; contract 2.3)
DEFAULT_DETOUR_PERCENT = 5.0  # distance flown beyond the planned path [%] (common practice; contract 2.3)
#: ``[day] stall_margin``: circling speed over the banked stall speed [-]. Below 1.05 a gust
#: stalls the wing in the turn; above 1.5 nobody circles (common practice).
STALL_MARGIN_RANGE = (1.05, 1.5)

# Zone keys by (task kind, role, zone name): which keys apply, with defaults (None: required).
_START_FINISH = {"line": {"length_km": None}, "cylinder": {"radius_km": None}}
_RACING_TURNS = {
    "cylinder": {"radius_km": None},
    "sector": {"radius_km": None, "angle_deg": 90.0},
    "keyhole": {"radius_km": 10.0, "angle_deg": 90.0, "cylinder_radius_km": 0.5},
}
_AREA_TURNS = {
    "cylinder": {"radius_km": None},
    "sector": {"radius_km": None, "inner_radius_km": 0.0, "radial_from_deg": None, "radial_to_deg": None},
}
_ZONE_SIZE_KEYS = ("length_km", "radius_km", "angle_deg", "cylinder_radius_km", "inner_radius_km",
                   "radial_from_deg", "radial_to_deg")


class _Reader(TomlReader):
    """Typed access to the task file's values, collecting a problem for each bad one."""

    def clock(self, table: dict, where: str, key: str, *, required: bool = False):
        value = self.text(table, where, key, required=required)
        if value is None:
            return None
        try:
            return parse_clock(value)
        except ValueError:
            self.add(f"{where} {key}", f"expected a local time as HH:MM, got {value!r}")
            return None


def _a(word: str) -> str:
    """``word`` with its indefinite article."""
    return f"{'an' if word[:1] in 'aeiou' else 'a'} {word}"


def _resolve(base: Path, value: str) -> Path:
    """A path from a task file, relative to the task file's folder (as the user can open it)."""
    path = Path(os.path.expanduser(value))
    return path if path.is_absolute() else Path(os.path.normpath(base / path))


def _folder_of(task_path: str | os.PathLike) -> Path:
    """The folder a task file's paths are relative to: that of the file itself, through any
    symbolic link (a task opened through a link finds its files next to the real file)."""
    path = Path(task_path)
    try:
        return Path(os.path.realpath(path)).parent if path.is_symlink() else path.parent
    except OSError:  # unreadable: the reader says why
        return path.parent


# ---------------------------------------------------------------- [task]


def _lookup(turnpoints: tuple[Turnpoint, ...]):
    """Resolve a name or code: exact name, then exact code, then either ignoring case."""
    by_name = {p.name: p for p in turnpoints}
    by_code = {p.code: p for p in turnpoints if p.code}
    folded: dict[str, list[Turnpoint]] = {}
    for p in turnpoints:
        for key in {p.name.casefold(), (p.code or "").casefold()} - {""}:
            folded.setdefault(key, []).append(p)

    def find(text: str) -> tuple[Turnpoint | None, str | None]:
        if text in by_name:
            return by_name[text], None
        if text in by_code:
            return by_code[text], None
        matches = {id(p): p for p in folded.get(text.casefold(), [])}
        if len(matches) == 1:
            return next(iter(matches.values())), None
        if len(matches) > 1:
            return None, f"{text!r} matches more than one turnpoint (names and codes ignoring case)"
        close = difflib.get_close_matches(text, list(by_name) + list(by_code), n=3, cutoff=0.75)
        hint = f"; did you mean {' or '.join(repr(c) for c in close)}?" if close else ""
        return None, f"no turnpoint named or coded {text!r} in the turnpoint file{hint}"

    return find


def _zone(reader: _Reader, entry: dict, where: str, task_kind: str, role: str) -> Zone | None:
    """The zone of one ``[[task.points]]`` entry, or None after reporting its problems."""
    name = entry.get("zone")
    if not isinstance(name, str):
        reader.add(f"{where} zone", "missing key" if name is None else f"must be text, got {show(name)}")
        return None
    name = name.strip().lower()
    if name.startswith("area_"):
        if task_kind != "area":
            reader.add(f"{where} zone", f"{name!r} is an area zone; it belongs in an area task (kind = \"area\")")
            return None
        name = name[len("area_"):]
    table = _START_FINISH if role != "turn" else _AREA_TURNS if task_kind == "area" else _RACING_TURNS
    if name not in table:
        every = set(_START_FINISH) | set(_RACING_TURNS) | set(_AREA_TURNS)
        if name in every:
            place = "a turn" if role == "turn" else f"the {role}"
            what = f"a {name} cannot be {place} of {_a(task_kind)} task; use {' or '.join(table)}"
        else:
            what = f"unknown zone {name!r}; use {' or '.join(table)}"
        reader.add(f"{where} zone", what)
        return None
    keys = table[name]
    for key in entry:
        if key in _ZONE_SIZE_KEYS and key not in keys:
            reader.add(f"{where} {key}", f"does not apply to a {name} zone here (its keys: {', '.join(keys)})")
    values = {}
    for key, default in keys.items():
        if key.endswith("_deg") and key.startswith("radial"):
            values[key] = reader.number(entry, where, key, required=default is None, default=default,
                                        low=0.0, high=360.0)
        elif key == "angle_deg":
            values[key] = reader.number(entry, where, key, default=default, positive=True, high=360.0)
        elif key == "inner_radius_km":
            values[key] = reader.number(entry, where, key, default=default, low=0.0, high=ZONE_SIZE_LIMIT_KM)
        else:
            values[key] = reader.number(entry, where, key, required=default is None, default=default, positive=True,
                                        high=ZONE_SIZE_LIMIT_KM)
    if any(v is None for v in values.values()):
        return None
    try:
        return _make_zone(reader, values, where, name, task_kind, role)
    except ValueError as error:  # a combination the zone itself refuses
        reader.add(f"{where} zone", str(error))
        return None


def _make_zone(reader: _Reader, values: dict, where: str, name: str, task_kind: str, role: str) -> Zone | None:
    if name == "line":
        return Zone.line(values["length_km"] * 1000.0)
    if name == "cylinder":
        radius = values["radius_km"] * 1000.0
        return Zone.area_cylinder(radius) if role == "turn" and task_kind == "area" else Zone.cylinder(radius)
    if name == "keyhole":
        return Zone.keyhole(values["radius_km"] * 1000.0, values["angle_deg"], values["cylinder_radius_km"] * 1000.0)
    if task_kind != "area":
        return Zone.sector(values["radius_km"] * 1000.0, values["angle_deg"])
    if values["inner_radius_km"] >= values["radius_km"]:
        reader.add(f"{where} inner_radius_km", f"must be below radius_km ({values['radius_km']:g}), "
                                               f"got {values['inner_radius_km']:g}")
        return None
    return Zone.area_sector(values["radius_km"] * 1000.0, values["radial_from_deg"], values["radial_to_deg"],
                            values["inner_radius_km"] * 1000.0)


def _task_kind(reader: _Reader, table: dict) -> tuple[str | None, float | None]:
    """``(kind, min_time_min)`` of the [task] table; the kind None where it is bad."""
    kind = reader.text(table, "[task]", "kind", default="racing")
    if kind is not None and kind not in ("racing", "area"):
        reader.add("[task] kind", f"unknown task kind {kind!r}; expected \"racing\" or \"area\"")
        kind = None
    minutes = reader.number(table, "[task]", "min_time_min", positive=True, high=24 * 60.0)
    if kind == "racing" and "min_time_min" in table:
        reader.add("[task] min_time_min", "a minimum time belongs to area tasks (kind = \"area\") only")
    if kind == "area" and "min_time_min" not in table:
        reader.add("[task] min_time_min", "missing key: an area task needs its minimum time in minutes")
    return kind, minutes


def _task_turnpoints(reader: _Reader, table: dict, base: Path) -> tuple[tuple[Turnpoint, ...], Path | None]:
    """``(turnpoints, the file's path or None)`` named by ``[task] turnpoints``."""
    file_value = reader.text(table, "[task]", "turnpoints", required=True)
    if file_value is None:
        return (), None
    turnpoint_file = _resolve(base, file_value)
    missing = file_problem(turnpoint_file)
    if missing is not None:
        reader.add("[task] turnpoints", f"{missing}: {turnpoint_file}")
        return (), turnpoint_file
    from glidetask.formats.turnpoints import read_turnpoints

    try:
        return read_turnpoints(turnpoint_file), turnpoint_file
    except InputError as error:
        reader.problems.extend(error.problems)
        return (), turnpoint_file


def _task_points(reader: _Reader, entries: list, kind: str | None, find) -> list[TaskPoint] | None:
    """The ``[[task.points]]`` entries as task points; None where any is bad (each reported)."""
    points, ok = [], kind is not None
    previous = None
    for number, entry in enumerate(entries, start=1):
        where = f"[[task.points]] {number}"
        reader.unknown(entry, where, ("at", "zone") + _ZONE_SIZE_KEYS)
        role = "start" if number == 1 else "finish" if number == len(entries) else "turn"
        at = reader.text(entry, where, "at", required=True)
        point = None
        if at is not None and find is not None:
            point, error = find(at)
            if error:
                reader.add(f"{where} at", error)
        zone = _zone(reader, entry, where, kind, role) if kind is not None else None
        if point is not None and previous is not None and (point.lat, point.lon) == (previous[1].lat, previous[1].lon):
            # Twice at one place in a row: a leg of no length (and an optimiser with nothing to choose).
            same = "the same turnpoint as" if point is previous[1] else "at the same place as"
            reader.add(f"{where} at", f"{at!r} is {same} point {previous[0]} ({previous[1].name}); "
                                      "consecutive task points must be at different places")
            ok = False
        if point is not None:
            previous = (number, point)
        if point is None or zone is None:
            ok = False
            continue
        points.append(TaskPoint(point, zone))
    if kind is not None:
        least = 3 if kind == "area" else 2
        if len(entries) < least:
            reader.add("[[task.points]]", f"{_a(kind)} task needs at least {least} points (start, "
                                          f"{'turns, ' if kind == 'area' else ''}finish), got {len(entries)}")
            ok = False
    return points if ok else None


def _task(reader: _Reader, table: dict, base: Path, default_name: str):
    """``(Task or None, turnpoints, turnpoint file path or None)`` from the [task] table."""
    reader.unknown(table, "[task]", TASK_KEYS)
    name = reader.text(table, "[task]", "name", default=default_name)
    kind, minutes = _task_kind(reader, table)
    turnpoints, turnpoint_file = _task_turnpoints(reader, table, base)
    entries = table.get("points")
    if entries is None:
        reader.add("[[task.points]]", "missing: list the task points, first = start, last = finish")
        return None, turnpoints, turnpoint_file
    if not isinstance(entries, list) or not all(isinstance(e, dict) for e in entries):
        reader.add("[[task.points]]", "must be an array of tables ([[task.points]] entries)")
        return None, turnpoints, turnpoint_file
    points = _task_points(reader, entries, kind, _lookup(turnpoints) if turnpoints else None)
    if points is None or reader.problems or name is None:
        return None, turnpoints, turnpoint_file
    min_time_s = minutes * 60.0 if kind == "area" and minutes is not None else None
    for index, message in task_problems(kind, [p.zone.kind for p in points], min_time_s):
        reader.add("[task]" if index is None else f"[[task.points]] {index + 1} zone", message)
    if reader.problems:
        return None, turnpoints, turnpoint_file
    return Task(name, kind, tuple(points), min_time_s), turnpoints, turnpoint_file


# ---------------------------------------------------------------- [glider], [day], [safety], [terrain]


def _glider(reader: _Reader, table: dict, base: Path) -> GliderSetup | None:
    from glidetask.formats.polar_file import MASS_LIMIT_KG, loading_problems, read_polar_spec

    reader.unknown(table, "[glider]", GLIDER_KEYS)
    pilot = reader.number(table, "[glider]", "pilot_kg", default=DEFAULT_PILOT_KG, positive=True, high=PILOT_LIMIT_KG)
    ballast = reader.number(table, "[glider]", "ballast_kg", default=0.0, low=0.0, high=MASS_LIMIT_KG)
    bugs = reader.number(table, "[glider]", "bugs_percent", default=0.0, low=0.0, high=100.0)
    value = reader.text(table, "[glider]", "polar", required=True)
    if value is None:
        return None
    polar_file = _resolve(base, value)
    missing = file_problem(polar_file)
    if missing is not None:
        reader.add("[glider] polar", f"{missing}: {polar_file}")
        return None
    spec, problems = read_polar_spec(polar_file)
    reader.problems.extend(problems)
    if spec is None or None in (pilot, ballast, bugs):
        return None
    loading = loading_problems(spec, pilot, ballast, file=reader.problems.file,
                               pilot_where="[glider] pilot_kg", ballast_where="[glider] ballast_kg")
    reader.problems.extend(loading)
    if loading:
        return None
    return GliderSetup(spec, pilot, ballast, bugs, polar_file=str(polar_file.resolve()))


def _profile(reader: _Reader, table: dict, key: str, low: float = 0.0, high: float = 15.0,
             unit: str = "m/s") -> Profile | None:
    """``[day] key`` as ``[["HH:MM", value], ...]`` pairs, each value in [low, high] ``unit``."""
    def check(here: str, pair: list, values: tuple) -> bool:
        value = values[0]
        if value is None or not math.isfinite(value) or not low <= value <= high:
            reader.add(here, f"the value must be in [{low:g}, {high:g}] {unit}, got {show(pair[1])}")
            return False
        return True

    read = reader.timed_rows(table[key], f"[day] {key}", listing="[\"HH:MM\", value] pairs",
                             entry=f"a pair [\"HH:MM\", {unit}]", width=1, check=check)
    return None if read is None else Profile(read[0], tuple(row[0] for row in read[1]))


def _wind(reader: _Reader, table: dict) -> Wind | WindProfile | None:
    raw = table.get("wind")
    if raw is None:
        return Wind()
    if isinstance(raw, list):
        return _wind_profile(reader, raw)
    if not isinstance(raw, dict):
        reader.add("[day] wind", f"must be a table like {{ from_deg = 270.0, speed_kmh = 20.0 }} or a list of "
                                 f"{{ height_m, from_deg, speed_kmh }} tables, got {show(raw)}")
        return None
    reader.unknown(raw, "[day] wind", ("from_deg", "speed_kmh"))
    direction = reader.number(raw, "[day] wind", "from_deg", required=True, low=0.0, high=360.0)
    speed = reader.number(raw, "[day] wind", "speed_kmh", required=True, low=0.0, high=MAX_WIND_SPEED_KMH)
    if direction is None or speed is None:
        return None
    return Wind(direction % 360.0, speed * KMH)


def _band_top(reader: _Reader, table: dict, derived) -> tuple[float | None, Profile | None]:
    """``(band_top_m, profile or None)``: a typed height, a typed band top through the day
    (``[["HH:MM", m], ...]``, band_top_m its highest value), or the derived day's."""
    if "band_top_m" not in table:
        if derived is not None:
            return derived.band_top_m, derived.band_top
        reader.number(table, "[day]", "band_top_m", required=True)
        return None, None
    if isinstance(table["band_top_m"], list):
        profile = _profile(reader, table, "band_top_m", low=-500.0, high=15000.0, unit="m")
        return (None, None) if profile is None else (max(profile.values), profile)
    return reader.number(table, "[day]", "band_top_m", required=True, low=-500.0, high=15000.0), None


def _wind_profile(reader: _Reader, raw: list) -> WindProfile | None:
    """``[day] wind`` as a list of levels (contract 2.3): heights strictly increasing."""
    if not raw:
        reader.add("[day] wind", "a wind profile needs at least one { height_m, from_deg, speed_kmh } level")
        return None
    levels, ok = [], True
    for number, entry in enumerate(raw, start=1):
        here = f"[day] wind[{number}]"
        if not isinstance(entry, dict):
            reader.add(here, f"must be a table like {{ height_m = 1000.0, from_deg = 270.0, speed_kmh = 20.0 }}, "
                             f"got {show(entry)}")
            ok = False
            continue
        reader.unknown(entry, here, ("height_m", "from_deg", "speed_kmh"))
        height = reader.number(entry, here, "height_m", required=True, low=-500.0, high=15000.0)
        direction = reader.number(entry, here, "from_deg", required=True, low=0.0, high=360.0)
        speed = reader.number(entry, here, "speed_kmh", required=True, low=0.0, high=MAX_WIND_SPEED_KMH)
        if None in (height, direction, speed):
            ok = False
            continue
        if levels and height <= levels[-1].height_m:
            reader.add(f"{here} height_m", f"heights must increase: {height:g} m is not above "
                                           f"{levels[-1].height_m:g} m")
            ok = False
            continue
        levels.append(WindLevel(height, direction % 360.0, speed * KMH))
    return WindProfile(tuple(levels)) if ok else None


def _day_band(reader: _Reader, table: dict, derived, optional: bool, start: float | None):
    """``(band_top_m, band top profile or None, band_bottom_m, start_height_m)`` of [day],
    typed or derived, with the checks between them."""
    if optional and "band_top_m" not in table:
        top, top_profile = (None, None) if derived is None else (derived.band_top_m, derived.band_top)
    else:
        top, top_profile = _band_top(reader, table, derived)
    bottom = reader.number(table, "[day]", "band_bottom_m", required=not optional, low=-500.0, high=15000.0)
    if bottom is None and "band_bottom_m" not in table and derived is not None:
        bottom = derived.band_bottom_m
    start_height = reader.number(table, "[day]", "start_height_m", low=-500.0, high=15000.0)
    if start_height is None and "start_height_m" not in table and derived is not None and derived.no_lift:
        start_height = derived.band_bottom_m  # no lift: the flight starts at the band bottom
    lowest_top = top if top_profile is None else min(top_profile.values)
    if lowest_top is not None and bottom is not None and lowest_top <= bottom:
        reader.add("[day] band_top_m", f"the band top ({lowest_top:g} m) must be above band_bottom_m ({bottom:g} m)")
    start_top = top if top_profile is None or start is None else min(float(top_profile.at(start)), top)
    if start_height is not None and start_top is not None and start_height > start_top:
        top_name = "band_top_m" if top_profile is None else "the band top at the start"
        reader.add("[day] start_height_m", f"the start height ({start_height:g} m) is above {top_name} "
                                           f"({start_top:g} m)")
    return top, top_profile, bottom, start_height


def _day_lift(reader: _Reader, table: dict, derived, sounding_failed: bool) -> tuple[Profile | None, Profile | None]:
    """``(climb, thermal_strength)`` of [day]: exactly one is typed, or the derived strength."""
    given = [key for key in ("climb_ms", "thermal_strength_ms") if key in table]
    if not given and derived is not None:
        return None, derived.thermal_strength
    if not given and sounding_failed:
        return None, None
    if len(given) != 1:
        reader.add("[day] climb_ms", "give exactly one of climb_ms (achieved climb) and thermal_strength_ms "
                                     f"(thermal core strength), got {' and '.join(given) or 'neither'}")
        return None, None
    if given[0] == "climb_ms":
        return _profile(reader, table, "climb_ms"), None
    return None, _profile(reader, table, "thermal_strength_ms")


def _day_settings(reader: _Reader, table: dict) -> dict | None:
    """The [day] settings with defaults, as :class:`Day` keywords; None where any is bad."""
    settings = {
        "glide_airmass_ms": reader.number(table, "[day]", "glide_airmass_ms", default=0.0, low=-5.0, high=5.0),
        "isa_deviation_c": reader.number(table, "[day]", "isa_deviation_c", default=0.0, low=-50.0, high=50.0),
        "mc_ms": reader.number(table, "[day]", "mc_ms", low=0.0, high=10.0),
        "thermal_radius_m": reader.number(table, "[day]", "thermal_radius_m", positive=True, high=5000.0),
        "centring_s": reader.number(table, "[day]", "centring_s", default=DEFAULT_CENTRING_S, low=0.0, high=600.0),
        "detour_percent": reader.number(table, "[day]", "detour_percent", default=DEFAULT_DETOUR_PERCENT, low=0.0,
                                        high=50.0),
        "stall_margin": reader.number(table, "[day]", "stall_margin", default=DEFAULT_STALL_MARGIN,
                                      low=STALL_MARGIN_RANGE[0], high=STALL_MARGIN_RANGE[1]),
    }
    optional = ("mc_ms", "thermal_radius_m")  # None when absent
    if any(value is None and (key not in optional or key in table) for key, value in settings.items()):
        return None
    return settings


def _day(reader: _Reader, table: dict, source=None, sounding_failed: bool = False) -> Day | None:
    """The [day] table as a Day; with a sounding (``source``, a
    :class:`glidetask.engine.sounding_inputs.DaySource`) the keys it derives may be left out, and
    typed ones override them. ``sounding_failed``: the sounding's problems are reported
    already, so the keys it would have given are not reported missing."""
    reader.unknown(table, "[day]", DAY_KEYS)
    derived = None if source is None else source.inputs
    optional = derived is not None or sounding_failed
    start = reader.clock(table, "[day]", "start_time", required=True)
    lift_ends = reader.clock(table, "[day]", "lift_ends", required=not optional)
    if lift_ends is None and "lift_ends" not in table and derived is not None:
        lift_ends = derived.lift_ends_s
    top, top_profile, bottom, start_height = _day_band(reader, table, derived, optional, start)
    if start is not None and lift_ends is not None and start >= lift_ends:
        reader.add("[day] start_time", f"the start ({format_clock(start)}) must be before lift_ends "
                                       f"({format_clock(lift_ends)})")
    climb, strength = _day_lift(reader, table, derived, sounding_failed)
    wind = derived.wind_profile if "wind" not in table and derived is not None else _wind(reader, table)
    settings = _day_settings(reader, table)
    if (climb is None and strength is None) or None in (start, lift_ends, top, bottom, wind) or settings is None:
        return None
    if "start_height_m" in table and start_height is None:
        return None
    return Day(start_time_s=start, band_top_m=top, band_bottom_m=bottom, lift_ends_s=lift_ends, wind=wind,
               climb=climb, thermal_strength=strength, start_height_m=start_height, band_top_profile=top_profile,
               **settings)


def _quiet_clock(value) -> float | None:
    """A clock value read without reporting (the [day] reader reports a bad one), or None."""
    try:
        return parse_clock(value) if isinstance(value, str) else None
    except ValueError:
        return None


def _day_source(reader: _Reader, document: dict, path) -> tuple[object, bool]:
    """``(DaySource or None, failed)`` for a task whose [day] names a sounding: the
    derived day (MetPy is imported only here) and the keys typed over it."""
    day = document.get("day")
    if not isinstance(day, dict) or "sounding" not in day:
        return None, False
    from glidetask.engine.sounding_inputs import DaySource, NoWorkingBandError, day_inputs, no_lift_inputs
    from glidetask.formats.sounding_file import derive_task_day

    try:
        settings, sounding, derived = derive_task_day(document, path)
    except InputError as error:
        reader.problems.extend(error.problems)
        return None, True
    try:
        inputs = day_inputs(derived)
    except NoWorkingBandError:
        typed = all(key in day for key in ("band_top_m", "band_bottom_m", "lift_ends")) and (
            "climb_ms" in day or "thermal_strength_ms" in day)
        inputs = None
        if not typed:
            # A forecast that never triggers is a result: the plan flies a day with no lift
            # from the start height and lands out (the sounding's no-lift caution says why).
            start = _quiet_clock(day.get("start_time"))
            height = day.get("start_height_m")
            height = float(height) if isinstance(height, (int, float)) and not isinstance(height, bool) else None
            inputs = no_lift_inputs(derived, 0.0 if start is None else start, height)
    overridden = tuple(key for key in OVERRIDING_KEYS if key in day)
    return DaySource(settings.sounding_file, derived, inputs, overridden, settings, sounding), False
def _safety(reader: _Reader, table: dict | None) -> Safety | None:
    if table is None:
        return Safety()
    reader.unknown(table, "[safety]", SAFETY_KEYS)
    margin = reader.number(table, "[safety]", "arrival_margin_m", default=200.0, low=0.0, high=5000.0)
    clearance = reader.number(table, "[safety]", "terrain_clearance_m", default=150.0, low=0.0, high=5000.0)
    mc = reader.number(table, "[safety]", "final_glide_mc_ms", low=0.0, high=10.0)
    # Source: 100 m below an airspace floor is a common planning margin (common practice).
    airspace_margin = reader.number(table, "[safety]", "airspace_margin_m", default=DEFAULT_AIRSPACE_MARGIN_M, low=0.0, high=1000.0)
    if margin is None or clearance is None or airspace_margin is None or ("final_glide_mc_ms" in table and mc is None):
        return None
    return Safety(margin, clearance, mc, airspace_margin)


def _airspace(reader: _Reader, table: dict | None, base: Path):
    """``(airspace, absolute path)`` of ``[airspace] file``, or ``(None, None)``; the airspace
    file's own problems are reported under its name (contract 2.6)."""
    if table is None:
        return None, None
    reader.unknown(table, "[airspace]", AIRSPACE_KEYS)
    value = reader.text(table, "[airspace]", "file", required=True)
    if value is None:
        return None, None
    path = _resolve(base, value)
    missing = file_problem(path)
    if missing is not None:
        reader.add("[airspace] file", f"{missing}: {path}")
        return None, None
    from glidetask.formats.airspace_file import read_airspace  # only for tasks with airspace

    try:
        airspace = read_airspace(path)
    except InputError as error:
        reader.problems.extend(error.problems)
        return None, None
    return airspace, str(path.resolve())


def _terrain(reader: _Reader, table: dict | None, base: Path) -> str | None:
    if table is None:
        return None
    reader.unknown(table, "[terrain]", TERRAIN_KEYS)
    value = reader.text(table, "[terrain]", "file", required=True)
    if value is None:
        return None
    path = _resolve(base, value)
    missing = file_problem(path)
    if missing is not None:
        reader.add("[terrain] file", f"{missing}: {path}")
        return None
    return str(path.resolve())


# ---------------------------------------------------------------- reading


def _parse_toml(path: Path, file: str) -> dict:
    document, problems = read_toml(path, file)
    if document is None:
        raise InputError(problems)
    return document


def load_scenario(path: str | os.PathLike) -> Scenario:
    """Read a task file (contract 2.3) with everything it references.

    Parameters
    ----------
    path : str or path-like
        The task file. Paths inside it are relative to its folder.

    Returns
    -------
    Scenario
        ``task``, ``glider`` (its ``polar_file`` an absolute path), ``day``, ``safety``,
        ``turnpoints`` (the whole turnpoint file), ``terrain_file`` (absolute path or None)
        and ``source`` (``path`` as given).

    Raises
    ------
    InputError
        With every problem found in the task file, the turnpoint file and the polar file.
    """
    file = str(path)
    document = _parse_toml(Path(path), file)
    reader = _Reader(file)
    base = _folder_of(path)
    for key in document:
        if key not in TABLES:
            reader.add(f"[{key}]", f"unknown table (expected {', '.join('[' + t + ']' for t in TABLES)})")
    task_table = reader.table(document, "task", required=True)
    glider_table = reader.table(document, "glider", required=True)
    day_table = reader.table(document, "day", required=True)
    task = turnpoints = turnpoint_file = None
    if task_table is not None:
        task, turnpoints, turnpoint_file = _task(reader, task_table, base, Path(path).stem)
    glider = _glider(reader, glider_table, base) if glider_table is not None else None
    source, sounding_failed = _day_source(reader, document, path) if day_table is not None else (None, False)
    day = _day(reader, day_table, source, sounding_failed) if day_table is not None else None
    safety = _safety(reader, reader.table(document, "safety", required=False))
    terrain = _terrain(reader, reader.table(document, "terrain", required=False), base)
    airspace, airspace_file = _airspace(reader, reader.table(document, "airspace", required=False), base)
    reader.problems.raise_if_any()
    # Achieved climbs belong to the file's loading: other ballasts climb as the circling model says.
    day = dataclasses.replace(day, ground_m=_ground_m(day_table, task),
                              climb_ballast_kg=glider.ballast_kg if day.climb is not None else None)
    return Scenario(task=task, glider=glider, day=day, safety=safety, turnpoints=turnpoints,
                    terrain_file=terrain, source=file, day_source=source, airspace=airspace,
                    airspace_file=airspace_file,
                    turnpoints_file=None if turnpoint_file is None else str(turnpoint_file))


def files_named_by(task_path: str | os.PathLike) -> list[Path]:
    """The task file and every existing file its text names (turnpoints, polar, terrain, and any
    other path such as an airspace or a sounding file), resolved as the reader resolves them.
    Empty if the task cannot be read. For writers that must never replace a file the task reads."""
    from glidetask.formats.files import file_problem

    document, _ = read_toml(Path(task_path), str(task_path))
    if document is None:
        return []
    folder = _folder_of(task_path)
    found = [Path(task_path)]

    def walk(value) -> None:
        if isinstance(value, dict):
            for item in value.values():
                walk(item)
        elif isinstance(value, list):
            for item in value:
                walk(item)
        elif isinstance(value, str) and value.strip() and "\0" not in value:
            try:
                path = _resolve(folder, value.strip())
            except (ValueError, RuntimeError):
                return
            if file_problem(path) is None:
                found.append(path)

    walk(document)
    return found


def _ground_m(day_table: dict, task: Task) -> float:
    """The ground under the day's convective layer [m MSL] (its depth sets the default thermal
    size, contract section 3): ``[day] surface_elevation_m`` where given (the sounding's
    ground), else the lowest elevation among the task's turnpoints (the deepest layer the
    task flies over, so the broadest default thermals)."""
    given = day_table.get("surface_elevation_m")
    if is_number(given):
        return float(given)
    return float(min(point.turnpoint.elevation_m for point in task.points))


def turnpoints_file_of(task_path: str | os.PathLike) -> Path | None:
    """The turnpoint file a task file names (resolved against its folder), or None."""
    try:
        document = _parse_toml(Path(task_path), str(task_path))
    except InputError:
        return None
    value = document.get("task", {}).get("turnpoints") if isinstance(document.get("task"), dict) else None
    return _resolve(_folder_of(task_path), value) if isinstance(value, str) else None


# ---------------------------------------------------------------- writing


def _toml_value(value: Any) -> str:
    if isinstance(value, bool):
        return "true" if value else "false"
    if isinstance(value, str):
        return json.dumps(value, ensure_ascii=False)  # JSON string escapes are valid TOML basic strings
    if isinstance(value, (int, float)):
        number = round(float(value), 6)
        return str(int(number)) + ".0" if number.is_integer() else repr(number)
    if isinstance(value, (list, tuple)):
        return "[" + ", ".join(_toml_value(v) for v in value) + "]"
    if isinstance(value, dict):
        return "{ " + ", ".join(f"{k} = {_toml_value(v)}" for k, v in value.items()) + " }"
    raise TypeError(f"cannot write {type(value).__name__} to TOML")


def _zone_entry(point: TaskPoint) -> dict[str, Any]:
    zone = point.zone
    entry: dict[str, Any] = {"at": point.turnpoint.code or point.turnpoint.name}
    if zone.kind == "line":
        entry.update(zone="line", length_km=zone.length_m / 1000.0)
    elif zone.kind in ("cylinder", "area_cylinder"):
        entry.update(zone="cylinder", radius_km=zone.radius_m / 1000.0)
    elif zone.kind == "sector":
        entry.update(zone="sector", radius_km=zone.radius_m / 1000.0, angle_deg=zone.angle_deg)
    elif zone.kind == "keyhole":
        entry.update(zone="keyhole", radius_km=zone.radius_m / 1000.0, angle_deg=zone.angle_deg,
                     cylinder_radius_km=zone.cylinder_radius_m / 1000.0)
    else:
        entry.update(zone="sector", inner_radius_km=zone.inner_radius_m / 1000.0, radius_km=zone.radius_m / 1000.0,
                     radial_from_deg=zone.radial_from_deg, radial_to_deg=zone.radial_to_deg)
    return entry


def _relative(target: str | os.PathLike, folder: Path) -> str:
    """``target`` relative to ``folder`` (POSIX separators), or absolute if on another drive."""
    try:
        return Path(os.path.relpath(Path(target).resolve(), folder.resolve())).as_posix()
    except ValueError:
        return Path(target).resolve().as_posix()


def _profile_value(profile: Profile) -> list:
    return [[format_clock(t), v] for t, v in zip(profile.times_s, profile.values)]


def _typed_day_keys(scenario: Scenario) -> set[str]:
    """The [day] keys of the derivable values a saved task must type: all of them for a
    typed day; for a day from a sounding, those typed over it and those edited away from
    the derived value (the rest the sounding gives again when the task is read)."""
    every = {"band_top_m", "band_bottom_m", "wind", "thermal_strength_ms", "lift_ends"}
    source, day = scenario.day_source, scenario.day
    if source is None or source.inputs is None or source.settings is None:
        return every
    derived = source.inputs
    same = {"band_top_m": day.band_top_profile == derived.band_top and day.band_top_m == derived.band_top_m,
            "band_bottom_m": day.band_bottom_m == derived.band_bottom_m,
            "wind": day.wind == derived.wind_profile,
            "thermal_strength_ms": day.climb is None and day.thermal_strength == derived.thermal_strength,
            "lift_ends": day.lift_ends_s == derived.lift_ends_s}
    return {key for key in every if key in source.overridden or not same[key]}


def _sounding_lines(settings, folder: Path) -> list[str]:
    """The [day] sounding keys as read (:class:`glidetask.formats.sounding_file.DaySounding`)."""
    surface = settings.surface
    rows = [[format_clock(t), temperature, dewpoint]
            for t, temperature, dewpoint in zip(surface.times_s, surface.temperature_c, surface.dewpoint_c)]
    lines = [f"sounding = {_toml_value(_relative(settings.sounding_file, folder))}",
             f"surface = {_toml_value(rows)}"]
    if settings.surface_elevation_m is not None:
        lines.append(f"surface_elevation_m = {_toml_value(settings.surface_elevation_m)}")
    return lines + [f"band_top_margin_m = {_toml_value(settings.band_top_margin_m)}",
                    f"band_bottom_agl_m = {_toml_value(settings.band_bottom_agl_m)}"]


def _wind_value(wind: Wind | WindProfile):
    if isinstance(wind, WindProfile):
        return [{"height_m": level.height_m, "from_deg": level.from_deg, "speed_kmh": level.speed_ms / KMH}
                for level in wind.levels]
    return {"from_deg": wind.from_deg, "speed_kmh": wind.speed_ms / KMH}


def _day_lines(scenario: Scenario, folder: Path) -> list[str]:
    """The [day] table's lines: the keys typed (a derived day's own are left to the sounding)
    and the settings that differ from their defaults."""
    task, day = scenario.task, scenario.day
    lines: list[str] = []
    typed = _typed_day_keys(scenario)
    if scenario.day_source is not None and scenario.day_source.settings is not None:
        lines += _sounding_lines(scenario.day_source.settings, folder)
    lines.append(f"start_time = {_toml_value(format_clock(day.start_time_s))}")
    if day.start_height_m is not None:
        lines.append(f"start_height_m = {_toml_value(day.start_height_m)}")
    if "band_top_m" in typed:
        top = day.band_top_m if day.band_top_profile is None else _profile_value(day.band_top_profile)
        lines.append(f"band_top_m = {_toml_value(top)}")
    if "band_bottom_m" in typed:
        lines.append(f"band_bottom_m = {_toml_value(day.band_bottom_m)}")
    if "wind" in typed:
        lines.append(f"wind = {_toml_value(_wind_value(day.wind))}")
    if day.climb is not None:
        lines.append(f"climb_ms = {_toml_value(_profile_value(day.climb))}")
    elif "thermal_strength_ms" in typed:
        lines.append(f"thermal_strength_ms = {_toml_value(_profile_value(day.thermal_strength))}")
    # The circling model uses the thermal radius with either profile (ballast comparisons, odds);
    # absent, it comes from the day's convective layer.
    if day.thermal_radius_m is not None:
        lines.append(f"thermal_radius_m = {_toml_value(day.thermal_radius_m)}")
    if day.centring_s != DEFAULT_CENTRING_S:
        lines.append(f"centring_s = {_toml_value(day.centring_s)}")
    if day.detour_percent != DEFAULT_DETOUR_PERCENT:
        lines.append(f"detour_percent = {_toml_value(day.detour_percent)}")
    if day.stall_margin != DEFAULT_STALL_MARGIN:
        lines.append(f"stall_margin = {_toml_value(day.stall_margin)}")
    lowest = min(point.turnpoint.elevation_m for point in task.points)
    if scenario.day_source is None and day.ground_m != lowest:  # the layer's ground, as read (a sounding gives its own)
        lines.append(f"surface_elevation_m = {_toml_value(day.ground_m)}")
    if "lift_ends" in typed:
        lines.append(f"lift_ends = {_toml_value(format_clock(day.lift_ends_s))}")
    lines += [f"glide_airmass_ms = {_toml_value(day.glide_airmass_ms)}",
              f"isa_deviation_c = {_toml_value(day.isa_deviation_c)}"]
    if day.mc_ms is not None:
        lines.append(f"mc_ms = {_toml_value(day.mc_ms)}")
    return lines


def scenario_to_toml(scenario: Scenario, folder: Path, turnpoints_file: str | os.PathLike,
                     header: str | None = None) -> str:
    """The TOML text of a task file for ``scenario``, with paths relative to ``folder``."""
    task, glider, safety = scenario.task, scenario.glider, scenario.safety
    lines = [f"# {line}".rstrip() for line in (header or "").splitlines()]
    if lines:
        lines.append("")
    lines += ["[task]", f"name = {_toml_value(task.name)}", f"kind = {_toml_value(task.kind)}",
              f"turnpoints = {_toml_value(_relative(turnpoints_file, folder))}"]
    if task.min_time_s is not None:
        lines.append(f"min_time_min = {_toml_value(task.min_time_s / 60.0)}")
    for point in task.points:
        lines += ["", "[[task.points]]"] + [f"{k} = {_toml_value(v)}" for k, v in _zone_entry(point).items()]
    lines += ["", "[glider]", f"polar = {_toml_value(_relative(glider.polar_file, folder))}",
              f"pilot_kg = {_toml_value(glider.pilot_kg)}", f"ballast_kg = {_toml_value(glider.ballast_kg)}",
              f"bugs_percent = {_toml_value(glider.bugs_percent)}"]
    lines += ["", "[day]"] + _day_lines(scenario, folder)
    if scenario.terrain_file:
        lines += ["", "[terrain]", f"file = {_toml_value(_relative(scenario.terrain_file, folder))}"]
    if scenario.airspace_file:
        lines += ["", "[airspace]", f"file = {_toml_value(_relative(scenario.airspace_file, folder))}"]
    lines += ["", "[safety]", f"arrival_margin_m = {_toml_value(safety.arrival_margin_m)}",
              f"terrain_clearance_m = {_toml_value(safety.terrain_clearance_m)}"]
    if safety.final_glide_mc_ms is not None:
        lines.append(f"final_glide_mc_ms = {_toml_value(safety.final_glide_mc_ms)}")
    if safety.airspace_margin_m != DEFAULT_AIRSPACE_MARGIN_M:
        lines.append(f"airspace_margin_m = {_toml_value(safety.airspace_margin_m)}")
    return "\n".join(lines) + "\n"


def _leading_comments(path: str | os.PathLike | None) -> str | None:
    if not path:
        return None
    try:
        text = Path(path).read_text(encoding="utf-8")
    except (OSError, UnicodeDecodeError):
        return None
    comments = []
    for line in text.splitlines():
        if not line.startswith("#"):
            break
        comments.append(line[1:].removeprefix(" "))
    return "\n".join(comments) or None


# ---------------------------------------------------------------- saving over the user's own text
#
# A save keeps the user's comments, order and spelling for everything that did not change
# (shared/CONTRACT.md section 7): the new file is the previous text (tomlkit keeps its comments
# and layout) with only the values that mean something else replaced, added or removed.
# "Means the same" is judged on normalised values: a turnpoint by the point it names
# (``at = "Kellow Hill"`` and ``at = "KLH"`` are one place), a path by the file it reaches,
# clock times by their minute, numbers to the writer's six decimals, zones without the
# ``area_`` prefix, and an absent key by the reader's default.

_TABLE_DEFAULTS = {
    "task": {"kind": "racing"},
    "glider": {"pilot_kg": DEFAULT_PILOT_KG, "ballast_kg": 0.0, "bugs_percent": 0.0},
    "day": {"centring_s": DEFAULT_CENTRING_S, "detour_percent": DEFAULT_DETOUR_PERCENT, "glide_airmass_ms": 0.0,
            "isa_deviation_c": 0.0, "stall_margin": DEFAULT_STALL_MARGIN,
            "wind": {"from_deg": 0.0, "speed_kmh": 0.0}},
    "safety": {"arrival_margin_m": 200.0, "terrain_clearance_m": 150.0, "airspace_margin_m": DEFAULT_AIRSPACE_MARGIN_M},
    "terrain": {},
}
_PATH_KEYS = {("task", "turnpoints"), ("glider", "polar"), ("terrain", "file")}


class _Normaliser:
    """Values of a task document reduced to what they mean, for comparing two documents."""

    def __init__(self, folder: Path, turnpoints: tuple[Turnpoint, ...], default_name: str):
        self.folder = folder
        self.find = _lookup(turnpoints) if turnpoints else None
        self.default_name = default_name

    def value(self, key: tuple, value: Any) -> Any:
        if key[-2:] in _PATH_KEYS:
            return ("path", os.path.realpath(_resolve(self.folder, value))) if isinstance(value, str) else value
        if key[-1] == "at" and isinstance(value, str) and self.find is not None:
            point, _ = self.find(value.strip())
            return ("turnpoint", point.name) if point is not None else value
        if key[-1] == "zone" and isinstance(value, str):
            return value.strip().lower().removeprefix("area_")
        if isinstance(value, bool):
            return value
        if isinstance(value, (int, float)):
            number = as_float(value)
            if number is None or not math.isfinite(number):
                return ("number", str(value))
            return round(number % 360.0 if key[-1] == "from_deg" else number, 6)
        if isinstance(value, str):
            try:
                return ("clock", parse_clock(value))
            except ValueError:
                return value
        if isinstance(value, (list, tuple)):
            return tuple(self.value(key + ("[]",), v) for v in value)
        if isinstance(value, dict):
            return {k: self.value(key + (k,), v) for k, v in value.items()}
        return value

    def point(self, entry: dict, kind: str, role: str) -> dict:
        values = {k: self.value(("task", "points", k), v) for k, v in entry.items()}
        zone = values.get("zone")
        table = _START_FINISH if role != "turn" else _AREA_TURNS if kind == "area" else _RACING_TURNS
        for key, default in table.get(zone, {}).items() if isinstance(zone, str) else ():
            if default is not None:
                values.setdefault(key, round(default, 6))
        return values

    def document(self, document: dict) -> dict:
        """The whole document with defaults filled in (points by role)."""
        result = {}
        for name, defaults in _TABLE_DEFAULTS.items():
            table = document.get(name)
            if table is None and name in ("terrain",):
                continue
            table = dict(table or {})
            values = {k: self.value((name, k), v) for k, v in table.items() if not (name == "task" and k == "points")}
            for key, default in defaults.items():
                values.setdefault(key, self.value((name, key), default))
            if name == "task":
                values.setdefault("name", self.default_name)
                points = table.get("points") or []
                kind = table.get("kind", "racing")
                values["points"] = [self.point(entry, kind, "start" if i == 0 else "finish" if i == len(points) - 1
                                               else "turn") for i, entry in enumerate(points)]
            result[name] = values
        return result


def _keep_comment(old_item, new_item):
    """``new_item`` with the end-of-line comment of the item it replaces."""
    trivia = getattr(old_item, "trivia", None)
    if trivia is not None and trivia.comment and hasattr(new_item, "trivia"):
        new_item.trivia.comment = trivia.comment
        new_item.trivia.comment_ws = trivia.comment_ws
    return new_item


def _merge_table(old, new, key: tuple, norm: _Normaliser, defaults: dict, same_default: bool = True) -> None:
    """Change ``old`` (a tomlkit table) in place to mean what ``new`` means."""
    for name in list(old.keys()):
        if name not in new and not (key == ("task",) and name == "points"):
            del old[name]
    for name, value in new.items():
        if key == ("task",) and name == "points":
            continue
        where = key + (name,)
        if name in old:
            if norm.value(where, old[name].unwrap() if hasattr(old[name], "unwrap") else old[name]) \
                    != norm.value(where, value.unwrap() if hasattr(value, "unwrap") else value):
                old[name] = _keep_comment(old[name], value)
        elif not (same_default and name in defaults
                  and norm.value(where, defaults[name]) == norm.value(where, value.unwrap())):
            old[name] = value


def _merge_points(old_task, new_task, norm: _Normaliser, kind: str) -> None:
    import difflib

    import tomlkit

    new_points = new_task["points"]
    old_points = old_task.get("points")
    count = len(new_points)
    roles = ["start" if i == 0 else "finish" if i == count - 1 else "turn" for i in range(count)]

    def zone_defaults(entry, role) -> dict:
        zone = norm.value(("task", "points", "zone"), entry.get("zone"))
        table = _START_FINISH if role != "turn" else _AREA_TURNS if kind == "area" else _RACING_TURNS
        return {k: v for k, v in table.get(zone, {}).items() if v is not None} if isinstance(zone, str) else {}

    if not isinstance(old_points, tomlkit.items.AoT):
        old_task["points"] = new_points
        return
    identity = lambda entry: norm.value(("task", "points", "at"), entry.get("at"))  # noqa: E731
    if len(old_points) == count:
        pairs = list(range(count))
    else:
        pairs = [None] * count
        matcher = difflib.SequenceMatcher(a=[identity(e) for e in old_points], b=[identity(e) for e in new_points],
                                          autojunk=False)
        for block in matcher.get_matching_blocks():
            for offset in range(block.size):
                pairs[block.b + offset] = block.a + offset
    tables = []
    for index, (entry, old_index) in enumerate(zip(new_points, pairs)):
        if old_index is None:
            tables.append(entry)
            continue
        table = old_points[old_index]
        _merge_table(table, entry, ("task", "points"), norm, zone_defaults(entry, roles[index]))
        tables.append(table)
    if pairs == list(range(count)) and len(old_points) == count:
        return  # changed in place
    while len(old_points):
        del old_points[0]
    for table in tables:
        old_points.append(table)


def _merged_text(previous: str, fresh: str, folder: Path, scenario: Scenario) -> str | None:
    """``previous`` changed to mean what ``fresh`` means, or None if that cannot be done safely."""
    import tomllib

    import tomlkit

    try:
        old = tomlkit.parse(previous)
        new = tomlkit.parse(fresh)
    except Exception:  # noqa: BLE001 - anything tomlkit cannot keep: write the fresh text
        return None
    default_name = Path(scenario.source).stem if scenario.source else ""
    norm = _Normaliser(folder, scenario.turnpoints or (), default_name)
    try:
        for name in list(old.keys()):
            if name not in new:
                del old[name]
        for name, table in new.items():
            defaults = dict(_TABLE_DEFAULTS.get(name, {}))
            if name == "task":
                defaults["name"] = default_name
            if name not in old:
                kept = {k: v for k, v in table.items()
                        if not (k in defaults and norm.value((name, k), defaults[k]) == norm.value((name, k), v.unwrap()))}
                if kept:
                    old[name] = table
                continue
            _merge_table(old[name], table, (name,), norm, defaults)
            if name == "task":
                _merge_points(old[name], table, norm, str(table.get("kind", "racing")))
        text = tomlkit.dumps(old)
        same = norm.document(tomllib.loads(text)) == norm.document(tomllib.loads(fresh))
    except Exception:  # noqa: BLE001 - a layout tomlkit cannot edit: write the fresh text
        return None
    return text if same else None


def save_task(path: str | os.PathLike, scenario: Scenario, *, turnpoints_file: str | os.PathLike | None = None,
              header: str | None = None) -> None:
    """Write ``scenario`` as a task file (contract 2.3), atomically.

    The text is the task file the scenario was read from (``scenario.source``) with only
    what changed rewritten, so the user's comments, order and spelling stay; with no
    readable source, a fresh file. A symbolic link is written through to its target, and
    the paths in the file are relative to the target's folder.

    Parameters
    ----------
    path : str or path-like
        Where to write; the referenced files are written relative to its folder.
    scenario : Scenario
        As :func:`load_scenario` returns it (possibly edited with ``dataclasses.replace``).
    turnpoints_file : path, optional
        The turnpoint file the task refers to. Default: the ``turnpoints_file`` attribute
        of the scenario if it has one, else the file named by ``scenario.source``.
    header : str, optional
        Comment lines for the top of a fresh file. Default: the leading comment block of
        ``scenario.source`` (so a note such as "invented demo data" is kept).

    Raises
    ------
    ValueError
        If the turnpoint file cannot be found out, or ``path`` is a file the task reads
        (its polar, turnpoints or terrain).
    OSError
        If the file cannot be written (read-only, a name too long, no such folder).
    """
    from glidetask.formats.atomic import write_atomic, write_target

    target = write_target(path)
    if turnpoints_file is None:
        turnpoints_file = scenario.turnpoints_file or (
            turnpoints_file_of(scenario.source) if scenario.source else None)
    if turnpoints_file is None:
        raise ValueError("save_task needs the turnpoint file: pass turnpoints_file=")
    reads = [turnpoints_file, scenario.glider.polar_file if scenario.glider else None, scenario.terrain_file]
    for other in (f for f in reads if f):
        if os.path.realpath(other) == str(target):
            raise ValueError(f"{os.fspath(path)} is {other}, a file the task reads; save the task under another name")
    if header is None:
        header = _leading_comments(scenario.source)
    fresh = scenario_to_toml(scenario, target.parent, turnpoints_file, header)
    previous = _previous_text(scenario.source)
    text = _merged_text(previous, fresh, target.parent, scenario) if previous is not None else None
    write_atomic(target, fresh if text is None else text)


def _previous_text(source: str | os.PathLike | None) -> str | None:
    if not source:
        return None
    from glidetask.formats.files import read_text

    try:
        return read_text(source, str(source))
    except InputError:
        return None


__all__ = ["load_scenario", "save_task", "scenario_to_toml", "turnpoints_file_of"]
