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

The thermodynamics (potential temperature, LCL, the parcel's thermal top, CAPE, w*) are
:mod:`glidetask.engine.convection`, which imports MetPy only inside the functions that need
it, so that planning without a sounding never pays for it. What the derived day gives the
plan's day is :mod:`glidetask.engine.sounding_inputs`.

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
from dataclasses import dataclass, field

import numpy as np

from glidetask.engine.convection import (
    THETA_REFERENCE_PA, convective_velocity_scale, encroachment_heat_content, lcl_pressure_pa, parcel_cape_jkg,
    potential_temperature_k, temperature_from_potential_k, thermal_top_m,
)
from glidetask.engine.forecast import Sounding, SurfaceForecast
from glidetask.engine.scenario import WindLevel

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



def surface_cape_jkg(sounding: Sounding, surface_m: float, temperature_k: float, dewpoint_k: float) -> float:
    """CAPE of the surface parcel [J/kg] through the sounding above ``surface_m`` (MetPy [3])."""
    above = sounding.height_m > surface_m
    p = np.concatenate(([sounding.pressure_at(surface_m)], sounding.pressure_pa[above]))
    t = np.concatenate(([temperature_k], sounding.temperature_k[above]))
    td = np.concatenate(([min(dewpoint_k, temperature_k)], sounding.dewpoint_k[above]))
    return parcel_cape_jkg(p, t, td)


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
    tops = thermal_top_m(theta_parcel, heights, theta_env, surface_m)
    if np.isnan(tops).any():
        raise SoundingTooShortError(heights[-1], time_s=float(times[np.isnan(tops)][0]))

    lcl = sounding.height_at_pressure(lcl_pressure_pa(p_surface, temperature_c + 273.15, dewpoint_c + 273.15))
    cumulus = np.isfinite(lcl) & (lcl < tops)
    usable_top = np.where(cumulus, lcl, tops) - band_top_margin_m
    bottom = surface_m + band_bottom_agl_m

    trigger_c = _trigger_temperature_c(sounding, theta_env, surface_m, p_surface,
                                       bottom + MIN_WORKING_BAND_M + band_top_margin_m)
    start, end = crossing_times(surface.times_s, surface.temperature_c, trigger_c)
    flux = _hourly_flux(sounding, surface, times, p_surface, theta_env, surface_m)
    in_lift, flux, facts = _lift_hours(times, surface, start, end, trigger_c, flux)
    depth = tops - surface_m
    wstar = np.where(in_lift, convective_velocity_scale(flux, depth, theta_parcel), 0.0)
    band_ok = in_lift & (usable_top - bottom >= MIN_WORKING_BAND_M - 1e-6)
    cape, overdevelopment = _overdevelopment(sounding, surface_m, times, cumulus, temperature_c, dewpoint_c)
    facts += overdevelopment + _depth_facts(times, depth, in_lift)

    arrays = {name: _read_only(value) for name, value in dict(
        times_s=times, surface_temperature_c=temperature_c, surface_dewpoint_c=dewpoint_c, thermal_top_m=tops,
        lcl_m=lcl, cloud_base_m=np.where(cumulus, lcl, np.nan), cumulus=cumulus,
        band_top_m=np.where(band_ok, usable_top, np.nan), band_bottom_m=np.where(band_ok, bottom, np.nan),
        heat_flux_kms=flux, wstar_ms=wstar, thermal_strength_ms=CORE_STRENGTH_PER_WSTAR * wstar).items()}
    return DerivedDay(
        **arrays, lift_start_s=start, lift_end_s=None if start is None else (surface.times_s[-1] if end is None else end),
        trigger_temperature_c=trigger_c, cape_jkg=cape, wind=wind_profile(sounding, surface_m), facts=tuple(facts),
        surface_elevation_m=surface_m, band_top_margin_m=band_top_margin_m, band_bottom_agl_m=band_bottom_agl_m)


def _lift_hours(times, surface, start, end, trigger_c, flux):
    """The hours in the lift, the heat flux used then (capped, and fading once the warming
    ends) and the facts about the lift: ``(in_lift, flux, facts)``."""
    facts: list[SoundingFact] = []
    in_lift = np.zeros(times.shape, bool)
    capped = flux > MAX_HEAT_FLUX_KMS
    if start is None:
        facts.append(SoundingFact("no_lift", value=trigger_c, other=float(max(surface.temperature_c))))
        return in_lift, flux, facts
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
    return in_lift, flux, facts


def _overdevelopment(sounding, surface_m, times, cumulus, temperature_c, dewpoint_c):
    """The day's CAPE [J/kg] (the surface parcel at the warmest hour with cumulus; 0 without
    cumulus) and the overdevelopment fact when it is high: ``(cape, facts)``."""
    if not cumulus.any():
        return 0.0, []
    warmest = int(np.argmax(np.where(cumulus, temperature_c, -np.inf)))
    cape = surface_cape_jkg(sounding, surface_m, temperature_c[warmest] + 273.15, dewpoint_c[warmest] + 273.15)
    if cape >= OVERDEVELOPMENT_CAPE_JKG:
        return cape, [SoundingFact("overdevelopment", value=cape, time_s=float(times[warmest]))]
    return cape, []


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
    theta = (derived.surface_temperature_c[warmest] + 273.15) * (THETA_REFERENCE_PA / sounding.pressure_at(surface)) ** kappa
    parcel = theta * (sounding.pressure_at(z) / THETA_REFERENCE_PA) ** kappa
    keep = sounding.height_m >= surface
    return SoundingDrawing(
        height_m=sounding.height_m[keep], temperature_k=sounding.temperature_k[keep],
        dewpoint_k=sounding.dewpoint_k[keep], parcel_height_m=z, parcel_temperature_k=np.asarray(parcel),
        parcel_time_s=float(derived.times_s[warmest]), times_s=derived.times_s, thermal_top_m=derived.thermal_top_m,
        cloud_base_m=derived.cloud_base_m, band_top_m=derived.band_top_m, band_bottom_m=derived.band_bottom_m,
        lift_start_s=derived.lift_start_s, lift_end_s=derived.lift_end_s)


__all__ = ["SoundingFact", "DerivedDay", "SoundingTooShortError", "derive_day",
           "crossing_times", "surface_cape_jkg", "hourly_times", "wind_profile", "SoundingDrawing", "sounding_drawing"]
