"""A plan's whole flight over the ground: its height profile, raised floors, uncovered
terrain and where it lands out (facts; :mod:`glidetask.cautions` words them).

:func:`ground_facts` turns the flight core's recorded vertices (``Flown.trace``) and the
terrain sampled along the planned path (:class:`glidetask.engine.clearance_hook.PathTerrain`)
into :class:`PlannedProfile`, the raised floors (:class:`Floor`), the uncovered stretches
and the land-out (:class:`Landout`). The land-out's place along the task is where the
flight core's glide at MacCready 0 ends (the same rule the odds fly:
:mod:`glidetask.engine.flight_ground`); the field is the best landable field of the
turnpoint collection within reach of where the climbs stopped (the field nearest that
place, reached at MacCready 0 in the day's wind with the arrival margin).
"""

from __future__ import annotations

import math
from dataclasses import dataclass
from typing import NamedTuple

import numpy as np

from glidetask.engine import geodesy
from glidetask.engine.flight_profile import profile_samples, raised_floors
from glidetask.engine.landing_fields import LandingFields
from glidetask.engine.reach import reach_distance


@dataclass(frozen=True, eq=False)
class PlannedProfile:
    """The planned height of the whole flight along the task.

    Attributes
    ----------
    distance_m, height_m, terrain_m : ndarray, shape (K,)
        Distance along the planned path [m], planned height [m MSL], terrain under it
        [m MSL] (NaN where unknown or without a terrain file).
    phase : tuple of str, length K
        "glide" | "climb" | "final": the phase of the stretch ending at each sample.
    """

    distance_m: np.ndarray
    height_m: np.ndarray
    terrain_m: np.ndarray
    phase: tuple

    @property
    def least_clearance(self) -> tuple[float, float] | None:
        """``(clearance_m, at_m)``: the smallest height above the known terrain, or None."""
        gap = self.height_m - self.terrain_m
        if not np.any(np.isfinite(gap)):
            return None
        i = int(np.nanargmin(gap))
        return float(gap[i]), float(self.distance_m[i])


class Floor(NamedTuple):
    """A stretch ``(from_m, to_m, floor_m)`` of :func:`~glidetask.engine.flight_profile.raised_floors`,
    named: where the ground raised the glides' floor above the band bottom [m along the task],
    and the highest floor there [m MSL]."""

    from_m: float
    to_m: float
    floor_m: float


@dataclass(frozen=True)
class Landout:
    """Where a plan that ends short lands: distance along the task [m], the field (name or
    None when none is in reach), its position [deg] and elevation [m MSL] (the ground at
    the landing point without a field: terrain, or the finish elevation without a model)."""

    at_m: float
    field: str | None
    lat: float
    lon: float
    elevation_m: float


def point_at(path, distance_m: float) -> tuple[float, float]:
    """The point of a planned path at a distance along it [deg]."""
    bounds = path.cumulative_m
    leg = int(np.clip(np.searchsorted(bounds, distance_m, side="right") - 1, 0, len(path.legs) - 1))
    lat1, lon1, lat2, lon2 = path.lats[leg], path.lons[leg], path.lats[leg + 1], path.lons[leg + 1]
    _, azimuth, _ = geodesy.inverse(lat1, lon1, lat2, lon2)
    lat, lon, _ = geodesy.direct(lat1, lon1, azimuth, max(distance_m - bounds[leg], 0.0))
    return float(lat), float(lon)


def ground_facts(scenario, path, flown, hook):
    """``(profile, floors, uncovered, landout)`` of a plan flown with ``record=True``."""
    terrain = getattr(hook, "profile", None)
    profile = None
    if flown.trace:
        distance, height, phase = profile_samples(flown.trace)
        if terrain is not None:
            known = np.isfinite(terrain.elevation_m)
            ground = np.interp(distance, terrain.distance_m, np.where(known, terrain.elevation_m, np.nan))
        else:
            ground = np.full(distance.shape, np.nan)
        profile = PlannedProfile(distance, height, ground, phase)
    floors, uncovered = (), ()
    if terrain is not None:
        floors = tuple(map(Floor._make, raised_floors(terrain.distance_m, terrain.elevation_m, hook.clearance_m,
                                                      scenario.day.band_bottom_m)))
        uncovered = tuple((float(a), float(b)) for a, b in terrain.uncovered_ranges())
    landout = None
    if not bool(flown.finished[0]) and math.isfinite(float(flown.landout_m[0])):
        fields = getattr(hook, "terrain", hook)  # under airspace the corridor carries it
        if terrain is None and isinstance(fields, LandingFields):
            landout = _landout_in_field(scenario, path, flown, fields)
        else:
            landout = _landout(scenario, path, flown, terrain)
    return profile, floors, uncovered, landout


def _landout_in_field(scenario, path, flown, fields) -> Landout:
    """Without terrain: the field the flight core's glide reached (the odds fly the same), or
    the finish elevation where no field was in reach."""
    at = float(flown.landout_m[0])
    index = -1 if flown.landout_field is None else int(flown.landout_field[0])
    if index >= 0:
        return Landout(at, fields.names[index], float(fields.lats[index]), float(fields.lons[index]),
                       float(fields.elevation_m[index]))
    lat, lon = point_at(path, at)
    return Landout(at, None, lat, lon, float(scenario.task.points[-1].turnpoint.elevation_m))


def _landout(scenario, path, flown, terrain) -> Landout:
    at = float(flown.landout_m[0])
    lat, lon = point_at(path, at)
    if terrain is not None:
        ground = float(np.interp(at, terrain.distance_m, terrain.elevation_m))
    else:
        ground = float(scenario.task.points[-1].turnpoint.elevation_m)
    stop = [v for v in (flown.trace or ()) if v[2] == "stop"]
    fields = [p for p in scenario.turnpoints if getattr(p, "landable", False)]
    if stop and fields:
        stop_m, stop_h, _ = stop[-1]
        stop_lat, stop_lon = point_at(path, stop_m)
        day, margin = scenario.day, scenario.safety.arrival_margin_m
        f_lat = np.array([p.lat for p in fields])
        f_lon = np.array([p.lon for p in fields])
        f_elev = np.array([p.elevation_m for p in fields], dtype=float)
        distance, azimuth, _ = geodesy.inverse(stop_lat, stop_lon, f_lat, f_lon)
        polar = scenario.glider.polar_at(0.5 * (stop_h + f_elev.mean()), day.isa_deviation_c)
        wind = day.wind  # with height: the mean over the glide down from where the climbs stopped
        if hasattr(wind, "mean_between"):
            wind = wind.mean_between(min(float(f_elev.min()), stop_h), stop_h)
        reach = np.asarray(reach_distance(polar, stop_h - f_elev - margin, azimuth, wind,
                                          min(day.glide_airmass_ms, 0.0)), dtype=float)
        in_reach = np.flatnonzero(np.nan_to_num(reach, nan=-1.0) >= np.asarray(distance))
        if in_reach.size:
            from_landing, _, _ = geodesy.inverse(lat, lon, f_lat[in_reach], f_lon[in_reach])
            best = int(in_reach[int(np.argmin(np.atleast_1d(from_landing)))])
            field = fields[best]
            return Landout(at, field.name, float(field.lat), float(field.lon), float(field.elevation_m))
    if terrain is None:
        ground = float(scenario.task.points[-1].turnpoint.elevation_m)
    return Landout(at, None, lat, lon, ground if math.isfinite(ground) else math.nan)
