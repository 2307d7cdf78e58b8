"""Wind with height inside the flight core (shared/CONTRACT.md section 3, "wind with height").

The core's flights carry one wind each (``Flights.wind_from_deg``/``wind_speed_ms``): the
wind a leg's cruise glides in, at the middle of the working band (the height whose density
the cruise's polar takes). With a :class:`~glidetask.engine.scenario.WindProfile`
(``Flights.wind_profile``, shared by the flights) the wind at another height is that wind
plus the profile's change from the band middle to that height, as vectors. A flight whose
wind differs from the forecast (a drawn day of the odds) thus keeps its error at every
height, and the profile's shape is the forecast's.

* A leg's cruise glides and the glides before the first climb: the wind at the band middle.
* A climb drifts with the mean wind over the heights it climbs
  (:meth:`~glidetask.engine.scenario.WindProfile.mean_between`): from where it starts to the
  band top; the climb-and-glide cycle's climbs, from the band bottom to the band top.
* A final glide: the wind at the middle of its start and arrival heights, as for its density
  (:func:`glidetask.engine.finalglide.density_height_m`).

Without a profile every height has the flight's one wind and the core runs exactly as before
(the same operations, the same bits).
"""

from __future__ import annotations

import numpy as np

from glidetask.engine.scenario import wind_vector
from glidetask.engine.wind import wind_components


def components(course_deg, east, north):
    """Wind along (tailwind positive) and across a course from the vector of
    :func:`glidetask.engine.scenario.wind_vector` (where the wind blows FROM) [m/s];
    the same sign conventions as :func:`glidetask.engine.wind.wind_components`."""
    course = np.radians(np.asarray(course_deg, dtype=float))
    sin, cos = np.sin(course), np.cos(course)
    return -(east * sin + north * cos), -(east * cos - north * sin)


class WindAloft:
    """Per-flight winds at any height for the core: the flight's own wind shifted by the
    profile's change from the band middle (module docstring)."""

    def __init__(self, inputs: dict, course_deg: np.ndarray, profile=None):
        self.profile = profile
        self.course_deg = course_deg
        self.from_deg, self.speed_ms = inputs["wind_from_deg"], inputs["wind_speed_ms"]
        self.top, self.bottom = inputs["band_top_m"], inputs["band_bottom_m"]
        if profile is not None:
            self.east, self.north = wind_vector(self.from_deg, self.speed_ms)
            middle_east, middle_north = profile.vector_at(0.5 * (self.top + self.bottom))
            self.shift_east, self.shift_north = self.east - middle_east, self.north - middle_north

    @property
    def varies(self) -> bool:
        """The wind changes with height."""
        return self.profile is not None

    def cruise(self):
        """Along and across the course of each leg in the cruise's glides, shape (N, L) [m/s]."""
        along, across = wind_components(self.course_deg[None, :], self.from_deg[:, None], self.speed_ms[:, None])
        return np.asarray(along, dtype=float), np.asarray(across, dtype=float)

    def _legs(self, rows, east, north):
        return components(self.course_deg[None, :], (east + self.shift_east[rows])[:, None],
                          (north + self.shift_north[rows])[:, None])

    def at(self, rows, height_m):
        """Along and across each leg for flights ``rows`` at heights ``height_m`` (n,), shape (n, L)."""
        return self._legs(rows, *self.profile.vector_at(height_m))

    def mean(self, rows, low_m, high_m):
        """Along and across each leg of the mean wind from ``low_m`` to ``high_m`` (n,), shape (n, L)."""
        return self._legs(rows, *self.profile.vector_mean(low_m, high_m))

    def strongest_ms(self):
        """An upper bound of each flight's wind speed at any height [m/s], shape (N,)."""
        if self.profile is None:
            return self.speed_ms
        east, north = self.profile.vectors()
        east, north = east[None, :] + self.shift_east[:, None], north[None, :] + self.shift_north[:, None]
        return np.max(np.hypot(east, north), axis=1)  # linear between levels, held beyond: the levels bound it
