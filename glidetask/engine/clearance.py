"""Clearance over the terrain: a final glide checked against the ground under it.

The rule "no glide closer to the terrain than the terrain clearance" is
:class:`glidetask.engine.flight_ground.GroundFloor`'s, for every glide of the flight. Here it
is read as a report on one final glide: :func:`final_glide_clearance` gives the clearance of
the glide line over the ground, the least clearance and where, and how much the required
height must rise (the largest shortfall ahead, :meth:`GroundFloor.shortfall_along`) and
which obstacle decides it. :func:`final_glide_over_terrain` builds the required-height line
from the height used per metre on each leg and runs that check on a sampled path.

The same rule inside the flight core, along a task's whole planned path, is
:mod:`glidetask.engine.clearance_hook` (:class:`~glidetask.engine.clearance_hook.PathTerrain`).
"""

from __future__ import annotations

import math
from dataclasses import dataclass
from typing import Sequence

import numpy as np

from glidetask.engine.arrays import scalar_or_array
from glidetask.engine import geodesy
from glidetask.engine.flight_ground import GroundFloor
from glidetask.engine.terrain import Terrain
from glidetask.engine.terrain_profile import (
    PATH_SPACING_M, PathProfile, covered_share_of, flagged_runs, sample_path,
)

#: A glide that misses the clearance by less than this still passes [m]: heights are shown
#: to the metre, and a plan's start height comes from its own solver, not this module's.
CLEARANCE_TOLERANCE_M = 0.5




@dataclass(frozen=True)
class TerrainPoint:
    """A place on a glide worth naming: the least clearance, or the obstacle that decides.

    Attributes
    ----------
    at_m : float
        Distance along the path, measured like the distances given to the check [m].
    lat, lon : float
        Position [deg]; NaN when the check was given no positions.
    elevation_m : float
        Terrain elevation there [m MSL].
    clearance_m : float
        Height of the glide as planned above the terrain there [m].
    needed_height_m : float
        Terrain elevation plus the demanded clearance: the height the glider must have
        there [m MSL].
    near : str or None
        The nearest named place (a turnpoint) when names were given.
    near_distance_m : float
        Distance from that place [m] (NaN without one).
    near_bearing_deg : float
        Bearing from that place to this point [deg true] (NaN without one).
    """

    at_m: float
    lat: float
    lon: float
    elevation_m: float
    clearance_m: float
    needed_height_m: float
    near: str | None = None
    near_distance_m: float = math.nan
    near_bearing_deg: float = math.nan


@dataclass(frozen=True, eq=False)
class FinalGlideTerrain:
    """A final glide checked against the terrain under it.

    Attributes
    ----------
    source : str
        The elevation model's file.
    ok : bool
        True when the model covers the whole glide and the glide as planned clears the
        terrain by at least ``clearance_m`` everywhere (less :data:`CLEARANCE_TOLERANCE_M`).
        False otherwise: never a silent pass.
    clearance_m : float
        The clearance demanded over the terrain [m].
    min_clearance_m : float
        Least height of the glide as planned above the terrain [m]; NaN if no sample is
        covered.
    at_m : float
        Where that least clearance is, along the path [m] (NaN if none).
    lowest : TerrainPoint or None
        The place of the least clearance.
    raised_by_m : float
        How much the terrain raises the required height at the start of the glide [m],
        >= 0.
    obstacle : TerrainPoint or None
        The sample whose terrain decided that rise (None when there is none).
    required_start_m : float
        Required height at the start with the terrain taken into account [m MSL]:
        ``required_m[0] + raised_by_m``.
    start_height_m : float
        The height at which the glide as planned starts [m MSL]: the one given, or
        ``required_start_m``.
    shortfall_m : float
        ``required_start_m - start_height_m`` where that exceeds :data:`CLEARANCE_TOLERANCE_M`,
        else 0: height missing for the clearance [m].
    covered_share : float
        Share of the glide's length covered by the elevation model [0-1].
    uncovered : tuple of (float, float)
        ``(from_m, to_m)`` stretches without terrain data.
    distance_m, lats, lons, terrain_m : ndarray
        The samples: distance along the path [m], position [deg], terrain [m MSL].
    required_m : ndarray
        Required height without the terrain (arrival with the margin) [m MSL].
    adjusted_m : ndarray
        Required height with the terrain: ``required_m`` plus the suffix-maximum rise [m MSL].
    glide_m : ndarray
        The glide as planned: ``required_m + (start_height_m - required_m[0])`` [m MSL].
    """

    source: str
    ok: bool
    clearance_m: float
    min_clearance_m: float
    at_m: float
    lowest: TerrainPoint | None
    raised_by_m: float
    obstacle: TerrainPoint | None
    required_start_m: float
    start_height_m: float
    shortfall_m: float
    covered_share: float
    uncovered: tuple[tuple[float, float], ...]
    distance_m: np.ndarray
    lats: np.ndarray
    lons: np.ndarray
    terrain_m: np.ndarray
    required_m: np.ndarray
    adjusted_m: np.ndarray
    glide_m: np.ndarray

    def raise_at(self, distance_m):
        """How much the terrain raises the required height at distances along the path [m].

        A step function: at ``s`` it is the largest shortfall of any sample at or beyond
        ``s`` (0 beyond the last sample), the same suffix maximum as ``adjusted_m``.
        """
        ahead = GroundFloor(self.distance_m, self.terrain_m + self.clearance_m).shortfall_along(self.required_m)
        suffix = np.concatenate((ahead, [0.0]))
        index = np.searchsorted(self.distance_m, np.asarray(distance_m, dtype=float), side="left")
        result = np.maximum(suffix[index], 0.0)
        return scalar_or_array(result)


def _landmark_fields(landmark):
    if hasattr(landmark, "name"):
        return landmark.name, float(landmark.lat), float(landmark.lon)
    name, lat, lon = landmark[:3]
    return str(name), float(lat), float(lon)


def nearest_landmark(lat: float, lon: float, landmarks: Sequence = ()):
    """The named place nearest a point: ``(name, distance_m, bearing_from_it_deg)``.

    ``landmarks`` are objects with ``name``, ``lat``, ``lon`` (turnpoints) or
    ``(name, lat, lon)`` tuples; ``(None, nan, nan)`` when there are none or the point
    is unknown.
    """
    if not landmarks or not (math.isfinite(lat) and math.isfinite(lon)):
        return None, math.nan, math.nan
    names, m_lats, m_lons = zip(*(_landmark_fields(m) for m in landmarks))
    dist, azimuth, _ = geodesy.inverse(np.array(m_lats), np.array(m_lons), lat, lon)
    best = int(np.argmin(dist))
    return names[best], float(dist[best]), float(azimuth[best])


def _terrain_point(index, distance, lats, lons, terrain, glide, clearance_m, landmarks) -> TerrainPoint:
    lat = float(lats[index]) if lats is not None else math.nan
    lon = float(lons[index]) if lons is not None else math.nan
    near, near_distance, near_bearing = nearest_landmark(lat, lon, landmarks)
    return TerrainPoint(
        at_m=float(distance[index]), lat=lat, lon=lon, elevation_m=float(terrain[index]),
        clearance_m=float(glide[index] - terrain[index]),
        needed_height_m=float(terrain[index] + clearance_m),
        near=near, near_distance_m=near_distance, near_bearing_deg=near_bearing,
    )


def _shortfall(required_m: float, start_m: float) -> float:
    """Height missing for the clearance [m]; within the tolerance it is none."""
    missing = required_m - start_m
    return missing if missing > CLEARANCE_TOLERANCE_M else 0.0


def final_glide_clearance(distance_m, required_height_m, terrain_m, clearance_m: float, *,
                          start_height_m: float | None = None, lats=None, lons=None,
                          landmarks: Sequence = (), source: str = "") -> FinalGlideTerrain:
    """Check a final glide against the terrain, and raise its required height until it clears.

    Parameters
    ----------
    distance_m : array_like
        Distance of each sample along the glide's path [m], increasing. The origin is the
        caller's (the task start for a plan, the glider's position for a single glide);
        every distance in the result is measured from it.
    required_height_m : array_like
        ``R_i``: the height the glider must have at each sample to arrive with the arrival
        margin, terrain ignored [m MSL]; it decreases toward the goal.
    terrain_m : array_like
        ``T_i``: terrain elevation at each sample [m MSL]; NaN where unknown.
    clearance_m : float
        ``C``: the least height above the terrain the glide must keep [m], >= 0.
    start_height_m : float, optional
        The height the glide actually starts at (the glider's present height for a
        ``glide`` check) [m MSL]. Default: the terrain-adjusted requirement, i.e. the plan
        starts its final glide as high as the terrain demands.
    lats, lons : array_like, optional
        Sample positions [deg], to place the least clearance and the obstacle.
    landmarks : sequence, optional
        Named places (turnpoints, or ``(name, lat, lon)``) to describe where those are.
    source : str, optional
        The elevation model's file, carried into the result.

    Returns
    -------
    FinalGlideTerrain

    Notes
    -----
    In a pure glide the height lost over each stretch does not depend on the height it
    starts at, so a glide that starts ``dH`` higher stays ``dH`` higher all the way:
    the glide as planned is ``G_i = R_i + (H_0 - R_0)``. Its clearance is ``G_i - T_i``.
    The glider clears the terrain from sample ``i`` on only if it has, at ``i``,

        ``R'_i = R_i + max(0, max_{j >= i} (T_j + C - R_j))``

    (the suffix maximum of the shortfalls ahead): the required height rises by exactly
    what the worst obstacle still ahead demands, and the sample ``j`` that attains the
    maximum for ``i = 0`` is the obstacle that decided the start height. Clearance is
    demanded at every sample, the goal included: with an arrival margin below ``C``
    the margin in effect becomes ``C`` (conservative).

    Samples without terrain data are left out of the check and make ``ok`` false;
    unknown terrain is never taken as sea level. The terrain is only as good as the
    elevation model: masts, trees and cables are not in it.
    """
    distance = np.atleast_1d(np.asarray(distance_m, dtype=float))
    required = np.broadcast_to(np.asarray(required_height_m, dtype=float), distance.shape).astype(float)
    terrain = np.broadcast_to(np.asarray(terrain_m, dtype=float), distance.shape).astype(float)
    if distance.size == 0:
        raise ValueError("the final glide needs at least one sample")
    if np.any(np.diff(distance) < 0.0):
        raise ValueError("distances along the glide must not decrease")
    if not (math.isfinite(clearance_m) and clearance_m >= 0.0):
        raise ValueError(f"clearance_m must be a finite number >= 0, got {clearance_m!r}")
    lats = None if lats is None else np.broadcast_to(np.asarray(lats, dtype=float), distance.shape)
    lons = None if lons is None else np.broadcast_to(np.asarray(lons, dtype=float), distance.shape)

    ground = GroundFloor(distance, terrain + clearance_m)  # the clearance rule (flight_ground)
    deficit = ground.shortfall(ground.floor, required)
    rise = np.maximum(ground.shortfall_along(required), 0.0)
    adjusted = required + rise
    raised_by = float(rise[0])
    required_start = float(adjusted[0])
    start = required_start if start_height_m is None else float(start_height_m)
    glide = required + (start - float(required[0]))

    known = np.isfinite(terrain) & np.isfinite(required)
    clearance_profile = np.where(known, glide - terrain, np.nan)
    lowest = obstacle = None
    min_clearance = at = math.nan
    if known.any():
        low = int(np.nanargmin(clearance_profile))
        lowest = _terrain_point(low, distance, lats, lons, terrain, glide, clearance_m, landmarks)
        min_clearance, at = lowest.clearance_m, lowest.at_m
    if raised_by > 0.0:
        worst = int(np.argmax(deficit))
        obstacle = _terrain_point(worst, distance, lats, lons, terrain, glide, clearance_m, landmarks)

    covered = covered_share_of(distance, known)
    ok = bool(known.all() and math.isfinite(min_clearance) and min_clearance >= clearance_m - CLEARANCE_TOLERANCE_M)
    return FinalGlideTerrain(
        source=source, ok=ok, clearance_m=float(clearance_m), min_clearance_m=min_clearance, at_m=at,
        lowest=lowest, raised_by_m=raised_by, obstacle=obstacle, required_start_m=required_start,
        start_height_m=start, shortfall_m=_shortfall(required_start, start), covered_share=covered,
        uncovered=flagged_runs(distance, ~known),
        distance_m=distance, lats=lats if lats is not None else np.full(distance.shape, np.nan),
        lons=lons if lons is not None else np.full(distance.shape, np.nan),
        terrain_m=terrain, required_m=required, adjusted_m=adjusted, glide_m=glide,
    )


def required_height_line(profile: PathProfile, height_per_metre, arrival_height_m: float) -> np.ndarray:
    """Required height at each sample of a path for a pure glide to its last vertex [m MSL].

    Parameters
    ----------
    profile : PathProfile
        The sampled path (from :func:`sample_path`).
    height_per_metre : float or array_like
        Height used per metre over the ground on each segment [m/m], one value or one per
        segment (from :func:`glidetask.engine.speedtofly.glide_in_wind` with that
        segment's wind components).
    arrival_height_m : float
        Goal elevation plus the arrival margin [m MSL].

    Notes
    -----
    ``R(s) = A + h_k (L_k_end - s) + sum_{m > k} h_m L_m`` on segment ``k``: contract
    section 3, "required height at a point", with each leg's own wind.
    """
    vertex = profile.vertex_distance_m
    n_segments = max(vertex.size - 1, 0)
    if n_segments == 0:
        return np.full(profile.distance_m.shape, float(arrival_height_m))
    per_metre = np.broadcast_to(np.asarray(height_per_metre, dtype=float), (n_segments,))
    lengths = np.diff(vertex)
    after = np.concatenate((np.cumsum((per_metre * lengths)[::-1])[::-1][1:], [0.0]))
    seg = profile.segment
    return arrival_height_m + per_metre[seg] * (vertex[seg + 1] - profile.distance_m) + after[seg]


def final_glide_over_terrain(terrain: Terrain, lats, lons, height_per_metre, arrival_height_m: float,
                             clearance_m: float, *, start_height_m: float | None = None,
                             start_distance_m: float = 0.0, landmarks: Sequence = (),
                             spacing_m: float = PATH_SPACING_M) -> FinalGlideTerrain:
    """Sample the terrain under a final glide and check it (:func:`final_glide_clearance`).

    Parameters
    ----------
    terrain : Terrain
        The elevation model.
    lats, lons : array_like
        The glide's path: its start, the turnpoints still to round, the goal [deg]
        (at least two vertices).
    height_per_metre : float or array_like
        Height used per metre on each segment at the final-glide MacCready setting [m/m].
    arrival_height_m : float
        Goal elevation plus the arrival margin [m MSL].
    clearance_m : float
        Least clearance over the terrain [m].
    start_height_m : float, optional
        Height at the start of the glide [m MSL]; default: as high as the terrain demands.
    start_distance_m : float, default 0
        Distance of the glide's start along the task [m]; every distance in the result
        is offset by it (so a plan reports positions along the task).
    landmarks : sequence, optional
        Named places to describe the obstacle's position (turnpoints).
    spacing_m : float, default 250
        Largest spacing of the terrain samples [m].

    Returns
    -------
    FinalGlideTerrain
    """
    if np.size(lats) < 2:
        raise ValueError("a final glide's path needs at least two vertices")
    profile = sample_path(terrain, lats, lons, spacing_m)
    required = required_height_line(profile, height_per_metre, arrival_height_m)
    return final_glide_clearance(
        profile.distance_m + start_distance_m, required, profile.elevation_m, clearance_m,
        start_height_m=start_height_m, lats=profile.lats, lons=profile.lons,
        landmarks=landmarks, source=terrain.source,
    )
