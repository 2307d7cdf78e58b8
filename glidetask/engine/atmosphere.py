"""The ISO 2533 standard atmosphere: density ratio and IAS <-> TAS.

Glide performance depends on air density: a polar measured at sea level holds at
altitude with every speed and sink rate multiplied by ``1/sqrt(sigma)``
(shared/CONTRACT.md section 3). This module gives ``sigma`` for the troposphere and
the isothermal layer above it (up to 20 km), with an optional ISA temperature deviation.

All functions take scalars or numpy arrays and broadcast; a scalar in gives a float out.
"""

from __future__ import annotations

import numpy as np

from glidetask.engine.arrays import scalar_or_array

# ISO 2533:1975 sea-level constants and the troposphere's lapse rate.
T0_K = 288.15  # sea-level temperature [K]
P0_PA = 101325.0  # sea-level pressure [Pa]
G0_MS2 = 9.80665  # standard gravity [m/s^2]
R_AIR = 287.05287  # specific gas constant of dry air [J/(kg K)]
LAPSE_KM = 0.0065  # temperature lapse rate in the troposphere [K/m]
EARTH_RADIUS_M = 6356766.0  # nominal Earth radius for geopotential altitude [m]
TROPOPAUSE_M = 11000.0  # geopotential altitude of the tropopause [m]
LOWEST_M = -2000.0  # lowest altitude the standard tabulates [m]
HIGHEST_M = 20000.0  # top of the isothermal layer modelled here [m]

_EXPONENT = G0_MS2 / (R_AIR * LAPSE_KM)  # 5.25588...
_T11_K = T0_K - LAPSE_KM * TROPOPAUSE_M  # 216.65 K
_P11_PA = P0_PA * (_T11_K / T0_K) ** _EXPONENT  # 22632 Pa


def geopotential_altitude(altitude_m):
    """Geopotential altitude for a geometric altitude [m]: ``H = r h / (r + h)``.

    ``r = 6 356 766 m`` as in ISO 2533; the difference is 1.4 m at 3000 m.
    """
    h = np.asarray(altitude_m, dtype=float)
    return scalar_or_array(EARTH_RADIUS_M * h / (EARTH_RADIUS_M + h))


def isa_temperature(altitude_m):
    """Standard temperature at an altitude [K].

    Parameters
    ----------
    altitude_m : float or array_like
        Geometric altitude above mean sea level [m].

    Returns
    -------
    float or ndarray
        ISA temperature [K]; NaN outside [-2000, 20000] m (geopotential).
    """
    h = np.asarray(geopotential_altitude(altitude_m))
    temperature = np.where(h < TROPOPAUSE_M, T0_K - LAPSE_KM * h, _T11_K)
    temperature = np.where((h >= LOWEST_M) & (h <= HIGHEST_M), temperature, np.nan)
    return scalar_or_array(temperature)


def isa_pressure(altitude_m):
    """Standard pressure at an altitude [Pa].

    Notes
    -----
    With ``H`` the geopotential altitude, troposphere: ``p = p0 (T/T0)^(g0/(R L))``;
    above 11 km (isothermal): ``p = p11 exp(-g0 (H - 11000)/(R T11))`` [1]_.

    References
    ----------
    .. [1] ISO 2533:1975, Standard Atmosphere (also ICAO Doc 7488/3).
    """
    h = np.asarray(geopotential_altitude(altitude_m))
    with np.errstate(invalid="ignore"):
        troposphere = P0_PA * ((T0_K - LAPSE_KM * h) / T0_K) ** _EXPONENT
        stratosphere = _P11_PA * np.exp(-G0_MS2 * (h - TROPOPAUSE_M) / (R_AIR * _T11_K))
    pressure = np.where(h < TROPOPAUSE_M, troposphere, stratosphere)
    pressure = np.where((h >= LOWEST_M) & (h <= HIGHEST_M), pressure, np.nan)
    return scalar_or_array(pressure)


def column_pressure(altitude_m, isa_deviation_c=0.0):
    """Pressure at an altitude in a warm or cold column [Pa]: the ISA's sea-level pressure,
    and the temperature offset by ``isa_deviation_c`` at every height.

    Notes
    -----
    Hydrostatic balance ``dp/p = -g0 dH / (R T)`` integrated with ``T = T_isa(H) + dT``:
    troposphere ``p = p0 ((T0 + dT - L H)/(T0 + dT))^(g0/(R L))``; above 11 km
    ``p = p11 exp(-g0 (H - 11000)/(R (T11 + dT)))`` with ``p11`` the column's own pressure
    there. A warm column keeps more air above a height, so its pressure there is higher
    than the standard's; ``dT = 0`` is :func:`isa_pressure` exactly.
    """
    deviation = np.asarray(isa_deviation_c, dtype=float)
    if not np.any(deviation):
        return isa_pressure(altitude_m)
    h = np.asarray(geopotential_altitude(altitude_m))
    base = T0_K + deviation
    top = _T11_K + deviation
    with np.errstate(invalid="ignore"):
        troposphere = P0_PA * ((base - LAPSE_KM * h) / base) ** _EXPONENT
        p11 = P0_PA * (top / base) ** _EXPONENT
        stratosphere = p11 * np.exp(-G0_MS2 * (h - TROPOPAUSE_M) / (R_AIR * top))
    pressure = np.where(h < TROPOPAUSE_M, troposphere, stratosphere)
    pressure = np.where((h >= LOWEST_M) & (h <= HIGHEST_M), pressure, np.nan)
    return scalar_or_array(pressure)


def air_density(altitude_m, isa_deviation_c=0.0):
    """Air density at an altitude with an ISA temperature deviation [kg/m^3].

    Parameters
    ----------
    altitude_m : float or array_like
        Geometric altitude above mean sea level [m] (the day's sea-level pressure is
        taken as the standard's).
    isa_deviation_c : float or array_like, default 0
        Temperature above the standard at every height [degC = K]: a warm or cold
        column, its pressure integrated hydrostatically (:func:`column_pressure`).

    Returns
    -------
    float or ndarray
        Density [kg/m^3]; NaN outside [-2000, 20000] m or where the temperature
        would not be above absolute zero.

    Notes
    -----
    Ideal gas: ``rho = p / (R (T_isa + dT))`` with ``p`` the warm or cold column's
    pressure at that altitude, so a warm day lowers the density at the same altitude [1]_.

    References
    ----------
    .. [1] ISO 2533:1975, Standard Atmosphere.
    """
    temperature = np.asarray(isa_temperature(altitude_m)) + np.asarray(isa_deviation_c, dtype=float)
    temperature = np.where(temperature > 0.0, temperature, np.nan)
    return scalar_or_array(np.asarray(column_pressure(altitude_m, isa_deviation_c)) / (R_AIR * temperature))


def density_ratio(altitude_m, isa_deviation_c=0.0):
    """``sigma = rho / rho0`` at an altitude and ISA deviation [-].

    See :func:`air_density`; ``rho0 = 1.225 kg/m^3`` (ISO 2533 sea level). Computed as
    ``(p/p0) (T0/T)`` so that it is exactly 1 at sea level in the standard atmosphere.
    """
    temperature = np.asarray(isa_temperature(altitude_m)) + np.asarray(isa_deviation_c, dtype=float)
    temperature = np.where(temperature > 0.0, temperature, np.nan)
    return scalar_or_array(np.asarray(column_pressure(altitude_m, isa_deviation_c)) / P0_PA * (T0_K / temperature))


def tas_from_ias(ias_ms, altitude_m, isa_deviation_c=0.0):
    """True airspeed for an indicated airspeed [m/s].

    Notes
    -----
    ``TAS = IAS / sqrt(sigma)``: IAS is taken as equivalent airspeed (instrument,
    position and compressibility errors neglected; compressibility is well under 1 %
    below 300 km/h at glider heights).
    """
    return tas_from_ias_at(ias_ms, density_ratio(altitude_m, isa_deviation_c))


def ias_from_tas(tas_ms, altitude_m, isa_deviation_c=0.0):
    """Indicated airspeed for a true airspeed [m/s]: ``IAS = TAS sqrt(sigma)``."""
    return ias_from_tas_at(tas_ms, density_ratio(altitude_m, isa_deviation_c))


def tas_from_ias_at(ias_ms, sigma):
    """True airspeed for an indicated airspeed [m/s] at a density ratio ``sigma``:
    ``TAS = IAS / sqrt(sigma)`` (see :func:`tas_from_ias`)."""
    return scalar_or_array(np.asarray(ias_ms, dtype=float) / np.sqrt(np.asarray(sigma, dtype=float)))


def ias_from_tas_at(tas_ms, sigma):
    """Indicated airspeed for a true airspeed [m/s] at a density ratio ``sigma``:
    ``IAS = TAS sqrt(sigma)`` (see :func:`ias_from_tas`)."""
    return scalar_or_array(np.asarray(tas_ms, dtype=float) * np.sqrt(np.asarray(sigma, dtype=float)))
