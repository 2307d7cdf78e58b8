"""The forecast a soaring day is derived from: a sounding (temperature, dew point and wind
by height, :class:`Sounding`) and the surface temperature and dew point through the day
(:class:`SurfaceForecast`). :mod:`glidetask.engine.sounding` derives the day from them.

Units: SI (m, Pa, K, m/s), the surface forecast in deg C as the task file gives it; times
are local clock seconds after midnight.
"""

from __future__ import annotations

from dataclasses import dataclass

import numpy as np


@dataclass(frozen=True)
class Sounding:
    """A sounding, one entry per level from the ground up (arrays of equal length).

    Attributes
    ----------
    pressure_pa : ndarray
        Pressure, strictly decreasing [Pa].
    height_m : ndarray
        Height, strictly increasing [m MSL].
    temperature_k : ndarray
        Air temperature [K].
    dewpoint_k : ndarray
        Dew point, at most the temperature [K].
    wind_from_deg : ndarray
        Wind direction, blowing from [deg true].
    wind_speed_ms : ndarray
        Wind speed [m/s].
    """

    pressure_pa: np.ndarray
    height_m: np.ndarray
    temperature_k: np.ndarray
    dewpoint_k: np.ndarray
    wind_from_deg: np.ndarray
    wind_speed_ms: np.ndarray

    def pressure_at(self, height_m):
        """Pressure at ``height_m`` [Pa], log-linear between levels (hydrostatic to first
        order); NaN outside the sounding."""
        log_p = np.interp(height_m, self.height_m, np.log(self.pressure_pa), left=np.nan, right=np.nan)
        return np.exp(log_p)

    def height_at_pressure(self, pressure_pa):
        """Height of ``pressure_pa`` [m MSL], linear in log-pressure; NaN outside the sounding."""
        return np.interp(-np.log(pressure_pa), -np.log(self.pressure_pa), self.height_m, left=np.nan, right=np.nan)


@dataclass(frozen=True)
class SurfaceForecast:
    """Surface temperature and dew point through the day, linear between the given times.

    Attributes
    ----------
    times_s : tuple of float
        Strictly increasing local clock times [s after midnight], at least two.
    temperature_c, dewpoint_c : tuple of float
        Screen-level temperature and dew point at those times [deg C].
    """

    times_s: tuple[float, ...]
    temperature_c: tuple[float, ...]
    dewpoint_c: tuple[float, ...]

    def at(self, time_s):
        """``(temperature_c, dewpoint_c)`` at ``time_s``, held beyond the ends."""
        return (np.interp(time_s, self.times_s, self.temperature_c),
                np.interp(time_s, self.times_s, self.dewpoint_c))
