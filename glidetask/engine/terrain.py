"""Elevation models: reading a GeoTIFF in any CRS, sampling it, checking a final glide over it.

A :class:`Terrain` holds one elevation band of a raster read with rasterio (imported
lazily, inside :func:`load_terrain` only), its georeferencing and a cached WGS84 -> raster
CRS transformer. :meth:`Terrain.sample` interpolates it bilinearly at latitudes and
longitudes; cells without data and points outside the raster give NaN: unknown, never
sea level. :func:`sample_path` samples along a geodesic polyline (a task path) and reports
which share of it the model does not cover.

:func:`final_glide_clearance` is the terrain-aware final glide: the clearance of the
glide line over the ground, the least clearance and where, and how much the required
height must rise (and which obstacle decides it) so that the clearance holds everywhere.
:func:`final_glide_over_terrain` builds the required-height line from the height used
per metre on each leg and runs that check on the sampled path.

Elevations are metres above mean sea level as the model gives them; the model's vertical
datum is taken to be mean sea level (the geoid), as it is for the common elevation
models, and no geoid correction is applied.
"""

from __future__ import annotations

import math
import os
import threading
import warnings
from collections import OrderedDict
from dataclasses import dataclass
from functools import cached_property, lru_cache
from typing import Sequence

import numpy as np

from glidetask.engine import geodesy

#: Largest sample spacing along a path [m]: the terrain is checked at least every 250 m.
PATH_SPACING_M = 250.0
#: Batches of the terrain requirement hook with at most this many (flight x sample) pairs
#: evaluate every sample ahead directly; larger ones search convex hulls (same results).
DIRECT_PAIRS_LIMIT = 20_000
#: A glide that misses the clearance by less than this still passes [m]: heights are shown
#: to the metre, and a plan's start height comes from its own solver, not this module's.
CLEARANCE_TOLERANCE_M = 0.5
_NEGLIGIBLE_WEIGHT = 1e-9
_FOOT_M = 0.3048
_FEET_UNITS = {"ft", "foot", "feet", "us-ft", "us survey foot", "international foot"}


class TerrainError(ValueError):
    """An elevation model that cannot be used: missing, not a raster, not georeferenced.

    Attributes
    ----------
    path : str
        The file as the caller named it.
    what : str
        What is wrong, in the user's terms (without the file name), for
        ``glidetask: error: FILE: WHERE: WHAT`` lines.
    """

    def __init__(self, path, what: str):
        self.path = str(path)
        self.what = what
        super().__init__(f"{self.path}: {what}")


# ---------------------------------------------------------------- the raster


@lru_cache(maxsize=16)
def _transformer(crs_wkt: str):
    """WGS84 (lon, lat) -> raster CRS (x, y); one per CRS, reused (pyproj >= 3.1 is thread-safe)."""
    from pyproj import CRS, Transformer

    return Transformer.from_crs(CRS.from_epsg(4326), CRS.from_wkt(crs_wkt), always_xy=True)


@dataclass(frozen=True, eq=False)
class Terrain:
    """An elevation model on a regular grid, in its own coordinate reference system.

    Attributes
    ----------
    source : str
        The file it was read from, as the caller named it.
    crs : str
        The raster's coordinate reference system (``"EPSG:nnnn"`` when it has one, else WKT).
    crs_wkt : str
        The same as WKT (used to build the transformer).
    geographic : bool
        True when the raster's coordinates are longitude/latitude.
    bounds : tuple of float
        ``(left, bottom, right, top)`` of the raster in its CRS [CRS units].
    transform : tuple of float
        The affine ``(a, b, c, d, e, f)``: ``x = a col + b row + c``, ``y = d col + e row + f``
        for pixel-corner coordinates ``(col, row)``.
    elevation_m : ndarray
        Elevations [m MSL], shape ``(rows, cols)``, NaN where the model has no data.
        Read-only.
    """

    source: str
    crs: str
    crs_wkt: str
    geographic: bool
    bounds: tuple[float, float, float, float]
    transform: tuple[float, float, float, float, float, float]
    elevation_m: np.ndarray

    @property
    def shape(self) -> tuple[int, int]:
        return self.elevation_m.shape

    def to_pixel(self, lats, lons):
        """Fractional pixel coordinates ``(col, row)`` of WGS84 points (corner convention).

        The centre of the cell in row ``i``, column ``j`` is at ``(j + 0.5, i + 0.5)``.
        """
        lats = np.asarray(lats, dtype=float)
        lons = np.asarray(lons, dtype=float)
        if self.crs == "EPSG:4326":
            x, y = lons, lats
        else:
            x, y = _transformer(self.crs_wkt).transform(lons, lats)
            x, y = np.asarray(x, dtype=float), np.asarray(y, dtype=float)
        if self.geographic:  # a model may number longitudes 0-360: fold into its range
            left = self.bounds[0]
            x = left + np.mod(x - left, 360.0)
        a, b, c, d, e, f = self.transform
        det = a * e - b * d
        dx, dy = x - c, y - f
        return (e * dx - b * dy) / det, (a * dy - d * dx) / det

    def sample_pixels(self, cols, rows):
        """Bilinear elevations [m] at fractional pixel coordinates (see :meth:`to_pixel`).

        NaN outside the raster and wherever a cell with a non-zero weight has no data.
        """
        grid = self.elevation_m
        n_rows, n_cols = grid.shape
        cols = np.asarray(cols, dtype=float)
        rows = np.asarray(rows, dtype=float)
        inside = (cols >= 0.0) & (cols <= n_cols) & (rows >= 0.0) & (rows <= n_rows)
        # Cell-centre coordinates; the half cell at the edges is extrapolated linearly from
        # the outermost pair of centres, which keeps the interpolation exact on a plane.
        u = np.where(inside, cols, 0.5) - 0.5
        v = np.where(inside, rows, 0.5) - 0.5
        j0 = np.clip(np.floor(u), 0, n_cols - 2).astype(np.intp)
        i0 = np.clip(np.floor(v), 0, n_rows - 2).astype(np.intp)
        tu, tv = u - j0, v - i0
        weights = ((1.0 - tu) * (1.0 - tv), tu * (1.0 - tv), (1.0 - tu) * tv, tu * tv)
        corners = (grid[i0, j0], grid[i0, j0 + 1], grid[i0 + 1, j0], grid[i0 + 1, j0 + 1])
        total = np.zeros(np.broadcast(u, v).shape)
        unknown = np.zeros(total.shape, dtype=bool)
        for weight, value in zip(weights, corners):
            missing = np.isnan(value)
            # A cell without data counts unless its weight is round-off from a query that
            # sits on a neighbouring centre.
            unknown |= missing & (np.abs(weight) > _NEGLIGIBLE_WEIGHT)
            total += weight * np.where(missing, 0.0, value)
        result = np.where(inside & ~unknown, total, np.nan)
        return float(result) if result.ndim == 0 else result

    def sample(self, lats, lons):
        """Elevation [m MSL] at WGS84 latitudes and longitudes [deg] (scalars or arrays).

        Returns
        -------
        float or ndarray
            Bilinear interpolation between the four nearest cell centres; NaN outside the
            raster and where a contributing cell has no data (unknown, not sea level).

        Notes
        -----
        Bilinear interpolation reproduces ``z = p + q x + r y + s x y`` in the raster's own
        coordinates exactly, so a plane in the raster's CRS is sampled without error.
        Within half a cell of the raster's edge the value is extrapolated linearly from
        the outermost cells.
        """
        cols, rows = self.to_pixel(lats, lons)
        return self.sample_pixels(cols, rows)


_CACHE: "OrderedDict[tuple, Terrain]" = OrderedDict()
_CACHE_SIZE = 4
_CACHE_LOCK = threading.Lock()


def load_terrain(path) -> Terrain:
    """Read an elevation model, or return it from the cache if the file has not changed.

    Parameters
    ----------
    path : str or os.PathLike
        A raster file GDAL reads (GeoTIFF; SRTM ``.hgt`` tiles work too) with a coordinate
        reference system; band 1 holds elevations in metres (feet when the band says so).

    Returns
    -------
    Terrain

    Raises
    ------
    TerrainError
        The file is missing, is not a raster, has no CRS or georeferencing, or is too small
        to interpolate (fewer than 2 x 2 cells).

    Notes
    -----
    The cache holds the last few models, keyed by (absolute path, modification time,
    size), so repeated plans of a task do not read the file again.
    """
    name = os.fspath(path)
    unusable = terrain_name_problem(name)
    if unusable:
        raise TerrainError(name, unusable)
    try:
        status = os.stat(name)
    except FileNotFoundError:
        raise TerrainError(name, "no such file") from None
    except OSError as error:
        raise TerrainError(name, f"cannot read the file: {error.strerror or error}") from None
    if not os.path.isfile(name):
        raise TerrainError(name, "not a file")
    key = (os.path.abspath(name), status.st_mtime_ns, status.st_size)
    with _CACHE_LOCK:
        if key in _CACHE:
            _CACHE.move_to_end(key)
            cached = _CACHE[key]
            return cached if cached.source == name else _renamed(cached, name)
    terrain = _read(name)
    with _CACHE_LOCK:
        _CACHE[key] = terrain
        while len(_CACHE) > _CACHE_SIZE:
            _CACHE.popitem(last=False)
    return terrain


# Checks of a model before it is used: self-contained, so they can move with the loader.
ELEVATION_LIMITS_M = (-11000.0, 9000.0)  # the deepest ocean trench to above the highest summit (from memory)


def terrain_name_problem(name) -> str | None:
    """Why the raster library cannot open a file of this name (not UTF-8), or None."""
    try:
        os.fsencode(name).decode("utf-8")
    except UnicodeDecodeError:
        return "the file name is not UTF-8, which the raster library needs; rename the file"
    return None


def terrain_value_problem(crs, values: np.ndarray) -> str | None:
    """Why a model with this CRS and these elevations [m] cannot be used, or None.

    The CRS must be geographic or projected (a local engineering CRS has no place on the
    earth) and reachable from WGS84; every known elevation must lie between the deepest
    ocean floor and above the highest summit (values such as 3.4e38 are unflagged no-data).
    """
    if not (crs.is_geographic or crs.is_projected):
        return ("has a local coordinate reference system (neither geographic nor projected): "
                "it cannot be placed on the earth")
    try:
        _transformer(crs.to_wkt())
    except Exception:  # noqa: BLE001 - PROJ's own errors vary by version
        return "its coordinate reference system cannot be converted from latitude and longitude (WGS84)"
    known = values[np.isfinite(values)]
    if known.size:
        low, high = float(known.min()), float(known.max())
        if low < ELEVATION_LIMITS_M[0] or high > ELEVATION_LIMITS_M[1]:
            return (f"elevations from {low:.6g} to {high:.6g} m are outside {ELEVATION_LIMITS_M[0]:g} to "
                    f"{ELEVATION_LIMITS_M[1]:g} m; is the no-data value set, and are the units metres?")
    return None


def _renamed(terrain: Terrain, source: str) -> Terrain:
    from dataclasses import replace

    return replace(terrain, source=source)


def _read(name: str) -> Terrain:
    import rasterio
    from rasterio.errors import NotGeoreferencedWarning, RasterioError

    try:
        with warnings.catch_warnings():
            warnings.simplefilter("ignore", NotGeoreferencedWarning)
            with rasterio.open(name) as dataset:
                if dataset.count < 1:
                    raise TerrainError(name, "the raster has no bands")
                if dataset.crs is None:
                    raise TerrainError(name, "has no coordinate reference system (CRS); "
                                             "an elevation model must be georeferenced")
                if dataset.transform.is_identity or dataset.transform.determinant == 0.0:
                    raise TerrainError(name, "has no georeferencing (no geotransform)")
                if dataset.height < 2 or dataset.width < 2:
                    raise TerrainError(name, "too small: an elevation model needs at least 2 x 2 cells")
                band = dataset.read(1, masked=True)
                scale = dataset.scales[0] if dataset.scales else 1.0
                offset = dataset.offsets[0] if dataset.offsets else 0.0
                unit = (dataset.units[0] or "").strip().lower() if dataset.units else ""
                crs, transform, bounds = dataset.crs, dataset.transform, tuple(dataset.bounds)
    except TerrainError:
        raise
    except (RasterioError, OSError) as error:
        raise TerrainError(name, f"not a raster elevation model GDAL can read ({_first_line(error)})") from None

    dtype = np.float64 if band.dtype == np.float64 else np.float32
    values = band.astype(dtype).filled(np.nan)
    values[~np.isfinite(values)] = np.nan
    with np.errstate(over="ignore", invalid="ignore"):
        values = values * dtype(scale or 1.0) + dtype(offset or 0.0)
        if unit in _FEET_UNITS:
            values = values * dtype(_FOOT_M)
    unusable = terrain_value_problem(crs, values)
    if unusable:
        raise TerrainError(name, unusable)
    values.setflags(write=False)
    epsg = crs.to_epsg()
    return Terrain(
        source=name,
        crs=f"EPSG:{epsg}" if epsg else crs.to_wkt(),
        crs_wkt=crs.to_wkt(),
        geographic=bool(crs.is_geographic),
        bounds=tuple(float(b) for b in bounds),
        transform=tuple(float(t) for t in (transform.a, transform.b, transform.c,
                                           transform.d, transform.e, transform.f)),
        elevation_m=values,
    )


def _first_line(error: Exception) -> str:
    text = str(error).strip().splitlines()
    return text[0] if text else type(error).__name__


def clear_cache() -> None:
    """Forget every cached model (tests; a long-lived UI after files moved)."""
    with _CACHE_LOCK:
        _CACHE.clear()


# ---------------------------------------------------------------- paths


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
        return _covered_share(self.distance_m, np.isfinite(self.elevation_m))

    def uncovered_ranges(self) -> tuple[tuple[float, float], ...]:
        """``(from_m, to_m)`` stretches of the path where the model has no data."""
        return _runs(self.distance_m, ~np.isfinite(self.elevation_m))


def _cells(distance_m: np.ndarray) -> tuple[np.ndarray, np.ndarray]:
    """Each sample's stretch of path: from the midpoint before it to the midpoint after it."""
    mid = 0.5 * (distance_m[1:] + distance_m[:-1])
    starts = np.concatenate((distance_m[:1], mid))
    ends = np.concatenate((mid, distance_m[-1:]))
    return starts, ends


def _covered_share(distance_m: np.ndarray, known: np.ndarray) -> float:
    if distance_m.size == 0:
        return 0.0
    total = float(distance_m[-1] - distance_m[0])
    if total <= 0.0:
        return float(np.all(known))
    starts, ends = _cells(distance_m)
    return float(np.sum((ends - starts)[known]) / total)


def _runs(distance_m: np.ndarray, flag: np.ndarray) -> tuple[tuple[float, float], ...]:
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


# ---------------------------------------------------------------- the terrain-aware final glide


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

    @property
    def clearance_profile_m(self) -> np.ndarray:
        """Height of the glide as planned above the terrain at each sample [m] (NaN: unknown)."""
        return self.glide_m - self.terrain_m

    def raise_at(self, distance_m):
        """How much the terrain raises the required height at distances along the path [m].

        A step function: at ``s`` it is the largest shortfall of any sample at or beyond
        ``s`` (0 beyond the last sample), the same suffix maximum as ``adjusted_m``.
        """
        deficit = _deficit(self.terrain_m, self.clearance_m, self.required_m)
        suffix = np.concatenate((_suffix_max(deficit), [0.0]))
        index = np.searchsorted(self.distance_m, np.asarray(distance_m, dtype=float), side="left")
        result = np.maximum(suffix[index], 0.0)
        return float(result) if result.ndim == 0 else result


def _deficit(terrain_m, clearance_m, required_m) -> np.ndarray:
    """``T + C - R`` per sample; -inf where the terrain or the requirement is unknown."""
    deficit = np.asarray(terrain_m, dtype=float) + clearance_m - np.asarray(required_m, dtype=float)
    return np.where(np.isfinite(deficit), deficit, -np.inf)


def _suffix_max(values: np.ndarray) -> np.ndarray:
    """``out[i] = max(values[i:])``."""
    return np.maximum.accumulate(values[::-1])[::-1] if values.size else values


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

    deficit = _deficit(terrain, clearance_m, required)
    rise = np.maximum(_suffix_max(deficit), 0.0)
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

    covered = _covered_share(distance, known)
    ok = bool(known.all() and math.isfinite(min_clearance) and min_clearance >= clearance_m - CLEARANCE_TOLERANCE_M)
    return FinalGlideTerrain(
        source=source, ok=ok, clearance_m=float(clearance_m), min_clearance_m=min_clearance, at_m=at,
        lowest=lowest, raised_by_m=raised_by, obstacle=obstacle, required_start_m=required_start,
        start_height_m=start, shortfall_m=_shortfall(required_start, start), covered_share=covered,
        uncovered=_runs(distance, ~known),
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


# ---------------------------------------------------------------- terrain along a whole task path


@dataclass(frozen=True, eq=False)
class PathTerrain:
    """The terrain under a task's planned path, sampled once, for the final-glide requirement.

    Build it with :func:`path_terrain`. It is both the flight core's requirement hook
    (``extra = path_terrain(position_m, height_per_metre, floor_m)``: how much the terrain
    raises the final-glide requirement at a point) and the source of the final-glide report
    (:meth:`final_glide`), so the height the plan flies and the obstacle it names come
    from the same samples.

    Attributes
    ----------
    profile : PathProfile
        The samples along the path; its segments are the task's legs.
    clearance_m : float
        Least clearance over the terrain [m].
    """

    profile: PathProfile
    clearance_m: float

    @property
    def source(self) -> str:
        return self.profile.source

    def _leg_lengths(self) -> np.ndarray:
        return self._lengths

    @cached_property
    def _lengths(self) -> np.ndarray:
        return np.diff(self.profile.vertex_distance_m)

    @cached_property
    def _sample_leg(self) -> np.ndarray:
        """The leg of each sample (a vertex belongs to the leg that starts there)."""
        return self._leg_of(self.profile.distance_m)

    def _ahead(self, start_m: float):
        """Samples from ``start_m`` on: that point itself (interpolated) and every sample beyond."""
        p = self.profile
        beyond = p.distance_m > start_m
        distance = np.concatenate(([start_m], p.distance_m[beyond]))
        terrain = np.concatenate(([np.interp(start_m, p.distance_m, p.elevation_m)], p.elevation_m[beyond]))
        lats = np.concatenate(([np.interp(start_m, p.distance_m, p.lats)], p.lats[beyond]))
        lons = np.concatenate(([np.interp(start_m, p.distance_m, p.lons)], p.lons[beyond]))
        return distance, terrain, lats, lons, self._leg_of(distance)

    def _leg_of(self, distance) -> np.ndarray:
        vertex = self.profile.vertex_distance_m
        return np.clip(np.searchsorted(vertex, distance, side="right") - 1, 0, max(vertex.size - 2, 0))

    def _tail(self, per_metre: np.ndarray) -> np.ndarray:
        """Height used from each leg's start to the finish, shape (..., L+1), 0 at the finish."""
        lengths = self._leg_lengths()
        used = np.where(lengths == 0.0, 0.0, per_metre * lengths)
        return np.concatenate((np.cumsum(used[..., ::-1], axis=-1)[..., ::-1],
                               np.zeros(per_metre.shape[:-1] + (1,))), axis=-1)

    def _required(self, distance, leg, height_per_metre, floor_m):
        """Pure final-glide requirement at samples ``distance`` (J,) on legs ``leg`` (J,), for each row
        of ``height_per_metre`` (..., L) and ``floor_m`` (...): shape (..., J)."""
        per_metre = np.asarray(height_per_metre, dtype=float)
        leg_end = self.profile.vertex_distance_m[leg + 1]
        return (np.asarray(floor_m, dtype=float)[..., None] + per_metre[..., leg] * (leg_end - distance)
                + self._tail(per_metre)[..., leg + 1])

    @cached_property
    def _hulls(self) -> "_SuffixHulls":
        return _suffix_hulls(self.profile.distance_m, self.profile.elevation_m, self._sample_leg,
                             self._leg_lengths().size)

    def extra_required(self, position_m, height_per_metre, floor_m) -> np.ndarray:
        """How much the terrain raises the final-glide requirement at points of the path [m].

        Parameters
        ----------
        position_m : array_like, shape (n,)
            Distance along the path [m].
        height_per_metre : array_like, shape (n, L)
            The final glide's height used per metre on each leg [m/m].
        floor_m : array_like, shape (n,)
            Arrival floor: finish elevation plus the arrival margin [m MSL].

        Returns
        -------
        ndarray, shape (n,)
            ``max(0, max over the point and the samples ahead of (T + C - R))``, with ``R``
            the pure requirement (the suffix maximum of :func:`final_glide_clearance`);
            unknown terrain adds nothing here and is reported by :meth:`final_glide`.

        Notes
        -----
        On leg ``l`` the pure requirement at a sample ``j`` is
        ``R_j = F + h_l (E_l - s_j) + tail_{l+1}`` (``E_l`` the leg's end, ``tail`` the
        height used over the legs after it), so the shortfall there is
        ``T_j + h_l s_j`` plus a term that is the same for every sample of the leg. Its
        largest value over the leg's samples ahead of a point is reached at a vertex of
        the upper convex hull of the points ``(s_j, T_j)`` ahead, where the hull's edge
        slopes pass ``-h_l``. The hulls of every suffix of each leg are built once per
        path (:func:`_suffix_hulls`) and searched by binary lifting, so a call costs
        ``O(n L log J)`` for ``J`` samples instead of ``O(n J)``; the shortfall at the
        chosen sample is then computed exactly as the direct maximum would. Small batches
        (the planner's single flight: at most :data:`DIRECT_PAIRS_LIMIT` flight-sample
        pairs) take the direct maximum, which is cheaper than building the hulls.
        """
        position = np.atleast_1d(np.asarray(position_m, dtype=float))
        per_metre = np.broadcast_to(np.atleast_2d(np.asarray(height_per_metre, dtype=float)),
                                    (position.size, self._leg_lengths().size))
        floor = np.broadcast_to(np.asarray(floor_m, dtype=float), position.shape)
        p = self.profile
        tail = self._tail(per_metre)
        # The point itself, between samples: terrain interpolated, requirement exact.
        line = np.arange(position.size)
        here_leg = self._leg_of(position)
        here_required = (floor + per_metre[line, here_leg] * (p.vertex_distance_m[here_leg + 1] - position)
                         + tail[line, here_leg + 1])
        here = np.interp(position, p.distance_m, p.elevation_m) + self.clearance_m - here_required
        extra = np.where(np.isfinite(here), here, -np.inf)
        if position.size * p.distance_m.size <= DIRECT_PAIRS_LIMIT:
            ahead = self._shortfall_ahead_direct(position, per_metre, floor, tail)
        else:
            ahead = self._shortfall_ahead_hulls(position, per_metre, floor, tail)
        return np.maximum(np.maximum(extra, ahead), 0.0)

    def _shortfall_ahead_direct(self, position, per_metre, floor, tail) -> np.ndarray:
        """``max over samples j with s_j >= position of (T_j + C - R_j)`` per row (-inf for none),
        every sample evaluated."""
        p, leg = self.profile, self._sample_leg
        required = (floor[:, None] + per_metre[:, leg] * (p.vertex_distance_m[leg + 1] - p.distance_m)
                    + tail[:, leg + 1])
        shortfall = p.elevation_m + self.clearance_m - required
        ahead = np.isfinite(shortfall) & (p.distance_m >= position[:, None])
        return np.max(np.where(ahead, shortfall, -np.inf), axis=1)

    def _shortfall_ahead_hulls(self, position, per_metre, floor, tail) -> np.ndarray:
        """The same maximum, searched on the hulls of the samples ahead (see :meth:`extra_required`)."""
        p, hulls = self.profile, self._hulls
        first = np.searchsorted(p.distance_m, position, side="left")
        begin = np.maximum(first[:, None], hulls.leg_first[None, :])  # (n, L): first sample ahead on each leg
        inside = begin < hulls.leg_end[None, :]
        vertex = np.where(inside, hulls.start[np.minimum(begin, hulls.start.size - 1)], -1)
        rows, legs = np.nonzero(vertex >= 0)
        slope = per_metre[rows, legs]
        best = hulls.highest(vertex[rows, legs], slope)
        leg_end = p.vertex_distance_m[legs + 1]
        required = floor[rows] + slope * (leg_end - p.distance_m[best]) + tail[rows, legs + 1]
        shortfall = p.elevation_m[best] + self.clearance_m - required
        table = np.full(per_metre.shape, -np.inf)
        table[rows, legs] = np.where(np.isfinite(shortfall), shortfall, -np.inf)
        return table.max(axis=1)

    __call__ = extra_required

    def final_glide(self, start_m: float, height_per_metre, floor_m: float, *,
                    start_height_m: float | None = None, landmarks: Sequence = ()) -> FinalGlideTerrain:
        """The final glide from ``start_m`` along the path to the finish, checked over the terrain.

        Parameters
        ----------
        start_m : float
            Where the final glide starts, along the path [m].
        height_per_metre : array_like, shape (L,)
            The final glide's height used per metre on each leg [m/m].
        floor_m : float
            Finish elevation plus the arrival margin [m MSL].
        start_height_m : float, optional
            The height it starts at [m MSL]; default as high as the terrain demands.
        landmarks : sequence, optional
            Named places (turnpoints) to describe the obstacle.

        Returns
        -------
        FinalGlideTerrain
            Distances along the task path; ``raised_by_m`` equals :meth:`extra_required`
            at ``start_m`` for the same heights per metre.
        """
        distance, terrain, lats, lons, leg = self._ahead(float(start_m))
        required = self._required(distance, leg, np.asarray(height_per_metre, dtype=float), floor_m)
        return final_glide_clearance(distance, required, terrain, self.clearance_m, start_height_m=start_height_m,
                                     lats=lats, lons=lons, landmarks=landmarks, source=self.source)


# ---------------------------------------------------------------- the largest shortfall ahead, fast


@dataclass(frozen=True, eq=False)
class _SuffixHulls:
    """The upper convex hull of every suffix of each leg's known samples, as linked chains.

    The hull of the samples from ``i`` to the end of ``i``'s leg runs ``start[i]``,
    ``following[start[i]]``, ... to a sample that is its own follower; along a chain the
    edge slopes ``rise / run`` strictly decrease (a vertical first edge counts as
    steepest). ``levels[k]`` is the ``2**k``-th follower, for binary lifting; there are
    enough levels to walk the longest chain.
    """

    start: np.ndarray  # (J,) first known sample at or after i on i's leg; -1 when none
    following: np.ndarray  # (J,) the next hull vertex; itself at a chain's end
    rise: np.ndarray  # (J,) terrain gained along the edge to the next vertex [m]
    run: np.ndarray  # (J,) distance along that edge [m]
    ends: np.ndarray  # (J,) bool: the vertex ends its chain
    levels: tuple  # ndarray (J,) per level
    leg_first: np.ndarray  # (L,) first sample of each leg
    leg_end: np.ndarray  # (L,) one past its last sample

    def highest(self, vertex: np.ndarray, slope: np.ndarray) -> np.ndarray:
        """The vertex of each chain (starting at ``vertex``) that maximises ``T + slope s``.

        The objective rises along an edge while ``rise + slope run > 0``; the slopes
        decrease along a chain, so it rises over a prefix of the chain and the answer is
        the vertex where the prefix ends (found by binary lifting). NaN slopes rise
        nowhere: the answer is the chain's first vertex.
        """
        def rising(at):
            return ~self.ends[at] & (self.rise[at] + slope * self.run[at] > 0.0)

        climbing = rising(vertex)
        current = vertex
        for level in reversed(self.levels):
            candidate = level[current]
            current = np.where(climbing & rising(candidate), candidate, current)
        return np.where(climbing, self.following[current], current)


def _suffix_hulls(distance_m: np.ndarray, terrain_m: np.ndarray, leg: np.ndarray, legs: int) -> _SuffixHulls:
    """Build :class:`_SuffixHulls` (Andrew's monotone chain, run backwards over each leg).

    Scanning a leg from its end, the stack holds the upper hull of the samples scanned so
    far, leftmost on top; a new sample pops the vertices that no longer turn clockwise
    and links to the new top. Popped vertices keep their own links, so every suffix's
    hull stays readable: O(J) time and memory for all of them. Unknown terrain (NaN) is
    left out, as the direct maximum leaves it out.
    """
    s, t = distance_m.tolist(), terrain_m.tolist()
    count = len(s)
    start, following, depth = [-1] * count, list(range(count)), [1] * count
    leg_first = np.searchsorted(leg, np.arange(legs), side="left")
    leg_end = np.searchsorted(leg, np.arange(legs), side="right")
    for first, end in zip(leg_first.tolist(), leg_end.tolist()):
        stack: list[int] = []
        known = -1
        for i in range(end - 1, first - 1, -1):
            if not math.isfinite(t[i]):
                start[i] = known
                continue
            while stack:
                a = stack[-1]
                if s[a] == s[i]:  # a repeated position: only the higher sample can be the highest
                    if t[a] > t[i]:
                        break
                elif len(stack) < 2 or ((s[a] - s[i]) * (t[stack[-2]] - t[a])
                                        - (t[a] - t[i]) * (s[stack[-2]] - s[a])) < 0.0:
                    break  # a clockwise turn at a: a stays on the upper hull
                stack.pop()
            if stack:
                following[i], depth[i] = stack[-1], depth[stack[-1]] + 1
            stack.append(i)
            start[i] = known = i
    following_arr = np.asarray(following, dtype=np.intp)
    s_arr, t_arr = np.asarray(s, dtype=float), np.asarray(t, dtype=float)
    levels = [following_arr]
    while (1 << len(levels)) < max(depth, default=1):  # 2**K - 1 steps reach the end of the longest chain
        levels.append(levels[-1][levels[-1]])
    return _SuffixHulls(
        start=np.asarray(start, dtype=np.intp), following=following_arr,
        rise=t_arr[following_arr] - t_arr, run=s_arr[following_arr] - s_arr,
        ends=following_arr == np.arange(count), levels=tuple(levels),
        leg_first=leg_first.astype(np.intp), leg_end=leg_end.astype(np.intp),
    )


def path_terrain(terrain: Terrain, lats, lons, clearance_m: float, spacing_m: float = PATH_SPACING_M) -> PathTerrain:
    """Sample the terrain along a task's planned path (one vertex per task point) once.

    See :class:`PathTerrain`; ``clearance_m`` is the task's ``terrain_clearance_m`` [m].
    """
    if not (math.isfinite(clearance_m) and clearance_m >= 0.0):
        raise ValueError(f"clearance_m must be a finite number >= 0, got {clearance_m!r}")
    if np.size(lats) < 2:
        raise ValueError("a task path needs at least two points")
    return PathTerrain(sample_path(terrain, lats, lons, spacing_m), float(clearance_m))
