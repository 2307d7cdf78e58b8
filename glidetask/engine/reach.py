"""Landable reach: which fields a glider can glide to, and where along a task it can reach none.

From each sample of the planned path, at the bottom of the working band, a landable (a
turnpoint marked ``landable``) is in reach when a pure glide at MacCready 0 in the day's
wind arrives over it with the arrival margin (shared/CONTRACT.md section 3, "pure glide in
wind"), and, when an elevation model is loaded, clears the terrain on the way by the
terrain clearance. :func:`coverage` finds the nearest and the best landable in reach from
every sample, the stretches of the task with none (gaps) and the alternates for each leg;
the search itself is :mod:`glidetask.engine.reach_coverage`.

Candidates are pruned with a k-d tree (:class:`scipy.spatial.cKDTree`) on unit-sphere
coordinates: no field beyond the longest glide the band allows can be in reach, so a
file of 50,000 fields costs little more than one of fifty. (For a few hundred fields the
same radius test runs on every pair directly, which spares importing scipy.spatial.)
"""

from __future__ import annotations

from dataclasses import dataclass
from functools import cached_property
from typing import Sequence

import numpy as np

from glidetask.engine.arrays import scalar_or_array
from glidetask.engine.polar import Polar
from glidetask.engine.scenario import Wind
from glidetask.engine.speedtofly import glide_in_wind
from glidetask.engine.wind import wind_components

#: Sample status along the path.
REACHABLE, OUT_OF_RANGE, TERRAIN_BLOCKED, TERRAIN_UNKNOWN = 0, 1, 2, 3



def reach_distance(polar: Polar, height_m, course_deg=0.0, wind: Wind = Wind(), airmass_ms=0.0):
    """Distance over the ground a pure glide at MacCready 0 covers losing a height [m].

    Parameters
    ----------
    polar : Polar
        The polar at this mass, bugs and density.
    height_m : float or array_like
        Height to lose: the height above the landable minus the arrival margin [m].
    course_deg : float or array_like, default 0
        Course to the landable [deg true].
    wind : Wind, default calm
        The day's wind.
    airmass_ms : float or array_like, default 0
        Average vertical air motion on the glide, up positive [m/s].

    Returns
    -------
    float or ndarray
        ``height / (height used per metre)``; 0 for a height <= 0; NaN where the glider
        makes no progress on that course; inf where the air rises at least as fast as the
        glider sinks.

    Notes
    -----
    The speed to fly at MacCready 0 in wind minimises the height used per metre over the
    ground (:func:`glidetask.engine.speedtofly.glide_in_wind`); in calm still air the
    distance is the height times the best glide ratio, the pilot's rule of thumb.
    """
    along, across = wind_components(course_deg, wind.from_deg, wind.speed_ms)
    per_metre = np.asarray(glide_in_wind(polar, 0.0, along, across, airmass_ms).height_per_metre)
    height = np.asarray(height_m, dtype=float)
    with np.errstate(divide="ignore", invalid="ignore"):
        distance = np.where(per_metre > 0.0, height / per_metre, np.where(np.isnan(per_metre), np.nan, np.inf))
    distance = np.where(height <= 0.0, 0.0, distance)
    return scalar_or_array(distance)


# ---------------------------------------------------------------- landables


def unit_xyz(lats, lons) -> np.ndarray:
    lat, lon = np.radians(np.asarray(lats, dtype=float)), np.radians(np.asarray(lons, dtype=float))
    return np.column_stack((np.cos(lat) * np.cos(lon), np.cos(lat) * np.sin(lon), np.sin(lat)))


@dataclass(frozen=True, eq=False)
class LandableIndex:
    """The landables of a turnpoint collection with a spatial index over them.

    Build it once with :func:`landable_index` and pass it to :func:`coverage` as often as
    needed (a what-if in the UI does not rebuild the tree).

    Attributes
    ----------
    names : tuple of str
    lats, lons : ndarray
        Positions [deg].
    elevation_m : ndarray
        Field elevations [m MSL].
    xyz : ndarray, shape (n, 3)
        Unit-sphere coordinates.
    """

    names: tuple[str, ...]
    lats: np.ndarray
    lons: np.ndarray
    elevation_m: np.ndarray
    xyz: np.ndarray

    def __len__(self) -> int:
        return len(self.names)

    @cached_property
    def tree(self):
        """A :class:`scipy.spatial.cKDTree` over ``xyz``, built on first use (None without landables)."""
        if not self.names:
            return None
        from scipy.spatial import cKDTree  # lazily: scipy.spatial is slow to import, small files skip it

        return cKDTree(self.xyz)


def landable_index(turnpoints: Sequence) -> LandableIndex:
    """The turnpoints marked ``landable`` (objects with ``name, lat, lon, elevation_m, landable``)."""
    fields = [(p.name, p.lat, p.lon, p.elevation_m) for p in turnpoints if getattr(p, "landable", False)]
    names = tuple(str(f[0]) for f in fields)
    lats = np.array([f[1] for f in fields], dtype=float)
    lons = np.array([f[2] for f in fields], dtype=float)
    elevation = np.array([f[3] for f in fields], dtype=float)
    return LandableIndex(names, lats, lons, elevation, unit_xyz(lats, lons).reshape(-1, 3))


# ---------------------------------------------------------------- the result


@dataclass(frozen=True)
class LegLandables:
    """The landables in reach from one leg.

    Attributes
    ----------
    leg : int
        The leg's index as given in ``leg_index`` (0 = the first leg).
    nearest : str or None
        The nearest landable in reach from some point of the leg; None if there is none.
    distance_m : float
        Its distance from the nearest sample of the leg it is in reach from [m] (NaN if none).
    alternates : tuple of (str, float)
        Up to a few landables in reach from the leg, nearest first: ``(name, distance_m)``.
    """

    leg: int
    nearest: str | None
    distance_m: float
    alternates: tuple[tuple[str, float], ...] = ()


@dataclass(frozen=True, eq=False)
class Coverage:
    """Landable coverage along a planned path.

    Attributes
    ----------
    coverage_percent : float
        Share of the path's length from which a landable is in reach [%].
    gaps : tuple of (float, float)
        ``(from_m, to_m)`` stretches, along the path, with no landable in reach.
    by_leg : tuple of LegLandables
        Nearest landable in reach and alternates, one entry per leg.
    band_bottom_m, margin_m : float
        The height the reach is computed from [m MSL] and the arrival margin [m].
    clearance_m : float
        Terrain clearance demanded on the glides [m]; NaN when no terrain was loaded.
    terrain_source : str or None
        The elevation model's file, None without one.
    landable_count : int
        Number of landables considered.
    landable_names : tuple of str
        Names, indexed by ``best_landable``.
    distance_m, lats, lons : ndarray
        The path samples: distance along the path [m], position [deg].
    leg_index : ndarray of int
        The leg of each sample.
    status : ndarray of int8
        Per sample: ``REACHABLE`` (0), ``OUT_OF_RANGE`` (1, no landable within a glide),
        ``TERRAIN_BLOCKED`` (2, terrain in the way of every landable within a glide, or the
        band bottom is within the clearance of the ground there), ``TERRAIN_UNKNOWN``
        (3, the terrain model does not cover the glides that would otherwise be clear).
    best_landable : ndarray of int
        Per sample, the landable reached with the most height to spare (index into
        ``landable_names``); -1 where none.
    spare_height_m : ndarray
        Per sample, the height the best landable leaves above the arrival margin [m]
        (NaN where none).
    best_distance_m : ndarray
        Per sample, the distance to the best landable [m] (NaN where none).
    """

    coverage_percent: float
    gaps: tuple[tuple[float, float], ...]
    by_leg: tuple[LegLandables, ...]
    band_bottom_m: float
    margin_m: float
    clearance_m: float
    terrain_source: str | None
    landable_count: int
    landable_names: tuple[str, ...]
    distance_m: np.ndarray
    lats: np.ndarray
    lons: np.ndarray
    leg_index: np.ndarray
    status: np.ndarray
    best_landable: np.ndarray
    spare_height_m: np.ndarray
    best_distance_m: np.ndarray

    @property
    def reachable(self) -> np.ndarray:
        return self.status == REACHABLE

    @property
    def terrain_checked(self) -> bool:
        return self.terrain_source is not None

    @property
    def total_m(self) -> float:
        return float(self.distance_m[-1] - self.distance_m[0]) if self.distance_m.size else 0.0

    def best_name(self, sample: int) -> str | None:
        """Name of the best landable in reach from a sample, or None."""
        k = int(self.best_landable[sample])
        return self.landable_names[k] if k >= 0 else None

    def _cells_m(self) -> np.ndarray:
        """Length of path each sample stands for: midpoint to midpoint [m]."""
        if self.distance_m.size < 2:
            return np.zeros(self.distance_m.shape)
        mid = 0.5 * (self.distance_m[1:] + self.distance_m[:-1])
        return np.diff(np.concatenate((self.distance_m[:1], mid, self.distance_m[-1:])))

    def gap_breakdown(self) -> tuple[dict[str, float], ...]:
        """For each gap, the length [m] of it for each cause: ``range`` (no field within a
        glide), ``terrain`` (terrain in the way, or the band bottom too near the ground) and
        ``unknown`` (glides the terrain model does not cover), by the samples inside it."""
        cells = self._cells_m()
        out = []
        for start, end in self.gaps:
            inside = (self.distance_m >= start) & (self.distance_m <= end)
            out.append({name: float(np.sum(cells[inside & (self.status == code)]))
                        for name, code in (("range", OUT_OF_RANGE), ("terrain", TERRAIN_BLOCKED),
                                           ("unknown", TERRAIN_UNKNOWN))})
        return tuple(out)

    def gap_reasons(self) -> tuple[str, ...]:
        """The main cause of each gap: the one covering most of it (see :meth:`gap_breakdown`);
        a gap between two samples with no sample inside takes ``range``."""
        reasons = []
        for parts in self.gap_breakdown():
            ranked = sorted(parts, key=lambda name: (-parts[name], ("unknown", "terrain", "range").index(name)))
            reasons.append(ranked[0] if parts[ranked[0]] > 0.0 else "range")
        return tuple(reasons)
