"""An independent brute-force search for the shortest (or longest) path through task zones.

Written apart from the engine's search so that the two can check each other: its own
description of the zone outlines (Sporting Code Section 3 Annex A shapes, sampled as azimuth
and distance about each point), pyproj's Geod directly for the geodesics, and exhaustive
enumeration of every combination of outline samples (as a min-plus product along the
chain, which is the same as trying them all). It then zooms: the outlines are sampled ten
times finer within three old spacings of the best combination, twice more.

Only the zone *outlines* are searched, so tasks whose consecutive zones overlap are out of
its scope (a shortest path may then sit inside both); the tests use it without overlaps.
"""

from __future__ import annotations

import math

import numpy as np
import pyproj

GEOD = pyproj.Geod(ellps="WGS84")
LEVELS = 3  # the coarse search and two zooms
COARSE_FRACTION = 1.0 / 60.0  # coarse step as a share of the zone's size


def _arc(parts, az0, az1, r, step_m):
    count = int(math.ceil(abs(math.radians(az1 - az0)) * r / step_m)) + 1
    parts.append((np.linspace(az0, az1, count), np.full(count, float(r))))


def _radial(parts, az, r0, r1, step_m):
    count = int(math.ceil(abs(r1 - r0) / step_m)) + 1
    parts.append((np.full(count, float(az)), np.linspace(r0, r1, count)))


def outline(zone, axis_deg: float, step_m: float):
    """Azimuths [deg] and distances [m] about the point of samples all round the outline."""
    parts: list = []
    kind = zone.kind
    if kind == "line":
        _radial(parts, axis_deg - 90.0, zone.length_m / 2, 0.0, step_m)
        _radial(parts, axis_deg + 90.0, 0.0, zone.length_m / 2, step_m)
    elif kind in ("cylinder", "area_cylinder"):
        _arc(parts, 0.0, 360.0, zone.radius_m, step_m)
    elif kind in ("sector", "keyhole"):
        half = zone.angle_deg / 2
        _radial(parts, axis_deg - half, 0.0, zone.radius_m, step_m)
        _arc(parts, axis_deg - half, axis_deg + half, zone.radius_m, step_m)
        _radial(parts, axis_deg + half, zone.radius_m, 0.0, step_m)
        if kind == "keyhole":
            _arc(parts, 0.0, 360.0, zone.cylinder_radius_m, step_m)
    else:  # area sector
        start = zone.radial_from_deg
        end = start + ((zone.radial_to_deg - start) % 360.0 or 360.0)
        _radial(parts, start, zone.inner_radius_m, zone.radius_m, step_m)
        _arc(parts, start, end, zone.radius_m, step_m)
        _radial(parts, end, zone.radius_m, zone.inner_radius_m, step_m)
        if zone.inner_radius_m > 0:
            _arc(parts, end, start, zone.inner_radius_m, step_m)
    return np.concatenate([p[0] for p in parts]), np.concatenate([p[1] for p in parts])


def _points(lat, lon, azimuth, r):
    lons, lats, _ = GEOD.fwd(np.full(azimuth.shape, lon), np.full(azimuth.shape, lat), azimuth, r)
    return np.asarray(lats), np.asarray(lons)


def _costs(a, b):
    la1 = np.repeat(a[0], len(b[0]))
    lo1 = np.repeat(a[1], len(b[0]))
    la2 = np.tile(b[0], len(a[0]))
    lo2 = np.tile(b[1], len(a[0]))
    _, _, dist = GEOD.inv(lo1, la1, lo2, la2)
    return np.asarray(dist).reshape(len(a[0]), len(b[0]))


def _enumerate(samples, maximize):
    """Best combination of samples (one per zone) and its length: all combinations, reduced
    along the chain; for the longest path the start and finish samples are the nearest."""
    n = len(samples)
    costs = [_costs(samples[i], samples[i + 1]) for i in range(n - 1)]
    if not maximize:
        value, back = np.zeros(len(samples[0][0])), []
        for cost in costs:
            total = value[:, None] + cost
            back.append(total.argmin(axis=0))
            value = total.min(axis=0)
        pick = [int(value.argmin())]
        best = float(value.min())
    else:
        first = costs[0].argmin(axis=0)  # the nearest start sample to each sample of zone 1
        value, back = costs[0].min(axis=0), []
        for cost in costs[1:-1]:
            total = value[:, None] + cost
            back.append(total.argmax(axis=0))
            value = total.max(axis=0)
        last = costs[-1].argmin(axis=1)  # the nearest finish sample to each sample before it
        value = value + costs[-1].min(axis=1)
        pick = [int(last[int(value.argmax())]), int(value.argmax())]
        best = float(value.max())
        for pointer in reversed(back):
            pick.append(int(pointer[pick[-1]]))
        pick.append(int(first[pick[-1]]))
        return pick[::-1], best
    for pointer in reversed(back):
        pick.append(int(pointer[pick[-1]]))
    return pick[::-1], best


def brute_force(task, maximize: bool = False):
    """(length [m], lats, lons) of the best path found by zooming exhaustive search."""
    steps = [max(p.zone.reach_m * COARSE_FRACTION, 1.0) for p in task.points]
    outlines = [outline(p.zone, axis, step) for p, axis, step in zip(task.points, task.axes_deg, steps)]
    samples = [_points(p.lat, p.lon, *o) for p, o in zip(task.points, outlines)]
    pick, best = _enumerate(samples, maximize)
    for _ in range(LEVELS - 1):
        chosen = [(s[0][k], s[1][k]) for s, k in zip(samples, pick)]
        new_samples = []
        for p, axis, step, (lat, lon) in zip(task.points, task.axes_deg, steps, chosen):
            az, r = outline(p.zone, axis, step / 10.0)
            lats, lons = _points(p.lat, p.lon, az, r)
            _, _, near = GEOD.inv(np.full(lats.shape, lon), np.full(lats.shape, lat), lons, lats)
            keep = np.asarray(near) <= 3.0 * step
            new_samples.append((lats[keep], lons[keep]))
        samples = new_samples
        steps = [s / 10.0 for s in steps]
        pick, best = _enumerate(samples, maximize)
    lats = np.array([s[0][k] for s, k in zip(samples, pick)])
    lons = np.array([s[1][k] for s, k in zip(samples, pick)])
    return best, lats, lons
