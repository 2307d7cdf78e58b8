"""The final glide's terrain requirement inside the flight core, over a task's planned path.

:class:`PathTerrain` (built by :func:`path_terrain`) is the flight core's requirement
hook (:data:`glidetask.engine.flight.RequirementHook`): the terrain under a task's planned
path, sampled once, as a :class:`~glidetask.engine.flight_ground.GroundFloor`. The final
glide's requirement is the clearance rule of every glide at its threshold: the least start
height from which the glide home at the final-glide MacCready never meets terrain +
clearance, that is the pure requirement plus the largest shortfall ahead
(:meth:`GroundFloor.largest_shortfall`, the same rule the cruise glides' contact search
applies). The final-glide report (:meth:`PathTerrain.final_glide`) is read from the same
samples and the same glide line, so the height the plan flies and the obstacle it names agree.
"""

from __future__ import annotations

import math
from dataclasses import dataclass
from functools import cached_property
from typing import Sequence

import numpy as np

from glidetask.engine.clearance import FinalGlideTerrain, final_glide_clearance
from glidetask.engine.flight_ground import FinalGlideLine, GroundFloor, height_used_after
from glidetask.engine.terrain import Terrain
from glidetask.engine.terrain_profile import PATH_SPACING_M, PathProfile, sample_path


@dataclass(frozen=True, eq=False)
class PathTerrain:
    """The terrain under a task's planned path, sampled once, for the final-glide requirement.

    Build it with :func:`path_terrain`. It is both the flight core's requirement hook
    (``extra = path_terrain(position_m, height_per_metre, floor_m)``: how much the terrain
    raises the final-glide requirement at a point) and the source of the final-glide report
    (:meth:`final_glide`); :attr:`ground` is the floor every glide of the core keeps above.

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

    @cached_property
    def ground(self) -> GroundFloor:
        """Terrain + clearance along the path, with the task's legs."""
        return GroundFloor.from_profile(self.profile, self.clearance_m)

    def final_glide_line(self, height_per_metre, floor_m) -> FinalGlideLine:
        """The glide home arriving at ``floor_m`` (n,) with ``height_per_metre`` (n, L) on each leg:
        its height anywhere is the pure final-glide requirement there."""
        per_metre = np.asarray(height_per_metre, dtype=float)
        tail = height_used_after(per_metre, np.diff(self.profile.vertex_distance_m))
        return FinalGlideLine(np.asarray(floor_m, dtype=float), per_metre, tail, self.profile.vertex_distance_m)

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
            ``max(0, largest shortfall ahead)`` of the glide home started at the pure
            requirement ``R(x) = F + h_l (E_l - x) + sum of the later legs' h_m L_m``
            (contract section 3, "required height at a point", each leg in its own wind):
            the least start height that never meets the floor is ``R + extra``. Unknown
            terrain adds nothing here and is reported by :meth:`final_glide`.
        """
        position = np.atleast_1d(np.asarray(position_m, dtype=float))
        legs = self.profile.vertex_distance_m.size - 1
        per_metre = np.broadcast_to(np.atleast_2d(np.asarray(height_per_metre, dtype=float)), (position.size, legs))
        floor = np.broadcast_to(np.asarray(floor_m, dtype=float), position.shape)
        return np.maximum(self.ground.largest_shortfall(position, self.final_glide_line(per_metre, floor)), 0.0)

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
            Distances along the task path: the start (interpolated) and every sample beyond,
            with the pure requirement read off :meth:`final_glide_line`; ``raised_by_m``
            equals :meth:`extra_required` at ``start_m`` for the same heights per metre.
        """
        p, start = self.profile, float(start_m)
        beyond = p.distance_m > start
        distance = np.concatenate(([start], p.distance_m[beyond]))
        terrain, lats, lons = (np.concatenate(([np.interp(start, p.distance_m, v)], v[beyond]))
                               for v in (p.elevation_m, p.lats, p.lons))
        line = self.final_glide_line(np.asarray(height_per_metre, dtype=float)[None, :], [floor_m])
        required = line.height(np.zeros(distance.size, dtype=np.intp), distance, self.ground.leg_of(distance))
        return final_glide_clearance(distance, required, terrain, self.clearance_m, start_height_m=start_height_m,
                                     lats=lats, lons=lons, landmarks=landmarks, source=self.source)


def path_terrain(terrain: Terrain, lats, lons, clearance_m: float, spacing_m: float = PATH_SPACING_M) -> PathTerrain:
    """Sample the terrain along a task's planned path (one vertex per task point) once.

    See :class:`PathTerrain`; ``clearance_m`` is the task's ``terrain_clearance_m`` [m].
    """
    if not (math.isfinite(clearance_m) and clearance_m >= 0.0):
        raise ValueError(f"clearance_m must be a finite number >= 0, got {clearance_m!r}")
    if np.size(lats) < 2:
        raise ValueError("a task path needs at least two points")
    return PathTerrain(sample_path(terrain, lats, lons, spacing_m), float(clearance_m))
