"""Where a land-out ends without an elevation model: in the field the glide reaches.

Without terrain the ground under the course is unknown; the landable fields are the only
ground known. A flight whose climbs stop before its final glide glides on along the task
at MacCready 0 (:meth:`glidetask.engine.flight_endings.FlightEndings._glide_on`). Each
landable field ``f`` in reach from where the climbs stopped (at best glide in the cruise
wind, arriving the arrival margin above it) gives the glide an end: the point along the
task where the glide's height comes down to the field's elevation plus the margin. The
flight lands in the field nearest its own end point, and its glide ends there; with no
field in reach it ends at the finish elevation plus the margin (the floor of the final
glide). The plan and the odds fly the same core, so they land in the same place.

Geometry: each field is projected once onto the planned path (:func:`landing_fields`):
its distance along the path ``s`` at the nearest path sample (every 250 m) and its signed
distance off it ``c`` (right of the course positive). From a point ``x`` along leg ``k``
the field lies ``hypot(s - x, c)`` away on the bearing ``course_k + atan2(c, s - x)``:
flat along the leg (the legs' corners are smoothed; a field is chosen, not navigated to).
"""

from __future__ import annotations

from dataclasses import dataclass

import numpy as np

from glidetask.engine import geodesy

SPACING_M = 250.0  # path sampling for the fields' projection [m]


@dataclass(frozen=True, eq=False)
class LandingFields:
    """The landable fields projected onto a planned path (metres of the planned path).

    Attributes
    ----------
    along_m, off_m, elevation_m : ndarray, shape (F,)
        Distance along the path of the nearest path point [m], signed distance off the
        path [m] (right of the course positive) and field elevation [m MSL].
    names : tuple of str
    lats, lons : ndarray, shape (F,)
        The fields' positions [deg].
    """

    along_m: np.ndarray
    off_m: np.ndarray
    elevation_m: np.ndarray
    names: tuple
    lats: np.ndarray
    lons: np.ndarray


def landing_fields(scenario, path) -> LandingFields | None:
    """The scenario's landable turnpoints projected onto ``path``; None when there are none."""
    fields = [p for p in scenario.turnpoints if getattr(p, "landable", False)]
    if not fields:
        return None
    lats, lons, along = path.sample(SPACING_M)
    f_lat = np.array([p.lat for p in fields], dtype=float)
    f_lon = np.array([p.lon for p in fields], dtype=float)
    grid_lat = np.broadcast_to(lats[None, :], (f_lat.size, lats.size))
    grid_lon = np.broadcast_to(lons[None, :], (f_lat.size, lats.size))
    distance, azimuth, _ = geodesy.inverse(grid_lat.ravel(), grid_lon.ravel(), np.repeat(f_lat, lats.size),
                                           np.repeat(f_lon, lats.size))
    distance = np.asarray(distance, dtype=float).reshape(f_lat.size, lats.size)
    azimuth = np.asarray(azimuth, dtype=float).reshape(f_lat.size, lats.size)
    nearest = np.argmin(distance, axis=1)
    line = np.arange(f_lat.size)
    k = np.minimum(nearest, lats.size - 2)
    _, course, _ = geodesy.inverse(lats[k], lons[k], lats[k + 1], lons[k + 1])
    side = np.sign(np.sin(np.radians(azimuth[line, nearest] - np.asarray(course, dtype=float))))
    return LandingFields(along[nearest].astype(float), side * distance[line, nearest],
                         np.array([p.elevation_m for p in fields], dtype=float), tuple(p.name for p in fields),
                         f_lat, f_lon)


def field_floor(fields: LandingFields, x0_m, course_deg, height_m, remaining, per_metre, cumulative, polar,
                wind_from_deg, wind_speed_ms, airmass_ms, margin_m, detour: float = 1.0):
    """``(floor_m, field)`` for flights (n,) that glide on at MacCready 0 from ``x0_m`` [m of
    the planned path] at ``height_m``, on legs of ``course_deg`` (n,) [deg], losing
    ``per_metre`` (n, L) over the ``remaining`` (n, L) metres flown of each leg
    (``cumulative`` (n, L): height used to each leg's end). ``polar``: the flights' polars
    (rows, as the core holds them). The floor is the chosen field's elevation plus
    ``margin_m`` (n,), the field its index; NaN and -1 where no field is in reach.
    """
    from glidetask.engine.speedtofly import glide_in_wind  # the core's own glide in wind
    from glidetask.engine.wind import wind_components

    x0 = np.asarray(x0_m, dtype=float)
    h0 = np.asarray(height_m, dtype=float)
    margin = np.asarray(margin_m, dtype=float)
    dx = fields.along_m[None, :] - x0[:, None]
    off = np.broadcast_to(fields.off_m[None, :], dx.shape)
    distance = np.hypot(dx, off)
    bearing = np.asarray(course_deg, dtype=float)[:, None] + np.degrees(np.arctan2(off, dx))
    along, across = wind_components(bearing, np.asarray(wind_from_deg, dtype=float)[:, None],
                                    np.asarray(wind_speed_ms, dtype=float)[:, None])
    glide = glide_in_wind(polar, 0.0, along, across, np.asarray(airmass_ms, dtype=float)[:, None])
    with np.errstate(invalid="ignore"):
        above = h0[:, None] - fields.elevation_m[None, :] - margin[:, None]
        reach = np.isfinite(glide.height_per_metre) & (above >= distance * glide.height_per_metre) & (above >= 0.0)
    # Each field's own end of the glide along the course: where it is down to the field's floor.
    ran = np.cumsum(remaining, axis=1)
    beyond = cumulative[:, None, :] > above[:, :, None]
    leg = np.argmax(beyond, axis=2)
    line = np.arange(x0.size)[:, None]
    before_h = np.where(leg > 0, cumulative[line, np.maximum(leg - 1, 0)], 0.0)
    before_x = np.where(leg > 0, ran[line, np.maximum(leg - 1, 0)], 0.0)
    with np.errstate(invalid="ignore", divide="ignore"):
        into = np.clip(np.nan_to_num((above - before_h) / per_metre[line, leg], nan=0.0), 0.0, remaining[line, leg])
    glided = np.where(beyond.any(axis=2), before_x + into, ran[:, -1:])
    end = x0[:, None] + glided / detour
    from_end = np.where(reach, np.hypot(fields.along_m[None, :] - end, off), np.inf)
    best = np.argmin(from_end, axis=1)
    found = np.isfinite(from_end[np.arange(x0.size), best])
    floor = np.where(found, fields.elevation_m[best] + margin, np.nan)
    return floor, np.where(found, best, -1)
