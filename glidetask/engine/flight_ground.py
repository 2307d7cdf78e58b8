"""The ground under every glide: the clearance rule, one function for the whole flight.

With an elevation model every planned glide stays at least the terrain clearance above the
terrain under it (contract section 3). :class:`GroundFloor` holds the floor along the
course, ``F = terrain + clearance`` at the samples of the path's terrain profile
(:class:`glidetask.engine.terrain_profile.PathProfile`, one sample at least every 250 m),
linear between them, and applies the rule to glides.

The rule
--------
A glide is a line ``G(x)``: straight within a leg, losing the height per metre of its
speed, sink and wind there (:class:`StraightGlide` for a cruise glide, :class:`FinalGlideLine`
for a glide home over the remaining legs, each in its own wind). Its **shortfall** at ``x``
is ``F(x) - G(x)`` (:meth:`GroundFloor.shortfall`, the one place the rule is evaluated): the
glide keeps the clearance where the shortfall is at most 0. Because both ``F`` and ``G`` are
linear between samples (every leg's end is a sample), the rule holds everywhere ahead when
it holds at the glide's start and at every sample ahead, and two uses follow:

* a cruise glide stops where it first meets the floor (:meth:`GroundFloor.contact`): in the
  first stretch whose far end has a positive shortfall, where the shortfall crosses 0. There
  the flight climbs (the floor follows the ground: above the band bottom wherever terrain
  plus clearance is); where the floor reaches the band top the task cannot be flown as set.
  A glide home at MacCready 0 after the climbs stop ends where it meets the floor;
* the least height at which a glide may start and never meet the floor is its height plus
  the **largest shortfall ahead** (:meth:`GroundFloor.largest_shortfall`). The final glide's
  terrain requirement is exactly that for the glide home at the final-glide MacCready
  (:class:`glidetask.engine.clearance_hook.PathTerrain`): a final glide started at the
  requirement never meets the floor, one started lower does wherever the terrain raised it.

Unknown terrain (outside the model) is no floor here; the plan lists it as uncovered
(never as sea level).
"""

from __future__ import annotations

import math
from dataclasses import dataclass
from functools import cached_property
from typing import NamedTuple

import numpy as np

#: Batches of the largest-shortfall search with at most this many (glide x sample) pairs
#: evaluate every sample ahead directly; larger ones search convex hulls (same results).
DIRECT_PAIRS_LIMIT = 20_000


class StraightGlide(NamedTuple):
    """Glides (n,) from ``start_m`` at ``height_m`` [m MSL] losing ``per_metre`` [m/m], straight on."""

    start_m: np.ndarray
    height_m: np.ndarray
    per_metre: np.ndarray

    def height(self, glide, x, leg=None):
        return self.height_m[glide] - self.per_metre[glide] * (x - self.start_m[glide])

    def slope(self, glide, leg):
        return self.per_metre[glide]


class FinalGlideLine(NamedTuple):
    """Glides (n,) over the remaining legs to the course's end, arriving there at ``arrival_m``
    [m MSL], losing ``per_metre`` (n, L) [m/m] on each leg; ``tail`` (n, L+1) is the height used
    from each leg's start to the end (:func:`height_used_after`), ``vertex_m`` (L+1,) the legs' ends."""

    arrival_m: np.ndarray
    per_metre: np.ndarray
    tail: np.ndarray
    vertex_m: np.ndarray

    def height(self, glide, x, leg):
        return (self.arrival_m[glide] + self.per_metre[glide, leg] * (self.vertex_m[leg + 1] - x)
                + self.tail[glide, leg + 1])

    def slope(self, glide, leg):
        return self.per_metre[glide, leg]


def height_used_after(per_metre, leg_length_m) -> np.ndarray:
    """Height used from each leg's start to the course's end, shape (..., L+1), 0 at the end
    (legs of zero length use none, whatever their table)."""
    used = np.where(leg_length_m == 0.0, 0.0, per_metre * leg_length_m)
    return np.concatenate((np.cumsum(used[..., ::-1], axis=-1)[..., ::-1],
                           np.zeros(np.shape(per_metre)[:-1] + (1,))), axis=-1)


class GroundFloor:
    """Terrain plus clearance along a course [m MSL], linear between samples.

    Parameters
    ----------
    distance_m : ndarray, shape (J,)
        Sample positions along the course, increasing [m].
    floor_m : ndarray, shape (J,)
        Terrain + clearance at the samples [m MSL]; NaN where unknown (no floor).
    vertex_m : ndarray, shape (L+1,), optional
        Where the course's legs begin and end [m] (samples); default one leg over all.
    """

    def __init__(self, distance_m, floor_m, vertex_m=None):
        self.distance = np.asarray(distance_m, dtype=float)
        self.floor = np.asarray(floor_m, dtype=float)
        self._known = np.where(np.isfinite(self.floor), self.floor, -np.inf)
        ends = self.distance[[0, -1]] if self.distance.size else np.zeros(2)
        self.vertex = np.asarray(ends if vertex_m is None else vertex_m, dtype=float)
        self.sample_leg = self.leg_of(self.distance)

    @classmethod
    def from_profile(cls, profile, clearance_m: float) -> "GroundFloor":
        """The floor over a :class:`~glidetask.engine.terrain_profile.PathProfile`."""
        return cls(profile.distance_m, profile.elevation_m + float(clearance_m), profile.vertex_distance_m)

    @classmethod
    def from_hook(cls, hook) -> "GroundFloor | None":
        """The floor of a terrain requirement hook: its ``ground``, or one built from its
        ``profile`` and ``clearance_m``; None for a hook without terrain."""
        ground = getattr(hook, "ground", None)
        if ground is not None:
            return ground
        profile, clearance = getattr(hook, "profile", None), getattr(hook, "clearance_m", None)
        return None if profile is None or clearance is None else cls.from_profile(profile, clearance)

    @property
    def legs(self) -> int:
        return max(self.vertex.size - 1, 1)

    def leg_of(self, position_m) -> np.ndarray:
        """The leg of positions along the course (a leg's start belongs to that leg)."""
        return np.clip(np.searchsorted(self.vertex, position_m, side="right") - 1, 0, max(self.vertex.size - 2, 0))

    def at(self, position_m) -> np.ndarray:
        """The floor at positions along the course [m MSL] (-inf where unknown)."""
        return np.interp(position_m, self.distance, self._known)

    @staticmethod
    def shortfall(floor_m, height_m) -> np.ndarray:
        """The rule at points: how far a glide at ``height_m`` is below the floor ``floor_m`` there [m].

        ``F(x) - G(x)``; positive where the glide breaks the clearance, -inf where the floor or
        the glide is unknown (no floor: nothing to break).
        """
        short = floor_m - height_m
        return np.where(np.isfinite(short), short, -np.inf)

    def shortfall_along(self, height_m) -> np.ndarray:
        """For one glide given by its heights at the samples (linear between them) [m MSL]: the
        largest shortfall from each sample to the course's end, shape (J,) (-inf where nothing
        ahead is known): :meth:`largest_shortfall` started at every sample at once, in O(J)."""
        short = self.shortfall(self.floor, np.asarray(height_m, dtype=float))
        return np.maximum.accumulate(short[::-1])[::-1] if short.size else short

    def largest_shortfall(self, start_m, line) -> np.ndarray:
        """The largest shortfall of glides (n,) of ``line`` from ``start_m`` to the course's end [m].

        The least height at which each glide may start at ``start_m`` and never meet the floor
        is its height there plus this (when positive). It is the largest of the shortfall at the
        start itself and at every sample ahead (exact for the linear floor and glide); -inf
        where nothing ahead is known. Small batches (at most :data:`DIRECT_PAIRS_LIMIT`
        glide-sample pairs) evaluate every sample; larger ones take, on each leg, the sample
        the upper convex hull of the floor ahead picks (:class:`_SuffixHulls`), so a call
        costs ``O(n L log J)`` instead of ``O(n J)``. Either way the shortfall is
        :meth:`shortfall`'s, at the chosen samples.
        """
        start = np.atleast_1d(np.asarray(start_m, dtype=float))
        glide = np.arange(start.size)[:, None]
        here = self.shortfall(self.at(start), line.height(glide[:, 0], start, self.leg_of(start)))
        if start.size * self.distance.size <= DIRECT_PAIRS_LIMIT:
            sample = np.broadcast_to(np.arange(self.distance.size), (start.size, self.distance.size))
            ahead = self.distance[None, :] >= start[:, None]
        else:
            sample, ahead = self._hull_candidates(start, line)
        short = self.shortfall(self._known[sample], line.height(glide, self.distance[sample], self.sample_leg[sample]))
        return np.maximum(here, np.max(np.where(ahead, short, -np.inf), axis=1, initial=-np.inf))

    def _hull_candidates(self, start, line):
        """Per glide and leg (n, L), the sample ahead where the floor rises most above the glide (the
        vertex of the upper hull of ``(x_j, F_j)`` ahead where the hull's slopes pass ``-slope``),
        and whether the leg has one."""
        hulls = self._hulls
        first = np.searchsorted(self.distance, start, side="left")
        begin = np.maximum(first[:, None], hulls.leg_first[None, :])  # (n, L): first sample ahead on each leg
        inside = begin < hulls.leg_end[None, :]
        vertex = np.where(inside, hulls.start[np.minimum(begin, hulls.start.size - 1)], -1)
        found = vertex >= 0
        glide, leg = np.nonzero(found)
        sample = np.zeros(vertex.shape, dtype=np.intp)
        sample[glide, leg] = hulls.highest(vertex[glide, leg], line.slope(glide, leg))
        return sample, found

    @cached_property
    def _hulls(self) -> "_SuffixHulls":
        return _suffix_hulls(self.distance, self.floor, self.sample_leg, self.legs)

    def contact(self, start_m, height_m, per_metre, limit_m, above_m) -> np.ndarray:
        """Distance [m] from ``start_m`` (n,) where a straight glide from ``height_m`` (n,) losing
        ``per_metre`` (n,) [m/m] first meets the floor, within ``limit_m`` (n,); ``inf`` when it
        does not; 0 when it starts at or below the floor.

        The first contact lies in the first stretch between samples whose far end has a
        positive :meth:`shortfall`, where the shortfall (linear there) crosses 0. Only stretches
        with an end above ``above_m`` (n,) (the glide's own lower stop, the band bottom) can
        stop it earlier than that stop, so only those are examined (a stretch falling from
        above the stop to below it counts: the glide may meet its floor before the stop).
        """
        start = np.asarray(start_m, dtype=float)
        line = StraightGlide(start, np.asarray(height_m, dtype=float), np.asarray(per_metre, dtype=float))
        end = start + np.minimum(np.asarray(limit_m, dtype=float), self.distance[-1] + 1.0)
        out = np.full(start.shape, np.inf)
        here = line.height_m < self.at(start) - 1e-9
        out[here] = 0.0
        high = self._known > np.min(above_m, initial=np.inf)
        raised = np.flatnonzero(high | np.concatenate(([False], high[:-1])))  # stretches, by their far ends
        if not raised.size:
            return out
        where = self.distance[raised]
        first = np.searchsorted(where, start, side="right")
        last = np.minimum(np.searchsorted(where, end, side="right") + 1, where.size)  # the segment across the end
        count = np.where(here, 0, last - first)
        if not count.any():
            return out
        some = np.flatnonzero(count)  # the glides with a stretch to examine, each a run of pairs
        count = count[some]
        begin = np.cumsum(count) - count
        j = raised[np.arange(begin[-1] + count[-1]) + np.repeat(first[some] - begin, count)]
        # each pair's glide (StraightGlide.height's terms, repeated over its run of pairs)
        origin, height, per_metre = (np.repeat(value[some], count) for value in line)
        x1 = self.distance[j]
        x0 = np.maximum(self.distance[np.maximum(j - 1, 0)], origin)
        s0 = self.shortfall(self.at(x0), height - per_metre * (x0 - origin))
        s1 = self.shortfall(self._known[j], height - per_metre * (x1 - origin))
        with np.errstate(invalid="ignore", divide="ignore"):
            t = np.where(np.isfinite(s0) & (s0 < 0.0), s0 / (s0 - s1), 0.0)
        x = np.where(s1 > 0.0, x0 + np.clip(t, 0.0, 1.0) * (x1 - x0), np.inf)
        best = np.full(start.size, np.inf)
        best[some] = np.minimum.reduceat(x, begin)
        return np.minimum(out, best - start)


def glide_allowance(ground: GroundFloor, leg_start, leg, position, height, remaining, per_metre, cumulative,
                    lowest) -> np.ndarray:
    """Height [m] a glide at MacCready 0 over the remaining legs may use before it meets the floor.

    Flights (n,) on ``leg`` at ``position`` in it and ``height`` glide over the remaining
    distance per leg ``remaining`` (n, L) losing ``per_metre`` (n, L) [m/m]; ``cumulative``
    (n, L) is the height used to each leg's end. Returns the height used up to the first
    contact with the floor, ``inf`` where the glide never meets it above ``lowest`` (n,).
    """
    n, legs = remaining.shape
    allowance = np.full(n, np.inf)
    open_ = np.ones(n, dtype=bool)
    for j in range(int(np.min(leg)), legs):
        rows = np.flatnonzero(open_ & (leg <= j) & (remaining[:, j] > 0.0) & np.isfinite(per_metre[:, j]))
        if not rows.size:
            continue
        before = cumulative[rows, j] - remaining[rows, j] * per_metre[rows, j]
        start = leg_start[j] + np.where(leg[rows] == j, position[rows], 0.0)
        d = ground.contact(start, height[rows] - before, per_metre[rows, j], remaining[rows, j], lowest[rows])
        hit = d <= remaining[rows, j]
        allowance[rows[hit]] = before[hit] + d[hit] * per_metre[rows[hit], j]
        open_[rows[hit]] = False
    return allowance


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


class Ceiling:
    """The band top lowered under airspace along a course (:mod:`glidetask.engine.plan_airspace`).

    Parameters
    ----------
    distance_m : ndarray, shape (K,)
        Positions along the course where the top is lowered, increasing [m].
    top_m : ndarray, shape (K,)
        The lowered top there [m MSL] (an airspace floor minus the margin).
    spacing_m : float
        The sampling of the positions: a lowered top holds from ``spacing_m`` before its sample.

    Notes
    -----
    A climb at ``x`` stops at the lowest of the band top and, for every lowered sample
    ``s_k`` ahead, ``top_k + hpm (s_k - x)``: the glide that follows enters each capped
    stretch under its top. ``hpm`` is the flattest glide of the flight (best glide in the
    leg with the most favourable wind), so any faster glide enters lower still. Each flight
    uses its own slope, so a flight flies the same alone and in a batch.
    """

    def __init__(self, distance_m, top_m, spacing_m: float = 250.0):
        self.distance = np.asarray(distance_m, dtype=float)
        self.top_m = np.asarray(top_m, dtype=float)
        self.spacing = float(spacing_m)

    def top(self, position_m, band_top_m, per_metre) -> np.ndarray:
        """The highest a climb at ``position_m`` (n,) may go [m MSL], for flights whose glides
        lose at least ``per_metre`` (n,) [m/m]. Only the lowered samples close enough ahead to
        matter are examined: beyond ``(band top - lowest top) / per_metre`` none can lower it.

        Of those, a sample ahead whose top is no lower than that of an earlier sample ahead
        gives no lower limit (its ``top_k + hpm (s_k - x)`` is at least the earlier one's,
        rounding included), so only the samples within the spacing behind and the chain of
        ever lower tops from the first sample ahead (:attr:`_next_lower`) are evaluated: the
        same minimum of the same terms, in a few vectorised steps.
        """
        position = np.asarray(position_m, dtype=float)
        top = np.asarray(band_top_m, dtype=float)
        out = top.copy()
        if not self.distance.size:
            return out
        slope = np.asarray(per_metre, dtype=float)
        with np.errstate(divide="ignore", invalid="ignore"):
            reach = np.where(slope > 0.0, np.maximum(top - self.top_m.min(), 0.0) / slope, np.inf)
        first = np.searchsorted(self.distance, position - self.spacing, side="left")
        ahead = np.searchsorted(self.distance, position, side="left")  # the first sample at or after the climb
        last = np.searchsorted(self.distance, position + reach, side="right")
        for sample, end, following in ((first, np.minimum(ahead, last), None), (ahead, last, self._next_lower)):
            sample = sample.copy()
            flights = np.flatnonzero(sample < end)
            while flights.size:
                k = sample[flights]
                climb_to = self.top_m[k] + slope[flights] * np.maximum(self.distance[k] - position[flights], 0.0)
                out[flights] = np.minimum(out[flights], climb_to)
                sample[flights] = k + 1 if following is None else following[k]
                flights = flights[sample[flights] < end[flights]]
        return out

    @cached_property
    def _next_lower(self) -> np.ndarray:
        """For each lowered sample, the next one with a lower top (the count when none)."""
        tops = self.top_m.tolist()
        following = np.full(len(tops), len(tops), dtype=np.intp)
        stack: list[int] = []
        for i in range(len(tops) - 1, -1, -1):
            while stack and tops[stack[-1]] >= tops[i]:
                stack.pop()
            if stack:
                following[i] = stack[-1]
            stack.append(i)
        return following
