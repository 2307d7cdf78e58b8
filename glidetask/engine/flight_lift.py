"""Achieved climb against the clock, for the flight core.

:class:`LiftClock` gives each flight's achieved climb at any time: the day's profile
(achieved climb, or thermal strength turned into achieved climb by the circling model,
tabulated once on a fixed strength grid so a flight gets the same table in any batch),
scaled per flight, and zero after the end of lift
(:func:`glidetask.engine.scenario.until_lift_ends`).
"""

from __future__ import annotations

import numpy as np

from glidetask.engine.circling import achieved_climb
from glidetask.engine.polar import Polar
from glidetask.engine.scenario import until_lift_ends

STRENGTH_STEP_MS = 0.05  # grid step of the achieved-climb tables against thermal strength [m/s]


class LiftClock:
    """Achieved climb against the clock for each flight (profile x scale; circling model)."""

    def __init__(self, flights, columns: dict, polar: Polar):
        self.times = np.atleast_1d(np.asarray(flights.lift_times_s, dtype=float))
        self.values = np.atleast_2d(np.asarray(flights.lift_values, dtype=float))
        if self.values.shape[-1] != self.times.size or np.any(np.diff(self.times) <= 0.0):
            raise ValueError("the lift profile needs one value per time and increasing times")
        self.scale = columns["lift_scale"]
        self.ends = columns["lift_ends_s"]
        self.table = None
        # Per flight: the profile is thermal strength (True) or achieved climb (False).
        self.is_strength = np.broadcast_to(np.asarray(flights.lift_is_strength, dtype=bool), self.ends.shape)
        if self.is_strength.any():
            self._tabulate(polar, columns["thermal_radius_m"], columns["stall_margin"])

    def _tabulate(self, polar: Polar, radius, stall_margin) -> None:
        """Achieved climb on a fixed strength grid, one row per distinct polar, radius and stall margin.

        The grid does not depend on the batch, so a flight gets the same table in any batch.
        """
        strongest = float(np.nanmax(np.abs(self.values)) * np.nanmax(self.scale))
        steps = int(np.ceil(strongest / STRENGTH_STEP_MS)) + 2
        grid = np.arange(steps) * STRENGTH_STEP_MS
        # The circling speed rests on the stall speed (circling.py), so it is part of the key.
        keys = np.column_stack([np.broadcast_to(np.asarray(x, dtype=float), radius.shape) for x in (
            polar.a, polar.b, polar.c, polar.min_speed_ms, polar.vne_ms, polar.wings_level_stall_ms, radius,
            stall_margin)])
        unique, self.table_row = np.unique(keys, axis=0, return_inverse=True)
        self.table_row = self.table_row.ravel()
        rows = Polar(a=unique[:, :1], b=unique[:, 1:2], c=unique[:, 2:3], min_speed_ms=unique[:, 3:4],
                     vne_ms=unique[:, 4:5], stall_speed_ms=unique[:, 5:6])
        self.table = np.asarray(achieved_climb(rows, grid[None, :], unique[:, 6:7], stall_margin=unique[:, 7:8]).climb_ms)

    def profile(self, rows, time_s):
        """The profile's value (x scale) for flights ``rows`` at their times ``time_s``."""
        row = rows if self.values.shape[0] > 1 else np.zeros_like(rows)  # only the two values around each time
        if self.times.size == 1:
            return self.values[row, 0] * self.scale[rows]
        clipped = np.clip(time_s, self.times[0], self.times[-1])
        j = np.clip(np.searchsorted(self.times, clipped, side="right") - 1, 0, self.times.size - 2)
        weight = (clipped - self.times[j]) / (self.times[j + 1] - self.times[j])
        value = self.values[row, j] * (1.0 - weight) + self.values[row, j + 1] * weight
        return value * self.scale[rows]

    def climb(self, rows, time_s):
        """Achieved climb [m/s] for flights ``rows`` at ``time_s``; 0 after the end of lift."""
        value = self.profile(rows, time_s)
        if self.table is not None:
            x = np.maximum(value, 0.0) / STRENGTH_STEP_MS
            j = np.minimum(np.floor(x).astype(int), self.table.shape[1] - 2)
            weight = x - j
            table = self.table[self.table_row[rows]]
            line = np.arange(rows.size)
            climb = np.where(value > 0.0, table[line, j] * (1.0 - weight) + table[line, j + 1] * weight, 0.0)
            value = np.where(self.is_strength[rows], climb, value)
        return until_lift_ends(value, time_s, self.ends[rows])
