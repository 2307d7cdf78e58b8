"""Observation zones of a gliding task, on the WGS84 ellipsoid.

The zone shapes are those of the FAI Sporting Code, Section 3 (Gliding), Annex A [1]_:

``line``
    A start or finish line of total length L, centred on the point and perpendicular to
    the adjacent leg (for a start: the first leg; for a finish: the last leg).
``cylinder``
    All points within radius R of the point (a start, turn or finish).
``sector``
    The FAI sector: points within radius R whose azimuth seen from the point is within
    angle/2 of the outward bisector of the inbound and outbound legs (angle 90 deg unless set).
``keyhole``
    A sector (default R = 10 km, 90 deg) together with a small cylinder (default 0.5 km).
``area_cylinder``
    An assigned area: a cylinder of radius R around the point.
``area_sector``
    An assigned area between two radials, clockwise from ``radial_from_deg`` to
    ``radial_to_deg`` (azimuths seen from the point), and between an inner and an outer
    radius (equal radials: the full ring).

Every zone is described in polar coordinates about its point: the azimuth seen from the
point [deg true] and the geodesic distance from it [m]. Sectors and lines also need an
*axis* [deg true] that depends on the neighbouring task points (:func:`zone_axes`): for a
line, the course of the adjacent leg at the point; for a sector or keyhole, the outward
bisector. Other kinds ignore the axis.

References
----------
.. [1] FAI Sporting Code, Section 3 - Gliding, Annex A "Rules for World and Continental
   Gliding Championships", observation zones and start/finish procedures (from memory of
   the zone definitions; editions of 2019-2023).
"""

from __future__ import annotations

import math
from dataclasses import dataclass
from functools import cached_property

import numpy as np

from glidetask.engine import geodesy

ZONE_KINDS = ("line", "cylinder", "sector", "keyhole", "area_cylinder", "area_sector")
START_FINISH_KINDS = ("line", "cylinder")
TURN_KINDS = ("cylinder", "sector", "keyhole")
AREA_KINDS = ("area_cylinder", "area_sector")

KEYHOLE_SECTOR_RADIUS_M = 10_000.0  # contract 2.3 keyhole defaults
KEYHOLE_CYLINDER_RADIUS_M = 500.0
SECTOR_ANGLE_DEG = 90.0


@dataclass(frozen=True)
class Zone:
    """One observation zone; sizes in metres, angles in degrees.

    Attributes
    ----------
    kind : str
        One of :data:`ZONE_KINDS`.
    radius_m : float
        Radius of a cylinder, of a sector, of a keyhole's sector, or the outer radius of
        an area zone [m]. Unused for a line.
    length_m : float
        Total length of a line [m], centred on the point. Unused otherwise.
    angle_deg : float
        Opening angle of a sector or a keyhole's sector [deg], symmetric about the axis.
    cylinder_radius_m : float
        Radius of a keyhole's cylinder [m].
    inner_radius_m : float
        Inner radius of an area sector [m] (0 for a plain sector).
    radial_from_deg, radial_to_deg : float
        An area sector's radials [deg true]; the sector runs clockwise from the first
        to the second (equal values: the full ring).

    Use the constructors (:meth:`line`, :meth:`cylinder`, ...) rather than the fields.
    """

    kind: str
    radius_m: float = 0.0
    length_m: float = 0.0
    angle_deg: float = SECTOR_ANGLE_DEG
    cylinder_radius_m: float = KEYHOLE_CYLINDER_RADIUS_M
    inner_radius_m: float = 0.0
    radial_from_deg: float = 0.0
    radial_to_deg: float = 0.0

    def __post_init__(self):
        if self.kind not in ZONE_KINDS:
            raise ValueError(f"unknown zone kind {self.kind!r}; expected one of {', '.join(ZONE_KINDS)}")
        sizes = (self.radius_m, self.length_m, self.angle_deg, self.cylinder_radius_m,
                 self.inner_radius_m, self.radial_from_deg, self.radial_to_deg)
        if not all(math.isfinite(v) for v in sizes):
            raise ValueError(f"{self.kind} zone sizes must be finite numbers")
        if self.kind == "line":
            if self.length_m <= 0.0:
                raise ValueError(f"a line needs a positive length, got {self.length_m:g} m")
        elif self.radius_m <= 0.0:
            raise ValueError(f"a {self.kind} needs a positive radius, got {self.radius_m:g} m")
        if self.kind in ("sector", "keyhole") and not 0.0 < self.angle_deg <= 360.0:
            raise ValueError(f"a sector angle must be in (0, 360] degrees, got {self.angle_deg:g}")
        if self.kind == "keyhole" and self.cylinder_radius_m <= 0.0:
            raise ValueError(f"a keyhole cylinder needs a positive radius, got {self.cylinder_radius_m:g} m")
        if self.kind == "area_sector" and not 0.0 <= self.inner_radius_m < self.radius_m:
            raise ValueError(f"an area sector's inner radius must be in [0, radius), "
                             f"got {self.inner_radius_m:g} m with radius {self.radius_m:g} m")

    # ---------------------------------------------------------------- constructors

    @classmethod
    def line(cls, length_m: float) -> "Zone":
        """A start/finish line of total length ``length_m`` [m], centred, perpendicular to its leg."""
        return cls("line", length_m=float(length_m))

    @classmethod
    def cylinder(cls, radius_m: float) -> "Zone":
        """A cylinder of radius ``radius_m`` [m]."""
        return cls("cylinder", radius_m=float(radius_m))

    @classmethod
    def sector(cls, radius_m: float, angle_deg: float = SECTOR_ANGLE_DEG) -> "Zone":
        """A sector of radius ``radius_m`` [m] and opening ``angle_deg`` about the outward bisector."""
        return cls("sector", radius_m=float(radius_m), angle_deg=float(angle_deg))

    @classmethod
    def keyhole(cls, radius_m: float = KEYHOLE_SECTOR_RADIUS_M, angle_deg: float = SECTOR_ANGLE_DEG,
                cylinder_radius_m: float = KEYHOLE_CYLINDER_RADIUS_M) -> "Zone":
        """A keyhole: a sector (default 10 km, 90 deg) plus a cylinder (default 0.5 km)."""
        return cls("keyhole", radius_m=float(radius_m), angle_deg=float(angle_deg),
                   cylinder_radius_m=float(cylinder_radius_m))

    @classmethod
    def area_cylinder(cls, radius_m: float) -> "Zone":
        """An assigned-area cylinder of radius ``radius_m`` [m]."""
        return cls("area_cylinder", radius_m=float(radius_m))

    @classmethod
    def area_sector(cls, radius_m: float, radial_from_deg: float, radial_to_deg: float,
                    inner_radius_m: float = 0.0) -> "Zone":
        """An assigned-area sector clockwise from ``radial_from_deg`` to ``radial_to_deg``."""
        return cls("area_sector", radius_m=float(radius_m), inner_radius_m=float(inner_radius_m),
                   radial_from_deg=float(radial_from_deg) % 360.0, radial_to_deg=float(radial_to_deg) % 360.0)

    # ---------------------------------------------------------------- derived sizes

    @property
    def is_area(self) -> bool:
        return self.kind in AREA_KINDS

    @property
    def reach_m(self) -> float:
        """The farthest any point of the zone lies from its centre [m]."""
        if self.kind == "line":
            return self.length_m / 2.0
        if self.kind == "keyhole":
            return max(self.radius_m, self.cylinder_radius_m)
        return self.radius_m

    @property
    def span_deg(self) -> float:
        """Clockwise angle from ``radial_from_deg`` to ``radial_to_deg`` of an area sector [deg]."""
        span = (self.radial_to_deg - self.radial_from_deg) % 360.0
        return 360.0 if span == 0.0 else span


# ---------------------------------------------------------------- orientation


def _outward_bisector(azimuth_in_deg: float | None, azimuth_out_deg: float | None) -> float:
    """Outward bisector [deg] of the directions from a turnpoint back to the previous and on
    to the next point (either may be missing: then directly away from the other)."""
    if azimuth_in_deg is None and azimuth_out_deg is None:
        return 0.0
    if azimuth_in_deg is None or azimuth_out_deg is None:
        known = azimuth_in_deg if azimuth_out_deg is None else azimuth_out_deg
        return (known + 180.0) % 360.0
    a, b = math.radians(azimuth_in_deg), math.radians(azimuth_out_deg)
    east, north = math.sin(a) + math.sin(b), math.cos(a) + math.cos(b)
    if math.hypot(east, north) < 1e-9:  # no turn at all: of the two perpendiculars, the one
        # between north (included) and south (excluded) through east, the same whichever way
        # the task is flown
        return (azimuth_out_deg + 90.0) % 180.0
    return (math.degrees(math.atan2(-east, -north))) % 360.0


def zone_axes(lats, lons, zones) -> tuple[float, ...]:
    """The axis of every zone of a task [deg true], resolved from the neighbouring points.

    Parameters
    ----------
    lats, lons : sequence of float
        The task points (zone centres) in order [deg].
    zones : sequence of Zone
        Their zones.

    Returns
    -------
    tuple of float
        For a line: the course of the adjacent leg at the point (a start: the first leg's
        azimuth on leaving it; a finish: the last leg's azimuth on arriving). For a sector
        or keyhole: the outward bisector of the legs (the mean direction away from the
        previous and the next point); where the legs run straight through, the
        perpendicular that lies in [0, 180) deg. 0 for the other kinds. Coincident
        neighbours are skipped to the nearest distinct point; with none, 0.

    Notes
    -----
    Sporting Code Section 3 Annex A [1]_ orients the sector "symmetrically about the
    bisector of the inbound and outbound legs, away from the task"; a start line is
    "perpendicular to the course to the first turnpoint" and a finish line to the course
    from the last turnpoint (wording from memory).
    """
    lats = np.asarray(lats, dtype=float)
    lons = np.asarray(lons, dtype=float)
    n = len(lats)
    if n < 2:
        return tuple(0.0 for _ in range(n))
    # Azimuths between consecutive points and which legs have length.
    dist, az_out, az_end = geodesy.inverse(lats[:-1], lons[:-1], lats[1:], lons[1:])
    dist, az_out, az_end = np.atleast_1d(dist), np.atleast_1d(az_out), np.atleast_1d(az_end)
    real = dist > 0.5  # metres: closer points count as the same place

    def towards_next(i):  # azimuth at point i towards the next distinct point
        for j in range(i, n - 1):
            if real[j]:
                if j == i:
                    return float(az_out[i])
                return float(geodesy.inverse(lats[i], lons[i], lats[j + 1], lons[j + 1])[1])
        return None

    def towards_previous(i):  # azimuth at point i back towards the previous distinct point
        for j in range(i - 1, -1, -1):
            if real[j]:
                if j == i - 1:
                    return float((az_end[j] + 180.0) % 360.0)
                return float(geodesy.inverse(lats[i], lons[i], lats[j], lons[j])[1])
        return None

    axes = []
    for i, zone in enumerate(zones):
        if zone.kind == "line":
            if i == 0:
                out = towards_next(0)
                axes.append(0.0 if out is None else out)
            else:
                back = towards_previous(i)
                axes.append(0.0 if back is None else (back + 180.0) % 360.0)
        elif zone.kind in ("sector", "keyhole"):
            axes.append(_outward_bisector(towards_previous(i), towards_next(i)))
        else:
            axes.append(0.0)
    return tuple(axes)


# ---------------------------------------------------------------- polar shape description


@dataclass(frozen=True)
class Piece:
    """A piece of a zone boundary in polar coordinates about the zone's point: from
    (``azimuth0_deg``, ``r0_m``) to (``azimuth1_deg``, ``r1_m``), both linear in the
    piece parameter (a radial: fixed azimuth; an arc: fixed distance, azimuth unwrapped)."""

    azimuth0_deg: float
    azimuth1_deg: float
    r0_m: float
    r1_m: float

    @property
    def length_m(self) -> float:
        arc = math.radians(abs(self.azimuth1_deg - self.azimuth0_deg)) * 0.5 * (self.r0_m + self.r1_m)
        return max(abs(self.r1_m - self.r0_m), arc)


@dataclass(frozen=True)
class Loop:
    """Consecutive boundary pieces; ``closed`` if the last piece ends where the first begins."""

    pieces: tuple[Piece, ...]
    closed: bool

    @cached_property
    def _table(self) -> tuple[np.ndarray, ...]:
        """Per piece: start azimuth, end azimuth, start r, end r; and the corner parameters."""
        table = np.array([(p.azimuth0_deg, p.azimuth1_deg, p.r0_m, p.r1_m) for p in self.pieces], dtype=float)
        ends = np.concatenate([[0.0], np.cumsum([p.length_m for p in self.pieces])])
        return table[:, 0], table[:, 1], table[:, 2], table[:, 3], ends

    @property
    def length_m(self) -> float:
        return float(self._table[4][-1])

    @property
    def corners_m(self) -> np.ndarray:
        """Boundary parameter [m] of every piece end (corners), including both loop ends."""
        return self._table[4]

    def polar(self, s_m):
        """Azimuth [deg] and distance [m] from the zone's point at boundary parameter ``s_m``
        (the distance along the boundary from the loop's first point [m])."""
        az0, az1, r0, r1, ends = self._table
        total = ends[-1]
        s = np.asarray(s_m, dtype=float)
        s = np.mod(s, total) if self.closed else np.clip(s, 0.0, total)
        index = np.clip(np.searchsorted(ends, s, side="right") - 1, 0, len(self.pieces) - 1)
        span = ends[index + 1] - ends[index]
        u = np.where(span > 0.0, (s - ends[index]) / np.where(span > 0.0, span, 1.0), 0.0)
        return az0[index] + u * (az1[index] - az0[index]), r0[index] + u * (r1[index] - r0[index])


def _sector_loop(axis_deg: float, half_deg: float, radius_m: float) -> Loop:
    left, right = axis_deg - half_deg, axis_deg + half_deg
    return Loop((Piece(left, left, 0.0, radius_m), Piece(left, right, radius_m, radius_m),
                 Piece(right, right, radius_m, 0.0)), closed=True)


def _circle_loop(radius_m: float) -> Loop:
    return Loop((Piece(0.0, 360.0, radius_m, radius_m),), closed=True)


def boundary_loops(zone: Zone, axis_deg: float = 0.0) -> tuple[Loop, ...]:
    """The boundary of ``zone`` as loops of polar pieces about its point.

    A line is one open loop from its left end through the point to its right end (left
    and right seen along the axis). A keyhole gives two loops, its sector and its cylinder
    (their union is the zone; parts of each lie inside the other).
    """
    if zone.kind == "line":
        half = zone.length_m / 2.0
        left, right = axis_deg - 90.0, axis_deg + 90.0
        return (Loop((Piece(left, left, half, 0.0), Piece(right, right, 0.0, half)), closed=False),)
    if zone.kind in ("cylinder", "area_cylinder"):
        return (_circle_loop(zone.radius_m),)
    if zone.kind == "sector":
        if zone.angle_deg >= 360.0:
            return (_circle_loop(zone.radius_m),)
        return (_sector_loop(axis_deg, zone.angle_deg / 2.0, zone.radius_m),)
    if zone.kind == "keyhole":
        sector = (_circle_loop(zone.radius_m) if zone.angle_deg >= 360.0
                  else _sector_loop(axis_deg, zone.angle_deg / 2.0, zone.radius_m))
        return (sector, _circle_loop(zone.cylinder_radius_m))
    # area sector: outer arc clockwise, then back along the inner arc
    start, end = zone.radial_from_deg, zone.radial_from_deg + zone.span_deg
    inner, outer = zone.inner_radius_m, zone.radius_m
    if zone.span_deg >= 360.0:
        loops = [_circle_loop(outer)]
        if inner > 0.0:
            loops.append(_circle_loop(inner))
        return tuple(loops)
    pieces = [Piece(start, start, inner, outer), Piece(start, end, outer, outer), Piece(end, end, outer, inner)]
    if inner > 0.0:
        pieces.append(Piece(end, start, inner, inner))
    return (Loop(tuple(pieces), closed=True),)


# ---------------------------------------------------------------- point in zone


def polar_coordinates(centre_lat, centre_lon, lat, lon):
    """Azimuth seen from the centre [deg true, 0-360) and geodesic distance [m] of points."""
    distance_m, azimuth_deg, _ = geodesy.inverse(centre_lat, centre_lon, lat, lon)
    return azimuth_deg, distance_m


def _angle_off(azimuth_deg, reference_deg):
    """Absolute angle [deg, 0-180] between two azimuths."""
    return np.abs((np.asarray(azimuth_deg) - reference_deg + 180.0) % 360.0 - 180.0)


def _within_angle(excess_deg, r_m, tolerance_m):
    """True where a point ``excess_deg`` outside an angular range is still within the
    tolerance of the bounding radial (perpendicular distance r sin(excess))."""
    excess = np.clip(excess_deg, 0.0, 90.0)
    return (excess <= 0.0) | (r_m * np.sin(np.radians(excess)) <= tolerance_m)


def _in_sector(azimuth, r, axis_deg, angle_deg, radius_m, tolerance_m):
    excess = _angle_off(azimuth, axis_deg) - angle_deg / 2.0
    return (r <= radius_m + tolerance_m) & ((r <= tolerance_m) | _within_angle(excess, r, tolerance_m))


def contains(zone: Zone, centre_lat, centre_lon, lat, lon, axis_deg: float = 0.0, tolerance_m: float = 1.0):
    """Whether points lie in the zone (inside or on its boundary, within ``tolerance_m``).

    Parameters
    ----------
    zone : Zone
        The zone.
    centre_lat, centre_lon : float
        The zone's point [deg].
    lat, lon : float or array_like
        The points to test [deg].
    axis_deg : float
        The zone's axis (:func:`zone_axes`) [deg true]; used by lines, sectors and keyholes.
    tolerance_m : float
        How far outside the boundary a point may lie and still count [m]. A line has no
        area: its points are those within ``tolerance_m`` of the line segment.

    Returns
    -------
    bool or ndarray of bool
    """
    azimuth, r = polar_coordinates(centre_lat, centre_lon, lat, lon)
    azimuth, r = np.asarray(azimuth), np.asarray(r)
    kind = zone.kind
    if kind == "line":
        off = np.radians(azimuth - axis_deg)
        inside = (np.abs(r * np.cos(off)) <= tolerance_m) & (np.abs(r * np.sin(off)) <= zone.length_m / 2 + tolerance_m)
    elif kind in ("cylinder", "area_cylinder"):
        inside = r <= zone.radius_m + tolerance_m
    elif kind == "sector":
        inside = _in_sector(azimuth, r, axis_deg, zone.angle_deg, zone.radius_m, tolerance_m)
    elif kind == "keyhole":
        inside = (r <= zone.cylinder_radius_m + tolerance_m) | _in_sector(
            azimuth, r, axis_deg, zone.angle_deg, zone.radius_m, tolerance_m)
    else:  # area_sector
        offset = (azimuth - zone.radial_from_deg) % 360.0
        excess = np.minimum(offset - zone.span_deg, 360.0 - offset)
        excess = np.where(offset <= zone.span_deg, 0.0, excess)
        inside = ((r >= zone.inner_radius_m - tolerance_m) & (r <= zone.radius_m + tolerance_m)
                  & ((r <= tolerance_m) | _within_angle(excess, r, tolerance_m)))
    return bool(inside) if np.ndim(inside) == 0 else inside


def boundary(zone: Zone, centre_lat: float, centre_lon: float, axis_deg: float = 0.0,
             points_per_circle: int = 72) -> list[tuple[np.ndarray, np.ndarray]]:
    """The zone's outline as polylines for drawing.

    Parameters
    ----------
    zone, centre_lat, centre_lon, axis_deg
        As for :func:`contains`.
    points_per_circle : int
        Arc resolution: points on a full circle (fewer on shorter arcs).

    Returns
    -------
    list of (lats, lons)
        One polyline per boundary loop [deg]; closed loops repeat their first point at
        the end. A line is one two-point polyline; a keyhole gives its sector and its cylinder.
    """
    outlines = []
    for loop in boundary_loops(zone, axis_deg):
        azimuths, radii = [], []
        for piece in loop.pieces:
            sweep = abs(piece.azimuth1_deg - piece.azimuth0_deg)
            count = max(2, int(math.ceil(points_per_circle * sweep / 360.0)) + 1)
            u = np.linspace(0.0, 1.0, count)
            if azimuths:
                u = u[1:]  # the previous piece ended here
            azimuths.append(piece.azimuth0_deg + u * (piece.azimuth1_deg - piece.azimuth0_deg))
            radii.append(piece.r0_m + u * (piece.r1_m - piece.r0_m))
        azimuth, r = np.concatenate(azimuths), np.concatenate(radii)
        if loop.closed:
            azimuth, r = np.append(azimuth, azimuth[0]), np.append(r, r[0])
        lats, lons = geodesy.destination(np.full(azimuth.shape, float(centre_lat)), centre_lon, azimuth, r)
        outlines.append((lats, lons))
    return outlines
