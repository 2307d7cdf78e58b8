"""A plan against the task's airspace: the band top capped along the path, the conflicts.

:func:`corridor` builds the flight core's hook for one planned path: the terrain hook (if
any) plus a :class:`glidetask.engine.flight_ground.Ceiling`, the band top lowered to each
volume's floor minus ``[safety] airspace_margin_m`` where the path runs under it
(:func:`glidetask.engine.airspace_conflicts.band_top_cap`). The core climbs only to that
top there (and low enough before it that the glide enters under it). Where the capped top
falls to the band bottom or below there is no room to fly under the volume: the core keeps
the band (a conflict is a legal problem for the pilot to solve, not a physics limit) and
:func:`airspace_check` reports it, with every other stretch of the planned profile inside a
volume (:func:`glidetask.engine.airspace_conflicts.conflicts`, on the crossings the corridor
found), the final glide included.

AGL limits stand on the terrain model, or on the nearest turnpoint's elevation without one
(the check says so).
"""

from __future__ import annotations

from dataclasses import dataclass

import numpy as np

from glidetask.engine.airspace import nearest_point_ground
from glidetask.engine.airspace_conflicts import AirspaceCheck, band_top_cap, conflicts
from glidetask.engine.airspace_crossings import path_stretches
from glidetask.engine.flight_ground import Ceiling

SPACING_M = 250.0  # the path is sampled this often for the airspace [m]


@dataclass(frozen=True, eq=False)
class Corridor:
    """The flight core's hook for a path under airspace: the terrain hook (or None) and the ceiling.

    It is the requirement hook of :func:`glidetask.engine.flight.fly` (the terrain's extra
    final-glide height, nothing without terrain) and carries the ``ceiling``; every other
    attribute is the terrain hook's (``profile``, ``final_glide``, ...), absent without terrain.
    """

    terrain: object | None
    ceiling: Ceiling
    lats: np.ndarray
    lons: np.ndarray
    along_m: np.ndarray
    ground: object
    ground_is_estimate: bool
    stretches: tuple = ()
    caps: tuple = ()
    agl_from_points: bool = False

    def __call__(self, position_m, height_per_metre, floor_m):
        if self.terrain is None:
            return np.zeros(np.shape(position_m))
        return self.terrain(position_m, height_per_metre, floor_m)

    def __getattr__(self, name):
        terrain = self.__dict__.get("terrain")
        if terrain is None or name.startswith("__"):
            raise AttributeError(name)
        return getattr(terrain, name)


def _ground(scenario, model):
    """The ground under AGL limits: the terrain model, or the nearest turnpoint's elevation."""
    if model is not None:
        return (lambda lats, lons: np.asarray(model.sample(lats, lons), dtype=float)), False
    points = scenario.turnpoints or tuple(p.turnpoint for p in scenario.task.points)
    return nearest_point_ground([p.lat for p in points], [p.lon for p in points],
                                [p.elevation_m for p in points]), True


def corridor(scenario, path, terrain_hook, model=None) -> Corridor:
    """The hook for ``path`` under ``scenario.airspace`` (see the module docstring)."""
    day = scenario.day
    lats, lons, along = path.sample(SPACING_M)
    ground, estimate = _ground(scenario, model)
    stretches = tuple(path_stretches(scenario.airspace, lats, lons, along))
    cap = band_top_cap(scenario.airspace, lats, lons, along, day.band_top_m, day.band_bottom_m,
                       scenario.safety.airspace_margin_m, ground, day.isa_deviation_c, estimate, stretches)
    lowered = (cap.top_m < day.band_top_m) & (cap.top_m > day.band_bottom_m)
    ceiling = Ceiling(along[lowered], cap.top_m[lowered], SPACING_M)
    return Corridor(terrain_hook, ceiling, lats, lons, along, ground, estimate, stretches, cap.caps,
                    cap.agl_from_points)


def airspace_check(plan) -> AirspaceCheck | None:
    """The planned profile checked against the airspace: caps and conflicts (None without airspace)."""
    scenario = plan.scenario
    hook = plan.requirement
    if scenario.airspace is None or not isinstance(hook, Corridor) or plan.profile is None:
        return None
    day, airspace = scenario.day, scenario.airspace
    found = conflicts(airspace, hook.lats, hook.lons, hook.along_m, plan.profile.distance_m, plan.profile.height_m,
                      plan.path.cumulative_m[:-1], scenario.safety.airspace_margin_m, day.band_bottom_m, hook.ground,
                      day.isa_deviation_c, hook.ground_is_estimate, hook.stretches)
    used_agl = any(airspace.volumes[s.volume].floor.is_agl or airspace.volumes[s.volume].ceiling.is_agl
                   for s in hook.stretches)
    agl = hook.agl_from_points or (used_agl and hook.ground_is_estimate)
    source = scenario.airspace.source
    if scenario.airspace_file:
        import os
        from pathlib import Path
        folder = os.path.dirname(os.path.abspath(scenario.source)) if scenario.source else None
        try:
            source = (Path(os.path.relpath(scenario.airspace_file, folder)).as_posix() if folder
                      else os.path.basename(scenario.airspace_file))
        except ValueError:  # on another drive
            source = Path(scenario.airspace_file).as_posix()
    return AirspaceCheck(source, tuple(found), hook.caps, hook.stretches, agl)
