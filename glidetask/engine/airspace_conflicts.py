"""What a planned flight makes of the airspace along its path: the band top lowered under
the volumes overhead (:func:`band_top_cap`), the stretches of the flight inside a volume
(:func:`conflicts`), and both in one call (:func:`check_path`).

The volumes and their heights are :mod:`glidetask.engine.airspace`; where the path is
inside each outline, :mod:`glidetask.engine.airspace_crossings`. Heights in metres MSL.
"""

from __future__ import annotations

from dataclasses import dataclass
from typing import Sequence

import numpy as np

from glidetask.engine.airspace import DEFAULT_MARGIN_M, Airspace, GroundFunction, Volume, limits_along
from glidetask.engine.airspace_crossings import Stretch, inside_mask, path_stretches, unwrapped_lons


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
    unwrapped = unwrapped_lons(lons)
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
