"""Where a path crosses airspace volumes: the stretches of it inside each outline.

Geometry
--------
The airspace file is GeoJSON, whose edges are straight lines in longitude/latitude (RFC 7946
[1]_, section 3.1.1). Path crossings are therefore computed in longitude/latitude itself,
where those edges are exact; the planned path is a geodesic the caller samples (the plan
samples every 250 m or closer), and its chords between samples are taken as straight there.
The chord of a geodesic in longitude/latitude departs from it by ``L^2 tan(lat) / (8 R)``:
0.001 m for a 250 m chord and 2 m for a 10 km chord at 46 deg N, far inside the 50 m this
module promises for where a crossing starts and ends. Distances along the path are the
caller's cumulative geodesic distances, interpolated along each chord. An airspace source
that means geodesic edges differs from the straight-in-lon/lat edge by
``L^2 tan(lat) / (8 R)`` too (18 m at the middle of a 30 km east-west edge at 46 deg N):
long edges should be given with intermediate positions.

Rings follow the even-odd rule within one polygon; the parts of a MultiPolygon are united
(:class:`glidetask.engine.airspace.Volume`). A path that crosses the antimeridian is
unwrapped, and volumes are tried at their longitude and 360 degrees either side.

References
----------
.. [1] H. Butler et al., RFC 7946, The GeoJSON Format, IETF, 2016.
"""

from __future__ import annotations

from dataclasses import dataclass
from typing import Sequence

import numpy as np

from glidetask.engine.airspace import Airspace, even_odd_inside, lon_shifts


@dataclass(frozen=True)
class Stretch:
    """Where a path is inside one volume: from ``from_m`` to ``to_m`` along it [m]."""

    volume: int
    from_m: float
    to_m: float


def unwrapped_lons(lons: np.ndarray) -> np.ndarray:
    """Longitudes made continuous along a path (a path crossing 180 deg runs past it)."""
    return np.degrees(np.unwrap(np.radians(lons)))


def _crossings_of_chords(edges, x, y, distance_m) -> np.ndarray:
    """Distances along the path [m] where its chords cross the edges (sorted).

    Each chord i runs from sample i to i+1, parameter t in [0, 1); an edge is crossed when
    its two ends lie on different sides of the chord's line (a position on the line counts
    as the positive side, so a path through a vertex crosses once or twice, as it should)
    and the crossing lies on the chord.
    """
    px, py = x[:-1, None], y[:-1, None]
    dx, dy = (x[1:] - x[:-1])[:, None], (y[1:] - y[:-1])[:, None]
    x0, y0, x1, y1 = edges[:, 0], edges[:, 1], edges[:, 2], edges[:, 3]
    straddle = (dx * (y0 - py) - dy * (x0 - px) >= 0.0) != (dx * (y1 - py) - dy * (x1 - px) >= 0.0)
    chord, edge = np.nonzero(straddle)  # few pairs: the rest of the work is on them only
    if chord.size == 0:
        return np.zeros(0)
    cx, cy, cdx, cdy = x[chord], y[chord], dx[chord, 0], dy[chord, 0]
    ex, ey = x1[edge] - x0[edge], y1[edge] - y0[edge]
    denominator = cdx * ey - cdy * ex
    with np.errstate(divide="ignore", invalid="ignore"):
        t = ((x0[edge] - cx) * ey - (y0[edge] - cy) * ex) / denominator
    hit = (t >= 0.0) & (t < 1.0) & (denominator != 0.0)
    chord = chord[hit]
    return np.sort(distance_m[chord] + t[hit] * (distance_m[chord + 1] - distance_m[chord]))


def _polygon_stretches(edges, x, y, distance_m) -> list[tuple[float, float]]:
    """Stretches of the path inside one polygon (its rings by the even-odd rule)."""
    # Only chords whose box meets the polygon's box can cross it or lie inside it.
    box = (min(edges[:, 0].min(), edges[:, 2].min()), min(edges[:, 1].min(), edges[:, 3].min()),
           max(edges[:, 0].max(), edges[:, 2].max()), max(edges[:, 1].max(), edges[:, 3].max()))
    near = ((np.maximum(x[:-1], x[1:]) >= box[0]) & (np.minimum(x[:-1], x[1:]) <= box[2])
            & (np.maximum(y[:-1], y[1:]) >= box[1]) & (np.minimum(y[:-1], y[1:]) <= box[3]))
    chords = np.flatnonzero(near)
    if chords.size == 0:
        return []
    inside = bool(even_odd_inside(edges, x[:1], y[:1])[0])
    crossings = []
    if chords.size:
        # Runs of neighbouring chords are passed together (as short paths) to keep arrays small.
        for run in np.split(chords, np.flatnonzero(np.diff(chords) > 1) + 1):
            pick = np.append(run, run[-1] + 1)
            crossings.append(_crossings_of_chords(edges, x[pick], y[pick], distance_m[pick]))
    cuts = np.concatenate(crossings) if crossings else np.zeros(0)
    cuts = np.sort(cuts)
    stretches, start = [], float(distance_m[0]) if inside else None
    for cut in cuts:
        if inside:
            stretches.append((start, float(cut)))
        else:
            start = float(cut)
        inside = not inside
    if inside:
        stretches.append((start, float(distance_m[-1])))
    return [(a, b) for a, b in stretches if b > a]


def _union(stretches: list[tuple[float, float]]) -> list[tuple[float, float]]:
    out: list[list[float]] = []
    for a, b in sorted(stretches):
        if out and a <= out[-1][1]:
            out[-1][1] = max(out[-1][1], b)
        else:
            out.append([a, b])
    return [(a, b) for a, b in out]


def _met_by_chords(airspace: Airspace, candidates: np.ndarray, lats: np.ndarray, lons: np.ndarray) -> np.ndarray:
    """The candidates whose box meets the box of at least one chord (or holds the one sample)."""
    if candidates.size == 0 or lats.size < 2:
        return candidates
    lo_x, hi_x = np.minimum(lons[:-1], lons[1:]), np.maximum(lons[:-1], lons[1:])
    lo_y, hi_y = np.minimum(lats[:-1], lats[1:]), np.maximum(lats[:-1], lats[1:])
    b = airspace.boxes[candidates]
    lat_ok = (b[:, 1:2] <= hi_y[None, :]) & (b[:, 3:4] >= lo_y[None, :])
    met = np.zeros(candidates.size, dtype=bool)
    for shift in (0.0, -360.0, 360.0):
        met |= (lat_ok & (b[:, 0:1] <= hi_x[None, :] - shift) & (b[:, 2:3] >= lo_x[None, :] - shift)).any(axis=1)
    return candidates[met]


def path_stretches(airspace: Airspace, lats, lons, distance_m) -> list[Stretch]:
    """Every stretch of a path inside each volume, in order along the path.

    Parameters
    ----------
    airspace : Airspace
    lats, lons : array_like
        The path's samples [deg], close enough that chords follow it (module docstring).
    distance_m : array_like
        Cumulative distance along the path at each sample [m], non-decreasing.

    Returns
    -------
    list of Stretch
        Sorted by ``from_m``; a volume the path enters twice gives two stretches.
    """
    lats = np.asarray(lats, dtype=float)
    lons = unwrapped_lons(np.asarray(lons, dtype=float))
    distance_m = np.asarray(distance_m, dtype=float)
    out: list[Stretch] = []
    if lats.size == 0:
        return out
    for index in _met_by_chords(airspace, airspace.near(lats, lons), lats, lons):
        volume = airspace.volumes[index]
        found = []
        for shift in lon_shifts(volume.bbox, lons.min(), lons.max()):
            for edges in volume.ring_edges:
                if lats.size == 1:
                    if even_odd_inside(edges, lons - shift, lats)[0]:
                        found.append((float(distance_m[0]), float(distance_m[0])))
                    continue
                found += _polygon_stretches(edges, lons - shift, lats, distance_m)
        out += [Stretch(int(index), a, b) for a, b in _union(found)]
    return sorted(out, key=lambda s: (s.from_m, s.volume))


def inside_mask(stretches: Sequence[Stretch], distance_m, volumes) -> np.ndarray:
    """``(len(volumes), samples)`` bool: row k, sample j lies in a stretch of ``volumes[k]``
    (ends included)."""
    distance_m = np.asarray(distance_m, dtype=float)
    row = {int(v): k for k, v in enumerate(volumes)}
    mask = np.zeros((len(row), distance_m.size), dtype=bool)
    for s in stretches:
        if s.volume in row:
            mask[row[s.volume]] |= (distance_m >= s.from_m) & (distance_m <= s.to_m)
    return mask
