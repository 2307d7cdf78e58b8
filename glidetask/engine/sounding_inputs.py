"""The day a plan flies from a derived day: what a sounding gives the plan's
:class:`glidetask.engine.scenario.Day` (:class:`DayInputs`, pure numpy: no MetPy), and
where a scenario's day came from (:class:`DaySource`).

The day itself is derived in :mod:`glidetask.engine.sounding`.
"""

from __future__ import annotations

import math
from dataclasses import dataclass, field

import numpy as np

from glidetask.engine.scenario import Profile, Wind, WindLevel, WindProfile
from glidetask.engine.sounding import DerivedDay, Sounding
from glidetask.units import KMH


#: The task file's ``[day]`` keys a derived day supplies (typed ones override them).
DERIVED_KEYS = ("band_top_m", "band_bottom_m", "thermal_strength_ms", "lift_ends", "wind")


class NoWorkingBandError(ValueError):
    """The derived day has no hour with a working band (no lift, or too shallow): nothing
    to plan a cross-country flight on."""


@dataclass(frozen=True)
class DayInputs:
    """What a derived day gives the plan's :class:`glidetask.engine.scenario.Day`.

    Attributes
    ----------
    band_top : Profile
        The band top through the day [m MSL]: the hours with a working band, held beyond.
    band_bottom_m : float
        The band bottom [m MSL] (the ground plus ``band_bottom_agl_m``).
    thermal_strength : Profile
        The hourly thermal strength [m/s], from the last hour without lift before the
        first with it (0) to the first hour after the lift (0); linear between hours.
    lift_start_s, lift_ends_s : float
        When thermals start and end [s after midnight].
    wind_profile : WindProfile
        The sounding's winds from the ground up: the wind the plan flies (``Day.wind``).
    wind : Wind
        The mean wind of the highest working band (:meth:`WindProfile.mean_between`), a
        one-line summary of it.
    no_lift : bool
        True for a day with no working band (:func:`no_lift_inputs`): no thermals at all.
    """

    band_top: Profile
    band_bottom_m: float
    thermal_strength: Profile
    lift_start_s: float
    lift_ends_s: float
    wind_profile: WindProfile
    wind: Wind
    no_lift: bool = False

    @property
    def band_top_m(self) -> float:
        """The highest band top of the day [m MSL]."""
        return max(self.band_top.values)


def day_inputs(derived: DerivedDay) -> DayInputs:
    """Map a :class:`DerivedDay` onto the plan's day (pure numpy: no MetPy).

    The values are rounded as a pilot types them, so the same day typed by hand plans the
    same: heights to the metre, thermal strength to 0.01 m/s, the wind to the degree and
    0.1 km/h, the lift's start up and its end down to the whole minute (the cautious side).

    Raises
    ------
    NoWorkingBandError
        If no hour has a working band.
    """
    band = np.isfinite(derived.band_top_m)
    if derived.lift_start_s is None or not band.any():
        raise NoWorkingBandError("the derived day has no working band")
    times = derived.times_s
    band_top = Profile(tuple(float(t) for t in times[band]), tuple(_rounded(derived.band_top_m[band], 0)))
    lift = np.nonzero(derived.thermal_strength_ms > 0.0)[0]
    first = max(int(lift[0]) - 1, 0) if lift.size else 0
    last = min(int(lift[-1]) + 1, times.size - 1) if lift.size else times.size - 1
    strength = Profile(tuple(float(t) for t in times[first:last + 1]),
                       tuple(_rounded(derived.thermal_strength_ms[first:last + 1], 2)))
    bottom = round(float(derived.surface_elevation_m + derived.band_bottom_agl_m))
    profile, wind = _typed_winds(derived, bottom, max(band_top.values))
    return DayInputs(band_top=band_top, band_bottom_m=float(bottom), thermal_strength=strength,
                     lift_start_s=math.ceil(derived.lift_start_s / 60.0) * 60.0,
                     lift_ends_s=math.floor(derived.lift_end_s / 60.0) * 60.0, wind_profile=profile, wind=wind)


def no_lift_inputs(derived: DerivedDay, start_time_s: float, start_height_m: float | None = None) -> DayInputs:
    """The day a plan flies when the derived day has no working band: no lift at all.

    The flight starts at ``start_height_m`` (else the band bottom the sounding gives, the
    ground plus ``band_bottom_agl_m``) and glides out; the band is that start height over
    the band bottom (at least a metre: a band with no lift in it), the thermal strength 0
    all day and the lift "ends" a minute after the start. The winds are the sounding's.
    """
    bottom = float(round(float(derived.surface_elevation_m + derived.band_bottom_agl_m)))
    start = bottom if start_height_m is None else float(start_height_m)
    top = max(start, bottom + 1.0)
    profile, wind = _typed_winds(derived, bottom, top)
    return DayInputs(band_top=Profile.constant(top), band_bottom_m=bottom, thermal_strength=Profile.constant(0.0),
                     lift_start_s=float(start_time_s), lift_ends_s=float(start_time_s) + 60.0, wind_profile=profile,
                     wind=wind, no_lift=True)


def _typed_winds(derived: DerivedDay, bottom_m: float, top_m: float) -> tuple[WindProfile, Wind]:
    """The sounding's winds with each level as a pilot would type it (metre, degree, 0.1 km/h),
    so a typed copy flies the same, and their mean over the band from ``bottom_m`` to ``top_m``
    rounded the same way."""
    profile = WindProfile(tuple(WindLevel(float(round(level.height_m)), float(round(level.from_deg) % 360.0),
                                          round(level.speed_ms / KMH, 1) * KMH) for level in derived.wind))
    mean = profile.mean_between(bottom_m, top_m)
    return profile, Wind(round(mean.from_deg) % 360.0, round(mean.speed_ms / KMH, 1) * KMH)


def _rounded(values, digits: int) -> list[float]:
    return [float(round(float(v), digits)) for v in values]


@dataclass(frozen=True)
class DaySource:
    """Where a scenario's day came from when its task file names a sounding.

    Attributes
    ----------
    sounding_file : str
        The sounding file as resolved against the task file's folder.
    derived : DerivedDay
    inputs : DayInputs or None
        What the derived day gives the plan (None: no working band, the typed keys give
        the whole day).
    overridden : tuple of str
        The ``[day]`` keys of :data:`DERIVED_KEYS` typed in the task file, which the plan
        takes instead of the derived values (``climb_ms`` overrides ``thermal_strength_ms``).
    sounding : Sounding
        The sounding itself (:func:`glidetask.engine.sounding.sounding_drawing` draws it with ``derived``).
    settings : object
        The task file's sounding keys as read (:class:`glidetask.formats.sounding_file.DaySounding`),
        so a saved task keeps them.
    """

    sounding_file: str
    derived: DerivedDay = field(compare=False)  # arrays; the inputs and settings say the same
    inputs: DayInputs | None = None
    overridden: tuple[str, ...] = ()
    settings: object = None
    sounding: Sounding | None = field(default=None, compare=False)  # for drawing (sounding_drawing)

    @property
    def derived_keys(self) -> tuple[str, ...]:
        """The ``[day]`` keys the plan takes from the sounding (none when the derived day
        has no working band and the typed keys give the whole day)."""
        if self.inputs is None:
            return ()
        typed = set(self.overridden) | ({"thermal_strength_ms"} if "climb_ms" in self.overridden else set())
        return tuple(key for key in DERIVED_KEYS if key not in typed)
