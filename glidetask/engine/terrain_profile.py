"""Terrain along a path: an elevation model sampled along a geodesic polyline.

:func:`sample_path` samples a :class:`~glidetask.engine.terrain.Terrain` along the WGS84
geodesics between a path's vertices (a task path) into a :class:`PathProfile`, which
reports the share of the path the model covers and the stretches it does not. The
clearance of a glide over these samples is :mod:`glidetask.engine.flight_ground`'s job.
"""

from __future__ import annotations

from dataclasses import dataclass

import numpy as np

from glidetask.engine import geodesy
from glidetask.engine.terrain import Terrain

#: Largest sample spacing along a path [m]: the terrain is checked at least every 250 m.
PATH_SPACING_M = 250.0


@dataclass(frozen=True, eq=False)
class PathProfile:
    """Terrain sampled along a geodesic polyline.

    Attributes
    ----------
    distance_m : ndarray
        Distance of each sample from the first vertex along the path [m], increasing.
    lats, lons : ndarray
        Sample positions [deg].
    elevation_m : ndarray
        Terrain elevation at each sample [m MSL]; NaN where the model has no data.
    segment : ndarray of int
        Index of the path segment (vertex ``k`` to ``k + 1``) each sample lies on; a
        vertex belongs to the segment that starts there (the last to the last segment).
    vertex_distance_m : ndarray
        Distance of each vertex from the first along the path [m].
    source : str
        The elevation model's file.
    """

    distance_m: np.ndarray
    lats: np.ndarray
    lons: np.ndarray
    elevation_m: np.ndarray
    segment: np.ndarray
    vertex_distance_m: np.ndarray
    source: str = ""

    @property
    def total_m(self) -> float:
        return float(self.distance_m[-1]) if self.distance_m.size else 0.0

    @property
    def covered_share(self) -> float:
        """Share of the path length the model covers [0-1] (1 for a path of zero length)."""
        return covered_share_of(self.distance_m, np.isfinite(self.elevation_m))

    def uncovered_ranges(self) -> tuple[tuple[float, float], ...]:
        """``(from_m, to_m)`` stretches of the path where the model has no data."""
        return flagged_runs(self.distance_m, ~np.isfinite(self.elevation_m))


def _cells(distance_m: np.ndarray) -> tuple[np.ndarray, np.ndarray]:
    """Each sample's stretch of path: from the midpoint before it to the midpoint after it."""
    mid = 0.5 * (distance_m[1:] + distance_m[:-1])
    starts = np.concatenate((distance_m[:1], mid))
    ends = np.concatenate((mid, distance_m[-1:]))
    return starts, ends


def covered_share_of(distance_m: np.ndarray, known: np.ndarray) -> float:
    if distance_m.size == 0:
        return 0.0
    total = float(distance_m[-1] - distance_m[0])
    if total <= 0.0:
        return float(np.all(known))
    starts, ends = _cells(distance_m)
    return float(np.sum((ends - starts)[known]) / total)


def flagged_runs(distance_m: np.ndarray, flag: np.ndarray) -> tuple[tuple[float, float], ...]:
    """``(from_m, to_m)`` of each run of flagged samples, by their cells."""
    if not flag.any():
        return ()
    starts, ends = _cells(distance_m)
    edges = np.diff(np.concatenate(([0], flag.astype(np.int8), [0])))
    first, last = np.flatnonzero(edges == 1), np.flatnonzero(edges == -1) - 1
    return tuple((float(starts[i]), float(ends[j])) for i, j in zip(first, last))


def sample_path(terrain: Terrain, lats, lons, spacing_m: float = PATH_SPACING_M) -> PathProfile:
    """Sample terrain along the geodesic polyline through the given vertices.

    Parameters
    ----------
    terrain : Terrain
        The elevation model.
    lats, lons : array_like
        Vertices of the path [deg] (at least one).
    spacing_m : float, default 250
        Largest distance between consecutive samples [m]; every vertex is a sample.

    Returns
    -------
    PathProfile
        Distances along the path, positions, elevations (NaN where not covered: see
        :attr:`PathProfile.covered_share` and :meth:`PathProfile.uncovered_ranges`).

    Notes
    -----
    Each segment is the WGS84 geodesic between its vertices, cut into equal pieces no
    longer than ``spacing_m`` (:func:`glidetask.engine.geodesy.path_points`).
    """
    if not spacing_m > 0.0:
        raise ValueError(f"spacing_m must be positive, got {spacing_m!r}")
    v_lats = np.atleast_1d(np.asarray(lats, dtype=float))
    v_lons = np.atleast_1d(np.asarray(lons, dtype=float))
    if v_lats.size == 0 or v_lats.shape != v_lons.shape:
        raise ValueError("a path needs at least one vertex, with as many longitudes as latitudes")
    s_lats, s_lons, along = geodesy.path_points(v_lats, v_lons, spacing_m)
    vertex_at = np.concatenate(([0.0], np.cumsum(np.atleast_1d(
        geodesy.distance(v_lats[:-1], v_lons[:-1], v_lats[1:], v_lons[1:])))))
    segment = np.clip(np.searchsorted(vertex_at, along, side="right") - 1, 0, max(v_lats.size - 2, 0))
    return PathProfile(
        distance_m=along, lats=s_lats, lons=s_lons,
        elevation_m=np.asarray(terrain.sample(s_lats, s_lons), dtype=float).reshape(along.shape),
        segment=segment.astype(np.intp), vertex_distance_m=vertex_at, source=terrain.source,
    )

