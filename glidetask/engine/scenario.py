"""The inputs of a plan: glider set-up, the forecast day, safety margins.

These are immutable engine objects built by :mod:`glidetask.formats.task_file` (or by
tests directly). A what-if is a new object made with :func:`dataclasses.replace`.
Times are local clock seconds after midnight; heights metres MSL; speeds m/s.
"""

from __future__ import annotations

from dataclasses import dataclass, field
from typing import TYPE_CHECKING

import numpy as np

if TYPE_CHECKING:  # imported for type names only; keeps this module cheap
    from glidetask.engine.polar import PolarSpec
    from glidetask.engine.task import Task, Turnpoint


@dataclass(frozen=True)
class Wind:
    """A steady wind: the direction it blows FROM [deg true] and its speed [m/s]."""

    from_deg: float = 0.0
    speed_ms: float = 0.0


@dataclass(frozen=True)
class Profile:
    """A quantity through the day: ``[time, value]`` pairs, linear in between,
    held constant before the first and after the last pair (shared/CONTRACT.md 2.3).

    Attributes
    ----------
    times_s : tuple of float
        Strictly increasing clock times [s after midnight].
    values : tuple of float
        The value at each time [unit of the quantity, e.g. m/s].
    """

    times_s: tuple[float, ...]
    values: tuple[float, ...]

    def at(self, time_s):
        """Value at ``time_s`` (scalar or array) by linear interpolation with held ends."""
        return np.interp(time_s, self.times_s, self.values)

    @classmethod
    def constant(cls, value: float) -> "Profile":
        return cls((0.0,), (float(value),))


@dataclass(frozen=True)
class GliderSetup:
    """A polar as given in its file, plus this flight's loading.

    ``mass_kg`` = empty mass + pilot (with parachute) + water ballast (contract section 3).
    """

    spec: "PolarSpec"
    pilot_kg: float = 90.0
    ballast_kg: float = 0.0
    bugs_percent: float = 0.0
    polar_file: str = ""

    @property
    def mass_kg(self) -> float:
        return self.spec.empty_mass_kg + self.pilot_kg + self.ballast_kg


@dataclass(frozen=True)
class Day:
    """The forecast day as the plan assumes it (shared/CONTRACT.md 2.3, ``[day]``).

    Exactly one of ``climb`` (achieved climb [m/s]) and ``thermal_strength`` (thermal
    core updraft [m/s], turned into achieved climb by the circling model for this glider)
    is set. Both are zero after ``lift_ends_s``.
    """

    start_time_s: float
    band_top_m: float
    band_bottom_m: float
    lift_ends_s: float
    wind: Wind = field(default_factory=Wind)
    climb: Profile | None = None
    thermal_strength: Profile | None = None
    start_height_m: float | None = None  # None: the band top
    glide_airmass_ms: float = 0.0
    isa_deviation_c: float = 0.0
    mc_ms: float | None = None  # None: the achieved climb at that moment
    thermal_radius_m: float = 150.0  # e-folding radius of the Gaussian thermal core

    @property
    def effective_start_height_m(self) -> float:
        return self.band_top_m if self.start_height_m is None else self.start_height_m

    def lift_profile_at(self, time_s):
        """The profile value (achieved climb or thermal strength) at ``time_s``; 0 after lift ends."""
        profile = self.climb if self.climb is not None else self.thermal_strength
        value = np.asarray(profile.at(time_s), dtype=float)
        value = np.where(np.asarray(time_s) > self.lift_ends_s, 0.0, value)
        return value if value.ndim else float(value)


@dataclass(frozen=True)
class Safety:
    """Safety margins (shared/CONTRACT.md 2.3, ``[safety]``)."""

    arrival_margin_m: float = 200.0
    terrain_clearance_m: float = 150.0
    final_glide_mc_ms: float | None = None  # None: the cruise MacCready setting at that moment


@dataclass(frozen=True)
class Scenario:
    """Everything a plan needs: the task, the glider, the day, the margins, and where from.

    ``turnpoints`` is the whole turnpoint collection the task file referenced (the
    landables among them feed the coverage check); ``terrain_file`` is an absolute
    path or None; ``source`` the task file's path (for messages), if any;
    ``turnpoints_file`` the turnpoint file's absolute path (a saved task refers to it).
    """

    task: "Task"
    glider: GliderSetup
    day: Day
    safety: Safety = field(default_factory=Safety)
    turnpoints: tuple["Turnpoint", ...] = ()
    terrain_file: str | None = None
    source: str | None = None
    turnpoints_file: str | None = None
