"""Airspace volumes and their heights: the outlines, and the floors and ceilings in metres.

A volume is a horizontal outline (one or more polygons, with holes) between a floor and a
ceiling given as the airspace file gives them (shared/CONTRACT.md 2.6): metres or feet above
mean sea level or above the ground, or a flight level. The engine keeps the limits as given
and converts them to metres MSL at the place they are needed (:func:`limit_msl_m`,
:func:`limits_along`).

Where a path crosses the outlines is :mod:`glidetask.engine.airspace_crossings`; what the
plan makes of it (the band top capped under a volume, the conflicts of a planned flight)
is :mod:`glidetask.engine.airspace_conflicts`.

Outlines
--------
The file is GeoJSON, whose edges are straight lines in longitude/latitude (RFC 7946 [1]_,
section 3.1.1): point-in-polygon is computed in longitude/latitude itself, where those
edges are exact. Rings follow the even-odd rule within one polygon (so holes are honoured
whatever their winding); the parts of a MultiPolygon are united. A polygon that crosses the
antimeridian must be split there (RFC 7946, 3.1.9); the reader refuses one that is not.
Points are tried at their longitude and 360 degrees either side.

Heights
-------
Flight levels are pressure altitudes (hundreds of feet) on the standard setting, 1013.25 hPa;
they are converted to heights above mean sea level for a day whose sea-level pressure is
standard and whose temperature departs from ISO 2533 [2]_ by a constant ISA deviation (the
hypsometric equation, :func:`flight_level_msl_m`). AGL limits use a ground elevation function;
without a terrain model the caller passes the elevation of the nearest turnpoint
(:func:`nearest_point_ground`) and says so.

References
----------
.. [1] H. Butler et al., RFC 7946, The GeoJSON Format, IETF, 2016.
.. [2] ISO 2533:1975, Standard Atmosphere (also ICAO Doc 7488/3).
"""

from __future__ import annotations

from dataclasses import dataclass, field
from functools import cached_property, lru_cache
from typing import Callable

import numpy as np

from glidetask.engine.atmosphere import EARTH_RADIUS_M, LAPSE_KM, T0_K, TROPOPAUSE_M

FOOT_M = 0.3048  # international foot [m]
UNITS = ("m", "ft", "FL")
REFS = ("MSL", "AGL")
#: Class letters and kinds an airspace file may give (contract 2.6).
CLASSES = ("A", "B", "C", "D", "E", "F", "G", "danger", "restricted", "prohibited")
#: Vertical margin kept below every floor and above every ceiling when the task gives none
#: [m] (common practice).
DEFAULT_MARGIN_M = 100.0

GroundFunction = Callable[[np.ndarray, np.ndarray], np.ndarray]



# ---------------------------------------------------------------- limits


@dataclass(frozen=True)
class Limit:
    """A floor or ceiling as the airspace file gives it.

    Attributes
    ----------
    value : float
        The number [m, ft or flight level].
    unit : str
        ``"m"``, ``"ft"`` or ``"FL"``.
    ref : str or None
        ``"MSL"`` or ``"AGL"``; None for a flight level.
    """

    value: float
    unit: str
    ref: str | None = None

    @property
    def is_ground(self) -> bool:
        """True for the ground itself (0 above the ground)."""
        return self.ref == "AGL" and self.value == 0.0

    @property
    def is_agl(self) -> bool:
        return self.ref == "AGL"


def flight_level_msl_m(flight_level, isa_deviation_c=0.0):
    """Height above mean sea level of a flight level on a day with an ISA deviation [m].

    Parameters
    ----------
    flight_level : float or array_like
        Flight level [hundreds of feet of pressure altitude on 1013.25 hPa].
    isa_deviation_c : float, default 0
        The day's temperature above the ISO 2533 standard, taken as constant with height [K].

    Returns
    -------
    float or ndarray
        Geometric height above mean sea level [m], for a sea-level pressure of 1013.25 hPa.

    Notes
    -----
    The pressure altitude ``Hp`` is a geopotential altitude of the standard atmosphere. On a
    day ``dT`` warmer than standard at every pressure, the hypsometric equation makes each
    layer thicker in the ratio ``(T + dT)/T``, so the geopotential height of that pressure is
    ``H = Hp + dT * integral(0..Hp) dh / T(h)``: in the troposphere ``T = T0 - L h`` and the
    integral is ``ln(T0 / (T0 - L Hp)) / L``; above 11 km it grows by ``(Hp - 11000)/T11``
    [1]_. The geometric height is ``r H / (r - H)`` with ``r = 6 356 766 m`` (ISO 2533).
    A sea-level pressure below standard lowers every flight level by about 8 m per hPa; the
    pressure of the day is not known here (the plan assumes standard, as for density).

    References
    ----------
    .. [1] ISO 2533:1975, Standard Atmosphere, equations for ``T(H)`` and ``p(H)``.
    """
    hp = np.asarray(flight_level, dtype=float) * 100.0 * FOOT_M
    dt = np.asarray(isa_deviation_c, dtype=float)
    low = np.minimum(hp, TROPOPAUSE_M)
    t11 = T0_K - LAPSE_KM * TROPOPAUSE_M
    with np.errstate(invalid="ignore", divide="ignore"):
        integral = np.log(T0_K / (T0_K - LAPSE_KM * low)) / LAPSE_KM
        integral = integral + np.maximum(hp - TROPOPAUSE_M, 0.0) / t11
    geopotential = hp + dt * integral
    result = EARTH_RADIUS_M * geopotential / (EARTH_RADIUS_M - geopotential)
    return float(result) if np.ndim(result) == 0 else result


@lru_cache(maxsize=256)
def _flight_level_m(flight_level: float, isa_deviation_c: float) -> float:
    """:func:`flight_level_msl_m` of one level, remembered (a file has few distinct levels)."""
    return flight_level_msl_m(flight_level, isa_deviation_c)


def limit_msl_m(limit: Limit, ground_m=None, isa_deviation_c: float = 0.0):
    """A limit as a height above mean sea level [m] at places with ground elevation ``ground_m``.

    ``ground_m`` [m MSL] (scalar or array) is only used for AGL limits; where it is NaN, or
    None is given for an AGL limit, the result is NaN (unknown). The result has the shape of
    ``ground_m`` (a float for a scalar or None).
    """
    ground = np.asarray(np.nan if ground_m is None else ground_m, dtype=float)
    if limit.unit == "FL":
        value = np.broadcast_to(_flight_level_m(float(limit.value), float(isa_deviation_c)), ground.shape)
    else:
        metres = limit.value * (FOOT_M if limit.unit == "ft" else 1.0)
        value = ground + metres if limit.ref == "AGL" else np.broadcast_to(metres, ground.shape)
    value = np.array(value, dtype=float)
    return float(value) if value.ndim == 0 else value


def nearest_point_ground(lats, lons, elevations_m) -> GroundFunction:
    """A ground elevation function that gives the elevation of the nearest of some points.

    Used for AGL limits without a terrain model (contract 2.6: the nearest turnpoint's
    elevation). Nearness is measured on a local equirectangular grid: choosing the nearest of
    a few turnpoints needs no more.
    """
    lats = np.asarray(lats, dtype=float)
    lons = np.asarray(lons, dtype=float)
    elevations = np.asarray(elevations_m, dtype=float)

    def ground(at_lats, at_lons):
        at_lats = np.atleast_1d(np.asarray(at_lats, dtype=float))
        at_lons = np.atleast_1d(np.asarray(at_lons, dtype=float))
        if lats.size == 0:
            return np.full(at_lats.shape, np.nan)
        coslat = np.cos(np.radians(at_lats))[:, None]
        dlon = (at_lons[:, None] - lons[None, :] + 180.0) % 360.0 - 180.0
        d2 = (at_lats[:, None] - lats[None, :]) ** 2 + (dlon * coslat) ** 2
        return elevations[np.argmin(d2, axis=1)]

    return ground


# ---------------------------------------------------------------- volumes


@dataclass(frozen=True)
class Volume:
    """One airspace volume.

    Attributes
    ----------
    name : str
    airspace_class : str or None
        ICAO class letter or kind (:data:`CLASSES`), None if the file gives none.
    floor, ceiling : Limit
        As given in the file.
    polygons : tuple of tuple of ndarray
        Each polygon a tuple of rings (the first the outline, the rest holes), each ring an
        ``(n, 2)`` array of ``[lon, lat]`` [deg] whose last position repeats the first.
    note : str
    """

    name: str
    airspace_class: str | None
    floor: Limit
    ceiling: Limit
    polygons: tuple
    note: str = ""

    @cached_property
    def bbox(self) -> tuple:
        """[lon_min, lat_min, lon_max, lat_max] of the outlines [deg] (holes lie inside them)."""
        outlines = np.concatenate([polygon[0] for polygon in self.polygons])
        low, high = outlines.min(axis=0), outlines.max(axis=0)
        return float(low[0]), float(low[1]), float(high[0]), float(high[1])

    @cached_property
    def ring_edges(self) -> tuple:
        """Per polygon: its rings' edges as rows [lon0, lat0, lon1, lat1] (made when first needed)."""
        return tuple(np.concatenate([np.hstack([ring[:-1], ring[1:]]) for ring in polygon])
                     for polygon in self.polygons)

    def contains(self, lats, lons) -> np.ndarray:
        """Whether each point is inside the outline (on an edge counts as either) [bool array]."""
        lats = np.atleast_1d(np.asarray(lats, dtype=float))
        lons = np.atleast_1d(np.asarray(lons, dtype=float))
        inside = np.zeros(lats.shape, dtype=bool)
        for shift in lon_shifts(self.bbox, lons.min(), lons.max()):
            for edges in self.ring_edges:
                inside |= even_odd_inside(edges, lons - shift, lats)
        return inside


def lon_shifts(bbox, lon_min: float, lon_max: float) -> list[float]:
    """Longitude shifts (of the points) under which they can fall in the box: 0, +-360."""
    out = []
    for shift in (0.0, -360.0, 360.0):
        if lon_max - shift >= bbox[0] and lon_min - shift <= bbox[2]:
            out.append(shift)
    return out


def even_odd_inside(edges: np.ndarray, x: np.ndarray, y: np.ndarray) -> np.ndarray:
    """Even-odd point-in-polygon test of points (x, y) against edges [x0, y0, x1, y1]."""
    x0, y0, x1, y1 = (edges[:, k][None, :] for k in range(4))
    px, py = x[:, None], y[:, None]
    straddles = (y0 > py) != (y1 > py)
    with np.errstate(divide="ignore", invalid="ignore"):
        x_cross = x0 + (py - y0) * (x1 - x0) / (y1 - y0)
    return np.count_nonzero(straddles & (px < x_cross), axis=1) % 2 == 1


@dataclass(frozen=True)
class Airspace:
    """A set of volumes with a bounding-box index.

    Attributes
    ----------
    volumes : tuple of Volume
    source : str
        Where they came from (the file name), for the output.
    boxes : ndarray
        ``(n, 4)`` [lon_min, lat_min, lon_max, lat_max] of each volume [deg].
    """

    volumes: tuple
    source: str = ""
    boxes: np.ndarray = field(init=False, repr=False, compare=False)

    def __post_init__(self):
        boxes = np.array([v.bbox for v in self.volumes], dtype=float).reshape(-1, 4)
        object.__setattr__(self, "boxes", boxes)

    def near(self, lats, lons, pad_deg: float = 0.0) -> np.ndarray:
        """Indices of the volumes whose box meets the box of these points (padded) [int array]."""
        lats = np.asarray(lats, dtype=float)
        lons = np.asarray(lons, dtype=float)
        if not len(self.volumes) or lats.size == 0:
            return np.zeros(0, dtype=int)
        b = self.boxes
        lat_ok = (b[:, 1] <= lats.max() + pad_deg) & (b[:, 3] >= lats.min() - pad_deg)
        lon_ok = np.zeros(len(b), dtype=bool)
        for shift in (0.0, -360.0, 360.0):
            lon_ok |= (b[:, 0] <= lons.max() - shift + pad_deg) & (b[:, 2] >= lons.min() - shift - pad_deg)
        return np.flatnonzero(lat_ok & lon_ok)


# ---------------------------------------------------------------- heights along a path


@dataclass(frozen=True)
class Limits:
    """Floors and ceilings of some volumes at each sample [m MSL], ``(len(volumes), samples)``:
    row k belongs to the volume ``volumes[k]``."""

    volumes: np.ndarray
    floor_m: np.ndarray
    ceiling_m: np.ndarray
    agl_from_points: bool


def limits_along(airspace: Airspace, lats, lons, ground: GroundFunction | None = None,
                 isa_deviation_c: float = 0.0, ground_is_estimate: bool = False,
                 only: np.ndarray | None = None) -> Limits:
    """Every volume's floor and ceiling at each sample [m MSL] (NaN where AGL and no ground,
    except a floor at the ground itself: -inf there, below any flight).

    ``only`` (volume indices) limits the work to those volumes; the others get NaN.
    ``ground_is_estimate`` marks ``ground`` as the nearest turnpoint's elevation.
    """
    lats = np.atleast_1d(np.asarray(lats, dtype=float))
    lons = np.atleast_1d(np.asarray(lons, dtype=float))
    indices = np.arange(len(airspace.volumes)) if only is None else np.asarray(only, dtype=int)
    floor = np.full((indices.size, lats.size), np.nan)
    ceiling = np.full((indices.size, lats.size), np.nan)
    ground_m = None
    used_agl = False
    unknown = np.full(lats.shape, np.nan)
    for k, i in enumerate(indices):
        volume = airspace.volumes[i]
        if (volume.floor.is_agl or volume.ceiling.is_agl) and ground_m is None and ground is not None:
            ground_m = np.asarray(ground(lats, lons), dtype=float)
        used_agl |= volume.floor.is_agl or volume.ceiling.is_agl
        under = ground_m if ground_m is not None else unknown
        floor[k] = limit_msl_m(volume.floor, under, isa_deviation_c)
        ceiling[k] = limit_msl_m(volume.ceiling, under, isa_deviation_c)
        if volume.floor.is_ground:  # from the ground: below any flight, even where the ground is unknown
            floor[k] = np.where(np.isnan(floor[k]), -np.inf, floor[k])
    return Limits(indices, floor, ceiling, bool(used_agl and ground is not None and ground_is_estimate))
