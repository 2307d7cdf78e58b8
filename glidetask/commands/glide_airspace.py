"""The airspace check of ``glidetask glide --airspace FILE --from LAT,LON --to LAT,LON``.

Called by :mod:`glidetask.commands.glide` (imported only when ``--airspace`` is given). The
glide runs down the straight geodesic from the present height at ``--from`` to the arrival
height (goal elevation plus margin) at ``--to``, at the height used per metre of the final
glide just computed, sampled every 250 m. Every volume the path crosses is reported with
the stretch, its limits in metres MSL and the glide's heights there; a stretch where the
glide is between a floor minus the margin and a ceiling plus the margin is a conflict
(:func:`glidetask.engine.airspace_conflicts.conflicts`). AGL limits stand on the terrain model
(``--terrain``) or, without one, on the goal elevation, and the output says so.
"""

from __future__ import annotations

import argparse
import math

import numpy as np

from glidetask import cautions as caution_text
from glidetask import units as unit_systems
from glidetask.engine import geodesy
from glidetask.engine.airspace import limit_msl_m, nearest_point_ground
from glidetask.engine.airspace_conflicts import check_path
from glidetask.formats.airspace_file import read_airspace

SPACING_M = 250.0  # sample spacing along the glide [m]
WHAT = "The glide"


def _ground(args: argparse.Namespace):
    """The ground function for AGL limits, and whether it is only the goal's elevation."""
    if args.terrain is not None:
        from glidetask.commands.glide_terrain import _load  # lazy: the terrain modules, only with --terrain

        model = _load(args.terrain)
        return (lambda lats, lons: np.asarray(model.sample(lats, lons), dtype=float)), False
    lat, lon = args.to_latlon
    return nearest_point_ground([lat], [lon], [args.arrival_elevation_m]), True


def check(args: argparse.Namespace, result) -> tuple[dict, str]:
    """The airspace met by a final glide between two positions.

    Returns
    -------
    extra_json : dict
        ``{"airspace": {"source", "ok", "margin_m", "conflicts", "crossed"}, "cautions": [...]}``;
        ``crossed`` lists every volume the path is inside, with ``from_km``, ``to_km`` (from
        the start position), ``floor_m``, ``ceiling_m`` (MSL, at the stretch's middle) and the
        glide's ``planned_min_m``/``planned_max_m`` there.
    extra_text : str
        The readable section.
    """
    airspace = read_airspace(args.airspace)
    shown = unit_systems.by_name(args.units)
    caution_units = unit_systems.METRIC if args.json else shown
    (lat0, lon0), (lat1, lon1) = args.from_latlon, args.to_latlon
    lats, lons, along = geodesy.path_points([lat0, lat1], [lon0, lon1], SPACING_M)
    distance = float(along[-1])
    arrival = args.arrival_elevation_m + args.margin_m
    used = float(result.height_used_m)
    if not math.isfinite(used):  # out of reach: check the straight line down to the arrival height
        used = args.height_m - arrival
    heights = args.height_m - (used * along / distance if distance > 0.0 else np.zeros_like(along))
    ground, estimated = _ground(args)
    margin = args.airspace_margin_m
    found = check_path(airspace, lats, lons, along, along, heights, margin_m=margin, ground=ground,
                       isa_deviation_c=args.isa_deviation_c, ground_is_estimate=estimated)
    crossed = []
    for s in found.stretches:
        volume = airspace.volumes[s.volume]
        middle = 0.5 * (s.from_m + s.to_m)
        at_lat, at_lon = np.interp(middle, along, lats), np.interp(middle, along, lons)
        ground_m = float(ground(np.array([at_lat]), np.array([at_lon]))[0])
        pick = (along >= s.from_m) & (along <= s.to_m)
        there = np.concatenate([heights[pick], np.interp([s.from_m, s.to_m], along, heights)])
        crossed.append({"name": volume.name, "class": volume.airspace_class, "from_km": s.from_m / 1000.0,
                        "to_km": s.to_m / 1000.0, "floor_m": limit_msl_m(volume.floor, ground_m, args.isa_deviation_c),
                        "ceiling_m": limit_msl_m(volume.ceiling, ground_m, args.isa_deviation_c),
                        "from_ground": volume.floor.is_ground,
                        "planned_min_m": float(there.min()), "planned_max_m": float(there.max())})
    conflicts = [{"name": c.name, "class": c.airspace_class, "leg": c.leg, "from_km": c.from_m / 1000.0,
                  "to_km": c.to_m / 1000.0, "floor_m": c.floor_m, "ceiling_m": c.ceiling_m,
                  "planned_min_m": c.planned_min_m, "planned_max_m": c.planned_max_m} for c in found.conflicts]
    flight_levels = any(airspace.volumes[s.volume].floor.unit == "FL" or airspace.volumes[s.volume].ceiling.unit == "FL"
                        for s in found.stretches)
    words = caution_text.airspace_cautions(found, caution_units, WHAT, flight_levels, "the goal (--to)")
    payload = {"source": args.airspace, "ok": found.ok, "margin_m": margin, "conflicts": conflicts,
               "crossed": crossed, "agl_over_goal_elevation": bool(found.agl_from_points)}
    return {"airspace": payload, "cautions": words}, _text(args.airspace, crossed, found, shown, margin)


def _text(source: str, crossed: list[dict], found, units, margin_m: float) -> str:
    lines = [f"Airspace on the glide ({source}, margin {units.fmt_height(margin_m)})"]
    if not crossed:
        return "\n".join(lines + ["  the glide crosses no volume in the file"])
    clashing = {(c.name, round(c.from_m)) for c in found.conflicts}
    for row in crossed:
        floor = "ground" if row["from_ground"] else units.fmt_height(row["floor_m"])
        conflict = any(name == row["name"] and row["from_km"] * 1000.0 - 1.0 <= start <= row["to_km"] * 1000.0 + 1.0
                       for name, start in clashing)
        klass = f" [{row['class']}]" if row["class"] else ""
        lines.append(f"  {'CONFLICT ' if conflict else 'crossed  '} {row['name']}{klass}: "
                     f"{units.fmt_distance(row['from_km'] * 1000.0)} to {units.fmt_distance(row['to_km'] * 1000.0)}, "
                     f"{floor} to {units.fmt_height(row['ceiling_m'])}; glide "
                     f"{units.fmt_height(row['planned_max_m'])} down to {units.fmt_height(row['planned_min_m'])}")
    return "\n".join(lines)
