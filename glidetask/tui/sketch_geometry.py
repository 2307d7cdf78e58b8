"""The task in a local flat frame for the sketch: an azimuthal-equidistant projection
centred on the task (pyproj ``+proj=aeqd``), so distances from the centre are true and
shapes near it are undistorted at task scale.
"""

from __future__ import annotations

from dataclasses import dataclass, field
from functools import lru_cache

import numpy as np


@dataclass
class Sketch:
    """Everything the sketch draws, in metres east (x) and north (y) of the centre."""

    centre_lat: float
    centre_lon: float
    zones: list[tuple[np.ndarray, np.ndarray]] = field(default_factory=list)  # outlines
    path: tuple[np.ndarray, np.ndarray] | None = None  # the planned (or nominal) path
    points: list[tuple[float, float, str]] = field(default_factory=list)  # task points: x, y, label
    landables: list[tuple[float, float]] = field(default_factory=list)
    final_glide: tuple[float, float] | None = None  # where the final glide starts
    # airspace outlines near the task: x, y and "near" | "crossed" (the path passes through
    # or under it) | "conflict" (the plan enters it)
    airspace: list[tuple[np.ndarray, np.ndarray, str]] = field(default_factory=list)

    def extent(self) -> tuple[float, float, float, float]:
        """``(xmin, xmax, ymin, ymax)`` of the task points, zones and path [m]."""
        xs = [x for x, _, _ in self.points] + [float(np.min(z[0])) for z in self.zones] + [float(np.max(z[0])) for z in self.zones]
        ys = [y for _, y, _ in self.points] + [float(np.min(z[1])) for z in self.zones] + [float(np.max(z[1])) for z in self.zones]
        if not xs:
            return -1000.0, 1000.0, -1000.0, 1000.0
        return min(xs), max(xs), min(ys), max(ys)


@lru_cache(maxsize=8)
def local_projection(centre_lat: float, centre_lon: float):
    """A transformer from (lon, lat) [deg] to azimuthal-equidistant (x, y) [m] about the centre
    (kept: making one takes milliseconds, and every edit redraws the sketch of the same task)."""
    from pyproj import Transformer

    return Transformer.from_crs(
        "EPSG:4326",
        f"+proj=aeqd +lat_0={centre_lat:.8f} +lon_0={centre_lon:.8f} +datum=WGS84 +units=m",
        always_xy=True,
    )


def task_centre(lats, lons) -> tuple[float, float]:
    """The middle of the task's bounding box (longitudes unwrapped around the first point)."""
    lats = np.asarray(lats, dtype=float)
    lons = np.asarray(lons, dtype=float)
    unwrapped = lons[0] + (lons - lons[0] + 180.0) % 360.0 - 180.0
    centre_lon = 0.5 * (unwrapped.min() + unwrapped.max())
    return 0.5 * (lats.min() + lats.max()), ((centre_lon + 180.0) % 360.0) - 180.0


NEAR_DEG = 0.3  # airspace within this of the task's bounding box is drawn [deg] (about 30 km)


def near_volumes(airspace, lats, lons, margin_deg: float = NEAR_DEG) -> list[int]:
    """Indices of the volumes whose outline box comes within ``margin_deg`` of the task's box."""
    lat_min, lat_max = float(np.min(lats)) - margin_deg, float(np.max(lats)) + margin_deg
    lon_min, lon_max = float(np.min(lons)) - margin_deg, float(np.max(lons)) + margin_deg
    out = []
    for index, volume in enumerate(airspace.volumes):
        west, south, east, north = volume.bbox
        if south <= lat_max and north >= lat_min and west <= lon_max and east >= lon_min:
            out.append(index)
    return out


def build_sketch(task, *, path=None, landables=(), final_glide_at=None, airspace=None, check=None) -> Sketch:
    """Project the task's zones, its path (``(lats, lons)``, default centre to centre), the
    landables (Turnpoints), the final-glide start (``(lat, lon)``) and the outlines of the
    ``airspace`` volumes near the task (marked by the plan's ``check``, an
    ``engine.airspace_conflicts.AirspaceCheck``) into the local frame."""
    from glidetask.engine.zones import boundary

    centre_lat, centre_lon = task_centre(task.lats, task.lons)
    to_local = local_projection(centre_lat, centre_lon)
    sketch = Sketch(centre_lat, centre_lon)
    for point, axis in zip(task.points, task.axes_deg):
        for lats, lons in boundary(point.zone, point.lat, point.lon, axis, points_per_circle=48):
            sketch.zones.append(to_local.transform(np.asarray(lons), np.asarray(lats)))
    path_lats, path_lons = path if path is not None else (task.lats, task.lons)
    sketch.path = to_local.transform(np.asarray(path_lons, dtype=float), np.asarray(path_lats, dtype=float))
    last = len(task.points) - 1
    for index, point in enumerate(task.points):
        x, y = to_local.transform(point.lon, point.lat)
        label = "S" if index == 0 else "F" if index == last else str(index)
        if index == last and point.turnpoint == task.points[0].turnpoint:
            continue  # a finish at the start point: one mark, labelled S
        sketch.points.append((float(x), float(y), label))
    for turnpoint in landables:
        x, y = to_local.transform(turnpoint.lon, turnpoint.lat)
        sketch.landables.append((float(x), float(y)))
    if final_glide_at is not None:
        x, y = to_local.transform(final_glide_at[1], final_glide_at[0])
        sketch.final_glide = (float(x), float(y))
    if airspace is not None:
        crossed = {s.volume for s in check.stretches} if check is not None else set()
        conflicts = {c.volume for c in check.conflicts} if check is not None else set()
        for index in near_volumes(airspace, task.lats, task.lons):
            kind = "conflict" if index in conflicts else "crossed" if index in crossed else "near"
            for polygon in airspace.volumes[index].polygons:
                for ring in polygon:
                    xs, ys = to_local.transform(ring[:, 0], ring[:, 1])
                    sketch.airspace.append((np.asarray(xs), np.asarray(ys), kind))
    return sketch
