"""Elevation models: reading a raster in any CRS, caching it, and interpolating it.

A :class:`Terrain` holds one elevation band of a raster read with rasterio (imported
lazily, inside :func:`load_terrain` only: it is slow to import and only tasks with an
elevation model need it), its georeferencing and a cached WGS84 -> raster CRS
transformer. :meth:`Terrain.sample` interpolates it bilinearly at latitudes and
longitudes; cells without data and points outside the raster give NaN: unknown, never
sea level. :func:`load_terrain` keeps the last few models read.

Sampling along a path lives in :mod:`glidetask.engine.terrain_profile`; the clearance
of a glide over the ground in :mod:`glidetask.engine.clearance`.

Elevations are metres above mean sea level as the model gives them; the model's vertical
datum is taken to be mean sea level (the geoid), as it is for the common elevation
models, and no geoid correction is applied.
"""

from __future__ import annotations

import os
import threading
import warnings
from collections import OrderedDict
from dataclasses import dataclass, replace
from functools import lru_cache

import numpy as np
from pyproj import CRS, Transformer

from glidetask.engine.arrays import scalar_or_array
from glidetask.units import FOOT

_NEGLIGIBLE_WEIGHT = 1e-9
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
    file_key : tuple or None
        ``(absolute path, modification time [ns], size [bytes])`` of the file read: a value
        that names this model for caches (:func:`load_terrain` sets it); None for a model
        built in memory, which is then never cached.
    """

    source: str
    crs: str
    crs_wkt: str
    geographic: bool
    bounds: tuple[float, float, float, float]
    transform: tuple[float, float, float, float, float, float]
    elevation_m: np.ndarray
    file_key: tuple | None = None

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
        return scalar_or_array(result)

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
    terrain = replace(_read(name), file_key=key)
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
    return replace(terrain, source=source)


def _read(name: str) -> Terrain:
    import rasterio  # lazily: slow to import, and only tasks with an elevation model need it
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
            values = values * dtype(FOOT)
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
