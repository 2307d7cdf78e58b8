"""The plan: a whole task flown on paper, leg by leg, into a :class:`Plan`.

:func:`plan` applies the what-ifs to a :class:`~glidetask.engine.scenario.Scenario`,
chooses the planned path (the optimized path of a racing task; for an area task the
target points that bring the planned time to the minimum time or just above it), flies
it with the vectorised flight core (:func:`glidetask.engine.flight.fly`, one flight) and
gathers what a pilot reads before take-off: per leg the climb and MacCready setting,
airspeed, heading, ground speeds, time, the height required at its start and the height
planned on reaching its end; the totals, where the final glide starts, and cautions.
The rules of the flight are the contract's section 3 (see :mod:`glidetask.engine.flight`).

The core's inputs for a scenario and a path are :func:`glidetask.engine.flight.flights_for`
and :func:`glidetask.engine.flight.course_for`, shared with the ballast sweep and the
Monte-Carlo days, which vary them per flight.

Safety over the ground: when the task names an elevation model (``[terrain] file``) the
plan samples it along every path it flies (:func:`glidetask.engine.clearance_hook.path_terrain`),
lets it raise the final-glide requirement wherever the terrain ahead demands more height
than the arrival margin, and reports the final glide over the terrain from the same
samples (:attr:`Plan.terrain`). Whenever the turnpoint collection has landable fields it
reports the coverage along the planned path from the band bottom
(:func:`glidetask.engine.reach_coverage.coverage`, :attr:`Plan.landables`).

References
----------
.. [1] FAI Sporting Code Section 3 (Gliding), Annex A: assigned-area tasks are scored
   on the marking distance over the greater of the task time and the minimum task time
   (from memory).
"""

from __future__ import annotations

import dataclasses
import math
from dataclasses import dataclass

import numpy as np

from glidetask import cautions as caution_text
from glidetask.engine import flight
from glidetask.engine.atmosphere import density_ratio
from glidetask.engine import task as task_geometry
from glidetask.engine import task_search
from glidetask.engine.flight import Flown, course_for, flights_for, fly
from glidetask.engine.plan_airspace import airspace_check, corridor
from glidetask.engine.clearance import TerrainPoint, nearest_landmark
from glidetask.engine.plan_airspace import airspace_check, corridor
from glidetask.engine.plan_ground import Floor, Landout, PlannedProfile, ground_facts, point_at
from glidetask.engine.landing_fields import landing_fields
from glidetask.engine.plan_safety import check_model_covers, load_terrain_for, terrain_requirement, with_safety
from glidetask.engine.scenario import Scenario, Wind, with_what_ifs
from glidetask.units import METRIC

AREA_TIME_SLACK = 0.05  # planned area-task time within [min time, (1 + this) x min time]
TIGHT_DAY_S = 1800.0  # caution when the last climb ends this close to the end of lift [s]
THIN_MARGIN_M = 150.0  # caution for an arrival margin below this [m] (common practice)
CARD_MC_MS = (0.0, 1.0, 2.0, 3.0)  # MacCready settings of the briefing's final-glide card


@dataclass(frozen=True)
class LegPlan:
    """One leg of the plan (contract 5.3), SI units.

    Attributes
    ----------
    from_name, to_name : str
        Turnpoint names.
    distance_m : float
        Length along the planned path [m].
    course_deg : float
        Geodesic azimuth at the leg's start [deg true].
    climb_ms, mc_ms : float
        Achieved climb and MacCready setting used: those of the leg's first climb, or of
        the climb in force on entering the leg if it has none [m/s]. On a leg flown in
        final glide ``mc_ms`` is the final glide's setting. NaN if the leg is not reached.
    airspeed_ms : float
        Speed to fly in the leg's glides [m/s TAS]; on final-glide legs the final glide's.
    heading_deg : float
        Heading in the leg's glides [deg true]: in cruise it makes good the course over a
        whole climb-and-glide cycle (the glides cancel the drift of the climbs); on
        final-glide legs it holds the course on the glide.
    glide_ground_speed_ms : float
        Speed over the ground along the course while gliding [m/s].
    cruise_speed_ms : float
        Drift-aware average speed along the course with climbs, at ``climb_ms`` and
        ``mc_ms`` [m/s] (contract section 3); NaN without a climb.
    time_s : float
        Time on the leg [s]; for the leg where the plan ends short, the time until it does.
    required_height_m : float
        Height needed at the leg's start to final-glide home with the margin [m MSL].
    arrival_height_m : float
        Planned height on reaching the leg's end [m MSL]; NaN if not reached.
    final_glide : bool
        The leg is flown entirely in final glide.
    start_time_s : float
        Clock time at the leg's start [s after midnight]; NaN if not reached.
    indicated_airspeed_ms : float
        ``airspeed_ms`` as indicated, ``TAS sqrt(sigma)`` at the leg's density (the band
        middle's; a final-glide leg's, its final glide's) [m/s IAS]: what the pilot flies.
    average_speed_ms : float
        The leg's distance over its time [m/s], climbs, centring and detour included.
    """

    from_name: str
    to_name: str
    distance_m: float
    course_deg: float
    climb_ms: float
    mc_ms: float
    airspeed_ms: float
    heading_deg: float
    glide_ground_speed_ms: float
    cruise_speed_ms: float
    time_s: float
    required_height_m: float
    arrival_height_m: float
    final_glide: bool
    start_time_s: float
    indicated_airspeed_ms: float = math.nan
    average_speed_ms: float = math.nan


@dataclass(frozen=True)
class AreaPlan:
    """How an assigned-area task's targets were chosen [m], [s]."""

    min_distance_m: float
    max_distance_m: float
    target_distance_m: float
    min_time_s: float
    depth: float  # 0 = the shortest path through the areas, 1 = the longest


@dataclass(frozen=True)
class Notice:
    """A fact about a plan that a pilot must be told; :mod:`glidetask.cautions` words it.

    Attributes
    ----------
    code : str
        What it is: ``"ends_short"``, ``"lift_ends_before_final_glide"``, ``"tight_day"``,
        ``"under_min_time"``, ``"thin_margin"``, ``"final_glide_at_mc0"``,
        ``"rising_air_counted"``, ``"areas_too_long"``, ``"areas_too_short"``.
    facts : dict
        The numbers (SI: ``_m``, ``_ms``, ``_s`` durations, ``_time_s`` clock times in
        seconds after midnight, ``_deg``) and names it is about.
    """

    code: str
    facts: dict = dataclasses.field(default_factory=dict)


@dataclass(frozen=True)
class Plan:
    """A task flown on paper (contract 5.3 in SI units; see :mod:`glidetask.formats.plan_json`).

    Attributes
    ----------
    scenario : Scenario
        The inputs with the what-ifs applied.
    path : TaskPath
        The planned path (racing: the optimized path; area: through the chosen targets).
    legs : tuple of LegPlan
    nominal_distance_m, optimized_distance_m, planned_distance_m : float
        Centre to centre, shortest through the zones, and along the planned path [m].
    area : AreaPlan or None
        For area tasks.
    mass_kg, wing_loading_kgm2, best_ld, best_ld_speed_ms : float
        The glider as loaded; best L/D speed TAS at the middle of the working band.
    total_time_s : float
        Start to finish, or to where the plan ends short [s].
    task_speed_ms : float
        Racing: optimized distance over the time; area: planned distance over the greater
        of the time and the minimum time [1]_; NaN when the plan ends short.
    finished : bool
    finish_time_s : float
        Clock time at the finish; NaN when the plan ends short.
    landout_m : float
        Distance along the planned path where the plan ends short; NaN when finished.
    final_glide_from_m, final_glide_height_m, final_glide_mc_ms : float
        Where the final glide starts (distance along the path), its start height [m MSL]
        and MacCready setting; NaN without one.
    reason : str
        How the flight ended (:data:`glidetask.engine.flight.REASONS`).
    notices : tuple of Notice
        The facts about this plan a pilot must be told (worded, with the general, terrain
        and landable cautions, by :func:`glidetask.cautions.plan_cautions`).
    flown : Flown
        The flight core's full result (one flight).
    terrain : FinalGlideTerrain or None
        The final glide checked over the elevation model
        (:class:`glidetask.engine.clearance.FinalGlideTerrain`), from the same samples that
        raised its requirement; None without a model or without a final glide.
    landables : Coverage or None
        Landable coverage along the planned path from the band bottom
        (:class:`glidetask.engine.reach.Coverage`); None when no turnpoint is landable.
    requirement : RequirementHook or None
        The extra final-glide requirement the plan was flown with (a
        :class:`glidetask.engine.clearance_hook.PathTerrain` when the task has a model).
    terrain_source : str or None
        The elevation model's file when the task has one (even when no final glide
        could be checked), as the task names it: relative to the task file
        (:func:`shown_terrain_source`); ``terrain.source`` is the same.
    profile : PlannedProfile or None
        The planned height of the whole flight (:mod:`glidetask.engine.plan_ground`).
    floors : tuple of Floor
        Where terrain + clearance raised the glides' floor above the band bottom.
    uncovered : tuple of (from_m, to_m)
        Stretches of the planned path the elevation model does not cover.
    landout : Landout or None
        Where a plan that ends short lands, and in which field; None when finished.
    airspace : AirspaceCheck or None
        The planned path checked against the task's airspace (:mod:`glidetask.engine.airspace`).
    """

    scenario: Scenario
    path: object
    legs: tuple[LegPlan, ...]
    nominal_distance_m: float
    optimized_distance_m: float
    planned_distance_m: float
    area: AreaPlan | None
    mass_kg: float
    wing_loading_kgm2: float
    best_ld: float
    best_ld_speed_ms: float
    total_time_s: float
    task_speed_ms: float
    finished: bool
    finish_time_s: float
    landout_m: float
    final_glide_from_m: float
    final_glide_height_m: float
    final_glide_mc_ms: float
    reason: str
    notices: tuple[Notice, ...]
    flown: Flown
    terrain: object | None = None
    landables: object | None = None
    requirement: object | None = None
    terrain_source: str | None = None
    profile: "PlannedProfile | None" = None
    floors: "tuple[Floor, ...]" = ()
    uncovered: tuple[tuple[float, float], ...] = ()
    landout: "Landout | None" = None
    airspace: object | None = None

    @property
    def cautions(self) -> tuple[str, ...]:
        """Every caution of this plan worded in metric units, as the contract's JSON carries
        them (:func:`glidetask.cautions.plan_cautions`; outputs in other units call it)."""
        return tuple(caution_text.plan_cautions(self, METRIC))

    @property
    def start_time_s(self) -> float:
        return self.scenario.day.start_time_s

    @property
    def arrival_floor_m(self) -> float:
        """Finish elevation plus the arrival margin [m MSL]."""
        return self.scenario.task.points[-1].turnpoint.elevation_m + self.scenario.safety.arrival_margin_m

    @property
    def last_climb_end_s(self) -> float:
        return float(self.flown.last_climb_end_s[0])

    @property
    def terrain_path(self):
        """The terrain sampled along the planned path (a ``PathTerrain``), or None."""
        return self.requirement if hasattr(self.requirement, "profile") else None

    @property
    def terrain_ok(self) -> bool | None:
        """The contract's ``terrain.ok``: the final glide clears the terrain by the clearance
        and the model covers the whole planned path; None without a model."""
        if self.terrain_source is None:
            return None
        path = self.terrain_path
        covered = path is None or path.profile.covered_share >= 1.0
        return bool(self.terrain is not None and self.terrain.ok and covered)


# ---------------------------------------------------------------- the plan


def plan(scenario: Scenario, *, mc_ms=None, ballast_kg=None, bugs_percent=None, wind: Wind | None = None,
         start_time_s=None, requirement_for=None, memo=None) -> Plan:
    """Fly the scenario's task on paper.

    Parameters
    ----------
    scenario : Scenario
        Task, glider, day and margins (from :func:`glidetask.formats.task_file.load_scenario`).
    mc_ms : float, optional
        Fixed MacCready setting [m/s] instead of the day's.
    ballast_kg, bugs_percent : float, optional
        Water ballast [kg] and bugs [%] instead of the task file's.
    wind : Wind, optional
        The wind instead of the day's.
    start_time_s : float, optional
        Start time [s after midnight] instead of the day's.
    requirement_for : callable, optional
        ``requirement_for(scenario, path) -> RequirementHook or None``: extra final-glide
        height along a candidate path (see :data:`glidetask.engine.flight.RequirementHook`),
        asked once per path flown. Default: the task's elevation model, if it has one
        (:func:`glidetask.engine.plan_safety.terrain_requirement`).
    memo : callable, optional
        ``memo(kind, key, compute)``: keeps the terrain sampled along a path and the
        landable coverage by the values they depend on (``plan_safety.Memo``); the
        terminal UI's recompute passes one, as it replans on every edit. None: computed.

    Returns
    -------
    Plan
        A plan that ends short (wind too strong, no lift) is a result: ``finished``
        false, ``landout_m`` and a caution that says why. With an elevation model the
        plan carries the final glide checked over the terrain (``terrain``); with landable
        turnpoints, the coverage along the planned path (``landables``).

    Raises
    ------
    InputError
        What-ifs that make the inputs inconsistent (see :func:`with_what_ifs`); an
        elevation model that cannot be read or does not cover the task at all (named
        ``[terrain] file`` of the task file).
    """
    scenario = with_what_ifs(scenario, mc_ms=mc_ms, ballast_kg=ballast_kg, bugs_percent=bugs_percent, wind=wind,
                             start_time_s=start_time_s)
    model = load_terrain_for(scenario)
    if requirement_for is None and model is not None:
        requirement_for = terrain_requirement(model, memo)
    elif requirement_for is None:  # no terrain: a land-out ends in the field it reaches
        requirement_for = landing_fields
    if scenario.airspace is not None:  # the band top capped under the task's airspace (plan_airspace)
        requirement_for = _under_airspace(requirement_for, model)
    task = scenario.task
    flights = flights_for(scenario)
    optimized = task_search.optimized_path(task)
    area = None
    notes: list[str] = []
    hooks: list[tuple[object, object]] = []  # (path, hook) of every path flown

    def fly_path(path):
        hook = None if requirement_for is None else requirement_for(scenario, path)
        hooks.append((path, hook))
        return fly(course_for(path, scenario.day.detour_percent), flights, requirement=hook, record=True)

    if task.kind == "area":
        path, flown, area, notes = _area_path(scenario, fly_path)
    else:
        path, flown = optimized, fly_path(optimized)
    hook = next(h for p, h in hooks if p is path)
    if model is not None:
        check_model_covers(scenario, model, hook)
    result = _assemble(scenario, path, flown, task_geometry.nominal_distance_m(task), optimized.total_m, area, notes)
    profile, floors, uncovered, landout = ground_facts(scenario, path, flown, hook)
    result = dataclasses.replace(result, profile=profile, floors=floors, uncovered=uncovered, landout=landout)
    result = with_safety(result, hook, model, memo)
    result = dataclasses.replace(result, notices=_ground_notices(result))
    return dataclasses.replace(result, airspace=airspace_check(result))


def _under_airspace(requirement_for, model):
    """``requirement_for`` wrapped in the airspace corridor of each path flown."""
    def corridor_for(scenario, path):
        inner = None if requirement_for is None else requirement_for(scenario, path)
        return corridor(scenario, path, inner, model)
    return corridor_for


def _area_path(scenario: Scenario, fly_path):
    """Targets of an area task: the depth whose planned time is in [T, 1.05 T] (T the minimum
    time) when the areas allow; else the longest path (too short) or the shortest (too long).

    The time grows with the depth (the path with it), so a bracketing secant search on
    ``time(depth) - 1.025 T`` finds it in a few flights.
    """
    task = scenario.task
    minimum = float(task.min_time_s)
    shortest, longest = task_search.area_distance_range(task)

    def attempt(depth):
        lats, lons = task_search.area_targets(task, float(depth))
        path = task_geometry.path_through(task, lats, lons)
        flown = fly_path(path)
        time = float(flown.total_time_s[0]) if flown.finished[0] else math.inf
        return depth, path, flown, time

    def good(time):
        return minimum <= time <= (1.0 + AREA_TIME_SLACK) * minimum

    low = attempt(0.0)
    notes: list[Notice] = []
    if low[3] >= minimum:
        chosen = low
        if low[3] > (1.0 + AREA_TIME_SLACK) * minimum and math.isfinite(low[3]):
            notes.append(Notice("areas_too_long", dict(distance_m=shortest, time_s=low[3], min_time_s=minimum)))
    else:
        high = attempt(1.0)
        chosen = high
        if high[3] < minimum:
            notes.append(Notice("areas_too_short", dict(distance_m=longest, time_s=high[3], min_time_s=minimum)))
        elif not good(high[3]):
            chosen = _bisect_depth(attempt, low, high, minimum)
    depth, path, flown, _ = chosen
    area = AreaPlan(shortest, longest, path.total_m, minimum, float(depth))
    return path, flown, area, notes


def _bisect_depth(attempt, low, high, minimum, tries: int = 14):
    """Regula falsi (Illinois) on the depth between a too-short ``low`` and a too-long ``high``."""
    target = (1.0 + AREA_TIME_SLACK / 2.0) * minimum
    f_low, f_high = low[3] - target, min(high[3], 10.0 * minimum) - target
    side = 0
    best = high
    for _ in range(tries):
        depth = (low[0] * f_high - high[0] * f_low) / (f_high - f_low)
        if not low[0] < depth < high[0]:
            depth = 0.5 * (low[0] + high[0])
        trial = attempt(depth)
        if minimum <= trial[3] <= (1.0 + AREA_TIME_SLACK) * minimum:
            return trial
        f_trial = min(trial[3], 10.0 * minimum) - target
        if f_trial < 0.0:
            low, f_low = trial, f_trial
            f_high = f_high / 2.0 if side == -1 else f_high
            side = -1
        else:
            high, f_high, best = trial, f_trial, trial
            f_low = f_low / 2.0 if side == 1 else f_low
            side = 1
    return best


def _assemble(scenario, path, flown: Flown, nominal_m, optimized_m, area, notes) -> Plan:
    day = scenario.day
    polar = scenario.glider.polar_at(day.band_middle_m, day.isa_deviation_c)
    legs = _legs(path, flown, float(density_ratio(day.band_middle_m, day.isa_deviation_c)))
    finished = bool(flown.finished[0])
    total = float(flown.total_time_s[0])
    planned = path.total_m
    if not finished:
        speed = math.nan
    elif area is not None:
        speed = planned / max(total, area.min_time_s)
    else:
        speed = optimized_m / total
    plan = Plan(
        scenario=scenario, path=path, legs=legs, nominal_distance_m=nominal_m, optimized_distance_m=optimized_m,
        planned_distance_m=planned, area=area, mass_kg=float(scenario.glider.mass_kg),
        wing_loading_kgm2=float(polar.wing_loading_kgm2), best_ld=float(polar.best_ld),
        best_ld_speed_ms=float(polar.best_ld_speed_ms), total_time_s=total, task_speed_ms=speed,
        finished=finished, finish_time_s=float(flown.finish_time_s[0]), landout_m=float(flown.landout_m[0]),
        final_glide_from_m=float(flown.final_glide_from_m[0]), final_glide_height_m=float(flown.final_glide_height_m[0]),
        final_glide_mc_ms=float(flown.final_glide_mc_ms[0]), reason=flight.REASONS[int(flown.reason[0])],
        notices=(), flown=flown)
    return dataclasses.replace(plan, notices=tuple(notes) + plan_notices(plan))


def _legs(path, flown: Flown, band_sigma: float) -> tuple[LegPlan, ...]:
    """The plan's legs from the flight core's records (one flight); NaN where not reached.
    ``band_sigma``: the density ratio at the band middle (the cruise's)."""
    reached = np.isfinite(flown.leg_entry_time_s[0])
    out = []
    for i, leg in enumerate(path.legs):
        def value(name):
            return float(getattr(flown, name)[0, i]) if reached[i] else math.nan
        out.append(LegPlan(
            from_name=leg.from_name, to_name=leg.to_name, distance_m=float(leg.distance_m),
            course_deg=float(leg.course_deg), climb_ms=value("leg_climb_ms"), mc_ms=value("leg_mc_ms"),
            airspeed_ms=value("leg_airspeed_ms"), heading_deg=value("leg_heading_deg"),
            glide_ground_speed_ms=value("leg_ground_speed_ms"), cruise_speed_ms=value("leg_cruise_speed_ms"),
            time_s=value("leg_time_s"), required_height_m=value("leg_required_height_m"),
            arrival_height_m=float(flown.leg_arrival_height_m[0, i]), final_glide=bool(flown.leg_final[0, i]),
            start_time_s=float(flown.leg_entry_time_s[0, i]),
            indicated_airspeed_ms=value("leg_airspeed_ms") * math.sqrt(
                float(flown.final_glide_sigma[0]) if flown.leg_final[0, i] else band_sigma),
            average_speed_ms=float(leg.distance_m) / value("leg_time_s") if value("leg_time_s") > 0.0 else math.nan))
    return tuple(out)


# ---------------------------------------------------------------- notices


def _leg_at(plan: Plan, distance_m: float) -> LegPlan:
    """The leg of the planned path at a distance along it."""
    bounds = plan.path.cumulative_m
    return plan.legs[int(np.clip(np.searchsorted(bounds, distance_m, side="right") - 1, 0, len(plan.legs) - 1))]


_WHY_SHORT = {flight.LIFT_ENDED: "lift_ended", flight.NO_CLIMB: "no_climb", flight.UNREACHABLE: "wind_too_strong",
              flight.BELOW_FLOOR: "below_floor", flight.TERRAIN_ABOVE_BAND: "terrain_above_band"}


def plan_notices(plan: Plan) -> tuple[Notice, ...]:
    """The facts about this plan a pilot must be told (worded by
    :func:`glidetask.cautions.plan_cautions`), in the order they are shown."""
    day, flown = plan.scenario.day, plan.flown
    reason = int(flown.reason[0])
    stop = float(flown.stop_time_s[0])
    floor = plan.arrival_floor_m
    out: list[Notice] = []
    if not plan.finished:
        leg = _leg_at(plan, plan.landout_m)
        out.append(Notice("ends_short", dict(
            why=_WHY_SHORT.get(reason, "other"), stop_time_s=stop, lift_ends_s=day.lift_ends_s,
            wind_from_deg=day.wind_at(day.band_middle_m).from_deg, wind_speed_ms=day.wind_at(day.band_middle_m).speed_ms,
            at_m=plan.landout_m,
            leg_from=leg.from_name, leg_to=leg.to_name, floor_m=floor)))
    elif reason != flight.FINAL_GLIDE:
        out.append(Notice("lift_ends_before_final_glide", dict(
            stop_time_s=stop, final_glide_from_m=plan.final_glide_from_m,
            above_margin_m=plan.legs[-1].arrival_height_m - floor)))
    last_climb = plan.last_climb_end_s
    if plan.finished and reason == flight.FINAL_GLIDE and math.isfinite(last_climb):
        spare = day.lift_ends_s - last_climb
        if spare < TIGHT_DAY_S:
            out.append(Notice("tight_day", dict(last_climb_end_s=last_climb, spare_s=spare,
                                                lift_ends_s=day.lift_ends_s)))
    if plan.area is not None and plan.finished and plan.total_time_s < plan.area.min_time_s:
        out.append(Notice("under_min_time", dict(time_s=plan.total_time_s, min_time_s=plan.area.min_time_s)))
    margin = plan.scenario.safety.arrival_margin_m
    if margin < THIN_MARGIN_M:
        out.append(Notice("thin_margin", dict(margin_m=margin)))
    if plan.finished and math.isfinite(plan.final_glide_mc_ms) and plan.final_glide_mc_ms == 0.0:
        out.append(Notice("final_glide_at_mc0"))
    if day.glide_airmass_ms > 0.0:
        out.append(Notice("rising_air_counted", dict(airmass_ms=day.glide_airmass_ms)))
    return tuple(out)


def _ground_notices(plan: Plan) -> tuple[Notice, ...]:
    """The facts of the whole flight over the ground: the land-out's field, each raised floor.

    The ``ends_short`` notice (first when the plan ends short) gets the land-out and, when
    terrain above the band stopped the flight, the place (nearest turnpoint, bearing, terrain).
    """
    out: list[Notice] = []
    notices = list(plan.notices)
    if plan.landout is not None and notices and notices[0].code == "ends_short":
        facts = dict(notices[0].facts)
        landout = plan.landout
        facts.update(field=landout.field, field_elevation_m=landout.elevation_m,
                     terrain=plan.terrain_source is not None)
        if facts["why"] == "terrain_above_band" or plan.terrain_source is not None:
            lat, lon = point_at(plan.path, landout.at_m)
            landmarks = plan.scenario.turnpoints or tuple(p.turnpoint for p in plan.scenario.task.points)
            near, near_m, near_deg = nearest_landmark(lat, lon, landmarks)
            ground = math.nan
            if plan.profile is not None and np.any(np.isfinite(plan.profile.terrain_m)):
                ground = float(np.interp(landout.at_m, plan.profile.distance_m, plan.profile.terrain_m))
            facts["place"] = TerrainPoint(landout.at_m, lat, lon, ground, plan.scenario.safety.terrain_clearance_m,
                                          ground + plan.scenario.safety.terrain_clearance_m, near, near_m, near_deg)
        notices[0] = Notice("ends_short", facts)
    for floor in plan.floors:
        out.append(Notice("raised_floor", dict(from_m=floor.from_m, to_m=floor.to_m, floor_m=floor.floor_m,
                                               band_bottom_m=plan.scenario.day.band_bottom_m,
                                               band_top_m=plan.scenario.day.band_top_m)))
    # plan.notices is replaced whole: the amended ends_short first, then the rest, then the floors
    return tuple(notices[:1]) + tuple(out) + tuple(notices[1:]) if notices else tuple(out)


# ---------------------------------------------------------------- cards


def final_glide_card(plan: Plan, mc_values=CARD_MC_MS) -> np.ndarray:
    """Required height [m MSL] at each turnpoint of the planned path (each leg's start and
    the finish) for a final glide home at each MacCready setting, shape (len(mc_values), L+1).

    Each final glide is computed as in the plan: the day's wind per leg, the arrival
    margin, the density at the middle of its start and arrival heights, and the terrain
    ahead when the plan has an elevation model.
    """
    return flight.requirement_card(course_for(plan.path, plan.scenario.day.detour_percent), flights_for(plan.scenario), mc_values,
                                   requirement=plan.requirement)[0]
