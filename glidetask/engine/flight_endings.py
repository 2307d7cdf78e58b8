"""How flights end, for the flight core's event loop (:class:`glidetask.engine.flight_simulation.Simulation`):
the final glide from where a flight is, the glide on at MacCready 0 when the climbs stop
(home if it reaches, else down to the floor, the terrain or a field), and a landing where
a flight is. Also the codes of why a flight ended (``Flown.reason``) and of what each
flight is doing.

:class:`FlightEndings` is a part of :class:`~glidetask.engine.flight_simulation.Simulation`
(its state and its other handlers are there); it is kept in its own module by concern.
"""

from __future__ import annotations

import numpy as np

from glidetask.engine.flight_ground import glide_allowance
from glidetask.engine.flight_requirement import polar_rows
from glidetask.engine.landing_fields import field_floor

# Why a flight ended (``Flown.reason``). A finished flight has FINAL_GLIDE, or the reason
# its climbs stopped if it then glided home at MacCready 0.
FINAL_GLIDE, LIFT_ENDED, NO_CLIMB, UNREACHABLE, NO_THERMAL_FOUND, BELOW_FLOOR, UNRESOLVED, TERRAIN_ABOVE_BAND = range(8)
REASONS = ("final glide", "lift ended", "no climb in the profile", "wind too strong for the glider",
           "no thermal found", "reached the finish below the arrival floor", "unresolved",
           "terrain plus clearance above the working band")

GLIDING, STARTING_CLIMB, CLIMBING, DONE = range(4)  # what each flight is doing (Simulation.mode)


class FlightEndings:
    """The handlers that end flights: the final glide, the glide on at MacCready 0, a landing.

    Methods of :class:`glidetask.engine.flight_simulation.Simulation`, which holds the state
    they read and write (see its docstring).
    """

    def _remaining(self, rows):
        """Distance left on every leg from the present position, shape (n, L)."""
        leg, position = self.leg[rows], self.position[rows]
        j = np.arange(self.legs)[None, :]
        remaining = np.where(j > leg[:, None], self.leg_length[None, :], 0.0)
        remaining[np.arange(rows.size), leg] = self.leg_length[leg] - position
        return remaining

    def _final(self, rows, reason: int = FINAL_GLIDE, per_metre=None, ground_speed_ms=None, mc=None) -> None:
        """The final glide from the present point over all remaining legs, then done.

        The planned final glide uses the cycle's table; a glide home after the climbs
        stopped passes the MacCready-0 table (``per_metre``, ``ground_speed_ms``) and ``mc`` = 0.
        """
        if not rows.size:
            return
        planned = per_metre is None
        per_metre = self.final_per_metre[rows] if planned else per_metre
        ground_speed_ms = self.final_ground_speed[rows] if planned else ground_speed_ms
        remaining = self._remaining(rows)
        flown = remaining != 0.0
        used = np.where(flown, remaining * per_metre, 0.0)
        time = np.where(flown, remaining / ground_speed_ms, 0.0)
        leg, t, height = self.leg[rows], self.time[rows], self.height[rows]
        j = np.arange(self.legs)[None, :]
        ahead, later = j >= leg[:, None], j > leg[:, None]
        cumulative_time = np.cumsum(time, axis=1)
        self.leg_time[rows] = np.where(ahead, np.nan_to_num(self.leg_time[rows]) + time, self.leg_time[rows])
        self.leg_arrival[rows] = np.where(ahead, height[:, None] - np.cumsum(used, axis=1), self.leg_arrival[rows])
        entry = t[:, None] + cumulative_time - time
        self.leg_entry[rows] = np.where(later, entry, self.leg_entry[rows])
        setting = self.final_mc[rows] if planned else mc
        self.leg_final_mc[rows] = np.where(later, self.final_mc[rows][:, None], self.leg_final_mc[rows])
        whole = later | ((j == leg[:, None]) & (self.position[rows] <= 0.0)[:, None] & ~self.leg_has_climb[rows])
        self.leg_final[rows] = whole
        self.leg_mc[rows] = np.where(whole, setting[:, None], self.leg_mc[rows])
        self.leg_climb[rows] = np.where(later, np.maximum(self.climb_rate[rows], 0.0)[:, None], self.leg_climb[rows])
        self.flown_final_from[rows] = self.leg_start[leg] + self.position[rows]
        self.flown_final_height[rows], self.flown_final_mc[rows], self.flown_final_leg[rows] = height, setting, leg
        self.flown_final_sigma[rows] = self.final_sigma[rows] if planned else self.band_sigma[rows]
        if not planned:  # the glide home's own table, for the requirements on its legs
            self.final_per_metre[rows], self.final_height_after[rows] = per_metre, self._tail(per_metre)
        self.end_time[rows] = t + cumulative_time[:, -1]
        self.finished[rows], self.reason[rows], self.mode[rows] = True, reason, DONE
        if self.trace is not None and rows[0] == 0:
            self._mark_legs(leg[0], height[0] - np.cumsum(used[0]), self.legs - 1, None, "final")

    def _glide_on(self, rows, reason: int) -> None:
        """No more climbs: glide on at MacCready 0 to the arrival floor; home if it reaches."""
        if not rows.size:
            return
        self.stop_time[rows] = self.time[rows]
        self._mark(rows, "stop")  # where the climbs stopped: the land-out's field is chosen in reach of it
        remaining = self._remaining(rows)
        per_metre, ground_speed_ms = self.best_per_metre[rows], self.best_ground_speed[rows]
        with np.errstate(invalid="ignore"):
            used = np.where(remaining != 0.0, np.where(np.isfinite(per_metre), remaining * per_metre, np.inf), 0.0)
        cumulative = np.cumsum(used, axis=1)
        available = self.height[rows] - self.floor[rows]
        if self.ground is not None:  # it glides on only while it keeps the clearance
            available = np.minimum(available, glide_allowance(
                self.ground, self.leg_start, self.leg[rows], self.position[rows], self.height[rows], remaining, per_metre,
                cumulative, self.floor[rows]))
        home = cumulative[:, -1] <= available
        if home.any():
            self._final(rows[home], reason, per_metre[home], ground_speed_ms[home], np.zeros(int(home.sum())))
        out = ~home
        if self.fields is not None and out.any():  # no terrain: down to the field it reaches
            landing = rows[out]
            x0 = (self.leg_start[self.leg[landing]] + self.position[landing]) / self.detour
            floor, field = field_floor(
                self.fields, x0, self.course_deg[self.leg[landing]], self.height[landing], remaining[out], per_metre[out],
                cumulative[out], polar_rows(self.band_polar, landing), self.inputs["wind_from_deg"][landing],
                self.inputs["wind_speed_ms"][landing], self.airmass[landing], self.inputs["arrival_margin_m"][landing],
                self.detour)
            found = field >= 0
            # never past the finish: a field below the finish's floor still ends the glide short of it
            lower = np.minimum(self.height[landing] - floor, np.nextafter(cumulative[out][:, -1], -np.inf))
            available[out] = np.where(found, lower, available[out])
            self.landout_field[landing] = field
        self._land_between(rows[out], reason, remaining[out], per_metre[out], ground_speed_ms[out], cumulative[out],
                           available[out])

    def _land_between(self, rows, reason, remaining, per_metre, ground_speed_ms, cumulative, available) -> None:
        """Flights gliding at MacCready 0 that reach the floor before the finish land there."""
        if not rows.size:
            return
        leg = self.leg[rows]
        j = np.arange(self.legs)[None, :]
        beyond = (cumulative > available[:, None]) & (j >= leg[:, None])
        land_leg = np.argmax(beyond, axis=1)
        line = np.arange(rows.size)
        before = np.where(land_leg > 0, cumulative[line, np.maximum(land_leg - 1, 0)], 0.0)
        with np.errstate(invalid="ignore", divide="ignore"):
            into = (available - before) / per_metre[line, land_leg]
        into = np.clip(np.nan_to_num(into, nan=0.0), 0.0, remaining[line, land_leg])
        flown = np.where(j < land_leg[:, None], remaining, 0.0)
        flown[line, land_leg] = into
        with np.errstate(invalid="ignore"):
            time = np.where(flown != 0.0, flown / ground_speed_ms, 0.0)
        ahead = (j >= leg[:, None]) & (j <= land_leg[:, None])
        self.leg_time[rows] = np.where(ahead, np.nan_to_num(self.leg_time[rows]) + time, self.leg_time[rows])
        done = (j >= leg[:, None]) & (j < land_leg[:, None])
        self.leg_arrival[rows] = np.where(done, self.height[rows][:, None] - cumulative, self.leg_arrival[rows])
        entered = (j > leg[:, None]) & (j <= land_leg[:, None])
        entry = self.time[rows][:, None] + np.cumsum(time, axis=1) - time
        self.leg_entry[rows] = np.where(entered, entry, self.leg_entry[rows])
        self.leg_final_mc[rows] = np.where(entered, self.final_mc[rows][:, None], self.leg_final_mc[rows])
        self.landout_at[rows] = self.leg_start[land_leg] + np.where(land_leg == leg, self.position[rows], 0.0) + into
        self.landout_leg[rows] = land_leg
        if self.trace is not None and rows[0] == 0:
            self._mark_legs(leg[0], self.height[0] - cumulative[0], land_leg[0], float(self.landout_at[0]), "glide",
                            float(self.height[0] - (before[0] + into[0] * per_metre[0, land_leg[0]])))
        self.end_time[rows] = self.time[rows] + time.sum(axis=1)
        self.reason[rows], self.mode[rows] = reason, DONE

    def _mark_legs(self, leg, height_after, last, end_m, phase, end_height=None) -> None:
        """Record the first flight's vertices at the leg ends it glides past, from leg ``leg`` to
        ``last`` (the finish), or to ``end_m`` [m along the course] on leg ``last``."""
        for j in range(int(leg), int(last) + 1):
            if end_m is not None and j == last:
                self.trace.append((end_m / self.detour, end_height, phase))
            else:
                self.trace.append((float(self.leg_start[j + 1]) / self.detour, float(height_after[j]), phase))

    def _landed(self, rows, reason: int) -> None:
        """Flights that land where they are: a search for a climb down to its floor, terrain above the
        band top, or a flight the core could not resolve."""
        if not rows.size:
            return
        self.stop_time[rows] = self.time[rows]
        self.landout_at[rows] = self.leg_start[self.leg[rows]] + self.position[rows]
        self.landout_leg[rows] = self.leg[rows]
        self.end_time[rows] = self.time[rows]
        self.reason[rows], self.mode[rows] = reason, DONE

    def give_up(self) -> None:
        rows = np.flatnonzero(self.mode != DONE)
        self._landed(rows, UNRESOLVED)
