"""``glidetask check FILE...``: validate polar, turnpoint, task and terrain files (contract 4).

Each file's kind comes from its name and content: ``.toml`` with a ``[task]`` table is a
task, with a ``[polar]`` table a polar; ``.geojson``, ``.json`` and ``.csv`` are turnpoint
files; ``.tif``/``.tiff`` elevation models. Anything else is skipped (not an error), so
``glidetask check demo_tasks/*`` works on a whole folder. A short summary is printed for
each good file and every problem of every bad one; the exit status is 2 if any file has a
problem, else 0. ``--json`` prints a list with one result per file.

Imports stay lazy: each kind of file pulls in only the readers it needs.
"""

from __future__ import annotations

import argparse
import os
from pathlib import Path

from glidetask import cautions, units
from glidetask.errors import InputError, Problem, one_line

TURNPOINT_SUFFIXES = (".geojson", ".json", ".csv")
TERRAIN_SUFFIXES = (".tif", ".tiff")


def _problem_dicts(problems: list[Problem]) -> list[dict]:
    return [{"file": p.file, "where": p.where, "what": p.what} for p in problems]


# ---------------------------------------------------------------- one file of each kind


def check_turnpoints(path: str) -> dict:
    """Summary of a turnpoint file (raises InputError with its problems)."""
    from glidetask.formats.turnpoints import read_turnpoints

    from collections import Counter
    from operator import attrgetter

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


def check_polar(path: str) -> dict:
    """Summary of a polar file at its reference mass in still sea-level air."""
    from glidetask.engine.polar import scaled_polar
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
        "best_ld_speed_kmh": float(polar.best_ld_speed_ms) * 3.6,
        "min_sink_ms": float(polar.min_sink_ms),
        "min_sink_speed_kmh": float(polar.min_sink_speed_ms) * 3.6,
        "fit_rms_ms": float(polar.fit_rms_ms),
    }


def _zone_text(zone) -> str:
    km = lambda metres: f"{metres / 1000.0:g} km"  # noqa: E731
    if zone.kind == "line":
        return f"line {km(zone.length_m)}"
    if zone.kind == "sector":
        return f"sector {km(zone.radius_m)} {zone.angle_deg:g} deg"
    if zone.kind == "keyhole":
        return f"keyhole {km(zone.radius_m)} {zone.angle_deg:g} deg + {km(zone.cylinder_radius_m)}"
    if zone.kind == "area_sector":
        inner = f"{km(zone.inner_radius_m)}-" if zone.inner_radius_m > 0 else ""
        return f"area sector {inner}{km(zone.radius_m)} {zone.radial_from_deg:g}-{zone.radial_to_deg:g} deg"
    return f"{zone.kind.replace('_', ' ')} {km(zone.radius_m)}"


def check_task(path: str) -> dict:
    """Summary of a task file: the task, its distances, glider and day."""
    from glidetask.engine.task import area_distance_range, nominal_distance_m, optimized_path
    from glidetask.formats.task_file import load_scenario

    scenario = load_scenario(path)
    task, day = scenario.task, scenario.day
    result = {
        "kind": "task",
        "name": task.name,
        "task_kind": task.kind,
        "points": [{"at": p.name, "zone": _zone_text(p.zone)} for p in task.points],
        "nominal_distance_km": nominal_distance_m(task) / 1000.0,
        "optimized_distance_km": optimized_path(task).total_m / 1000.0,
        "glider": scenario.glider.spec.label,
        "mass_kg": scenario.glider.mass_kg,
        "start_time": units.format_clock(day.start_time_s),
        "band_m": [day.band_bottom_m, day.band_top_m],
        "wind": {"from_deg": day.wind.from_deg, "speed_kmh": day.wind.speed_ms * 3.6},
        "turnpoints": len(scenario.turnpoints),
        "landables": sum(1 for p in scenario.turnpoints if p.landable),
        "terrain_file": scenario.terrain_file,
        "cautions": cautions.general(),
    }
    if task.kind == "area":
        low, high = area_distance_range(task)
        result.update(min_distance_km=low / 1000.0, max_distance_km=high / 1000.0, min_time_s=task.min_time_s)
    return result


def check_terrain(path: str) -> dict:
    """Summary of an elevation model, if the terrain engine is available."""
    try:
        from glidetask.engine.terrain import TerrainError, load_terrain
    except ImportError:  # the terrain engine (rasterio) is missing: nothing to check with
        return {"kind": "terrain", "checked": False}
    import numpy as np

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


def _toml_kind(path: str) -> str:
    """``"task"``, ``"polar"`` or InputError, from the tables a TOML file has."""
    from glidetask.formats.toml_reader import read_toml

    document, problems = read_toml(Path(path), path)
    if document is None:
        raise InputError(problems)
    if "task" in document:
        return "task"
    if "polar" in document:
        return "polar"
    raise InputError.one(path, "file", "neither a task ([task] table) nor a polar ([polar] table)")


def file_kind(path: str) -> str:
    """What kind of glidetask file ``path`` is: task, polar, turnpoints, terrain or skipped."""
    suffix = Path(path).suffix.lower()
    if os.path.isdir(path):
        return "skipped"
    if suffix == ".toml":
        return "toml"
    if suffix in TURNPOINT_SUFFIXES:
        return "turnpoints"
    if suffix in TERRAIN_SUFFIXES:
        return "terrain"
    return "skipped"


def check_file(path: str) -> dict:
    """One file's result: ``{"file", "kind", "ok", "problems", ...summary}``."""
    from glidetask.formats.files import file_problem

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
                   "terrain": check_terrain}[kind](path)
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
    if kind == "polar":
        vertical = unit.vertical(result["min_sink_ms"])
        return [f"  {result['label']}",
                f"  at {result['reference_mass_kg']:g} kg: best glide 1:{result['best_ld']:.1f} at "
                f"{unit.fmt_speed(result['best_ld_speed_kmh'] / 3.6)}, minimum sink {vertical:.2f} "
                f"{unit.vertical_label} at {unit.fmt_speed(result['min_sink_speed_kmh'] / 3.6)}"]
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
              f"{wind['from_deg']:03.0f}/{unit.fmt_speed(wind['speed_kmh'] / 3.6)}",
              f"  {result['turnpoints']} turnpoints ({result['landables']} landable); terrain "
              f"{'none' if not result['terrain_file'] else os.path.basename(result['terrain_file'])}",
              f"  {cautions.COMPACT}"]
    return lines


def run(args: argparse.Namespace) -> int:
    from glidetask.commands._output import print_json

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
