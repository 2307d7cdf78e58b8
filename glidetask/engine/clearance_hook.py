"""The clearance rule inside the flight core: terrain along a task's whole planned path.

:class:`PathTerrain` (built by :func:`path_terrain`) is the flight core's requirement
hook (:data:`glidetask.engine.flight.RequirementHook`): the terrain under a task's
planned path, sampled once, raising the final-glide requirement wherever the ground
ahead demands more than the terrain clearance, and reporting the final glide from the
same samples (:func:`glidetask.engine.clearance.final_glide_clearance`), so the height
the plan flies and the obstacle it names agree. The largest shortfall ahead of many
positions at once is found on convex hulls of the samples (:class:`_SuffixHulls`).
"""

from __future__ import annotations

import math
from dataclasses import dataclass
from functools import cached_property
from typing import Sequence

import numpy as np

from glidetask.engine.clearance import FinalGlideTerrain, final_glide_clearance
from glidetask.engine.terrain import Terrain
from glidetask.engine.terrain_profile import PATH_SPACING_M, PathProfile, sample_path

#: Batches of the terrain requirement hook with at most this many (flight x sample) pairs
#: evaluate every sample ahead directly; larger ones search convex hulls (same results).
DIRECT_PAIRS_LIMIT = 20_000



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
