"""The flight core: a task flown on paper, leg by leg, for many flights at once.

:func:`fly` simulates N flights over one shared course (the planned path's legs) by the
rules of shared/CONTRACT.md section 3: a glide from the start height, climb-and-glide
cycles in the working band with the climb following the clock and the drift of each
climb compensated in the glides, the last climb only as high as the final glide needs,
and the final glide over all remaining legs. Every per-flight quantity (polar, climb,
wind, start, band, end of lift, MacCready settings, margins) is an array of shape
``(N,)``; the loop runs over events (glide segments, climbs, turnpoints: a few dozen),
never over flights. The planner calls it with ``N = 1``; the ballast sweep and the
Monte-Carlo days call it with many flights, and the same inputs give the same numbers
in any batch.

The model
---------
* Wind with height (:mod:`glidetask.engine.flight_wind`): a leg's cruise glides in the
  wind at the middle of the band, a climb drifts with the mean wind over the heights it
  climbs, a final glide flies in the wind at its middle height (as for its density).
* Glides and climbs use the polar at the density of the middle of the working band;
  a final glide uses the density at the middle of its start height and its arrival
  height (the arrival floor). The start height of a final glide is itself what the
  requirement computes, so it is estimated from the previous cycle's requirement at
  the same place (at the first cycle from the MacCready-0 requirement); the error this
  leaves in the density is a few metres of height, under 0.1 m in the requirement.
* Each climb uses the achieved climb ``m_c`` at the moment it starts; the cycle's
  MacCready setting is the fixed one or ``m_c``; the speed to fly between climbs is the
  still-air MacCready speed (the drift-aware optimum, see
  :func:`glidetask.engine.speedtofly.cruise_in_wind`). A share
  ``f = m_c / (m_c + sink(v) - u)`` of the cycle is gliding. While climbing the glider
  drifts with the wind (``We`` along the course); in the glides the heading cancels the
  cycle's crosswind drift, so the air velocity across the course is ``-Wn/f`` and the
  glide's ground speed along the course is ``sqrt(v^2 - (Wn/f)^2) + We``. Over a whole
  cycle this gives the contract's ``Vc = sqrt((f v)^2 - Wn^2) + We``.
* The required height at a point is the arrival floor (finish elevation + margin)
  plus the pure-glide height used over the remaining legs at the final-glide setting,
  each leg with its own wind (:meth:`glidetask.engine.flight_requirement.FinalGlideRequirement.required`,
  the one place it is computed, with a hook for terrain). The final glide starts as soon as the height
  reaches it, in a glide or in a climb (the climb's drift moves the requirement too).
* When a climb is not possible (lift ended, or the profile is zero) or a leg cannot be
  flown against the wind, the flight glides on at MacCready 0 down to the arrival floor
  (the ground estimate): it finishes if that reaches the finish, otherwise it lands out
  there.

References
----------
.. [1] P. B. MacCready Jr., "Optimum airspeed selector", Soaring, Jan.-Feb. 1958 (from memory).
.. [2] H. Reichmann, Cross-Country Soaring, Thomson Publications, 1978: cruise in
   climb-and-glide cycles, drift in thermals, final glide (from memory).

Layout: this module holds the core's inputs and results and :func:`fly`;
:mod:`glidetask.engine.flight_simulation` moves the flights from event to event
(:mod:`glidetask.engine.flight_endings` ends them, :mod:`glidetask.engine.flight_records`
records each leg),
:mod:`glidetask.engine.flight_requirement` computes the final-glide requirement and
:mod:`glidetask.engine.flight_lift` the achieved climb against the clock.
"""

from __future__ import annotations

from dataclasses import dataclass, fields
from typing import Callable

import numpy as np

from glidetask.engine.flight_endings import (  # the reasons a flight ends, named where the core sets them
    BELOW_FLOOR, FINAL_GLIDE, LIFT_ENDED, NO_CLIMB, NO_THERMAL_FOUND, REASONS, TERRAIN_ABOVE_BAND, UNREACHABLE,
    UNRESOLVED,
)
from glidetask.engine.flight_simulation import Simulation
from glidetask.engine.polar import PolarSpec
from glidetask.engine.circling import DEFAULT_STALL_MARGIN, strength_for_climb
from glidetask.engine.scenario import Profile, Scenario, WindProfile

__all__ = ["BELOW_FLOOR", "FINAL_GLIDE", "LIFT_ENDED", "NO_CLIMB", "NO_THERMAL_FOUND", "REASONS", "TERRAIN_ABOVE_BAND",
           "UNREACHABLE",
           "UNRESOLVED", "Course", "Flights", "Flown", "RequirementHook", "SearchHook", "course_for", "flights_for",
           "fly", "requirement_card", "day_lift", "climb_strengths"]


@dataclass(frozen=True)
class Course:
    """The legs every flight flies (the planned path).

    Attributes
    ----------
    distance_m : ndarray, shape (L,)
        Leg lengths along the planned path [m].
    course_deg : ndarray, shape (L,)
        Geodesic azimuth at each leg's start [deg true].
    detour_factor : float, default 1
        The distance flown per metre of the planned path [-], >= 1 (``1 + detour_percent/100``,
        common practice): every leg is flown this much longer; the core's results are
        given in metres of the planned path all the same.
    """

    distance_m: np.ndarray
    course_deg: np.ndarray
    detour_factor: float = 1.0

    def __post_init__(self):
        distance = np.atleast_1d(np.asarray(self.distance_m, dtype=float))
        course = np.atleast_1d(np.asarray(self.course_deg, dtype=float))
        if distance.ndim != 1 or distance.shape != course.shape or distance.size == 0:
            raise ValueError("a course needs one distance and one course per leg (at least one leg)")
        if np.any(~(distance >= 0.0)):
            raise ValueError("leg distances must be finite and not negative")
        if not self.detour_factor >= 1.0:
            raise ValueError("the detour factor must be 1 or more")
        object.__setattr__(self, "distance_m", distance)
        object.__setattr__(self, "course_deg", course)

    @property
    def legs(self) -> int:
        return self.distance_m.size

    @property
    def leg_start_m(self) -> np.ndarray:
        """Distance along the course at each leg's start, and at the finish, shape (L+1,) [m]."""
        return np.concatenate([[0.0], np.cumsum(self.distance_m)])


@dataclass(frozen=True)
class Flights:
    """What differs between flights: every numeric field broadcasts to shape (N,).

    Attributes
    ----------
    spec : PolarSpec
        The glider's polar as measured (shared by all flights).
    mass_kg, bugs_percent : array_like
        Flying mass [kg] and bugs [% sink increase].
    wind_from_deg, wind_speed_ms : array_like
        The wind of the cruise's glides, at the middle of the working band [deg true, from], [m/s].
    wind_profile : WindProfile, optional
        The wind's change with height (shared by the flights): each flight's wind at another
        height is its own plus the profile's change from the band middle
        (:mod:`glidetask.engine.flight_wind`); None: the same wind at every height.
    start_time_s, start_height_m : array_like
        Start [s after midnight], [m MSL].
    band_top_m, band_bottom_m : array_like
        Working band [m MSL]; top above bottom. With a band top through the day
        (``band_top_times_s``), ``band_top_m`` is its highest value, the band top the
        density of the cruise's polar is taken from (contract section 3).
    band_top_times_s, band_top_values : array_like, shape (B,)
        The band top through the day (shared): times [s after midnight], strictly
        increasing, and tops [m MSL], linear between, held beyond; a climb's top is the
        value when the climb starts (capped at ``band_top_m``). Empty: the band top is
        ``band_top_m`` all day.
    lift_ends_s : array_like
        No climbs from this time on [s after midnight].
    lift_times_s : array_like, shape (P,)
        Times of the lift profile's pairs (shared), strictly increasing [s].
    lift_values : array_like, shape (P,) or (N, P)
        The profile's values: achieved climb [m/s], or thermal core strength [m/s] when
        ``lift_is_strength``; linear between the times, held beyond them.
    lift_scale : array_like
        Factor on the profile's values per flight [-] (1 for the forecast).
    lift_is_strength : bool or array_like of bool
        The profile is thermal strength, turned into achieved climb by the circling
        model (:func:`glidetask.engine.circling.achieved_climb`) for each flight's polar.
    thermal_radius_m : array_like
        e-folding radius of the thermal core, with ``lift_is_strength`` [m].
    mc_ms : array_like
        Fixed MacCready setting [m/s]; NaN: the achieved climb of each cycle.
    final_glide_mc_ms : array_like
        Final-glide setting [m/s]; NaN: the cruise setting at that moment.
    finish_elevation_m, arrival_margin_m : array_like
        The arrival floor is their sum [m MSL], [m].
    glide_airmass_ms : array_like
        Average vertical air motion while gliding, up positive [m/s].
    isa_deviation_c : array_like
        ISA temperature deviation [degC].
    centring_s : array_like
        Time lost centring each thermal before the climb begins [s] (common practice: 30 s).
    stall_margin : array_like
        Circling speed over the banked stall speed, with ``lift_is_strength`` [-]
        (:func:`glidetask.engine.circling.achieved_climb`; common practice 1.15).
    """

    spec: PolarSpec
    mass_kg: object
    start_time_s: object
    start_height_m: object
    band_top_m: object
    band_bottom_m: object
    lift_ends_s: object
    lift_times_s: object
    lift_values: object
    finish_elevation_m: object
    bugs_percent: object = 0.0
    wind_from_deg: object = 0.0
    wind_speed_ms: object = 0.0
    lift_scale: object = 1.0
    lift_is_strength: bool = False
    thermal_radius_m: object = 150.0
    mc_ms: object = np.nan
    final_glide_mc_ms: object = np.nan
    arrival_margin_m: object = 200.0
    glide_airmass_ms: object = 0.0
    isa_deviation_c: object = 0.0
    band_top_times_s: object = ()
    band_top_values: object = ()
    centring_s: object = 0.0
    wind_profile: object = None
    stall_margin: object = DEFAULT_STALL_MARGIN

    _PER_FLIGHT = ("mass_kg", "start_time_s", "start_height_m", "band_top_m", "band_bottom_m", "lift_ends_s",
                   "finish_elevation_m", "bugs_percent", "wind_from_deg", "wind_speed_ms", "lift_scale",
                   "thermal_radius_m", "mc_ms", "final_glide_mc_ms", "arrival_margin_m", "glide_airmass_ms",
                   "isa_deviation_c", "centring_s", "stall_margin")

    def columns(self) -> dict[str, np.ndarray]:
        """The per-flight fields as float arrays of one shape (N,) (read-only views)."""
        values = [np.atleast_1d(np.asarray(getattr(self, name), dtype=float)) for name in self._PER_FLIGHT]
        rows = np.atleast_2d(np.asarray(self.lift_values, dtype=float))
        size = np.broadcast_shapes(*(v.shape for v in values), (rows.shape[0] if rows.shape[0] > 1 else 1,))
        if len(size) != 1:
            raise ValueError("per-flight inputs must be scalars or 1-D arrays of one length")
        columns = {name: np.broadcast_to(v, size) for name, v in zip(self._PER_FLIGHT, values)}
        if np.any(~(columns["band_top_m"] > columns["band_bottom_m"])):
            raise ValueError("the working band's top must be above its bottom")
        if np.any(np.isnan(columns["mass_kg"])) or np.any(~np.isfinite(columns["start_time_s"])):
            raise ValueError("mass and start time must be finite")
        return columns

    @property
    def size(self) -> int:
        return self.columns()["mass_kg"].size


@dataclass(frozen=True)
class Flown:
    """What :func:`fly` returns: arrays of shape (N,), or (N, L) for per-leg values.

    Times are clock times [s after midnight] unless named a duration. Undefined
    values are NaN (integers: -1).

    Attributes
    ----------
    finished : ndarray of bool
        The flight reached the finish at or above the arrival floor.
    reason : ndarray of int
        :data:`FINAL_GLIDE`, or why the climbs stopped (:data:`LIFT_ENDED`,
        :data:`NO_CLIMB`, :data:`UNREACHABLE`, :data:`NO_THERMAL_FOUND`,
        :data:`BELOW_FLOOR`, :data:`UNRESOLVED`); names in :data:`REASONS`.
    total_time_s : ndarray
        Duration from the start to the finish, or to the landing [s].
    finish_time_s : ndarray
        Clock time at the finish; NaN if not finished.
    end_time_s : ndarray
        Clock time at the finish or the landing.
    stop_time_s : ndarray
        Clock time the climbs stopped (NaN for a planned final glide).
    landout_m : ndarray
        Distance along the course where the flight lands; NaN if finished.
    landout_leg : ndarray of int
        Leg index of the landing; -1 if finished.
    landout_field : ndarray of int or None
        Without terrain, flown with :class:`glidetask.engine.landing_fields.LandingFields`:
        the index of the field a land-out ends in, -1 if none is in reach or finished.
    final_glide_from_m, final_glide_height_m, final_glide_mc_ms : ndarray
        Where the final glide starts [m along the course], its start height [m MSL],
        its MacCready setting [m/s]; NaN without a final glide. After the climbs stop,
        a glide home at MacCready 0 counts as the final glide.
    final_glide_sigma : ndarray
        Density ratio of the final glide's polar [-].
    final_glide_leg : ndarray of int
        Leg in which the final glide starts; -1 without one.
    climbs : ndarray of int
        Number of climbs.
    last_climb_end_s : ndarray
        Clock time the last climb ended; NaN with no climb.
    leg_time_s : ndarray, (N, L)
        Time on each leg [s]; NaN for legs not reached; partial for the landing leg.
    leg_entry_time_s : ndarray, (N, L)
        Clock time at each leg's start.
    leg_arrival_height_m : ndarray, (N, L)
        Height on reaching each leg's end [m MSL]; NaN if not reached.
    leg_required_height_m : ndarray, (N, L)
        Required height at each leg's start, at the final-glide setting in force then [m MSL].
    leg_climb_ms, leg_mc_ms : ndarray, (N, L)
        The achieved climb and MacCready setting of the leg's first climb, or of the
        cycle in force on entering the leg if it has none [m/s]. On legs flown entirely
        in final glide ``leg_mc_ms`` is the final glide's setting.
    leg_final : ndarray of bool, (N, L)
        The leg is flown entirely in final glide.
    leg_airspeed_ms : ndarray, (N, L)
        Speed to fly in the leg's glides [m/s TAS] at the leg's settings: the final glide's
        on legs flown in final glide, best glide before any climb, else the cruise's.
    leg_heading_deg : ndarray, (N, L)
        Heading in the leg's glides [deg true]: in cruise it cancels the drift of a whole
        climb-and-glide cycle; in a pure glide it holds the course.
    leg_ground_speed_ms : ndarray, (N, L)
        Speed over the ground along the course while gliding [m/s].
    leg_cruise_speed_ms : ndarray, (N, L)
        Drift-aware average speed along the course with climbs at the leg's settings [m/s].
        The four ``leg_*speed``/heading arrays are NaN when ``fly`` ran with ``detail=False``.
    """

    finished: np.ndarray
    reason: np.ndarray
    total_time_s: np.ndarray
    finish_time_s: np.ndarray
    end_time_s: np.ndarray
    stop_time_s: np.ndarray
    landout_m: np.ndarray
    landout_leg: np.ndarray
    final_glide_from_m: np.ndarray
    final_glide_height_m: np.ndarray
    final_glide_mc_ms: np.ndarray
    final_glide_sigma: np.ndarray
    final_glide_leg: np.ndarray
    climbs: np.ndarray
    last_climb_end_s: np.ndarray
    leg_time_s: np.ndarray
    leg_entry_time_s: np.ndarray
    leg_arrival_height_m: np.ndarray
    leg_required_height_m: np.ndarray
    leg_climb_ms: np.ndarray
    leg_mc_ms: np.ndarray
    leg_final: np.ndarray
    leg_airspeed_ms: np.ndarray
    leg_heading_deg: np.ndarray
    leg_ground_speed_ms: np.ndarray
    leg_cruise_speed_ms: np.ndarray
    landout_field: np.ndarray | None = None  # index into the LandingFields flown with (no terrain), -1 none
    trace: tuple | None = None  # the first flight's profile vertices (distance_m, height_m, phase) with record=True

    def flight(self, i: int) -> "Flown":
        """The results of flight ``i`` alone (arrays of length 1; the trace stays with flight 0)."""
        return Flown(**{f.name: None if getattr(self, f.name) is None else getattr(self, f.name)[i:i + 1]
                        for f in fields(self) if f.name != "trace"},
                     trace=self.trace if i == 0 else None)


#: ``search(flights, climb_number) -> distance_m``: called when flights (indices, shape (n,))
#: reach the band bottom before their climb number ``climb_number`` (0 = the first climb);
#: returns how far they must glide on before that climb starts [m], >= 0.
SearchHook = Callable[[np.ndarray, np.ndarray], np.ndarray]

#: ``extra(position_m, height_per_metre, floor_m) -> extra_m``: height to add to the pure
#: final-glide requirement at ``position_m`` (n,) [m along the course], >= 0. Row ``i`` of
#: ``height_per_metre`` (n, L) is the final glide's height used per metre on each leg for that
#: position (legs behind the position are 0: not flown), ``floor_m`` (n,) its arrival floor, so the pure requirement at any point ``x``
#: ahead is the floor plus the table integrated from ``x`` to the finish. For a terrain check:
#: the largest (terrain + clearance - pure requirement) over the path ahead, or 0. That
#: never grows along the path, so using its value at a segment's start is conservative.
#: The core asks only for positions whose pure requirement is defined (a flight still too
#: far out for a final-glide table is not asked).
RequirementHook = Callable[[np.ndarray, np.ndarray, np.ndarray], np.ndarray]


def fly(course: Course, flights: Flights, *, search: SearchHook | None = None,
        requirement: RequirementHook | None = None, detail: bool = True, record: bool = False,
        max_events: int = 5000) -> Flown:
    """Fly N flights over one course, vectorised over the flights.

    Parameters
    ----------
    course : Course
        The L legs (distances [m], courses [deg true]) shared by all flights.
    flights : Flights
        The per-flight inputs, each broadcasting to shape (N,).
    search : SearchHook, optional
        How far beyond the band bottom each flight must glide to find its next climb
        (Monte-Carlo days); a flight that reaches the arrival floor first lands out
        there (:data:`NO_THERMAL_FOUND`). Default: every climb is found at the bottom.
    requirement : RequirementHook, optional
        Extra final-glide height along the path (terrain); default none. A terrain hook
        (:class:`glidetask.engine.clearance_hook.PathTerrain`) also keeps every glide the
        clearance above the ground (:mod:`glidetask.engine.flight_ground`).
    detail : bool, default True
        Compute ``leg_required_height_m`` (one more final-glide solve over every leg
        reached); NaN when False, which saves that work for large batches.
    record : bool, default False
        Record the first flight's planned profile (``Flown.trace``: a vertex at every event,
        each climb's bottom and top, every leg end of its final glide); the planner asks for
        it, the many-flight callers (sweep, odds) skip it.
    max_events : int
        Safety cap on the event loop; flights still flying are marked :data:`UNRESOLVED`.

    Returns
    -------
    Flown
        Per-flight arrays (see :class:`Flown`).

    Notes
    -----
    Each pass of the loop moves every flight that is gliding to its next event (a
    turnpoint, the band bottom, the end of a search, or the final-glide height) and
    every flight that is climbing to its next event (the band top, the final-glide
    height, a turnpoint reached by drift, the end of lift); the events are solved in
    closed form, because heights and requirements are linear in distance on a leg.
    Only the final-glide speed to fly needs a solver: one vectorised call per cycle for
    the flights starting a climb. See the module docstring for the model.
    """
    simulation = Simulation(course, flights, search, requirement, record)
    for _ in range(max_events):
        if not simulation.step():
            break
    else:
        simulation.give_up()
    trace = None if simulation.trace is None else tuple(simulation.trace)
    return Flown(**simulation.result(detail), trace=trace)


# ---------------------------------------------------------------- the core's inputs from a scenario


def course_for(path, detour_percent: float = 0.0) -> Course:
    """The flight core's legs for a planned path (a :class:`~glidetask.engine.task.TaskPath`),
    flown ``detour_percent`` longer (``Day.detour_percent``)."""
    return Course([leg.distance_m for leg in path.legs], [leg.course_deg for leg in path.legs],
                  1.0 + float(detour_percent) / 100.0)


def flights_for(scenario: Scenario) -> Flights:
    """The flight core's inputs for one flight of ``scenario`` (scalars; vary them with
    :func:`dataclasses.replace` to fly many).

    The lift profile is the day's achieved climb, or its thermal strength
    (``lift_is_strength``) for the circling model. Fixed settings absent from the
    scenario are NaN (the core then follows the climb of each cycle).
    """
    day, glider, safety = scenario.day, scenario.glider, scenario.safety
    profile, is_strength = day_lift(scenario)
    nan = float("nan")
    cruise_wind = day.wind_at(day.band_middle_m)
    return Flights(
        spec=glider.spec, mass_kg=glider.mass_kg, bugs_percent=glider.bugs_percent,
        wind_from_deg=cruise_wind.from_deg, wind_speed_ms=cruise_wind.speed_ms,
        wind_profile=day.wind if isinstance(day.wind, WindProfile) else None,
        start_time_s=day.start_time_s, start_height_m=day.effective_start_height_m,
        band_top_m=day.band_top_m, band_bottom_m=day.band_bottom_m, lift_ends_s=day.lift_ends_s,
        lift_times_s=tuple(profile.times_s), lift_values=tuple(profile.values),
        band_top_times_s=() if day.band_top_profile is None else tuple(day.band_top_profile.times_s),
        band_top_values=() if day.band_top_profile is None else tuple(day.band_top_profile.values),
        lift_is_strength=is_strength, thermal_radius_m=day.effective_thermal_radius_m,
        mc_ms=nan if day.mc_ms is None else day.mc_ms,
        final_glide_mc_ms=nan if safety.final_glide_mc_ms is None else safety.final_glide_mc_ms,
        finish_elevation_m=scenario.task.points[-1].turnpoint.elevation_m,
        arrival_margin_m=safety.arrival_margin_m, glide_airmass_ms=day.glide_airmass_ms,
        isa_deviation_c=day.isa_deviation_c, centring_s=day.centring_s, stall_margin=day.stall_margin)


def day_lift(scenario: Scenario) -> tuple[Profile, bool]:
    """The day's lift for the glider as loaded: ``(profile, is_strength)``.

    A thermal-strength day is itself. A day of achieved climbs (``climb_ms``) belongs to
    the loading they were given for (``Day.climb_ballast_kg``, the task file's ballast;
    None: whatever the glider carries): at that ballast the climbs are flown as given;
    at any other each value is turned once into the thermal strength in which the given
    loading achieves it (:func:`glidetask.engine.circling.strength_for_climb`, at the band
    middle's density, in thermals of the day's radius), and the circling model then gives
    this mass its own climb (shared/CONTRACT.md section 3). No lift (0) stays none.
    """
    day, glider = scenario.day, scenario.glider
    if day.climb is None:
        return day.thermal_strength, True
    if day.climb_ballast_kg is None or day.climb_ballast_kg == glider.ballast_kg:
        return day.climb, False
    return Profile(day.climb.times_s, tuple(float(x) for x in climb_strengths(scenario))), True


def climb_strengths(scenario: Scenario) -> np.ndarray:
    """The thermal strength behind each value of the day's achieved-climb profile [m/s]: the
    strength in which the glider at the climbs' own ballast achieves it (0 where the profile
    is 0). The one conversion from climb to strength (:func:`day_lift`)."""
    day, glider = scenario.day, scenario.glider
    ballast = glider.ballast_kg if day.climb_ballast_kg is None else day.climb_ballast_kg
    own = glider.polar_at(day.band_middle_m, day.isa_deviation_c, ballast_kg=ballast)
    values = np.asarray(day.climb.values, dtype=float)
    strength = np.asarray(strength_for_climb(own, values, day.effective_thermal_radius_m,
                                             stall_margin=day.stall_margin), dtype=float)
    return np.where(values > 0.0, np.nan_to_num(strength, nan=0.0), 0.0)


def requirement_card(course: Course, flights: Flights, mc_values,
                     requirement: RequirementHook | None = None) -> np.ndarray:
    """Required height [m MSL] at each leg's start and at the finish for final glides home
    at several MacCready settings, shape (N, M, L+1), M = ``len(mc_values)``.

    Each requirement is computed as in :func:`fly`: the arrival floor plus the pure-glide
    height used over the remaining legs in their own wind, the density at the middle of
    its start and arrival heights, plus the ``requirement`` hook's extra (terrain). The
    last column is the floor itself.
    """
    simulation = Simulation(course, flights, None, requirement)
    settings = np.atleast_1d(np.asarray(mc_values, dtype=float))
    n, count, legs = simulation.n, settings.size, course.legs
    rows = np.repeat(np.arange(n), count * legs)
    leg = np.tile(np.arange(legs), n * count)
    mc = np.tile(np.repeat(settings, legs), n)
    zero = np.zeros(rows.size)
    hpm, _, tail, _ = simulation.final_table(rows, leg, zero, mc)
    required = simulation.required(rows, leg, zero, hpm, tail).reshape(n, count, legs)
    floor = np.broadcast_to(simulation.floor[:, None, None], (n, count, 1))
    return np.concatenate([required, floor], axis=2)
