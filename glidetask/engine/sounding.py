"""The soaring day derived from a forecast sounding and a surface forecast.

From a temperature and dew-point sounding (heights MSL, from the ground up) and the
surface temperature and dew point forecast through the day, each whole hour gets:

* the **thermal top**: where the dry adiabat from the surface temperature meets the
  sounding (the parcel method);
* the **cloud base**: the lifting condensation level (LCL) of the surface air; cumulus
  where it lies below the thermal top, blue thermals where not;
* the **working band**: top = the lower of thermal top and cloud base less a margin,
  bottom = a height above the ground (both common practice, set in the task file);
* the **thermal strength**: Deardorff's convective velocity scale w* with the surface heat
  flux estimated from the mixed layer's warming between the hourly surface values
  (encroachment), turned into the core strength of the circling model's thermal by
  :data:`CORE_STRENGTH_PER_WSTAR`;
* **lift start and end**: when the surface temperature first reaches, and then falls below,
  the trigger temperature for a useful depth.

The sounding's winds become the day's wind profile, and cautions are returned as facts
(:class:`SoundingFact`) that :mod:`glidetask.cautions` words. A day that never triggers is
a result: no lift and a fact saying so.

MetPy does the thermodynamics (potential temperature, LCL, parcel profile, CAPE); it is
imported inside the functions that need it, so that planning without a sounding never
pays for it.

Units: SI inside (m, s, m/s, Pa, K); temperatures of the surface forecast in deg C as
the task file gives them; times are local clock seconds after midnight.

References
----------
.. [1] J. W. Deardorff, "Convective velocity and temperature scales for the unstable
   planetary boundary layer and for Rayleigh convection", J. Atmos. Sci. 27 (1970) 1211-1213.
.. [2] R. B. Stull, *An Introduction to Boundary Layer Meteorology*, Kluwer, 1988:
   section 1.6 (w*), section 11.2 (mixed-layer growth by encroachment) (from memory).
.. [3] MetPy (Unidata): ``potential_temperature``, ``lcl``, ``parcel_profile``,
   ``cape_cin``; the LCL by the exact formula of D. M. Romps, J. Atmos. Sci. 74 (2017), as MetPy documents it.
.. [4] J. Glendening, the RASP/BLIPMAP parameter notes: w* is the typical thermal updraft
   velocity near the middle of the convective layer (from memory).
"""

from __future__ import annotations

import math
import warnings
from dataclasses import dataclass, field

import numpy as np

from glidetask.engine.scenario import Profile, Wind, WindLevel, WindProfile
from glidetask.units import KMH

#: Gravity [m/s^2] (ISO 2533 standard value).
G = 9.80665
#: Reference pressure of potential temperature [Pa].
P0 = 100000.0
#: Default margin of the band top below cloud base or thermal top [m] (common practice).
DEFAULT_BAND_TOP_MARGIN_M = 200.0
#: Default band bottom above the ground [m] (common practice: leave for a climb no lower).
DEFAULT_BAND_BOTTOM_AGL_M = 600.0
#: The least working band worth a cross-country flight [m] (common practice): the trigger
#: temperature is the surface temperature whose thermals give a band this deep.
MIN_WORKING_BAND_M = 300.0
#: Core strength of the circling model's thermal per unit w* [-]. Source [4]: w* is the
#: typical updraft of thermals near the middle of the layer; our core strength is the
#: updraft at the thermal's centre, which is at least that, so 1.0 is the conservative
#: choice for planning.
CORE_STRENGTH_PER_WSTAR = 1.0
#: Surface-parcel CAPE from which cumulus may overdevelop [J/kg] (common practice:
#: 0-500 J/kg is weakly unstable; above it showers and storms grow out of the cumulus).
OVERDEVELOPMENT_CAPE_JKG = 500.0
#: Convective layer depths [m above ground] below which cross-country soaring is very
#: hard, and above which the layer is very deep (rough, strong thermals; airspace and
#: oxygen limits) (common practice).
SHALLOW_LAYER_M = 1000.0
DEEP_LAYER_M = 3000.0
#: The largest surface kinematic heat flux taken from the warming [K m/s]: about 480 W/m^2
#: with rho*cp = 1200 J/(m^3 K); midday sensible heat flux over dry land rarely exceeds
#: 400-500 W/m^2 (from memory). Warming faster than that is more than the sun can do (the
#: forecast's screen temperature runs ahead of the layer, or air is brought in by wind):
#: the flux is capped and a fact says so, as overestimated thermals are the unsafe error.
MAX_HEAT_FLUX_KMS = 0.4
#: Height step of the encroachment integral [m].
_INTEGRATION_STEP_M = 5.0


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


@dataclass(frozen=True)
class SoundingFact:
    """A fact about the derived day that the pilot must be told (worded in
    :func:`glidetask.cautions.sounding_cautions`).

    ``kind`` is one of ``"no_lift"`` (``value``: the trigger temperature [deg C],
    ``other``: the warmest surface temperature forecast [deg C]), ``"overdevelopment"``
    (``value``: surface-parcel CAPE [J/kg], ``time_s``: the hour), ``"shallow_layer"`` and
    ``"deep_layer"`` (``value``: the deepest convective layer [m above ground],
    ``time_s``: its hour), ``"lift_until_forecast_ends"`` (``time_s``: the forecast's last
    time; lift may go on after it), ``"lift_before_forecast"`` (``time_s``: the first
    time; lift may start before it), ``"weakening_assumed"`` (``time_s``: the first hour
    after the surface stops warming the layer, where the strength is our assumption),
    ``"flux_capped"`` (``value``: the heat flux the warming implies [K m/s], ``time_s``:
    the first such hour; the flux was capped at :data:`MAX_HEAT_FLUX_KMS`).
    """

    kind: str
    value: float | None = None
    time_s: float | None = None
    other: float | None = None


class SoundingTooShortError(ValueError):
    """The sounding ends below a height the derivation needs.

    Attributes: ``top_m`` (the sounding's top [m MSL]); ``time_s`` (the hour whose
    surface parcel is still warmer than the air there), or None with ``needed_m`` (the
    height the trigger temperature is defined by [m MSL]).
    """

    def __init__(self, top_m: float, *, time_s: float | None = None, needed_m: float | None = None):
        self.top_m, self.time_s, self.needed_m = float(top_m), time_s, needed_m
        super().__init__(f"the sounding ends at {top_m:.0f} m, below the thermal top or the trigger depth")


@dataclass(frozen=True)
class DerivedDay:
    """The day derived from a sounding, hour by hour (arrays over ``times_s``).

    Heights [m MSL]; NaN where a quantity does not exist that hour (no cumulus: no cloud
    base; no working band: no band top or bottom).

    Attributes
    ----------
    times_s : ndarray
        The whole hours from the first to the last surface forecast time [s after midnight].
    surface_temperature_c, surface_dewpoint_c : ndarray
        The surface forecast at those hours [deg C].
    thermal_top_m : ndarray
        Where the surface parcel's dry adiabat meets the sounding (the surface where it
        never rises).
    lcl_m : ndarray
        The surface air's lifting condensation level (NaN above the sounding).
    cloud_base_m : ndarray
        The LCL where cumulus form (LCL below the thermal top), else NaN.
    cumulus : ndarray of bool
    band_top_m, band_bottom_m : ndarray
        The working band during lift where it is at least ``MIN_WORKING_BAND_M`` deep, else NaN.
    heat_flux_kms : ndarray
        Surface kinematic heat flux by encroachment [K m/s] (negative when the layer cools;
        during the lift at most :data:`MAX_HEAT_FLUX_KMS`, and fading after the warming ends).
    wstar_ms : ndarray
        Deardorff's convective velocity scale [m/s] (0 outside the lift).
    thermal_strength_ms : ndarray
        Thermal core strength for the circling model [m/s] (0 outside the lift).
    lift_start_s, lift_end_s : float or None
        When the surface temperature reaches and falls below the trigger (None: no lift).
    trigger_temperature_c : float
        The surface temperature that gives a working band of ``MIN_WORKING_BAND_M``.
    cape_jkg : float
        The largest surface-parcel CAPE of the day [J/kg].
    wind : tuple of WindLevel
        The sounding's winds from the ground up.
    facts : tuple of SoundingFact
    surface_elevation_m, band_top_margin_m, band_bottom_agl_m : float
        The settings used.
    """

    times_s: np.ndarray
    surface_temperature_c: np.ndarray
    surface_dewpoint_c: np.ndarray
    thermal_top_m: np.ndarray
    lcl_m: np.ndarray
    cloud_base_m: np.ndarray
    cumulus: np.ndarray
    band_top_m: np.ndarray
    band_bottom_m: np.ndarray
    heat_flux_kms: np.ndarray
    wstar_ms: np.ndarray
    thermal_strength_ms: np.ndarray
    lift_start_s: float | None
    lift_end_s: float | None
    trigger_temperature_c: float
    cape_jkg: float
    wind: tuple[WindLevel, ...]
    facts: tuple[SoundingFact, ...] = field(default=())
    surface_elevation_m: float = 0.0
    band_top_margin_m: float = DEFAULT_BAND_TOP_MARGIN_M
    band_bottom_agl_m: float = DEFAULT_BAND_BOTTOM_AGL_M


# ---------------------------------------------------------------- plain physics


def convective_velocity_scale(heat_flux_kms, layer_depth_m, potential_temperature_k):
    """Deardorff's convective velocity scale w* [m/s].

    ``w* = (g / theta * H * flux) ** (1/3)`` with the surface kinematic heat flux
    ``flux`` [K m/s], the convective layer depth ``H`` [m] and the layer's potential
    temperature ``theta`` [K] [1], [2]. Zero where the flux or the depth is not positive.
    """
    flux = np.asarray(heat_flux_kms, dtype=float)
    depth = np.asarray(layer_depth_m, dtype=float)
    buoyancy = G / np.asarray(potential_temperature_k, dtype=float) * np.maximum(depth, 0.0) * np.maximum(flux, 0.0)
    result = np.cbrt(buoyancy)
    return result if result.ndim else float(result)


def encroachment_heat_content(parcel_theta_k, heights_m, environment_theta_k, surface_m):
    """Heat stored in the mixed layer above the morning sounding [K m].

    Encroachment [2]: the layer is mixed to the parcel's potential temperature up to where
    it meets the sounding's; the heat put in by the surface is
    ``integral (theta_parcel - theta_env(z)) dz`` from the surface to that top. Returns
    one value per parcel temperature (``parcel_theta_k`` may be an array).
    """
    z = np.arange(surface_m, heights_m[-1] + 0.5 * _INTEGRATION_STEP_M, _INTEGRATION_STEP_M)
    theta_env = np.interp(z, heights_m, environment_theta_k)
    parcel = np.atleast_1d(np.asarray(parcel_theta_k, dtype=float))[:, None]
    excess = parcel - theta_env[None, :]
    # Only the air below the first level where the environment is as warm as the parcel mixes.
    mixed = np.cumprod(excess > 0.0, axis=1).astype(bool)
    return np.trapezoid(np.where(mixed, excess, 0.0), z, axis=1)


def crossing_times(times_s, values, threshold) -> tuple[float | None, float | None]:
    """When a piecewise linear series first reaches ``threshold`` and when it next falls
    below it: ``(start, end)``; start None if never, end None if it stays at or above."""
    t = np.asarray(times_s, dtype=float)
    v = np.asarray(values, dtype=float) - threshold
    start = end = None
    if v[0] >= 0.0:
        start = float(t[0])
    for i in range(len(t) - 1):
        a, b = v[i], v[i + 1]
        if start is None and a < 0.0 <= b:
            start = float(t[i] + (t[i + 1] - t[i]) * (-a) / (b - a))
        elif start is not None and a >= 0.0 > b:
            end = float(t[i] + (t[i + 1] - t[i]) * a / (a - b))
            break
    return start, end


def _theta_crossing(parcel_theta_k, heights_m, theta_env_k, surface_m):
    """Height where the parcel's potential temperature first equals the environment's
    above ``surface_m`` (linear between levels); the surface where the parcel is not
    warmer there; NaN where the sounding ends first."""
    above = heights_m > surface_m
    z = np.concatenate(([surface_m], heights_m[above]))
    theta = np.concatenate(([np.interp(surface_m, heights_m, theta_env_k)], theta_env_k[above]))
    tops = np.full(np.shape(parcel_theta_k), np.nan)
    for index, parcel in np.ndenumerate(np.asarray(parcel_theta_k, dtype=float)):
        excess = parcel - theta
        if excess[0] <= 0.0:
            tops[index] = surface_m
            continue
        meets = np.nonzero(excess <= 0.0)[0]
        if meets.size:
            k = meets[0]
            tops[index] = z[k - 1] + (z[k] - z[k - 1]) * excess[k - 1] / (excess[k - 1] - excess[k])
    return tops


# ---------------------------------------------------------------- MetPy


def potential_temperature_k(pressure_pa, temperature_k):
    """Potential temperature [K] by Poisson's equation (MetPy [3])."""
    import metpy.calc as mpcalc  # heavy: only the sounding path pays for MetPy
    from metpy.units import units

    return np.asarray(mpcalc.potential_temperature(np.asarray(pressure_pa) * units.Pa,
                                                   np.asarray(temperature_k) * units.K).m_as("K"))


def temperature_from_potential_k(pressure_pa, theta_k):
    """Temperature [K] at ``pressure_pa`` of air with potential temperature ``theta_k`` (MetPy [3])."""
    import metpy.calc as mpcalc  # heavy: only the sounding path pays for MetPy
    from metpy.units import units

    return np.asarray(mpcalc.temperature_from_potential_temperature(
        np.asarray(pressure_pa) * units.Pa, np.asarray(theta_k) * units.K).m_as("K"))


def lcl_pressure_pa(pressure_pa, temperature_k, dewpoint_k):
    """Pressure of the lifting condensation level [Pa] of air at the given state (MetPy [3])."""
    import metpy.calc as mpcalc  # heavy: only the sounding path pays for MetPy
    from metpy.units import units

    with warnings.catch_warnings():
        warnings.simplefilter("ignore")
        p_lcl, _ = mpcalc.lcl(np.asarray(pressure_pa) * units.Pa, np.asarray(temperature_k) * units.K,
                              np.asarray(dewpoint_k) * units.K)
    return np.asarray(p_lcl.m_as("Pa"))


def surface_cape_jkg(sounding: Sounding, surface_m: float, temperature_k: float, dewpoint_k: float) -> float:
    """CAPE of the surface parcel [J/kg] through the sounding above ``surface_m`` (MetPy [3])."""
    import metpy.calc as mpcalc  # heavy: only the sounding path pays for MetPy
    from metpy.units import units

    above = sounding.height_m > surface_m
    p = np.concatenate(([sounding.pressure_at(surface_m)], sounding.pressure_pa[above]))
    t = np.concatenate(([temperature_k], sounding.temperature_k[above]))
    td = np.concatenate(([min(dewpoint_k, temperature_k)], sounding.dewpoint_k[above]))
    with warnings.catch_warnings():
        warnings.simplefilter("ignore")
        try:
            profile = mpcalc.parcel_profile(p * units.Pa, t[0] * units.K, td[0] * units.K)
            cape, _ = mpcalc.cape_cin(p * units.Pa, t * units.K, td * units.K, profile)
        except (ValueError, IndexError):  # MetPy finds no LFC/EL on some dry profiles: no CAPE
            return 0.0
    value = float(cape.m_as("J/kg"))
    return value if math.isfinite(value) else 0.0


# ---------------------------------------------------------------- the day


def hourly_times(surface: SurfaceForecast) -> np.ndarray:
    """The whole hours from the first to the last surface forecast time [s]."""
    first = math.ceil(surface.times_s[0] / 3600.0 - 1e-9)
    last = math.floor(surface.times_s[-1] / 3600.0 + 1e-9)
    return np.arange(first, last + 1) * 3600.0


def derive_day(sounding: Sounding, surface: SurfaceForecast, *, surface_elevation_m: float | None = None,
               band_top_margin_m: float = DEFAULT_BAND_TOP_MARGIN_M,
               band_bottom_agl_m: float = DEFAULT_BAND_BOTTOM_AGL_M) -> DerivedDay:
    """Derive the soaring day, hour by hour, from a sounding and a surface forecast.

    Parameters
    ----------
    sounding : Sounding
        The morning sounding; its lowest level at or below the surface elevation.
    surface : SurfaceForecast
        Surface temperature and dew point through the day (at least two times).
    surface_elevation_m : float, optional
        Ground elevation [m MSL]; default the sounding's lowest level.
    band_top_margin_m : float
        Band top below the lower of cloud base and thermal top [m] (default 200).
    band_bottom_agl_m : float
        Band bottom above the ground [m] (default 600).

    Returns
    -------
    DerivedDay

    Raises
    ------
    SoundingTooShortError
        If the sounding ends below the thermal top of some hour or below the height the
        trigger temperature is defined by.
    ValueError
        If the surface elevation lies outside the sounding.

    Notes
    -----
    The surface flux at hour ``t`` is the change of the mixed layer's heat content
    (:func:`encroachment_heat_content`) from half an hour before to half an hour after
    (within the forecast). Encroachment ignores entrainment and advection, so once the
    surface stops warming it sees no flux while thermals go on: from the first such hour
    in the lift, the flux is taken to fall linearly from the last warming hour's value to
    zero at the end of the lift (our assumption, reported as a fact). A warming faster
    than the sun can drive is capped at :data:`MAX_HEAT_FLUX_KMS` (also a fact).
    """
    heights = sounding.height_m
    surface_m = float(heights[0] if surface_elevation_m is None else surface_elevation_m)
    if not heights[0] <= surface_m < heights[-1]:
        raise ValueError(f"the surface elevation {surface_m:.0f} m lies outside the sounding "
                         f"({heights[0]:.0f} to {heights[-1]:.0f} m)")
    p_surface = float(sounding.pressure_at(surface_m))
    theta_env = potential_temperature_k(sounding.pressure_pa, sounding.temperature_k)

    times = hourly_times(surface)
    temperature_c, dewpoint_c = surface.at(times)
    theta_parcel = potential_temperature_k(p_surface, temperature_c + 273.15)
    tops = _theta_crossing(theta_parcel, heights, theta_env, surface_m)
    if np.isnan(tops).any():
        raise SoundingTooShortError(heights[-1], time_s=float(times[np.isnan(tops)][0]))

    lcl = sounding.height_at_pressure(lcl_pressure_pa(p_surface, temperature_c + 273.15, dewpoint_c + 273.15))
    cumulus = np.isfinite(lcl) & (lcl < tops)
    cloud_base = np.where(cumulus, lcl, np.nan)
    usable_top = np.where(cumulus, lcl, tops) - band_top_margin_m
    bottom = surface_m + band_bottom_agl_m

    trigger_c = _trigger_temperature_c(sounding, theta_env, surface_m, p_surface,
                                       bottom + MIN_WORKING_BAND_M + band_top_margin_m)
    start, end = crossing_times(surface.times_s, surface.temperature_c, trigger_c)

    facts: list[SoundingFact] = []
    flux = _hourly_flux(sounding, surface, times, p_surface, theta_env, surface_m)
    in_lift = np.zeros(times.shape, bool)
    capped = flux > MAX_HEAT_FLUX_KMS
    if start is None:
        facts.append(SoundingFact("no_lift", value=trigger_c, other=float(max(surface.temperature_c))))
    else:
        lift_end = surface.times_s[-1] if end is None else end
        in_lift = (times >= start - 1e-6) & (times <= lift_end + 1e-6)
        if start <= surface.times_s[0]:
            facts.append(SoundingFact("lift_before_forecast", time_s=float(surface.times_s[0])))
        if end is None:
            facts.append(SoundingFact("lift_until_forecast_ends", time_s=float(surface.times_s[-1])))
        if (capped & in_lift).any():
            first = int(np.argmax(capped & in_lift))
            facts.append(SoundingFact("flux_capped", value=float(flux[first]), time_s=float(times[first])))
        flux = _weakening_flux(times, np.minimum(flux, MAX_HEAT_FLUX_KMS), in_lift, lift_end, facts)
    depth = tops - surface_m
    wstar = np.where(in_lift, convective_velocity_scale(flux, depth, theta_parcel), 0.0)
    strength = CORE_STRENGTH_PER_WSTAR * wstar
    band_ok = in_lift & (usable_top - bottom >= MIN_WORKING_BAND_M - 1e-6)
    band_top = np.where(band_ok, usable_top, np.nan)
    band_bottom = np.where(band_ok, bottom, np.nan)

    cape = 0.0
    if cumulus.any():
        warmest = int(np.argmax(np.where(cumulus, temperature_c, -np.inf)))
        cape = surface_cape_jkg(sounding, surface_m, temperature_c[warmest] + 273.15, dewpoint_c[warmest] + 273.15)
        if cape >= OVERDEVELOPMENT_CAPE_JKG:
            facts.append(SoundingFact("overdevelopment", value=cape, time_s=float(times[warmest])))
    facts += _depth_facts(times, depth, in_lift)

    arrays = {name: _read_only(value) for name, value in dict(
        times_s=times, surface_temperature_c=temperature_c, surface_dewpoint_c=dewpoint_c, thermal_top_m=tops,
        lcl_m=lcl, cloud_base_m=cloud_base, cumulus=cumulus, band_top_m=band_top, band_bottom_m=band_bottom,
        heat_flux_kms=flux, wstar_ms=wstar, thermal_strength_ms=strength).items()}
    return DerivedDay(
        **arrays, lift_start_s=start, lift_end_s=None if start is None else (surface.times_s[-1] if end is None else end),
        trigger_temperature_c=trigger_c, cape_jkg=cape, wind=wind_profile(sounding, surface_m), facts=tuple(facts),
        surface_elevation_m=surface_m, band_top_margin_m=band_top_margin_m, band_bottom_agl_m=band_bottom_agl_m)


def _read_only(values) -> np.ndarray:
    array = np.array(values)
    array.flags.writeable = False
    return array


def _trigger_temperature_c(sounding, theta_env, surface_m, p_surface, needed_m) -> float:
    """The surface temperature [deg C] whose dry adiabat stays warmer than the sounding up
    to ``needed_m`` (the least useful working band's top plus the margin)."""
    heights = sounding.height_m
    if needed_m >= heights[-1]:
        raise SoundingTooShortError(heights[-1], needed_m=needed_m)
    grid = np.concatenate(([surface_m], heights[(heights > surface_m) & (heights < needed_m)], [needed_m]))
    theta_trigger = float(np.max(np.interp(grid, heights, theta_env)))
    return float(temperature_from_potential_k(p_surface, theta_trigger)) - 273.15


def _depth_facts(times, depth, in_lift) -> list[SoundingFact]:
    """A very shallow or very deep convective layer during the lift, at its deepest hour."""
    if not in_lift.any():
        return []
    deepest = int(np.argmax(np.where(in_lift, depth, -np.inf)))
    if depth[deepest] < SHALLOW_LAYER_M:
        return [SoundingFact("shallow_layer", value=float(depth[deepest]), time_s=float(times[deepest]))]
    if depth[deepest] > DEEP_LAYER_M:
        return [SoundingFact("deep_layer", value=float(depth[deepest]), time_s=float(times[deepest]))]
    return []


def _hourly_flux(sounding, surface, times, p_surface, theta_env, surface_m):
    """Encroachment heat flux [K m/s] at each hour, from half an hour before to half an hour
    after (clipped to the forecast)."""
    before = np.maximum(times - 1800.0, surface.times_s[0])
    after = np.minimum(times + 1800.0, surface.times_s[-1])
    both = np.concatenate((before, after))
    theta = potential_temperature_k(p_surface, surface.at(both)[0] + 273.15)
    heat = encroachment_heat_content(theta, sounding.height_m, theta_env, surface_m)
    span = np.maximum(after - before, 1.0)
    return (heat[len(times):] - heat[:len(times)]) / span


def _weakening_flux(times, flux, in_lift, lift_end_s, facts):
    """After the last hour in the lift that the surface warms, the flux falls linearly to
    zero at the lift's end (see :func:`derive_day`, Notes)."""
    lift_hours = np.nonzero(in_lift)[0]
    warming = [i for i in lift_hours if flux[i] > 0.0]
    if not warming:
        return flux
    last = warming[-1]
    later = [i for i in lift_hours if i > last]
    if not later:
        return flux
    flux = flux.copy()
    span = max(lift_end_s - times[last], 1.0)
    for i in later:
        flux[i] = flux[last] * max(0.0, (lift_end_s - times[i]) / span)
    facts.append(SoundingFact("weakening_assumed", time_s=float(times[later[0]])))
    return flux


def wind_profile(sounding: Sounding, surface_m: float) -> tuple[WindLevel, ...]:
    """The sounding's winds at and above ``surface_m``, from the ground up."""
    keep = sounding.height_m >= surface_m
    return tuple(WindLevel(float(z), float(d) % 360.0, float(s)) for z, d, s in
                 zip(sounding.height_m[keep], sounding.wind_from_deg[keep], sounding.wind_speed_ms[keep]))


# ---------------------------------------------------------------- the day the plan flies


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
    # Each level as a pilot would type it (metre, degree, 0.1 km/h), so a typed copy flies the same.
    profile = WindProfile(tuple(WindLevel(float(round(level.height_m)), float(round(level.from_deg) % 360.0),
                                          round(level.speed_ms / KMH, 1) * KMH) for level in derived.wind))
    mean = profile.mean_between(bottom, max(band_top.values))
    wind = Wind(round(mean.from_deg) % 360.0, round(mean.speed_ms / KMH, 1) * KMH)
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
    profile = WindProfile(tuple(WindLevel(float(round(level.height_m)), float(round(level.from_deg) % 360.0),
                                          round(level.speed_ms / KMH, 1) * KMH) for level in derived.wind))
    mean = profile.mean_between(bottom, top)
    wind = Wind(round(mean.from_deg) % 360.0, round(mean.speed_ms / KMH, 1) * KMH)
    return DayInputs(band_top=Profile.constant(top), band_bottom_m=bottom, thermal_strength=Profile.constant(0.0),
                     lift_start_s=float(start_time_s), lift_ends_s=float(start_time_s) + 60.0, wind_profile=profile,
                     wind=wind, no_lift=True)


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
        The sounding itself (:func:`sounding_drawing` draws it with ``derived``).
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


# ---------------------------------------------------------------- what to draw


@dataclass(frozen=True)
class SoundingDrawing:
    """What a drawing of the sounding shows, in SI (arrays over the levels or the hours).

    Attributes
    ----------
    height_m, temperature_k, dewpoint_k : ndarray
        The sounding's levels from the ground up [m MSL], [K].
    parcel_height_m, parcel_temperature_k : ndarray
        The surface parcel's dry adiabat at the warmest hour, from the ground to its
        thermal top [m MSL], [K].
    parcel_time_s : float
        That hour [s after midnight].
    times_s, thermal_top_m, cloud_base_m, band_top_m, band_bottom_m : ndarray
        The derived day hour by hour (NaN where there is none), as :class:`DerivedDay`.
    lift_start_s, lift_end_s : float or None
    """

    height_m: np.ndarray
    temperature_k: np.ndarray
    dewpoint_k: np.ndarray
    parcel_height_m: np.ndarray
    parcel_temperature_k: np.ndarray
    parcel_time_s: float
    times_s: np.ndarray
    thermal_top_m: np.ndarray
    cloud_base_m: np.ndarray
    band_top_m: np.ndarray
    band_bottom_m: np.ndarray
    lift_start_s: float | None
    lift_end_s: float | None


def sounding_drawing(sounding: Sounding, derived: DerivedDay, *, step_m: float = 50.0) -> SoundingDrawing:
    """What to draw for a sounding and its derived day: the temperature and dew point by
    height, the surface parcel's dry adiabat at the warmest hour (up to its thermal top)
    and the band through the day. Pure numpy (the adiabat by Poisson's equation with
    R/cp = 0.2857, as MetPy's dry adiabat [3]; the pressure log-linear between levels).
    """
    warmest = int(np.argmax(derived.surface_temperature_c))
    surface = derived.surface_elevation_m
    top = float(derived.thermal_top_m[warmest])
    z = np.append(np.arange(surface, top, step_m), top) if top > surface else np.array([surface])
    kappa = 0.2857  # R/cp of dry air (MetPy's constants.kappa, 2/7) (from memory)
    theta = (derived.surface_temperature_c[warmest] + 273.15) * (P0 / sounding.pressure_at(surface)) ** kappa
    parcel = theta * (sounding.pressure_at(z) / P0) ** kappa
    keep = sounding.height_m >= surface
    return SoundingDrawing(
        height_m=sounding.height_m[keep], temperature_k=sounding.temperature_k[keep],
        dewpoint_k=sounding.dewpoint_k[keep], parcel_height_m=z, parcel_temperature_k=np.asarray(parcel),
        parcel_time_s=float(derived.times_s[warmest]), times_s=derived.times_s, thermal_top_m=derived.thermal_top_m,
        cloud_base_m=derived.cloud_base_m, band_top_m=derived.band_top_m, band_bottom_m=derived.band_bottom_m,
        lift_start_s=derived.lift_start_s, lift_end_s=derived.lift_end_s)


__all__ = ["DERIVED_KEYS", "DayInputs", "DaySource", "NoWorkingBandError", "SoundingDrawing", "day_inputs",
           "no_lift_inputs",
           "sounding_drawing", "Sounding", "SurfaceForecast", "WindLevel", "SoundingFact", "DerivedDay", "SoundingTooShortError",
           "derive_day", "convective_velocity_scale", "encroachment_heat_content", "crossing_times",
           "potential_temperature_k", "temperature_from_potential_k", "lcl_pressure_pa", "surface_cape_jkg",
           "hourly_times", "wind_profile"]
