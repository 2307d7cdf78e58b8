"""The ground under every glide of the flight core: the clearance rule for the whole flight.

With an elevation model the flight core keeps every planned glide at least the terrain
clearance above the terrain under it (contract section 3). :class:`GroundFloor` holds the
floor along the course, ``terrain + clearance`` at the samples of the path's terrain
profile (:class:`glidetask.engine.terrain_profile.PathProfile`, one sample at least every
250 m), linear between them, and finds where a straight glide first meets it.

The rule, as the core applies it
--------------------------------
A glide in cruise stops where it would otherwise come closer to the ground than the
clearance: where its line ``h0 - hpm (x - x0)`` meets ``T(x) + C``. There the flight
climbs (the floor follows the ground: above the band bottom wherever terrain plus
clearance is). Because the glide line is straight and the floor is linear between
samples, meeting the floor is exact for the sampled terrain; equivalently, at a sample
``x_i`` the glide needs ``T(x_j) + C + hpm (x_j - x_i)`` for every sample ``x_j`` it
reaches before its next climb (the terrain ahead plus the height the glide loses getting
there). Where the floor reaches the band top the flight cannot go on: the task cannot be
flown as set. A glide home at MacCready 0 after the climbs stop ends where it meets the
floor. The final glide's requirement is raised by the same samples
(:class:`glidetask.engine.clearance_hook.PathTerrain`), so a final glide never meets it.

Unknown terrain (outside the model) is no floor here; the plan lists it as uncovered
(never as sea level).
"""

from __future__ import annotations

import numpy as np


class GroundFloor:
    """Terrain plus clearance along a course [m MSL], linear between samples.

    Parameters
    ----------
    distance_m : ndarray, shape (J,)
        Sample positions along the course, increasing [m].
    floor_m : ndarray, shape (J,)
        Terrain + clearance at the samples [m MSL]; NaN where unknown (no floor).
    """

    def __init__(self, distance_m, floor_m):
        self.distance = np.asarray(distance_m, dtype=float)
        self.floor = np.asarray(floor_m, dtype=float)
        self._known = np.where(np.isfinite(self.floor), self.floor, -np.inf)

    @classmethod
    def from_hook(cls, hook) -> "GroundFloor | None":
        """The floor of a terrain requirement hook (anything with ``profile`` and ``clearance_m``)."""
        profile = getattr(hook, "profile", None)
        clearance = getattr(hook, "clearance_m", None)
        if profile is None or clearance is None:
            return None
        return cls(profile.distance_m, profile.elevation_m + float(clearance))

    def at(self, position_m) -> np.ndarray:
        """The floor at positions along the course [m MSL] (-inf where unknown)."""
        return np.interp(position_m, self.distance, self._known)

    def contact(self, start_m, height_m, per_metre, limit_m, above_m) -> np.ndarray:
        """Distance [m] from ``start_m`` (n,) where a glide from ``height_m`` (n,) losing
        ``per_metre`` (n,) [m/m] first meets the floor, within ``limit_m`` (n,); ``inf`` when
        it does not. Only samples above ``above_m`` (n,) (the glide's own lower stop, the
        band bottom) can stop it earlier than that stop, so only those are examined.
        0 when the glide starts at or below the floor.
        """
        start = np.asarray(start_m, dtype=float)
        h0 = np.asarray(height_m, dtype=float)
        hpm = np.asarray(per_metre, dtype=float)
        end = start + np.minimum(np.asarray(limit_m, dtype=float), self.distance[-1] + 1.0)
        out = np.full(start.shape, np.inf)
        here = h0 < self.at(start) - 1e-9
        out[here] = 0.0
        raised = np.flatnonzero(self._known > np.min(above_m, initial=np.inf))
        if not raised.size:
            return out
        where = self.distance[raised]
        first = np.searchsorted(where, start, side="right")
        last = np.minimum(np.searchsorted(where, end, side="right") + 1, where.size)  # the segment across the end
        count = np.where(here, 0, last - first)
        if not count.any():
            return out
        flight = np.repeat(np.arange(start.size), count)
        offset = np.arange(flight.size) - np.repeat(np.cumsum(count) - count, count)
        j = raised[np.repeat(first, count) + offset]
        x1, f1 = self.distance[j], self._known[j]
        x0 = np.maximum(self.distance[np.maximum(j - 1, 0)], start[flight])
        f0 = self.at(x0)
        g0 = h0[flight] - hpm[flight] * (x0 - start[flight])
        g1 = h0[flight] - hpm[flight] * (x1 - start[flight])
        d0, d1 = g0 - f0, g1 - f1
        below = d1 < 0.0
        with np.errstate(invalid="ignore", divide="ignore"):
            t = np.where(np.isfinite(d0) & (d0 > 0.0), d0 / (d0 - d1), 0.0)
        x = np.where(below, x0 + np.clip(t, 0.0, 1.0) * (x1 - x0), np.inf)
        best = np.full(start.size, np.inf)
        np.minimum.at(best, flight, x)
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
        matter are examined: beyond ``(band top - lowest top) / per_metre`` none can lower it."""
        position = np.asarray(position_m, dtype=float)
        top = np.asarray(band_top_m, dtype=float)
        out = top.copy()
        if not self.distance.size:
            return out
        slope = np.asarray(per_metre, dtype=float)
        with np.errstate(divide="ignore", invalid="ignore"):
            reach = np.where(slope > 0.0, np.maximum(top - self.top_m.min(), 0.0) / slope, np.inf)
        first = np.searchsorted(self.distance, position - self.spacing, side="left")
        last = np.searchsorted(self.distance, position + reach, side="right")
        count = np.maximum(last - first, 0)
        if not count.any():
            return out
        flight = np.repeat(np.arange(position.size), count)
        offset = np.arange(flight.size) - np.repeat(np.cumsum(count) - count, count)
        k = np.repeat(first, count) + offset
        ahead = np.maximum(self.distance[k] - position[flight], 0.0)
        np.minimum.at(out, flight, self.top_m[k] + slope[flight] * ahead)
        return out
