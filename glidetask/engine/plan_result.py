"""What a plan is: :class:`Plan` (a task flown on paper, contract 5.3 in SI units), its
legs (:class:`LegPlan`), an area task's targets (:class:`AreaPlan`), and :class:`Notice`,
a fact a pilot must be told (the plan's, the sweep's and the odds' alike).

:func:`glidetask.engine.plan.plan` makes a plan; :mod:`glidetask.engine.plan_notices`
finds its notices; :mod:`glidetask.cautions` words them.
"""

from __future__ import annotations

import dataclasses
import math
from dataclasses import dataclass

from glidetask import cautions as caution_text
from glidetask.engine.flight import Flown
from glidetask.engine.plan_ground import Floor, Landout, PlannedProfile
from glidetask.engine.scenario import Scenario
from glidetask.units import METRIC


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
