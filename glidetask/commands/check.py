"""``glidetask check FILE...``: validate polar, turnpoint, task and terrain files (contract 4).

Each file's kind comes from its name and content: ``.toml`` with a ``[task]`` table is a
task, with a ``[polar]`` table a polar; a ``.csv`` whose header names the sounding columns
is a sounding (contract 2.7), other ``.csv`` files are turnpoint files; ``.geojson`` and
``.json`` are airspace files when their features are polygons, else turnpoint files;
``.tif``/``.tiff`` elevation models. A task with a sounding has its sounding and surface
forecast read too (the day is not derived here: ``glidetask day`` does that). Anything else
is skipped (not an error), so
``glidetask check demo_tasks/*`` works on a whole folder. A short summary is printed for
each good file and every problem of every bad one; the exit status is 2 if any file has a
problem, else 0. ``--json`` prints a list with one result per file.

The readers' imports stay lazy: each kind of file pulls in only the readers it needs.
"""

from __future__ import annotations

import argparse
import os
import re
from collections import Counter
from operator import attrgetter
from pathlib import Path

from glidetask import cautions, units
from glidetask.commands._output import print_json
from glidetask.errors import InputError, Problem, one_line
from glidetask.formats.files import file_problem, read_text
from glidetask.formats.wind_text import wind_json
from glidetask.formats.zone_text import zone_text
from glidetask.units import KMH, METRIC

TURNPOINT_SUFFIXES = (".geojson", ".json", ".csv")
GEOJSON_SUFFIXES = (".geojson", ".json")
TERRAIN_SUFFIXES = (".tif", ".tiff")


def _problem_dicts(problems: list[Problem]) -> list[dict]:
    return [{"file": p.file, "where": p.where, "what": p.what} for p in problems]


# ---------------------------------------------------------------- one file of each kind


def check_turnpoints(path: str) -> dict:
    """Summary of a turnpoint file (raises InputError with its problems)."""
    from glidetask.formats.turnpoints import read_turnpoints  # lazy: each kind of file loads only its reader

    points = read_turnpoints(path)  # C-speed passes below: files may hold 200,000 points
    counts = Counter(map(attrgetter("kind", "landable"), points))
    by_kind = {kind: counts[kind, False] + counts[kind, True] for kind in ("airfield", "field", "waypoint")}
    landable_by_kind = {kind: counts[kind, True] for kind in by_kind}
    lats, lons = list(map(attrgetter("lat"), points)), list(map(attrgetter("lon"), points))
    return {
        "kind": "turnpoints",
        "count": len(points),
        "landable": sum(landable_by_kind.values()),
        "by_kind": by_kind,
        "landable_by_kind": landable_by_kind,
        "with_code": sum(1 for p in points if p.code),
        "lat_range_deg": [min(lats), max(lats)],
        "lon_range_deg": [min(lons), max(lons)],
    }


def check_airspace(path: str) -> dict:
    """Summary of an airspace file (raises InputError with its problems)."""
    from glidetask.formats.airspace_file import read_airspace  # lazy: numpy and the airspace engine

    airspace = read_airspace(path)
    by_class: dict[str, int] = {}
    for volume in airspace.volumes:
        key = volume.airspace_class or "unclassified"
        by_class[key] = by_class.get(key, 0) + 1
    boxes = airspace.boxes
    return {
        "kind": "airspace",
        "count": len(airspace.volumes),
        "by_class": by_class,
        "from_ground": sum(1 for v in airspace.volumes if v.floor.is_ground),
        "holes": sum(len(polygon) - 1 for v in airspace.volumes for polygon in v.polygons),
        "lat_range_deg": [float(boxes[:, 1].min()), float(boxes[:, 3].max())] if len(boxes) else None,
        "lon_range_deg": [float(boxes[:, 0].min()), float(boxes[:, 2].max())] if len(boxes) else None,
    }


def _geojson_kind(path: str) -> str:
    """``"airspace"`` when a GeoJSON file's features are polygons, else ``"turnpoints"``."""
    if file_problem(path) is not None:
        return "turnpoints"  # not a regular file: check_file says what it is
    try:
        text = read_text(path, path, encoding="utf-8-sig")
    except InputError:
        return "turnpoints"  # the turnpoint reader says why it cannot be read
    polygon = re.search(r'"type"\s*:\s*"(?:Multi)?Polygon"', text)
    point = re.search(r'"type"\s*:\s*"Point"', text)
    return "airspace" if polygon and not point else "turnpoints"


def check_polar(path: str) -> dict:
    """Summary of a polar file at its reference mass in still sea-level air."""
    from glidetask.engine.polar import scaled_polar  # lazy: numpy and the fit, for polar files only
    from glidetask.formats.polar_file import load_polar_spec

    spec = load_polar_spec(path)
    polar = scaled_polar(spec, spec.reference_mass_kg)
    return {
        "kind": "polar",
        "label": spec.label,
        "reference_mass_kg": spec.reference_mass_kg,
        "empty_mass_kg": spec.empty_mass_kg,
        "max_ballast_kg": spec.max_ballast_kg,
        "best_ld": float(polar.best_ld),
        "best_ld_speed_kmh": float(polar.best_ld_speed_ms) / KMH,
        "min_sink_ms": float(polar.min_sink_ms),
        "min_sink_speed_kmh": float(polar.min_sink_speed_ms) / KMH,
        "fit_rms_ms": float(polar.fit_rms_ms),
    }


def check_task(path: str) -> dict:
    """Summary of a task file: the task, its distances, glider and day."""
    # lazy: the task engine (pyproj) and the task reader, for task files only
    from glidetask.engine.task import nominal_distance_m
    from glidetask.engine.task_search import area_distance_range, optimized_path
    from glidetask.formats.task_file import load_scenario

    problems, scenario, sounding = [], None, None
    try:
        scenario = load_scenario(path)
    except InputError as error:
        problems += error.problems
    try:
        sounding = _task_sounding(path)
    except InputError as error:
        problems += error.problems
    if problems:
        raise InputError(problems)
    task, day = scenario.task, scenario.day
    result = {
        "kind": "task",
        "name": task.name,
        "task_kind": task.kind,
        "points": [{"at": p.name, "zone": zone_text(p.zone, METRIC)} for p in task.points],
        "nominal_distance_km": nominal_distance_m(task) / 1000.0,
        "optimized_distance_km": optimized_path(task).total_m / 1000.0,
        "glider": scenario.glider.spec.label,
        "mass_kg": scenario.glider.mass_kg,
        "start_time": units.format_clock(day.start_time_s),
        "band_m": [day.band_bottom_m, day.band_top_m],
        "wind": wind_json(day.wind),
        "turnpoints": len(scenario.turnpoints),
        "landables": sum(1 for p in scenario.turnpoints if p.landable),
        "terrain_file": scenario.terrain_file,
        "sounding": sounding,
        "cautions": cautions.general(),
    }
    source = scenario.day_source
    if sounding is not None and source is not None and source.inputs is not None and source.inputs.no_lift:
        # A forecast that never triggers is a result, not a bad task: a plan flies it with no lift.
        sounding["no_lift"] = True
        result["cautions"] = result["cautions"] + [cautions.NO_LIFT_DAY]
    if task.kind == "area":
        low, high = area_distance_range(task)
        result.update(min_distance_km=low / 1000.0, max_distance_km=high / 1000.0, min_time_s=task.min_time_s)
    return result


def _task_sounding(path: str) -> dict | None:
    """The task's sounding and surface forecast, read and checked (not derived: no MetPy)."""
    # lazy: numpy and the sounding reader, and the TOML reader, for task files only
    from glidetask.formats.sounding_file import read_day_sounding, read_sounding
    from glidetask.formats.toml_reader import read_toml

    document, _ = read_toml(Path(path), path)  # a syntax error is the task reader's to report
    settings = None if document is None else read_day_sounding(document, path)
    if settings is None:
        return None
    sounding = read_sounding(settings.sounding_file)
    elevation = settings.surface_elevation_m
    if elevation is not None and not sounding.height_m[0] <= elevation < sounding.height_m[-1]:
        raise InputError.one(path, "[day] surface_elevation_m",
                             f"{elevation:g} m lies outside the sounding ({sounding.height_m[0]:g} to "
                             f"{sounding.height_m[-1]:g} m)")
    times = settings.surface.times_s
    return {"file": settings.sounding_file, "levels": len(sounding.height_m),
            "surface_from": units.format_clock(times[0]), "surface_to": units.format_clock(times[-1])}


def check_terrain(path: str) -> dict:
    """Summary of an elevation model, if the terrain engine is available."""
    try:
        from glidetask.engine.terrain import TerrainError, load_terrain  # lazy: numpy, pyproj, rasterio
    except ImportError:  # the terrain engine (rasterio) is missing: nothing to check with
        return {"kind": "terrain", "checked": False}
    import numpy as np  # lazy: loaded with the terrain engine above; other kinds of file may not need it

    try:
        terrain = load_terrain(path)
    except TerrainError as error:
        raise InputError.one(path, "file", error.what) from None
    elevation = terrain.elevation_m
    known = np.isfinite(elevation)
    return {
        "kind": "terrain",
        "checked": True,
        "crs": terrain.crs,
        "bounds": list(terrain.bounds),
        "shape": list(terrain.shape),
        "elevation_range_m": [float(elevation[known].min()), float(elevation[known].max())] if known.any() else None,
        "no_data_percent": 100.0 * (1.0 - known.mean()),
    }


def check_sounding(path: str) -> dict:
    """Summary of a sounding file (contract 2.7)."""
    from glidetask.formats.sounding_file import read_sounding  # lazy: numpy, for soundings only

    sounding = read_sounding(path)
    return {"kind": "sounding", "levels": len(sounding.height_m),
            "height_range_m": [float(sounding.height_m[0]), float(sounding.height_m[-1])]}


def _toml_kind(path: str) -> str:
    """``"task"``, ``"polar"`` or InputError, from the tables a TOML file has."""
    from glidetask.formats.toml_reader import read_toml  # lazy: the TOML libraries, for .toml files only

    document, problems = read_toml(Path(path), path)
    if document is None:
        raise InputError(problems)
    if "task" in document:
        return "task"
    if "polar" in document:
        return "polar"
    raise InputError.one(path, "file", "neither a task ([task] table) nor a polar ([polar] table)")


def file_kind(path: str) -> str:
    """What kind of glidetask file ``path`` is: task, polar, turnpoints, airspace, terrain or skipped."""
    suffix = Path(path).suffix.lower()
    if os.path.isdir(path):
        return "skipped"
    if suffix == ".toml":
        return "toml"
    if suffix == ".csv":
        from glidetask.formats.sounding_file import looks_like_sounding  # lazy: numpy, for .csv files only

        if looks_like_sounding(path):
            return "sounding"
    if suffix in GEOJSON_SUFFIXES:
        return _geojson_kind(path)
    if suffix in TURNPOINT_SUFFIXES:
        return "turnpoints"
    if suffix in TERRAIN_SUFFIXES:
        return "terrain"
    return "skipped"


def check_file(path: str) -> dict:
    """One file's result: ``{"file", "kind", "ok", "problems", ...summary}``."""
    kind = file_kind(path)
    result: dict = {"file": path, "kind": kind}
    if kind == "skipped":
        return {**result, "ok": True, "problems": []}
    problem = file_problem(path)
    if problem is not None:
        return {**result, "ok": False, "problems": _problem_dicts([Problem(path, "file", problem)])}
    try:
        if kind == "toml":
            kind = _toml_kind(path)
            result["kind"] = kind
        summary = {"task": check_task, "polar": check_polar, "toml": check_polar, "turnpoints": check_turnpoints,
                   "airspace": check_airspace, "terrain": check_terrain, "sounding": check_sounding}[kind](path)
    except InputError as error:
        return {**result, "ok": False, "problems": _problem_dicts(error.problems)}
    return {**result, **summary, "ok": True, "problems": []}


# ---------------------------------------------------------------- text


def _summary_lines(result: dict, unit: units.UnitSystem) -> list[str]:
    kind = result["kind"]
    if kind == "skipped":
        return ["  skipped: not a glidetask file"]
    if kind == "turnpoints":
        counts = result["by_kind"]
        landable = result["landable_by_kind"]
        return [f"  {result['count']} turnpoints, {result['landable']} landable "
                f"({landable['airfield']} airfields, {landable['field']} fields), {counts['waypoint']} waypoints",
                f"  latitude {result['lat_range_deg'][0]:.3f} to {result['lat_range_deg'][1]:.3f}, "
                f"longitude {result['lon_range_deg'][0]:.3f} to {result['lon_range_deg'][1]:.3f}"]
    if kind == "airspace":
        classes = ", ".join(f"{count} {name}" for name, count in sorted(result["by_class"].items()))
        lines = [f"  {result['count']} volumes ({classes}), {result['from_ground']} from the ground, "
                 f"{result['holes']} holes"]
        if result["lat_range_deg"] is not None:
            lines.append(f"  latitude {result['lat_range_deg'][0]:.3f} to {result['lat_range_deg'][1]:.3f}, "
                         f"longitude {result['lon_range_deg'][0]:.3f} to {result['lon_range_deg'][1]:.3f}")
        return lines + [f"  {cautions.COMPACT}"]
    if kind == "polar":
        vertical = unit.vertical(result["min_sink_ms"])
        return [f"  {result['label']}",
                f"  at {result['reference_mass_kg']:g} kg: best glide 1:{result['best_ld']:.1f} at "
                f"{unit.fmt_speed(result['best_ld_speed_kmh'] * KMH)}, minimum sink {vertical:.2f} "
                f"{unit.vertical_label} at {unit.fmt_speed(result['min_sink_speed_kmh'] * KMH)}"]
    if kind == "sounding":
        low, high = result["height_range_m"]
        return [f"  sounding of {result['levels']} levels, {unit.fmt_height(low)} to {unit.fmt_height(high)}"]
    if kind == "terrain":
        if not result.get("checked"):
            return ["  elevation model (not checked: the terrain engine is not available)"]
        rows, columns = result["shape"]
        left, bottom, right, top = result["bounds"]
        low_high = result["elevation_range_m"]
        span = "no data" if low_high is None else f"{unit.fmt_height(low_high[0])} to {unit.fmt_height(low_high[1])}"
        return [f"  elevation model {columns} x {rows} cells, {result['crs']}",
                f"  bounds {left:g}, {bottom:g} to {right:g}, {top:g}; elevations {span}"
                f" ({result['no_data_percent']:.1f} % no data)"]
    km = lambda value: unit.fmt_distance(value * 1000.0)  # noqa: E731
    lines = [f"  {result['name']} ({result['task_kind']}), {len(result['points'])} points:",
             "  " + " -> ".join(f"{p['at']} [{p['zone']}]" for p in result["points"]),
             f"  nominal {km(result['nominal_distance_km'])}, optimized {km(result['optimized_distance_km'])}"]
    if result["task_kind"] == "area":
        lines.append(f"  area distance {km(result['min_distance_km'])} to {km(result['max_distance_km'])}, "
                     f"minimum time {units.format_duration(result['min_time_s'])}")
    wind = result["wind"]
    lines += [f"  glider {result['glider']}, {result['mass_kg']:g} kg; start {result['start_time']}, band "
              f"{unit.fmt_height(result['band_m'][0])} to {unit.fmt_height(result['band_m'][1])}, wind "
              f"{_wind_words(wind, unit)}",
              f"  {result['turnpoints']} turnpoints ({result['landables']} landable); terrain "
              f"{'none' if not result['terrain_file'] else os.path.basename(result['terrain_file'])}",
              f"  {cautions.COMPACT}"]
    if result.get("sounding"):
        sounding = result["sounding"]
        lines.insert(-1, f"  sounding {os.path.basename(sounding['file'])}, {sounding['levels']} levels; surface "
                         f"forecast {sounding['surface_from']} to {sounding['surface_to']} (glidetask day derives the day)")
        if sounding.get("no_lift"):
            lines.insert(-1, f"  note: {cautions.NO_LIFT_DAY}")
    return lines


def run(args: argparse.Namespace) -> int:
    results = [check_file(path) for path in args.files]
    problems = [Problem(p["file"], p["where"], p["what"]) for r in results for p in r["problems"]]
    if args.json:
        print_json(results)
    else:
        unit = units.by_name(args.units)
        for result in results:
            name = one_line(result["file"])
            if result["ok"]:
                label = "skipped (not a glidetask file)" if result["kind"] == "skipped" else f"{result['kind']}, ok"
                print(f"{name}: {label}")
                if result["kind"] != "skipped":
                    print("\n".join(_summary_lines(result, unit)))
            else:
                print(f"{name}: {result['kind']}, {len(result['problems'])} problem(s) (listed on stderr)")
    if problems:
        raise InputError(problems)
    return 0


def _wind_words(wind, unit) -> str:
    """The check's wind (:func:`glidetask.formats.wind_text.wind_json`) in words."""
    levels = wind if isinstance(wind, list) else [wind]
    text = [f"{w['from_deg']:03.0f}/{unit.fmt_speed(w['speed_kmh'] * KMH)}"
            + (f" at {unit.fmt_height(w['height_m'])}" if "height_m" in w else "") for w in levels]
    return ", ".join(text)
