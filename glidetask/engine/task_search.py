"""Searches over a task's zones: the shortest and longest paths, and area-task targets.

``optimized_path`` finds the shortest path that touches every observation zone in order;
for assigned-area tasks ``area_distance_range`` gives the shortest and longest possible
distance and ``area_targets`` the points in between that the plan chooses by one number,
the depth. How the zones count is described in :mod:`glidetask.engine.task`; all
distances are geodesics on WGS84 (:mod:`glidetask.engine.geodesy`).
"""

from __future__ import annotations

import math
from dataclasses import dataclass
from functools import lru_cache

import numpy as np

from glidetask.engine import geodesy
from glidetask.engine.task import Task, TaskPath, path_through
from glidetask.engine.zones import Zone, boundary_loops, contains, polar_coordinates


# ---------------------------------------------------------------- the shortest and longest paths
#
# The search works on each zone's boundary, described as loops of polar pieces about the
# zone's point (zones.boundary_loops). A shortest path touches each zone either on its
# boundary or, where it passes straight through, at a point it shares with a neighbouring
# zone; so the candidates of a zone are points on its own boundary plus the neighbours'
# candidates that lie inside it. A dynamic programme over the chain of zones picks the
# best candidate of every zone jointly (no zone is optimised alone, so overlapping zones
# and keyholes cannot trap it); the search then repeats on ever narrower windows of the
# boundary around the chosen points until the spacing is below a metre. The first, coarse
# round measures on a sphere (numpy only), every later round on the ellipsoid (geodesic
# inverse), so the result is a WGS84 geodesic optimum.

_SPHERE_RADIUS_M = 6_371_008.8  # mean Earth radius, for the coarse round only
_COARSE_CLOSED = 64  # samples per closed boundary loop in the coarse round
_COARSE_OPEN = 33  # samples per line
_WINDOW = 12  # samples per refined window
_WINDOW_HALF = 1.5  # half-width of the next window, in spacings of the previous one
_FINE_M = 4.0  # refine every window to below this spacing [m] (see optimized_path Notes)
_INSIDE_M = 1e-3  # a neighbour's candidate counts as inside a zone within this [m]
_OFFSETS = np.linspace(-1.0, 1.0, _WINDOW)
_MAX_ROUNDS = 100  # a bound only; the search ends when every window is fine and settled


@dataclass
class _Window:
    """Search state of one task point: its boundary loops and the current window on them.

    The window is a trust region: it shrinks round by round around the chosen point, but
    when the choice lands on its edge it moves there at the same size, so the search can
    travel as far as it needs (the coarse round's spherical distances can put the choice
    a few samples off where the zone is nearly flat for the path, e.g. along a line).
    """

    lat: float
    lon: float
    zone: Zone
    axis_deg: float
    loops: tuple
    loop: int = -1  # the loop the window is on (-1: the coarse round samples every loop)
    centre_s: float = 0.0  # window centre on that loop [m along the boundary]
    half_m: float = math.inf  # half-width of the window [m along the boundary]
    spacing_m: float = math.inf  # sample spacing of the last round [m]
    at_edge: bool = False  # the last choice sat on the window's edge

    def samples(self) -> tuple[np.ndarray, np.ndarray]:
        """(loop index, boundary parameter) of this round's own candidates."""
        if self.loop < 0:
            loops, params, spacings = [], [], []
            for index, loop in enumerate(self.loops):
                count = _COARSE_CLOSED if loop.closed else _COARSE_OPEN
                s = np.linspace(0.0, loop.length_m, count, endpoint=not loop.closed)
                s = np.unique(np.concatenate([s, loop.corners_m[:-1] if loop.closed else loop.corners_m]))
                loops.append(np.full(s.shape, index))
                params.append(s)
                spacings.append(loop.length_m / (count if loop.closed else count - 1))
            self.spacing_m = max(spacings)
            return np.concatenate(loops), np.concatenate(params)
        loop = self.loops[self.loop]
        half = self.half_m
        s = self.centre_s + half * _OFFSETS
        corners = loop.corners_m
        if loop.closed:
            total = corners[-1]
            offset = (corners[:-1] - self.centre_s + total / 2.0) % total - total / 2.0
            near = np.abs(offset) <= half
            if near.any():  # corners are where sector and line optima often sit: sample them exactly
                s = np.concatenate([s, self.centre_s + offset[near]])
        else:
            near = np.abs(corners - self.centre_s) <= half
            if near.any():
                s = np.concatenate([s, corners[near]])
        self.spacing_m = 2.0 * half / (_WINDOW - 1)
        return np.full(s.shape, self.loop), s

    def recentre(self, loop_index: int, s: float, own: bool) -> None:
        """Centre the next window on the chosen sample: smaller, unless the choice was on the
        edge of this window (then the same size, and twice the size when it was on the edge
        the round before too); at the fine spacing it keeps its size until it travels."""
        loop = self.loops[loop_index]
        travelling = self.at_edge
        if self.loop < 0:
            moved, self.at_edge = 0.0, False
        else:
            moved = abs(s - self.centre_s)
            if loop.closed:
                moved = min(moved, loop.length_m - moved)
            self.at_edge = own and moved >= 0.999 * self.half_m and (loop.closed or 0.0 < s < loop.length_m)
        self.loop, self.centre_s = loop_index, s
        if self.at_edge and travelling:
            # The optimum lies further along than one window: where the path is nearly flat
            # for the zone (nearly straight through it), the coarse round's spherical
            # distances can pick a point hundreds of metres off, and a window of constant
            # size would crawl there a few metres a round. Doubling reaches it in a few rounds.
            self.half_m = min(2.0 * self.half_m, loop.length_m / 2.0 if loop.closed else loop.length_m)
        elif not self.at_edge and self.spacing_m > _FINE_M:
            self.half_m = _WINDOW_HALF * self.spacing_m


@dataclass
class _Candidates:
    """One round's candidate points of one zone; ``loop`` -1 marks a neighbour's point."""

    lats: np.ndarray
    lons: np.ndarray
    loop: np.ndarray
    s: np.ndarray


class _Outlines:
    """Every boundary piece of every zone in flat arrays, so that boundary parameters of
    all windows turn into polar coordinates in one vectorised step."""

    def __init__(self, windows: list[_Window]):
        az0, az1, r0, r1, starts = [], [], [], [], []
        self.offset: dict[tuple[int, int], tuple[float, float, bool, int, int]] = {}
        at = 0.0
        for w, window in enumerate(windows):
            for l, loop in enumerate(window.loops):
                table = loop._table
                first = len(starts)
                az0 += list(table[0])
                az1 += list(table[1])
                r0 += list(table[2])
                r1 += list(table[3])
                starts += list(at + table[4][:-1])
                self.offset[(w, l)] = (at, loop.length_m, loop.closed, first, len(starts) - 1)
                at += loop.length_m
        self.az0, self.az1 = np.array(az0), np.array(az1)
        self.r0, self.r1 = np.array(r0), np.array(r1)
        self.starts = np.array(starts)
        self.ends = np.append(self.starts[1:], at)

    def polar(self, keys: list[tuple[int, int]], params: list[np.ndarray]):
        """Azimuth [deg] and distance [m] about each zone's point of the samples ``params``
        (boundary parameters [m]) on the loops ``keys`` ((window, loop) pairs)."""
        info = [self.offset[k] for k in keys]
        counts = [len(p) for p in params]
        offset, length, closed, first, last = (np.repeat([i[j] for i in info], counts) for j in range(5))
        s = np.concatenate(params)
        s = np.where(closed, np.mod(s, length), np.clip(s, 0.0, length)) + offset
        piece = np.clip(np.searchsorted(self.starts, s, side="right") - 1, first, last)
        span = self.ends[piece] - self.starts[piece]
        u = np.where(span > 0.0, (s - self.starts[piece]) / np.where(span > 0.0, span, 1.0), 0.0)
        return (self.az0[piece] + u * (self.az1[piece] - self.az0[piece]),
                self.r0[piece] + u * (self.r1[piece] - self.r0[piece]))


def _own_candidates(windows: list[_Window], outlines: _Outlines) -> list[_Candidates]:
    """Every window's boundary samples as points, in one vectorised direct-geodesic call."""
    keys, params, parts = [], [], []
    for w, window in enumerate(windows):
        loop_index, s = window.samples()
        if window.loop >= 0:  # a refined window lies on one loop
            groups = [(window.loop, s)]
        else:
            groups = [(int(i), s[loop_index == i]) for i in np.unique(loop_index)]
        for index, values in groups:
            keys.append((w, index))
            params.append(values)
        parts.append((np.concatenate([np.full(len(v), i) for i, v in groups]), np.concatenate([v for _, v in groups])))
    azimuth, r = outlines.polar(keys, params)
    counts = [len(s) for _, s in parts]
    centre_lat = np.repeat([w.lat for w in windows], counts)
    centre_lon = np.repeat([w.lon for w in windows], counts)
    lons, lats, _ = geodesy.WGS84.fwd(centre_lon, centre_lat, azimuth, r)
    lats, lons = np.asarray(lats), geodesy.normalize_lon(np.asarray(lons))
    out, at = [], 0
    for loop_index, s in parts:
        out.append(_Candidates(lats[at:at + len(s)], lons[at:at + len(s)], loop_index, s))
        at += len(s)
    return out


def _with_neighbours(windows, own: list[_Candidates], overlapping: list[bool]) -> list[_Candidates]:
    """Add to each zone the candidates of its neighbours that lie inside it (where zones
    overlap), passed along forwards and then backwards, so that a run of overlapping zones
    can share one point."""
    out = list(own)

    def inside_of(i: int, source: _Candidates) -> _Candidates | None:
        window = windows[i]
        inside = np.atleast_1d(contains(window.zone, window.lat, window.lon, source.lats, source.lons,
                                        window.axis_deg, tolerance_m=_INSIDE_M))
        count = int(inside.sum())
        if not count:
            return None
        return _Candidates(source.lats[inside], source.lons[inside], np.full(count, -1), np.zeros(count))

    def joined(mine: _Candidates, extra: _Candidates | None) -> _Candidates:
        if extra is None:
            return mine
        return _Candidates(*(np.concatenate([np.asarray(getattr(mine, f)), np.asarray(getattr(extra, f))])
                             for f in ("lats", "lons", "loop", "s")))

    for i in range(1, len(windows)):  # forwards: what zone i-1 may use, zone i may share
        if overlapping[i - 1]:
            out[i] = joined(out[i], inside_of(i, out[i - 1]))
    # Backwards: zone i+1's own points and what it took backwards. (Not what it took forwards:
    # those are zone i's points already, and passing them back doubled the candidates at
    # every zone of a run of overlapping zones.)
    behind = own[-1]
    for i in range(len(windows) - 2, -1, -1):
        taken = inside_of(i, behind) if overlapping[i] else None
        out[i] = joined(out[i], taken)
        behind = joined(own[i], taken)
    return out


def _sphere_distance(lat1, lon1, lat2, lon2):
    """Great-circle distance [m] on the mean sphere (haversine), broadcasting."""
    p1, p2 = np.radians(lat1), np.radians(lat2)
    h = np.sin((p2 - p1) / 2) ** 2 + np.cos(p1) * np.cos(p2) * np.sin(np.radians(lon2 - lon1) / 2) ** 2
    return 2.0 * _SPHERE_RADIUS_M * np.arcsin(np.sqrt(np.clip(h, 0.0, 1.0)))


def _leg_costs(candidates: list[_Candidates], exact: bool) -> list[np.ndarray]:
    """Distance matrices [m] from every candidate of a zone (rows) to every candidate of the
    next (columns), for all legs in one vectorised call."""
    if not exact:
        return [_sphere_distance(a.lats[:, None], a.lons[:, None], b.lats[None, :], b.lons[None, :])
                for a, b in zip(candidates[:-1], candidates[1:])]
    pieces = [[], [], [], []]
    shapes = []
    for a, b in zip(candidates[:-1], candidates[1:]):
        shapes.append((len(a.lats), len(b.lats)))
        pieces[0].append(np.repeat(a.lats, len(b.lats)))
        pieces[1].append(np.repeat(a.lons, len(b.lats)))
        pieces[2].append(np.tile(b.lats, len(a.lats)))
        pieces[3].append(np.tile(b.lons, len(a.lats)))
    lat1, lon1, lat2, lon2 = (np.concatenate(p) for p in pieces)
    flat = np.asarray(geodesy.WGS84.inv(lon1, lat1, lon2, lat2)[2])
    out, at = [], 0
    for rows, columns in shapes:
        out.append(flat[at:at + rows * columns].reshape(rows, columns))
        at += rows * columns
    return out


def _chain_search(costs: list[np.ndarray], maximize: bool) -> list[int]:
    """The candidate of every zone giving the shortest path (``maximize=False``), or the
    longest path through the middle zones with the shortest connection to the start and
    finish zones (``maximize=True``): a dynamic programme along the chain of zones."""
    if not maximize:
        value = np.zeros(costs[0].shape[0])
        back = []
        for cost in costs:
            total = value[:, None] + cost
            back.append(np.argmin(total, axis=0))
            value = total[back[-1], np.arange(total.shape[1])]
        choice = [int(np.argmin(value))]
        for pointer in reversed(back):
            choice.append(int(pointer[choice[-1]]))
        return choice[::-1]
    # The start and finish points only ever shorten the path: eliminate them first as
    # "shortest connection" costs on their neighbours, then maximise over the middle.
    start_pick = np.argmin(costs[0], axis=0)
    finish_pick = np.argmin(costs[-1], axis=1)
    value = costs[0][start_pick, np.arange(costs[0].shape[1])]
    back = []
    for cost in costs[1:-1]:
        total = value[:, None] + cost
        back.append(np.argmax(total, axis=0))
        value = total[back[-1], np.arange(total.shape[1])]
    value = value + costs[-1][np.arange(costs[-1].shape[0]), finish_pick]
    last_middle = int(np.argmax(value))
    choice = [int(finish_pick[last_middle]), last_middle]
    for pointer in reversed(back):
        choice.append(int(pointer[choice[-1]]))
    choice.append(int(start_pick[choice[-1]]))
    return choice[::-1]


def _search(task: Task, maximize: bool) -> tuple[np.ndarray, np.ndarray]:
    """Path points (lats, lons) of the shortest path, or of the longest through the area zones."""
    windows = [_Window(p.lat, p.lon, p.zone, axis, boundary_loops(p.zone, axis))
               for p, axis in zip(task.points, task.axes_deg)]
    gaps = np.atleast_1d(geodesy.distance(task.lats[:-1], task.lons[:-1], task.lats[1:], task.lons[1:]))
    reach = np.array([p.zone.reach_m for p in task.points])
    overlapping = list(gaps <= reach[:-1] + reach[1:] + 1.0)
    outlines = _Outlines(windows)
    exact = False
    for _ in range(_MAX_ROUNDS):
        own = _own_candidates(windows, outlines)
        candidates = own if maximize else _with_neighbours(windows, own, overlapping)
        choice = _chain_search(_leg_costs(candidates, exact), maximize)
        picked = list(zip(candidates, choice))
        if exact and all(w.spacing_m <= _FINE_M and not w.at_edge for w in windows):
            break
        for window, (c, k) in zip(windows, picked):
            own_choice = c.loop[k] >= 0
            if not own_choice:  # a neighbour's point: centre the window on our own nearest sample
                mine = np.flatnonzero(c.loop >= 0)
                k = mine[np.argmin(_sphere_distance(c.lats[mine], c.lons[mine], c.lats[k], c.lons[k]))]
            window.recentre(int(c.loop[k]), float(c.s[k]), own_choice)
        exact = True
    return (np.array([c.lats[k] for c, k in picked]), np.array([c.lons[k] for c, k in picked]))


@lru_cache(maxsize=128)
def optimized_path(task: Task) -> TaskPath:
    """The shortest path that touches every zone of the task in order.

    Parameters
    ----------
    task : Task

    Returns
    -------
    TaskPath
        One point per task point: where the shortest path touches that zone.

    Notes
    -----
    A start or finish line counts anywhere along its length, a start or finish cylinder
    from its edge, every other zone anywhere on or inside it (the Sporting Code's
    observation zones; see the module docstring). The search is a dynamic programme over
    candidate points on the zone boundaries, refined on narrowing windows until the
    candidates are under 1 m apart; the result is within centimetres of the geodesic
    optimum on WGS84 (tests compare it with an independent brute-force search). Results
    are cached per task (tasks are immutable).
    """
    lats, lons = _search(task, maximize=False)
    return path_through(task, lats, lons)


@lru_cache(maxsize=128)
def _longest_path(task: Task) -> TaskPath:
    if not any(p.zone.is_area for p in task.points):
        return optimized_path(task)
    lats, lons = _search(task, maximize=True)
    return path_through(task, lats, lons)


def area_distance_range(task: Task) -> tuple[float, float]:
    """Shortest and longest distance of an assigned-area task [m].

    Returns
    -------
    (min_m, max_m) : tuple of float
        ``min_m`` is the optimized distance (:func:`optimized_path`). ``max_m`` is the
        longest path through the area zones, each touched anywhere on or inside it, with the
        shortest possible connection from the start zone and to the finish zone (a pilot
        does not fly extra in the start or finish zone). For a task without area zones
        both are the optimized distance.
    """
    return optimized_path(task).total_m, _longest_path(task).total_m


# ---------------------------------------------------------------- area-task targets


@dataclass(frozen=True, eq=False)
class _TargetCurve:
    """Each zone's target moving from the shortest path's point (t = 0) to the longest
    path's point (t = 1), in the zone's own coordinates so it never leaves the zone:
    along a line, or in azimuth and distance about the zone's point (clockwise within an
    area sector; the shorter way round otherwise)."""

    centre_lats: np.ndarray
    centre_lons: np.ndarray
    azimuth0: np.ndarray  # deg, at t = 0
    turn: np.ndarray  # deg turned by t = 1
    r0: np.ndarray
    r1: np.ndarray

    def points(self, t):
        """Target points for every t (rows) and task point (columns) [deg]."""
        t = np.atleast_1d(np.asarray(t, dtype=float))[:, None]
        azimuth = self.azimuth0 + t * self.turn
        r = self.r0 + t * (self.r1 - self.r0)
        # a signed distance (a point on a line) flips the azimuth instead
        azimuth = np.where(r < 0.0, azimuth + 180.0, azimuth)
        shape = np.broadcast(azimuth, self.centre_lats).shape
        return geodesy.destination(np.broadcast_to(self.centre_lats, shape), np.broadcast_to(self.centre_lons, shape),
                                   azimuth, np.abs(r))

    def lengths(self, t) -> np.ndarray:
        lats, lons = self.points(t)
        legs = geodesy.distance(lats[:, :-1], lons[:, :-1], lats[:, 1:], lons[:, 1:])
        return np.sum(np.atleast_2d(legs), axis=1)


@lru_cache(maxsize=128)
def _target_curve(task: Task) -> _TargetCurve:
    low, high = optimized_path(task), _longest_path(task)
    az0, r0 = (np.atleast_1d(v) for v in polar_coordinates(task.lats, task.lons, low.lats, low.lons))
    az1, r1 = (np.atleast_1d(v) for v in polar_coordinates(task.lats, task.lons, high.lats, high.lons))
    # At the zone's very point the azimuth means nothing: move straight out along the other one.
    az0 = np.where(r0 < 1e-3, az1, az0)
    az1 = np.where(r1 < 1e-3, az0, az1)
    turn = (az1 - az0 + 180.0) % 360.0 - 180.0
    for i, point in enumerate(task.points):
        zone, axis = point.zone, task.axes_deg[i]
        if zone.kind == "area_sector":  # stay within the radials: turn clockwise from radial_from
            offsets = []
            for azimuth in (az0[i], az1[i]):
                offset = (azimuth - zone.radial_from_deg) % 360.0
                if offset > zone.span_deg:  # round-off just outside a radial: onto the nearer one
                    offset = zone.span_deg if offset - zone.span_deg < 360.0 - offset else 0.0
                offsets.append(offset)
            az0[i] = zone.radial_from_deg + offsets[0]
            turn[i] = offsets[1] - offsets[0]
        elif zone.kind == "line":  # signed distance along the line, right of the axis positive
            right = axis + 90.0
            r0[i] *= 1.0 if abs((az0[i] - right + 180.0) % 360.0 - 180.0) < 90.0 else -1.0
            r1[i] *= 1.0 if abs((az1[i] - right + 180.0) % 360.0 - 180.0) < 90.0 else -1.0
            az0[i], turn[i] = right, 0.0
    return _TargetCurve(task.lats, task.lons, az0, turn, r0, r1)


def area_targets(task: Task, depth: float) -> tuple[np.ndarray, np.ndarray]:
    """Target points of an area task for a depth between its shortest and longest path.

    Parameters
    ----------
    task : Task
    depth : float
        0 gives the points of the shortest path, 1 those of the longest path
        (:func:`area_distance_range`); in between, the path through the targets is
        ``min_m + depth * (max_m - min_m)`` long (to within a few metres), so the length
        grows steadily with the depth and a planner can bisect on it to meet the minimum time.

    Returns
    -------
    lats, lons : ndarray
        One point per task point [deg] (start and finish points included); give them
        to :func:`path_through` for the legs.

    Notes
    -----
    Every target moves from its shortest-path point to its longest-path point in its
    zone's own coordinates (azimuth and distance about the zone's point, clockwise inside
    an area sector; along the line for a start or finish line), all by the same fraction
    t, so it stays inside its zone. The fraction t that gives the wanted length is found
    by nested grid search on the (vectorised) path length.
    """
    if not 0.0 <= depth <= 1.0:
        raise ValueError(f"depth must be in [0, 1], got {depth!r}")
    low, high = optimized_path(task), _longest_path(task)
    if depth == 0.0 or high.total_m - low.total_m < 1e-3:
        return low.lats.copy(), low.lons.copy()
    if depth == 1.0:
        return high.lats.copy(), high.lons.copy()
    curve = _target_curve(task)
    wanted = low.total_m + depth * (high.total_m - low.total_m)
    t_low, t_high = 0.0, 1.0
    for _ in range(4):
        ts = np.linspace(t_low, t_high, 17)
        reached = np.maximum.accumulate(curve.lengths(ts))  # first t with the length reached
        k = int(np.clip(np.searchsorted(reached, wanted), 1, len(ts) - 1))
        t_low, t_high = ts[k - 1], ts[k]
        length_low, length_high = reached[k - 1], reached[k]
    fraction = 0.0 if length_high <= length_low else (wanted - length_low) / (length_high - length_low)
    lats, lons = curve.points(t_low + np.clip(fraction, 0.0, 1.0) * (t_high - t_low))
    return lats[0], lons[0]
