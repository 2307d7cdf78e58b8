"""The final-glide requirement inside the flight core.

The height a flight needs at a point to glide home: the arrival floor plus the height
used over the remaining legs at the final-glide setting, each leg in its own wind, with
the polar at the density (and the wind) of the middle of the glide's start and arrival heights, plus
the terrain's extra from the requirement hook (:mod:`glidetask.engine.clearance_hook`).
:class:`FinalGlideRequirement` is the part of the simulation that computes it, the one
place it is computed; the tables it keeps per flight are documented on
:class:`glidetask.engine.flight_simulation.Simulation`.
"""

from __future__ import annotations

import numpy as np

from glidetask.engine.atmosphere import density_ratio
from glidetask.engine.finalglide import density_height_m
from glidetask.engine.flight_ground import height_used_after
from glidetask.engine.polar import Polar, scaled_polar
from glidetask.engine.speedtofly import glide_in_wind, speed_to_fly_still_air
from glidetask.engine.wind import ground_speed


#: A final glide from within this share of its leg's start distance of the start counts as
#: starting there (its table also solves the leg before): far above rounding, far below a metre.
START_TOLERANCE = 1e-9


def polar_rows(polar: Polar, rows, column: bool = True) -> Polar:
    """The polars of some flights, as a column (n, 1) for broadcasting against legs
    (``column``), or flat (n,)."""
    def pick(value):
        value = np.asarray(value, dtype=float)
        if not value.ndim:
            return value
        return value[rows][:, None] if column else value[rows]
    return Polar(a=pick(polar.a), b=pick(polar.b), c=pick(polar.c), min_speed_ms=pick(polar.min_speed_ms),
                 vne_ms=pick(polar.vne_ms), mass_kg=pick(polar.mass_kg), wing_area_m2=polar.wing_area_m2,
                 stall_speed_ms=pick(polar.stall_speed_ms))


class FinalGlideRequirement:
    """The requirement part of :class:`glidetask.engine.flight_simulation.Simulation`."""


    def _tail(self, hpm):
        """Height used from each leg's start to the finish, shape (n, L+1) (0 at the finish):
        :func:`glidetask.engine.flight_ground.height_used_after` over the legs flown."""
        return height_used_after(hpm, self.leg_length)

    def required(self, rows, leg=None, pos=None, hpm=None, tail=None):
        """Required height [m MSL] of flights ``rows`` (n,) at (leg, position in leg): the one
        place where the final-glide requirement along the remaining path is computed.

        ``hpm`` (n, L) and ``tail`` (n, L+1) default to each flight's present final-glide table.
        """
        leg = self.leg[rows] if leg is None else leg
        pos = self.position[rows] if pos is None else pos
        if hpm is None:  # the present tables, read where they are (the hook gets the rows it needs)
            required = (self.floor[rows] + self.final_per_metre[rows, leg] * (self.leg_length[leg] - pos)
                        + self.final_height_after[rows, leg + 1])
            if self.requirement_hook is not None:
                required = required + self._extra(required, self.leg_start[leg] + pos, self.final_per_metre[rows],
                                                  self.floor[rows])
            return required
        line = np.arange(rows.size)
        required = self.floor[rows] + hpm[line, leg] * (self.leg_length[leg] - pos) + tail[line, leg + 1]
        if self.requirement_hook is not None:
            required = required + self._extra(required, self.leg_start[leg] + pos, hpm, self.floor[rows])
        return required

    def _extra(self, required, position, hpm, floor):
        """The hook's extra height, asked only where the pure requirement is defined: a flight
        still too far out for a final-glide table (NaN) needs nothing from it."""
        asked = np.isfinite(required)
        # The hook works in metres of the planned path; the core in metres flown (the detour).
        position, hpm = position / self.detour, hpm * self.detour
        if asked.all():
            return np.asarray(self.requirement_hook(position, hpm, floor), dtype=float)
        extra = np.zeros(required.shape)
        if asked.any():
            extra[asked] = self.requirement_hook(position[asked], hpm[asked], floor[asked])
        return extra

    def _final_glide_bound(self):
        """A lower bound [m/m] of the final glide's height used per metre, any leg, setting and density.

        Over the ground a glider makes at most ``v + W``; a final glide's density is at most
        the arrival floor's, and a denser polar glides no flatter in wind. So the height per
        metre is at least ``min over v of (sink_floor(v) - max(u, 0)) / (v + W)``: the tangent
        from ``(-W, 0)`` to the polar at the floor's density. NaN where rising air could
        carry the glider (no bound).
        """
        inputs = self.inputs
        # The densest air any final glide here flies in: a glide that starts at the floor itself.
        sigma = density_ratio(density_height_m(self.floor, self.floor), inputs["isa_deviation_c"])
        polar = scaled_polar(self.spec, inputs["mass_kg"], inputs["bugs_percent"], sigma)
        a, b = np.asarray(polar.a), np.asarray(polar.b)
        c = np.asarray(polar.c) - np.maximum(self.airmass, 0.0)
        wind = self.aloft.strongest_ms()
        with np.errstate(invalid="ignore"):
            v = np.maximum(-wind + np.sqrt(wind * wind + (c - b * wind) / a), 0.0)
            bound = ((a * v + b) * v + c) / (v + wind)
        return np.where(bound > 0.0, bound * (1.0 - 1e-9), np.nan)

    def _far_from_final(self, rows):
        """Flights whose final glide cannot start before their next climb: no table needed.

        The furthest a cycle can carry a flight is its climb's drift plus a glide from the
        band top to the bottom at ground speed ``v + W``; if the lowest possible requirement
        there is still above the band top, no final glide can start in this cycle.
        """
        inputs = self.inputs
        top, bottom, wind = inputs["band_top_m"][rows], inputs["band_bottom_m"][rows], self.aloft.strongest_ms()[rows]
        rate, sink = self.climb_rate[rows], self.cruise_net_sink[rows]
        remaining = self.leg_start[-1] - self.leg_start[self.leg[rows]] - self.position[rows]
        with np.errstate(invalid="ignore", divide="ignore"):
            drift = np.where(rate > 0.0, np.maximum(top - self.height[rows], 0.0) / rate * wind, np.inf)
            glide = np.where(sink > 0.0, (top - bottom) * (self.cruise_airspeed[rows] + wind) / sink, np.inf)
            lowest = self.floor[rows] + self.final_per_metre_bound[rows] * np.maximum(remaining - drift - glide, 0.0)
        return (lowest > top + 1.0) & ~self.no_climb[rows]

    def _first_estimate(self, rows, leg, pos, mc_fg):
        """A cheap requirement [m MSL] to start the density iteration from: the band's polar
        at the still-air speed to fly, heading into the crosswind (no solver)."""
        line = np.arange(rows.size)
        polar = polar_rows(self.band_polar, rows)
        airmass = self.airmass[rows, None]
        v = speed_to_fly_still_air(polar, mc_fg[:, None], airmass)
        with np.errstate(invalid="ignore", divide="ignore"):
            ground = np.asarray(ground_speed(v, self.wind_along[rows], self.wind_across[rows]))
            hpm = np.where(ground > 0.0, (polar.sink(v) - airmass) / ground, self.best_per_metre[rows])
        tail = self._tail(hpm)
        return self.floor[rows] + hpm[line, leg] * (self.leg_length[leg] - pos) + tail[line, leg + 1]

    def final_table(self, rows, leg, pos, mc_fg, estimate=None):
        """Final-glide speeds per leg for flights ``rows`` starting at (leg, pos) at setting ``mc_fg``.

        The density is that of the middle of the start height (the requirement itself) and
        the arrival floor, found by two fixed-point passes from ``estimate`` (default a
        cheap first guess). Each pass shrinks the height error about twenty-fold, so the
        density matches the requirement to a few centimetres (a few decimetres from a
        poor first guess on long glides). Only the legs the glide flies are solved
        (:meth:`_legs_ahead`); the legs behind use no height (0) and have no ground speed (NaN).
        """
        inputs = self.inputs
        leg, pos = np.broadcast_to(leg, rows.shape), np.broadcast_to(pos, rows.shape)
        if estimate is None:
            estimate = self._first_estimate(rows, leg, pos, mc_fg)
        else:  # the cheap first guess only where there is no estimate (it is per flight: same bits)
            estimate = np.array(estimate, dtype=float)
            missing = np.flatnonzero(~np.isfinite(estimate))
            if missing.size:
                estimate[missing] = self._first_estimate(rows[missing], leg[missing], pos[missing], mc_fg[missing])
        flight, solved = self._legs_ahead(leg, pos)
        for attempt in range(2):
            estimate = np.where(np.isfinite(estimate), estimate, inputs["band_top_m"][rows])
            mid = np.asarray(density_height_m(estimate, self.floor[rows]))
            sigma = np.asarray(density_ratio(mid, inputs["isa_deviation_c"][rows]), dtype=float)
            polar = scaled_polar(self.spec, inputs["mass_kg"][rows], inputs["bugs_percent"][rows], sigma)
            along, across = self._final_wind(rows, mid)
            glide = glide_in_wind(polar_rows(polar, flight, column=False), mc_fg[flight], along[flight, solved],
                                  across[flight, solved], self.airmass[rows][flight])
            hpm, gs = np.zeros((rows.size, self.legs)), np.full((rows.size, self.legs), np.nan)
            hpm[flight, solved], gs[flight, solved] = glide.height_per_metre, glide.ground_speed_ms
            tail = self._tail(hpm)
            if attempt == 0:  # the next pass's start height, with the terrain's extra: the real start
                estimate = self.required(rows, leg, pos, hpm, tail)
        return hpm, gs, tail, sigma

    def _legs_ahead(self, leg, pos):
        """The (flight, leg) pairs a final glide from (leg, pos) flies: the legs from its own on,
        and the leg before for a start at (or within a rounding of) its leg's start, which the
        requirement hook (in metres of the planned path) may place at the end of that leg. The
        legs behind use no height in the table (and have no ground speed): no glide home from
        here or further on flies them."""
        at_start = pos <= START_TOLERANCE * (1.0 + self.leg_start[leg])
        first = np.maximum(leg - at_start, 0)
        return np.nonzero(np.arange(self.legs)[None, :] >= first[:, None])

    def _final_wind(self, rows, height_m):
        """The final glide's wind along and across each leg, at its middle height (the one
        whose density it takes), shape (n, L): the cruise's wind when it is the same at every
        height (:mod:`glidetask.engine.flight_wind`)."""
        if not self.aloft.varies:
            return self.wind_along[rows], self.wind_across[rows]
        return self.aloft.at(rows, height_m)

    def _solve_final(self, rows) -> None:
        """Give flights ``rows`` their cycle's final-glide table (where they are now)."""
        if not rows.size:
            return
        previous = self.required(rows)  # the last cycle's requirement here; NaN without a table
        hpm, gs, tail, sigma = self.final_table(rows, self.leg[rows], self.position[rows], self.final_mc[rows],
                                                 previous)
        self.final_per_metre[rows], self.final_ground_speed[rows], self.final_height_after[rows], self.final_sigma[rows] = hpm, gs, tail, sigma
