"""Airspace volumes along a planned path: where the path is inside each, how high their
limits are there, how far they cap the working band, and where the plan conflicts with them.

A volume is a horizontal outline (one or more polygons, with holes) between a floor and a
ceiling given as the airspace file gives them (shared/CONTRACT.md 2.6): metres or feet above
mean sea level or above the ground, or a flight level. The engine keeps the limits as given
and converts them to metres MSL at the place they are needed (:func:`limit_msl_m`).

Geometry
--------
The file is GeoJSON, whose edges are straight lines in longitude/latitude (RFC 7946 [1]_,
section 3.1.1). Point-in-polygon and path crossings are therefore computed in
longitude/latitude itself, where those edges are exact; the planned path is a geodesic the
caller samples (the plan samples every 250 m or closer), and its chords between samples are
taken as straight there. The chord of a geodesic in longitude/latitude departs from it by
``L^2 tan(lat) / (8 R)``: 0.001 m for a 250 m chord and 2 m for a 10 km chord at 46 deg N,
far inside the 50 m this module promises for where a crossing starts and ends. Distances
along the path are the caller's cumulative geodesic distances, interpolated along each chord.
An airspace source that means geodesic edges differs from the straight-in-lon/lat edge by
``L^2 tan(lat) / (8 R)`` too (18 m at the middle of a 30 km east-west edge at 46 deg N):
long edges should be given with intermediate positions.

Rings follow the even-odd rule within one polygon (so holes are honoured whatever their
winding); the parts of a MultiPolygon are united. A polygon that crosses the antimeridian
must be split there (RFC 7946, 3.1.9); the reader refuses one that is not. A path that crosses
it is unwrapped, and volumes are tried at their longitude and 360 degrees either side.

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
from typing import Callable, Sequence

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
    def _edges(self) -> tuple:
        """Per polygon: its rings' edges as rows [lon0, lat0, lon1, lat1] (made when first needed)."""
        return tuple(np.concatenate([np.hstack([ring[:-1], ring[1:]]) for ring in polygon])
                     for polygon in self.polygons)

    def contains(self, lats, lons) -> np.ndarray:
        """Whether each point is inside the outline (on an edge counts as either) [bool array]."""
        lats = np.atleast_1d(np.asarray(lats, dtype=float))
        lons = np.atleast_1d(np.asarray(lons, dtype=float))
        inside = np.zeros(lats.shape, dtype=bool)
        for shift in _shifts(self.bbox, lons.min(), lons.max()):
            for edges in self._edges:
                inside |= _even_odd(edges, lons - shift, lats)
        return inside


def _shifts(bbox, lon_min: float, lon_max: float) -> list[float]:
    """Longitude shifts (of the points) under which they can fall in the box: 0, +-360."""
    out = []
    for shift in (0.0, -360.0, 360.0):
        if lon_max - shift >= bbox[0] and lon_min - shift <= bbox[2]:
            out.append(shift)
    return out


def _even_odd(edges: np.ndarray, x: np.ndarray, y: np.ndarray) -> np.ndarray:
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


# ---------------------------------------------------------------- crossings of a path


@dataclass(frozen=True)
class Stretch:
    """Where a path is inside one volume: from ``from_m`` to ``to_m`` along it [m]."""

    volume: int
    from_m: float
    to_m: float


def _unwrapped(lons: np.ndarray) -> np.ndarray:
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
    inside = bool(_even_odd(edges, x[:1], y[:1])[0])
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
    lons = _unwrapped(np.asarray(lons, dtype=float))
    distance_m = np.asarray(distance_m, dtype=float)
    out: list[Stretch] = []
    if lats.size == 0:
        return out
    for index in _met_by_chords(airspace, airspace.near(lats, lons), lats, lons):
        volume = airspace.volumes[index]
        found = []
        for shift in _shifts(volume.bbox, lons.min(), lons.max()):
            for edges in volume._edges:
                if lats.size == 1:
                    if _even_odd(edges, lons - shift, lats)[0]:
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


# ---------------------------------------------------------------- the rules the plan uses


@dataclass(frozen=True)
class Cap:
    """Where the band top is lowered by a volume overhead: [from_m, to_m], top [m MSL]."""

    from_m: float
    to_m: float
    top_m: float
    name: str


@dataclass(frozen=True)
class BandCap:
    """The band top along a sampled path, lowered under volumes (:func:`band_top_cap`).

    Attributes
    ----------
    top_m : ndarray
        The highest height the flight may use at each sample [m MSL]: the band top, or the
        lowest floor minus the margin of the volumes overhead in the band.
    volume : ndarray of int
        The volume that sets it at each sample, -1 where the band top holds.
    caps : tuple of Cap
        The lowered stretches that leave room above the band bottom, one per run of samples
        under the same volume (where no room is left, :func:`conflicts` reports it).
    agl_from_points : bool
        True when an AGL floor was placed over the nearest turnpoint's elevation (no terrain).
    """

    top_m: np.ndarray
    volume: np.ndarray
    caps: tuple
    agl_from_points: bool = False


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


def band_top_cap(airspace: Airspace, lats, lons, distance_m, band_top_m, band_bottom_m,
                 margin_m: float = DEFAULT_MARGIN_M, ground: GroundFunction | None = None,
                 isa_deviation_c: float = 0.0, ground_is_estimate: bool = False,
                 stretches: Sequence[Stretch] | None = None) -> BandCap:
    """The band top at each sample of a path, lowered under the volumes overhead.

    A volume caps the band where the path is inside its outline and it lies in the band:
    its floor minus ``margin_m`` is below the band top, and its ceiling plus ``margin_m`` is
    above the band bottom (a volume wholly below the band is flown over, not under). The top
    there is the lowest such floor minus the margin. Where it reaches the band bottom or
    below there is no room to climb and glide under it: :func:`conflicts` reports that.

    Parameters
    ----------
    band_top_m, band_bottom_m : float or array_like
        The working band at each sample [m MSL].
    margin_m : float
        Kept below every floor and above every ceiling [m] (default 100, common practice).
    ground, isa_deviation_c, ground_is_estimate
        See :func:`limits_along`.
    stretches : sequence of Stretch, optional
        From :func:`path_stretches`, if already computed.
    """
    lats = np.asarray(lats, dtype=float)
    distance_m = np.asarray(distance_m, dtype=float)
    top = np.broadcast_to(np.asarray(band_top_m, dtype=float), distance_m.shape).copy()
    bottom = np.broadcast_to(np.asarray(band_bottom_m, dtype=float), distance_m.shape)
    if stretches is None:
        stretches = path_stretches(airspace, lats, lons, distance_m)
    involved = np.array(sorted({s.volume for s in stretches}), dtype=int)
    setter = np.full(distance_m.shape, -1, dtype=int)
    if involved.size == 0:
        return BandCap(top, setter, (), False)
    limits = limits_along(airspace, lats, lons, ground, isa_deviation_c, ground_is_estimate, only=involved)
    inside = inside_mask(stretches, distance_m, involved)
    for k, i in enumerate(involved):
        lowered = limits.floor_m[k] - margin_m
        in_band = inside[k] & (lowered < top) & (limits.ceiling_m[k] + margin_m > bottom)
        top = np.where(in_band, lowered, top)
        setter = np.where(in_band, i, setter)
    caps = []
    shown = np.where(top > bottom, setter, -2)  # no room left: a conflict, not a cap
    changes = np.flatnonzero(np.diff(shown) != 0) + 1
    row = {int(v): k for k, v in enumerate(involved)}
    for run in np.split(np.arange(distance_m.size), changes):
        i = shown[run[0]]
        if i >= 0:
            start, end = _run_ends(run, inside[row[i]], distance_m, [s for s in stretches if s.volume == i])
            caps.append(Cap(start, end, float(top[run].min()), airspace.volumes[i].name))
    return BandCap(top, setter, tuple(caps), limits.agl_from_points)


def _run_ends(run: np.ndarray, inside: np.ndarray, distance_m: np.ndarray, own: list[Stretch]):
    """Ends of a run of samples [m]: where the path enters or leaves the volume when that is
    what starts or ends the run (found exactly by :func:`path_stretches`), else the samples."""
    first, last = int(run[0]), int(run[-1])
    start, end = float(distance_m[first]), float(distance_m[last])
    if first == 0 or not inside[first - 1]:
        start = min((s.from_m for s in own if s.from_m <= start + 1e-6 and s.to_m >= start), default=start)
    if last == distance_m.size - 1 or not inside[last + 1]:
        end = max((s.to_m for s in own if s.from_m <= end and s.to_m >= end - 1e-6), default=end)
    return start, end


@dataclass(frozen=True)
class Conflict:
    """A stretch of the planned flight inside a volume (contract 5.3 ``airspace.conflicts``).

    Heights in metres MSL; ``floor_m``/``ceiling_m`` the lowest floor and highest ceiling on
    the stretch (they vary with the ground for AGL limits; a floor at unknown ground is
    -inf); ``no_room`` when the band capped by the volume falls to the band bottom or below
    somewhere on the stretch (whatever the planned heights), ``from_ground`` when its floor
    is the ground.
    """

    name: str
    airspace_class: str | None
    leg: int
    from_m: float
    to_m: float
    floor_m: float
    ceiling_m: float
    planned_min_m: float
    planned_max_m: float
    no_room: bool
    volume: int
    from_ground: bool = False


@dataclass(frozen=True)
class AirspaceCheck:
    """All the airspace facts of one planned flight or glide."""

    source: str
    conflicts: tuple
    caps: tuple
    stretches: tuple
    agl_from_points: bool = False

    @property
    def ok(self) -> bool:
        return not self.conflicts


def conflicts(airspace: Airspace, lats, lons, distance_m, profile_distance_m, profile_height_m,
              leg_starts_m: Sequence[float] = (0.0,), margin_m: float = DEFAULT_MARGIN_M,
              band_bottom_m=None, ground: GroundFunction | None = None, isa_deviation_c: float = 0.0,
              ground_is_estimate: bool = False, stretches: Sequence[Stretch] | None = None) -> list[Conflict]:
    """The planned flight's conflicts with the volumes along its path.

    A point of the flight conflicts with a volume when it is inside the outline and its
    planned height is above the floor minus ``margin_m`` and below the ceiling plus
    ``margin_m``; with ``band_bottom_m`` given, also where the volume leaves no room in the
    band (floor minus margin at or below the band bottom, ceiling plus margin above it),
    whatever height the profile shows there. Runs of such points make one conflict each,
    split where a leg ends.

    Parameters
    ----------
    lats, lons, distance_m : array_like
        The path's samples (as for :func:`path_stretches`).
    profile_distance_m, profile_height_m : array_like
        The planned height along the path [m, m MSL]; a climb repeats its distance.
    leg_starts_m : sequence of float
        Distance along the path where each leg starts [m]; legs are numbered from 1.
    band_bottom_m : float or array_like, optional
        The band bottom at each path sample [m MSL], for the no-room rule.

    Notes
    -----
    The profile's heights are evaluated at its own points and where it enters and leaves
    each outline; a vertical entry between two profile points is placed by linear
    interpolation, so conflicts start and end within the profile's sample spacing.
    """
    lats = np.asarray(lats, dtype=float)
    lons = np.asarray(lons, dtype=float)
    distance_m = np.asarray(distance_m, dtype=float)
    pd = np.asarray(profile_distance_m, dtype=float)
    ph = np.asarray(profile_height_m, dtype=float)
    if stretches is None:
        stretches = path_stretches(airspace, lats, lons, distance_m)
    leg_starts = np.asarray(leg_starts_m, dtype=float)
    unwrapped = _unwrapped(lons)
    out: list[Conflict] = []
    for s in stretches:
        volume = airspace.volumes[s.volume]
        within = (pd > s.from_m) & (pd < s.to_m)
        d = np.concatenate([[s.from_m], pd[within], [s.to_m]])
        h = np.concatenate([[np.interp(s.from_m, pd, ph)], ph[within], [np.interp(s.to_m, pd, ph)]])
        at_lats = np.interp(d, distance_m, lats)
        at_lons = np.interp(d, distance_m, unwrapped)
        at_lons = (at_lons + 180.0) % 360.0 - 180.0
        limits = limits_along(airspace, at_lats, at_lons, ground, isa_deviation_c, ground_is_estimate,
                              only=np.array([s.volume]))
        low = limits.floor_m[0] - margin_m
        high = limits.ceiling_m[0] + margin_m
        room = np.minimum(h - low, high - h)  # > 0: inside vertically
        clash = room > 0.0
        closed = np.zeros(d.shape, dtype=bool)
        if band_bottom_m is not None:
            bottom = np.interp(d, distance_m, np.broadcast_to(np.asarray(band_bottom_m, float), distance_m.shape))
            closed = (low <= bottom) & (high > bottom)
            clash |= closed
        out += _runs(volume, s.volume, d, h, room, clash, closed, limits.floor_m[0], limits.ceiling_m[0],
                     leg_starts)
    return sorted(out, key=lambda c: (c.from_m, c.volume))


def _runs(volume: Volume, index: int, d, h, room, clash, closed, floor, ceiling, leg_starts) -> list[Conflict]:
    """Conflicts from the runs of clashing points, their ends placed where ``room`` is zero."""
    out = []
    if not clash.any():
        return out
    edges = np.flatnonzero(np.diff(clash.astype(int)) != 0) + 1
    for run in np.split(np.arange(d.size), edges):
        if not clash[run[0]]:
            continue
        first, last = run[0], run[-1]
        start, end = d[first], d[last]
        if first > 0 and room[first] > 0.0 >= room[first - 1]:  # entered vertically between points
            start = _zero(d[first - 1], d[first], room[first - 1], room[first])
        if last < d.size - 1 and room[last] > 0.0 >= room[last + 1]:
            end = _zero(d[last], d[last + 1], room[last], room[last + 1])
        heights = np.concatenate([h[run], [np.interp(start, d, h), np.interp(end, d, h)]])
        pieces = _split_at_legs(start, end, leg_starts)
        no_room = bool(np.any(closed[run]))
        for leg, a, b in pieces:
            out.append(Conflict(volume.name, volume.airspace_class, leg, float(a), float(b),
                                float(np.nanmin(floor[run])), float(np.nanmax(ceiling[run])),
                                float(heights.min()), float(heights.max()), no_room, index,
                                volume.floor.is_ground))
    return out


def _zero(d0, d1, r0, r1) -> float:
    """Where a quantity linear between (d0, r0) and (d1, r1) is zero."""
    if r1 == r0:
        return float(d1)
    return float(d0 + (d1 - d0) * (0.0 - r0) / (r1 - r0))


def _split_at_legs(start: float, end: float, leg_starts: np.ndarray) -> list[tuple[int, float, float]]:
    """``(leg, from, to)`` pieces of [start, end]; legs are numbered from 1."""
    first = max(int(np.searchsorted(leg_starts, start, side="right")), 1)
    last = max(int(np.searchsorted(leg_starts, end, side="left")), 1)
    pieces = []
    for leg in range(first, last + 1):
        a = max(start, leg_starts[leg - 1]) if leg - 1 < leg_starts.size else start
        b = min(end, leg_starts[leg]) if leg < leg_starts.size else end
        if b > a or (start == end):
            pieces.append((leg, a, b))
    return pieces or [(first, start, end)]


def check_path(airspace: Airspace, lats, lons, distance_m, profile_distance_m, profile_height_m, *,
               band_top_m=None, band_bottom_m=None, leg_starts_m: Sequence[float] = (0.0,),
               margin_m: float = DEFAULT_MARGIN_M, ground: GroundFunction | None = None,
               isa_deviation_c: float = 0.0, ground_is_estimate: bool = False) -> AirspaceCheck:
    """Stretches, band caps (when a band is given) and conflicts of one path, in one call."""
    stretches = path_stretches(airspace, lats, lons, distance_m)
    caps: tuple = ()
    agl = False
    if band_top_m is not None and band_bottom_m is not None:
        cap = band_top_cap(airspace, lats, lons, distance_m, band_top_m, band_bottom_m, margin_m, ground,
                           isa_deviation_c, ground_is_estimate, stretches)
        caps, agl = cap.caps, cap.agl_from_points
    found = conflicts(airspace, lats, lons, distance_m, profile_distance_m, profile_height_m, leg_starts_m,
                      margin_m, band_bottom_m, ground, isa_deviation_c, ground_is_estimate, stretches)
    used_agl = any(airspace.volumes[s.volume].floor.is_agl or airspace.volumes[s.volume].ceiling.is_agl
                   for s in stretches)
    return AirspaceCheck(airspace.source, tuple(found), caps, tuple(stretches),
                         agl or (used_agl and ground is not None and ground_is_estimate))
