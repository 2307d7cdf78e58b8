"""The landable coverage search: the fields in reach from every sample of a planned path.

:func:`coverage` does what :mod:`glidetask.engine.reach` describes: a pure glide at MacCready 0 in the day's wind
from the band bottom to each candidate field, arriving with the margin and, with an
elevation model, clearing the terrain. Candidates are pruned on unit-sphere chords (a
k-d tree from scipy.spatial for many pairs, imported only then: it is slow to import);
the glides are checked in vectorised batches.
"""

from __future__ import annotations

import math
from dataclasses import dataclass

import numpy as np

from glidetask.engine import geodesy
from glidetask.engine.polar import Polar
from glidetask.engine.reach import (
    OUT_OF_RANGE, REACHABLE, TERRAIN_BLOCKED, TERRAIN_UNKNOWN, Coverage, LandableIndex, LegLandables,
    landable_index, unit_xyz,
)
from glidetask.engine.scenario import Wind
from glidetask.engine.speedtofly import glide_in_wind
from glidetask.engine.wind import wind_components

#: Smallest radius of curvature of the WGS84 ellipsoid (meridional, at the equator) [m]:
#: an angle on the unit sphere times this never exceeds the geodesic distance it stands for.
_SMALLEST_RADIUS_M = 6_335_439.0
_COURSE_STEP_DEG = 0.25  # resolution of the table of height used per metre against course
_NO_PROGRESS = 1.0e6  # height per metre standing for "no progress possible" [m/m]
_LONGEST_GLIDE_M = 1.0e6  # cap on the search radius when the air mass rises faster than the glider sinks
_GLIDE_SPACING_M = 250.0  # terrain samples along a glide to a landable [m]
_CHUNK_SAMPLES = 2_000_000  # terrain samples checked per vectorised batch
# Up to this many (sample, landable) pairs the candidates are found by comparing every
# pair's chord directly: cheaper than importing scipy.spatial and building a tree.
_DIRECT_PAIRS = 2_000_000


def _course_table(polar: Polar, wind: Wind, airmass_ms: float):
    """Height used per metre at MacCready 0 against course, every 0.25 deg, 0-360 inclusive.

    The height used per metre depends on the course only through the wind components,
    so one table per call serves every (sample, landable) pair. It is smooth in the
    course: linear interpolation at 0.25 deg is exact to about 1e-8 m/m (2 mm on a
    20 km glide) for any wind a glider flies in.
    """
    courses = np.arange(0.0, 360.0 + _COURSE_STEP_DEG / 2.0, _COURSE_STEP_DEG)
    along, across = wind_components(courses, wind.from_deg, wind.speed_ms)
    per_metre = np.asarray(glide_in_wind(polar, 0.0, along, across, airmass_ms).height_per_metre, dtype=float)
    return courses, np.where(np.isnan(per_metre), _NO_PROGRESS, per_metre)


def _per_metre(table, azimuth_deg):
    courses, per_metre = table
    return np.interp(azimuth_deg, courses, per_metre)


@dataclass
class _Pairs:
    """(sample, landable) pairs within a glide's reach of each other (working data)."""

    point: np.ndarray
    landable: np.ndarray
    distance_m: np.ndarray
    azimuth_deg: np.ndarray
    per_metre: np.ndarray
    spare_m: np.ndarray
    state: np.ndarray  # -1 not checked; REACHABLE, TERRAIN_BLOCKED or TERRAIN_UNKNOWN once checked

    def take(self, keep) -> "_Pairs":
        return _Pairs(*(getattr(self, f)[keep] for f in
                        ("point", "landable", "distance_m", "azimuth_deg", "per_metre", "spare_m", "state")))


def _candidate_pairs(index: LandableIndex, lats, lons, available_m, table) -> _Pairs:
    """Every (sample, landable) pair a glide could possibly bridge, with its height to spare.

    The k-d tree query radius is the longest glide the band allows to the lowest field
    on the most favourable course; a per-landable bound on the unit-sphere distance
    drops the rest before the exact geodesic is solved.
    """
    gain = 1.0 / np.min(table[1]) if np.min(table[1]) > 0.0 else math.inf
    reach_bound = np.minimum(np.maximum(available_m, 0.0) * gain, _LONGEST_GLIDE_M)
    radius = float(np.max(reach_bound)) if reach_bound.size else 0.0
    empty = np.zeros(0)
    if len(index) == 0 or not np.any(available_m >= 0.0):
        return _Pairs(empty.astype(np.intp), empty.astype(np.intp), empty, empty, empty, empty, empty.astype(np.int8))
    angle = min(radius / _SMALLEST_RADIUS_M * 1.01 + 1e-9, math.pi)
    point, landable, chord = _pairs_within(unit_xyz(lats, lons), index, 2.0 * math.sin(angle / 2.0))
    lower_bound = 2.0 * np.arcsin(np.minimum(chord / 2.0, 1.0)) * _SMALLEST_RADIUS_M
    keep = (available_m[landable] >= 0.0) & (lower_bound <= reach_bound[landable] * 1.01 + 1.0)
    point, landable = point[keep], landable[keep]
    distance, azimuth, _ = geodesy.inverse(lats[point], lons[point], index.lats[landable], index.lons[landable])
    distance, azimuth = np.atleast_1d(distance), np.atleast_1d(azimuth)
    per_metre = _per_metre(table, azimuth)
    spare = available_m[landable] - np.where(distance > 0.0, per_metre * distance, 0.0)
    pairs = _Pairs(point, landable, distance, azimuth, per_metre, spare, np.full(point.size, -1, np.int8))
    return pairs.take(spare >= 0.0)


def _pairs_within(path_xyz: np.ndarray, index: LandableIndex, chord: float):
    """``(sample, landable, chord)`` for every pair closer than ``chord`` on the unit sphere."""
    if path_xyz.shape[0] * len(index) <= _DIRECT_PAIRS:
        distance = np.sqrt(np.maximum(2.0 - 2.0 * (path_xyz @ index.xyz.T), 0.0))
        point, landable = np.nonzero(distance <= chord)
        return point.astype(np.intp), landable.astype(np.intp), distance[point, landable]
    from scipy.spatial import cKDTree  # lazily: scipy.spatial is slow to import, small files skip it

    found = cKDTree(path_xyz).sparse_distance_matrix(index.tree, chord, output_type="ndarray")
    return found["i"].astype(np.intp), found["j"].astype(np.intp), found["v"]


class _GlideChecker:
    """Checks glides from path samples to landables against the terrain, on demand, once each."""

    def __init__(self, terrain, pairs: _Pairs, lats, lons, index: LandableIndex, start_height_m, clearance_m):
        self.terrain, self.pairs = terrain, pairs
        self.start_height_m, self.clearance_m = start_height_m, clearance_m
        if terrain is not None:
            self.path_px = terrain.to_pixel(lats, lons)
            self.landable_px = terrain.to_pixel(index.lats, index.lons)

    def check(self, selected: np.ndarray) -> None:
        """Fill ``pairs.state`` for the selected pair indices not yet checked."""
        pairs = self.pairs
        todo = selected[pairs.state[selected] < 0]
        if todo.size == 0:
            return
        if self.terrain is None:
            pairs.state[todo] = REACHABLE
            return
        counts = np.ceil(pairs.distance_m[todo] / _GLIDE_SPACING_M).astype(np.intp) + 1
        order = np.argsort(counts, kind="stable")
        todo, counts = todo[order], counts[order]
        width = max(1, _CHUNK_SAMPLES // int(counts[-1]))
        start = 0
        while start < todo.size:
            batch = slice(start, min(start + width, todo.size))
            pairs.state[todo[batch]] = self._clearance_state(todo[batch], counts[batch])
            start = batch.stop

    def _clearance_state(self, pair_ids, counts) -> np.ndarray:
        """REACHABLE, TERRAIN_BLOCKED or TERRAIN_UNKNOWN for a batch of glides.

        The glide is sampled every 250 m or closer, both ends included, along the straight
        line between its ends in the raster's grid: over the few tens of kilometres of a
        glide this stays within tens of metres of the geodesic, well inside a grid cell.
        """
        p = self.pairs
        step = np.arange(int(counts.max()))[None, :]
        valid = step < counts[:, None]
        fraction = np.minimum(step / np.maximum(counts - 1, 1)[:, None], 1.0)
        point, landable = p.point[pair_ids], p.landable[pair_ids]
        cols = self.path_px[0][point][:, None] + fraction * (self.landable_px[0][landable] - self.path_px[0][point])[:, None]
        rows = self.path_px[1][point][:, None] + fraction * (self.landable_px[1][landable] - self.path_px[1][point])[:, None]
        ground = self.terrain.sample_pixels(cols, rows)
        height = self.start_height_m - (p.per_metre[pair_ids] * p.distance_m[pair_ids])[:, None] * fraction
        blocked = np.any(valid & (height - ground < self.clearance_m), axis=1)
        unknown = np.any(valid & np.isnan(ground), axis=1)
        return np.where(blocked, TERRAIN_BLOCKED, np.where(unknown, TERRAIN_UNKNOWN, REACHABLE)).astype(np.int8)


def _group_rank(keys: np.ndarray) -> np.ndarray:
    """Rank of each element within its run of equal, sorted keys (0, 1, 2, ...)."""
    if keys.size == 0:
        return keys.astype(np.intp)
    starts = np.concatenate(([0], np.flatnonzero(np.diff(keys)) + 1))
    return np.arange(keys.size) - np.repeat(starts, np.diff(np.concatenate((starts, [keys.size]))))


def _best_per_sample(n_samples: int, pairs: _Pairs, checker: _GlideChecker, skip: np.ndarray) -> np.ndarray:
    """Per sample, the pair with the most height to spare whose glide is clear (-1: none).

    Candidates are checked against the terrain best first, in windows that double in
    size, so a sample usually costs one terrain check, and never more than twice the
    checks needed.
    """
    best = np.full(n_samples, -1, dtype=np.intp)
    order = np.lexsort((-pairs.spare_m, pairs.point))
    order = order[~skip[pairs.point[order]]]
    samples = pairs.point[order]
    rank = _group_rank(samples)
    resolved = np.zeros(n_samples, dtype=bool)
    low, width = 0, 1
    while True:
        in_window = (rank >= low) & (rank < low + width) & ~resolved[samples]
        if not in_window.any():
            break
        selected = order[in_window]
        checker.check(selected)
        clear = selected[pairs.state[selected] == REACHABLE]
        first_samples, first = np.unique(pairs.point[clear], return_index=True)
        best[first_samples] = clear[first]
        resolved[first_samples] = True
        low, width = low + width, width * 2
    return best


def _leg_landables(leg: int, in_leg: np.ndarray, pairs: _Pairs, by_distance: np.ndarray,
                   checker: _GlideChecker, names: tuple[str, ...], count: int) -> LegLandables:
    """Nearest landables in reach from a leg's samples: first clear pairs by distance.

    ``by_distance`` is every pair's index, nearest first.
    """
    candidates = by_distance[in_leg[pairs.point[by_distance]]]
    found: dict[int, float] = {}
    low, width = 0, 8
    while low < candidates.size and len(found) < count:
        selected = candidates[low:low + width]
        checker.check(selected)
        clear = selected[pairs.state[selected] == REACHABLE]
        fields, first = np.unique(pairs.landable[clear], return_index=True)
        for position in np.sort(first):
            field = int(pairs.landable[clear[position]])
            if field not in found and len(found) < count:
                found[field] = float(pairs.distance_m[clear[position]])
        low, width = low + width, width * 2
    alternates = tuple((names[k], d) for k, d in found.items())
    if not alternates:
        return LegLandables(leg, None, math.nan, ())
    return LegLandables(leg, alternates[0][0], alternates[0][1], alternates)


def _gap_edges(reachable, status, best_pair, pairs: _Pairs, index: LandableIndex, s, lats, lons,
               available_m, table) -> np.ndarray:
    """Where each change between covered and uncovered samples happens along the path [m].

    Between a covered sample ``a`` and an uncovered neighbour ``b`` out of range, the
    height to spare for ``a``'s best landable is interpolated linearly to zero; that is
    exact when the path runs straight at the landable in steady wind, and in calm air
    never later than the true edge (the distance to a point is convex along a line),
    so a gap is never drawn shorter than it is. Otherwise (terrain) the midpoint.
    """
    change = np.flatnonzero(reachable[1:] != reachable[:-1])
    edges = 0.5 * (s[change] + s[change + 1])
    covered = np.where(reachable[change], change, change + 1)
    uncovered = np.where(reachable[change], change + 1, change)
    refine = (status[uncovered] == OUT_OF_RANGE) & (best_pair[covered] >= 0)
    if not refine.any():
        return edges
    c, u = covered[refine], uncovered[refine]
    pair = best_pair[c]
    field = pairs.landable[pair]
    spare_covered = pairs.spare_m[pair]
    distance, azimuth, _ = geodesy.inverse(lats[u], lons[u], index.lats[field], index.lons[field])
    spare_uncovered = available_m[field] - _per_metre(table, np.atleast_1d(azimuth)) * np.atleast_1d(distance)
    with np.errstate(divide="ignore", invalid="ignore"):
        fraction = spare_covered / (spare_covered - spare_uncovered)
    usable = (spare_uncovered < 0.0) & (fraction >= 0.0) & (fraction <= 1.0)
    refined = s[c] + fraction * (s[u] - s[c])
    edges[refine] = np.where(usable, refined, edges[refine])
    return edges


def _gaps(reachable, edges, s) -> tuple[tuple[float, float], ...]:
    """``(from_m, to_m)`` for each run of uncovered samples, bounded by the edges around it."""
    if reachable.all() or s.size == 0:
        return ()
    change = np.flatnonzero(reachable[1:] != reachable[:-1])
    bounds = np.concatenate(([s[0]], edges, [s[-1]]))
    # Runs between consecutive changes alternate; the first run is uncovered iff sample 0 is.
    runs = [(float(bounds[i]), float(bounds[i + 1])) for i in range(change.size + 1)]
    first_uncovered = 0 if not reachable[0] else 1
    return tuple(run for run in runs[first_uncovered::2])


def coverage(path_lats, path_lons, path_s_m, leg_index, landables, polar: Polar, wind: Wind,
             band_bottom_m: float, margin_m: float, terrain=None, clearance_m: float = 150.0, *,
             airmass_ms: float = 0.0, alternates: int = 3) -> Coverage:
    """Landable coverage along a planned path from the bottom of the working band.

    Parameters
    ----------
    path_lats, path_lons : array_like
        Samples along the planned path [deg], every 1 km or closer (see
        :func:`glidetask.engine.geodesy.path_points`).
    path_s_m : array_like
        Distance of each sample along the path [m], increasing.
    leg_index : array_like of int
        The leg each sample belongs to (0 = the first leg).
    landables : LandableIndex or sequence of turnpoints
        The fields: a :class:`LandableIndex`, or turnpoints of which those marked
        ``landable`` are used.
    polar : Polar
        The polar at this mass and bugs, at the density of the heights glided through
        (e.g. half-way between the band bottom and the fields).
    wind : Wind
        The day's wind.
    band_bottom_m : float
        The lowest height the pilot plans to leave for a climb [m MSL].
    margin_m : float
        Arrival margin above a field's elevation [m].
    terrain : Terrain, optional
        Elevation model; with it, a glide must also clear the terrain by ``clearance_m``.
    clearance_m : float, default 150
        Least clearance over the terrain [m].
    airmass_ms : float, default 0
        Average vertical air motion on the glides, up positive [m/s].
    alternates : int, default 3
        Landables listed per leg.

    Returns
    -------
    Coverage

    Notes
    -----
    A field at elevation ``E`` at geodesic distance ``D`` on course ``c`` is in reach from
    height ``H`` when ``H - D h(c) >= E + S`` with ``h(c)`` the height used per metre on a
    pure glide at MacCready 0 in the wind (contract section 3); the height to spare is
    ``H - E - S - D h(c)``. With terrain the glide line ``H - x h(c)`` must stay ``C``
    above the ground at every sample of the glide, its start and the field included
    (an arrival margin below ``C`` in effect becomes ``C``). Unknown terrain never
    counts as clear.
    """
    lats = np.atleast_1d(np.asarray(path_lats, dtype=float))
    lons = np.atleast_1d(np.asarray(path_lons, dtype=float))
    s = np.atleast_1d(np.asarray(path_s_m, dtype=float))
    legs = np.broadcast_to(np.asarray(leg_index, dtype=np.intp), s.shape)
    if not (lats.shape == lons.shape == s.shape) or s.size == 0:
        raise ValueError("the path needs one or more samples with a latitude, longitude and distance each")
    if np.any(np.diff(s) < 0.0):
        raise ValueError("distances along the path must not decrease")
    index = landables if isinstance(landables, LandableIndex) else landable_index(landables)
    table = _course_table(polar, wind, airmass_ms)
    available = band_bottom_m - index.elevation_m - margin_m
    pairs = _candidate_pairs(index, lats, lons, available, table)
    checker = _GlideChecker(terrain, pairs, lats, lons, index, band_bottom_m, clearance_m)

    # The band bottom itself too close to the ground: nothing is in reach from there.
    below = np.zeros(s.shape, dtype=bool)
    if terrain is not None:
        ground = np.asarray(terrain.sample(lats, lons), dtype=float).reshape(s.shape)
        below = band_bottom_m - ground < clearance_m
    best_pair = _best_per_sample(s.size, pairs, checker, below)

    status = np.full(s.shape, OUT_OF_RANGE, dtype=np.int8)
    in_range = np.bincount(pairs.point, minlength=s.size) > 0
    unknown = np.bincount(pairs.point, weights=(pairs.state == TERRAIN_UNKNOWN).astype(float), minlength=s.size) > 0
    status[in_range] = np.where(unknown[in_range], TERRAIN_UNKNOWN, TERRAIN_BLOCKED)
    status[below] = TERRAIN_BLOCKED
    has_best = best_pair >= 0
    status[has_best] = REACHABLE
    reachable = status == REACHABLE

    edges = _gap_edges(reachable, status, best_pair, pairs, index, s, lats, lons, available, table)
    gaps = _gaps(reachable, edges, s)
    total = float(s[-1] - s[0])
    if total > 0.0:
        percent = 100.0 * (1.0 - sum(b - a for a, b in gaps) / total)
    else:
        percent = 100.0 * float(reachable.all())
    by_distance = np.argsort(pairs.distance_m, kind="stable")
    by_leg = tuple(_leg_landables(int(leg), (legs == leg) & ~below, pairs, by_distance, checker,
                                  index.names, alternates) for leg in np.unique(legs))

    chosen = np.where(has_best, best_pair, 0)
    return Coverage(
        coverage_percent=float(min(max(percent, 0.0), 100.0)), gaps=gaps, by_leg=by_leg,
        band_bottom_m=float(band_bottom_m), margin_m=float(margin_m),
        clearance_m=float(clearance_m) if terrain is not None else math.nan,
        terrain_source=terrain.source if terrain is not None else None,
        landable_count=len(index), landable_names=index.names,
        distance_m=s, lats=lats, lons=lons, leg_index=np.array(legs),
        status=status,
        best_landable=np.where(has_best, pairs.landable[chosen] if pairs.point.size else -1, -1),
        spare_height_m=np.where(has_best, pairs.spare_m[chosen] if pairs.point.size else np.nan, np.nan),
        best_distance_m=np.where(has_best, pairs.distance_m[chosen] if pairs.point.size else np.nan, np.nan),
    )
