"""The day from a sounding, checked against hand calculations, published formulas and MetPy.

Each check names its source. The analytic soundings have a constant lapse rate and
pressures from the hydrostatic equation in closed form, ``p = p0 (T/T0)^(g/(Rd*lapse))``
(Source: the standard atmosphere's troposphere formula, ISO 2533, with our lapse rate).
"""

from __future__ import annotations

import math

import numpy as np
import pytest
from hypothesis import given, settings
from hypothesis import strategies as st

from glidetask.engine import convection, forecast
from glidetask.engine import sounding as snd
from glidetask.engine import sounding_inputs

RD = 287.04749  # J/(kg K), MetPy's dry-air gas constant (Source: metpy.constants.Rd)
G = 9.80665


def analytic_sounding(surface_m=300.0, surface_c=15.0, lapse_k_per_km=6.5, spread_c=8.0, top_m=6000.0,
                      step_m=100.0) -> forecast.Sounding:
    heights = np.arange(surface_m, top_m + 0.5 * step_m, step_m)
    lapse = lapse_k_per_km / 1000.0
    temperature = surface_c + 273.15 - lapse * (heights - surface_m)
    pressure = 97000.0 * (temperature / temperature[0]) ** (G / (RD * lapse))
    return forecast.Sounding(pressure, heights, temperature, temperature - spread_c,
                        np.full(heights.shape, 270.0), np.linspace(3.0, 15.0, heights.size))


def surface(times_h, temperatures, dewpoints) -> forecast.SurfaceForecast:
    return forecast.SurfaceForecast(tuple(3600.0 * t for t in times_h), tuple(temperatures), tuple(dewpoints))


def test_thermal_top_on_a_constant_lapse_rate_matches_the_dry_adiabat_by_hand():
    # Source: the parcel method with the dry adiabatic lapse rate of 9.8 K/km (any
    # meteorology text; g/cp = 9.77 K/km with MetPy's constants). By hand: the parcel
    # starts 8 K warmer than the air at the ground and loses (9.8 - 5.0) K/km on it, so it
    # meets the sounding 8 / 4.8 km = 1667 m above the ground. Tolerance: 9.8 K/km is
    # the rule to two figures, and the parcel's lapse in height is g/cp * T_parcel/T_air
    # (up to 2.8 % more near the ground): together at most 2 % of the depth, 33 m.
    sounding = analytic_sounding(surface_c=15.0, lapse_k_per_km=5.0, spread_c=20.0)
    day = snd.derive_day(sounding, surface([10, 14], [23.0, 23.0], [0.0, 0.0]))
    by_hand = 300.0 + 8.0 / (9.8 - 5.0) * 1000.0
    assert day.thermal_top_m == pytest.approx(np.full(day.times_s.size, by_hand), abs=0.02 * 1667.0)


def test_thermal_top_matches_the_exact_dry_adiabat_in_the_analytic_atmosphere():
    # Source: Poisson's equation T_p = T_s (p/p_s)^kappa (kappa = Rd/cp = 2/7) meets
    # T(z) of the closed-form atmosphere above where T_s (T/T0)^(g/(cp*lapse)) = T, i.e.
    # T = T0 (T_s/T0)^(1/(1 - g/(cp*lapse))). Tolerance 2 m: linear interpolation of theta
    # between 100 m levels.
    lapse = 5.0e-3
    cp = RD / (2.0 / 7.0)
    sounding = analytic_sounding(surface_c=15.0, lapse_k_per_km=5.0, spread_c=20.0)
    t0, ts = 288.15, 296.15
    t_meet = t0 * (ts / t0) ** (1.0 / (1.0 - G / (cp * lapse)))
    exact = 300.0 + (t0 - t_meet) / lapse
    day = snd.derive_day(sounding, surface([12, 13], [23.0, 23.0], [0.0, 0.0]))
    assert day.thermal_top_m[0] == pytest.approx(exact, abs=2.0)


@pytest.mark.parametrize("temperature_c, dewpoint_c", [(20.0, 12.0), (25.0, 10.0), (28.0, 8.0)])
def test_cloud_base_follows_the_dew_point_spread_rule(temperature_c, dewpoint_c):
    # Source (common practice): cloud base above the ground is about 125 m per degree C of
    # spread between surface temperature and dew point. The rule is good to some 5 %
    # (the exact figure falls from about 125 to 120 m/K as the air gets drier and colder).
    # The air at the ground is 1 K cooler than the surface air, as on a sunny afternoon.
    sounding = analytic_sounding(surface_c=temperature_c - 1.0, lapse_k_per_km=7.5, spread_c=15.0, top_m=8000.0)
    day = snd.derive_day(sounding, surface([12, 13], [temperature_c] * 2, [dewpoint_c] * 2))
    rule_m = 125.0 * (temperature_c - dewpoint_c)
    assert day.lcl_m[0] - 300.0 == pytest.approx(rule_m, rel=0.05)


def test_cloud_base_is_metpys_lcl_at_its_height_in_the_sounding():
    # Source: MetPy's lcl() (Romps 2017, exact) for the surface air; its pressure put
    # into the closed-form atmosphere of the sounding, z = z0 + (T0/lapse)(1 - (p/p0)^(Rd*lapse/g)).
    # Tolerance 3 m: log-pressure interpolation between 100 m levels. And Bolton's LCL
    # temperature (Mon. Wea. Rev. 108, 1980, eq. 15; equation number from memory) taken down the dry adiabat at
    # g/cp = 9.77 K/km agrees within 1 % (Bolton's stated accuracy is 0.1 K, about 15 m;
    # the parcel, 1 K warmer than the air, cools 0.4 % faster per metre than g/cp).
    import metpy.calc as mpcalc
    from metpy.units import units

    lapse = 7.5e-3
    sounding = analytic_sounding(surface_c=23.0, lapse_k_per_km=7.5, spread_c=15.0, top_m=8000.0)
    day = snd.derive_day(sounding, surface([12, 13], [24.0, 24.0], [11.0, 11.0]))
    p_lcl, _ = mpcalc.lcl(97000.0 * units.Pa, 24.0 * units.degC, 11.0 * units.degC)
    z_lcl = 300.0 + 296.15 / lapse * (1.0 - (p_lcl.m_as("Pa") / 97000.0) ** (RD * lapse / G))
    assert day.lcl_m[0] == pytest.approx(z_lcl, abs=3.0)
    t, td = 297.15, 284.15
    t_lcl = 1.0 / (1.0 / (td - 56.0) + math.log(t / td) / 800.0) + 56.0
    assert day.lcl_m[0] - 300.0 == pytest.approx((t - t_lcl) / 9.77e-3, rel=0.01)
    # 1 K warmer than a 7.5 K/km sounding, thermals stop some 440 m up: blue, no cloud base
    assert day.thermal_top_m[0] < day.lcl_m[0] and not day.cumulus[0] and np.isnan(day.cloud_base_m[0])


def test_band_is_the_lower_of_base_and_top_less_the_margin_over_a_height_above_ground():
    # Source: the task file's rule (contract 2.7): band top = min(cloud base, thermal top)
    # less band_top_margin_m; band bottom = ground + band_bottom_agl_m.
    sounding = analytic_sounding(surface_c=10.0, lapse_k_per_km=7.5, spread_c=15.0, top_m=8000.0)
    day = snd.derive_day(sounding, surface([10, 16], [24.0, 24.0], [11.0, 11.0]),
                         band_top_margin_m=150.0, band_bottom_agl_m=500.0)
    expected_top = np.minimum(day.lcl_m, day.thermal_top_m) - 150.0
    assert day.band_top_m == pytest.approx(expected_top)
    assert day.band_bottom_m == pytest.approx(np.full(day.times_s.size, 800.0))


def test_wstar_on_a_worked_case_by_hand():
    # Source: Deardorff (1970), w* = (g/theta * zi * flux)^(1/3). By hand: g = 9.80665,
    # theta = 300 K, zi = 1500 m, flux = 0.2 K m/s: 9.80665/300 * 1500 * 0.2 = 9.80665,
    # whose cube root is 2.1405 m/s (to 5 figures).
    assert convection.convective_velocity_scale(0.2, 1500.0, 300.0) == pytest.approx(2.1405, abs=5e-5)
    assert convection.convective_velocity_scale(-0.1, 1500.0, 300.0) == 0.0


def test_encroachment_heat_content_in_a_linear_theta_profile():
    # Source: Stull (1988), mixed-layer growth by encroachment (section from memory) into theta = theta0 + gamma*z: the
    # layer mixed to theta_m reaches h = (theta_m - theta0)/gamma and holds gamma*h^2/2
    # of heat [K m]. gamma = 4 K/km, 6 K warmer: h = 1500 m, 4500 K m. Tolerance 0.5 %:
    # the integral on a 5 m grid.
    heights = np.array([0.0, 1000.0, 2000.0, 3000.0])
    theta = 300.0 + 4e-3 * heights
    heat = convection.encroachment_heat_content(np.array([306.0, 300.0]), heights, theta, 0.0)
    assert heat[0] == pytest.approx(0.5 * 4e-3 * 1500.0 ** 2, rel=0.005)
    assert heat[1] == 0.0


def _afternoon(peak_c: float) -> snd.DerivedDay:
    sounding = analytic_sounding(surface_c=12.0, lapse_k_per_km=6.0, spread_c=10.0, top_m=8000.0)
    return snd.derive_day(sounding, surface([9, 11, 13, 15, 17, 19], [14.0, 18.0, peak_c - 2.0, peak_c, peak_c - 2.0, 16.0],
                                            [8.0] * 6))


def test_a_warmer_afternoon_gives_a_deeper_layer_and_stronger_thermals():
    # Source (physics of the method): a warmer surface parcel meets the sounding higher,
    # and a warming layer that is deeper needs more heat (larger flux, and w* grows with
    # both depth and flux).
    cool, warm = _afternoon(22.0), _afternoon(25.0)
    afternoon = (cool.times_s >= 12 * 3600) & (cool.times_s <= 15 * 3600)
    assert np.all(warm.thermal_top_m[afternoon] > cool.thermal_top_m[afternoon])
    assert np.all(warm.thermal_strength_ms[afternoon] > cool.thermal_strength_ms[afternoon])
    assert np.all(cool.thermal_strength_ms[afternoon] > 0.0)


def test_lift_starts_and_ends_at_the_trigger_temperature():
    day = _afternoon(25.0)
    assert day.lift_start_s is not None and day.lift_end_s is not None
    for time_s in (day.lift_start_s, day.lift_end_s):
        temperature = np.interp(time_s, [h * 3600.0 for h in (9, 11, 13, 15, 17, 19)],
                                [14.0, 18.0, 23.0, 25.0, 23.0, 16.0])
        assert temperature == pytest.approx(day.trigger_temperature_c, abs=1e-9)
    # at the trigger temperature the band is exactly the least useful one (MIN_WORKING_BAND_M)
    outside = (day.times_s < day.lift_start_s) | (day.times_s > day.lift_end_s)
    assert np.all(day.thermal_strength_ms[outside] == 0.0) and np.all(np.isnan(day.band_top_m[outside]))


def test_a_day_that_never_triggers_is_a_result_with_no_lift():
    sounding = analytic_sounding(surface_c=15.0, lapse_k_per_km=3.0, spread_c=10.0)
    day = snd.derive_day(sounding, surface([10, 16], [15.5, 16.0], [5.0, 5.0]))
    assert day.lift_start_s is None and day.lift_end_s is None
    assert np.all(day.thermal_strength_ms == 0.0)
    assert [fact.kind for fact in day.facts] == ["no_lift"]
    assert day.facts[0].value == pytest.approx(day.trigger_temperature_c)


def test_a_sounding_that_ends_below_the_thermal_top_is_refused():
    sounding = analytic_sounding(surface_c=15.0, lapse_k_per_km=5.0, spread_c=20.0, top_m=1200.0)
    with pytest.raises(snd.SoundingTooShortError) as caught:
        snd.derive_day(sounding, surface([12, 14], [25.0, 26.0], [0.0, 0.0]))
    assert caught.value.top_m == 1200.0 and caught.value.time_s == 12 * 3600.0


def test_large_cape_and_deep_or_shallow_layers_are_facts():
    # Source (common practice): see OVERDEVELOPMENT_CAPE_JKG, SHALLOW_LAYER_M, DEEP_LAYER_M.
    # A moist, nearly dry-adiabatic sounding: the surface parcel is free to convect deep.
    unstable = analytic_sounding(surface_c=22.0, lapse_k_per_km=8.0, spread_c=3.0, top_m=12000.0)
    day = snd.derive_day(unstable, surface([10, 16], [27.0, 30.0], [20.0, 21.0]))
    kinds = {fact.kind for fact in day.facts}
    assert "overdevelopment" in kinds and day.cape_jkg >= snd.OVERDEVELOPMENT_CAPE_JKG
    deep = snd.derive_day(analytic_sounding(surface_c=15.0, lapse_k_per_km=7.0, spread_c=25.0, top_m=9000.0),
                          surface([10, 16], [25.0, 28.0], [0.0, 0.0]))
    assert "deep_layer" in {fact.kind for fact in deep.facts}
    shallow = snd.derive_day(analytic_sounding(surface_c=15.0, lapse_k_per_km=2.0, spread_c=25.0),
                             surface([10, 16], [21.5, 22.5], [0.0, 0.0]), band_bottom_agl_m=300.0)
    assert shallow.lift_start_s is not None and "shallow_layer" in {fact.kind for fact in shallow.facts}


def test_wind_profile_is_the_soundings_winds_from_the_ground_up():
    sounding = analytic_sounding()
    day = snd.derive_day(sounding, surface([10, 16], [25.0, 26.0], [5.0, 5.0]), surface_elevation_m=450.0)
    assert [w.height_m for w in day.wind] == list(sounding.height_m[sounding.height_m >= 450.0])
    assert day.wind[0].speed_ms == pytest.approx(float(np.interp(500.0, sounding.height_m, sounding.wind_speed_ms)))


def test_after_the_warming_ends_the_flux_fades_linearly_to_nothing_at_the_end_of_lift():
    # Our assumption (documented in derive_day): from the last warming hour's flux down to
    # zero at the lift's end, linearly in time.
    day = _afternoon(25.0)
    # The surface peaks at 15:00, so 14:00 is the last hour whose half hour either side warms.
    last = int(np.argmin(np.abs(day.times_s - 14 * 3600.0)))
    later = [i for i in range(last + 1, len(day.times_s)) if day.times_s[i] <= day.lift_end_s]
    assert len(later) >= 3 and "weakening_assumed" in {fact.kind for fact in day.facts}
    for i in later:
        share = (day.lift_end_s - day.times_s[i]) / (day.lift_end_s - day.times_s[last])
        assert day.heat_flux_kms[i] == pytest.approx(day.heat_flux_kms[last] * share)


def test_warming_faster_than_the_sun_can_drive_is_capped():
    # Source: MAX_HEAT_FLUX_KMS (about 480 W/m^2, from memory). A 2 km deep layer warming
    # 3 K an hour would need 1.7 K m/s (2000 W/m^2).
    sounding = analytic_sounding(surface_c=12.0, lapse_k_per_km=6.0, spread_c=10.0, top_m=8000.0)
    day = snd.derive_day(sounding, surface([10, 11, 16], [20.0, 23.0, 24.0], [5.0, 5.0, 5.0]))
    assert np.all(day.heat_flux_kms <= snd.MAX_HEAT_FLUX_KMS)
    fact = next(f for f in day.facts if f.kind == "flux_capped")
    assert fact.value > 1.0 and fact.time_s == 10 * 3600.0


@settings(max_examples=25, deadline=None)
@given(lapse=st.floats(3.0, 8.0), excess=st.floats(0.5, 10.0), spread=st.floats(1.0, 20.0),
       warmer=st.floats(0.1, 3.0))
def test_invariants_of_the_derived_hour(lapse, excess, spread, warmer):
    # Invariants of the method (contract 2.7): a warmer surface never lowers the thermal top;
    # a drier one never lowers the cloud base; cumulus exactly where the LCL is below the top;
    # the band never above the lower of base and top less the margin; strength never negative.
    sounding = analytic_sounding(surface_c=10.0, lapse_k_per_km=lapse, spread_c=15.0, top_m=12000.0, step_m=250.0)
    temperature = 10.0 + excess
    day = snd.derive_day(sounding, surface([12, 13, 14], [temperature, temperature + warmer, temperature + warmer],
                                           [temperature - spread, temperature - spread - 1.0, temperature - spread - 1.0]))
    assert day.thermal_top_m[1] >= day.thermal_top_m[0]
    assert day.lcl_m[1] >= day.lcl_m[0]
    assert np.array_equal(day.cumulus, day.lcl_m < day.thermal_top_m)
    band = np.isfinite(day.band_top_m)
    limit = np.minimum(day.lcl_m, day.thermal_top_m) - day.band_top_margin_m
    assert np.all(day.band_top_m[band] <= limit[band] + 1e-6)
    assert np.all(day.thermal_strength_ms >= 0.0)


# ---------------------------------------------------------------- what the plan flies, what to draw


def test_the_drawing_s_adiabat_is_the_dry_adiabat_and_meets_the_sounding_at_the_thermal_top():
    # Source: the dry adiabatic lapse rate g/cp = 9.8 K/km (ISO 2533 g, cp = 1004 J/(kg K);
    # handbook value) and MetPy's dry_lapse as an independent reference; the thermal top is
    # where the parcel is as warm as the air (the parcel method).
    import metpy.calc as mpcalc
    from metpy.units import units

    sounding = analytic_sounding()
    derived = snd.derive_day(sounding, surface([10, 14, 18], [18.0, 24.0, 17.0], [8.0, 8.0, 8.0]))
    drawing = snd.sounding_drawing(sounding, derived)
    warmest = int(np.argmax(derived.surface_temperature_c))
    assert drawing.parcel_time_s == derived.times_s[warmest]
    assert drawing.parcel_height_m[0] == derived.surface_elevation_m
    assert drawing.parcel_height_m[-1] == pytest.approx(derived.thermal_top_m[warmest])
    rise_km = (drawing.parcel_height_m[-1] - drawing.parcel_height_m[0]) / 1000.0
    cooling = drawing.parcel_temperature_k[0] - drawing.parcel_temperature_k[-1]
    assert cooling / rise_km == pytest.approx(9.8, abs=0.15)
    reference = mpcalc.dry_lapse(sounding.pressure_at(drawing.parcel_height_m) * units.Pa,
                                 drawing.parcel_temperature_k[0] * units.K).m_as("K")
    np.testing.assert_allclose(drawing.parcel_temperature_k, reference, atol=0.01)
    air_at_top = np.interp(drawing.parcel_height_m[-1], sounding.height_m, sounding.temperature_k)
    assert drawing.parcel_temperature_k[-1] == pytest.approx(air_at_top, abs=0.05)
    np.testing.assert_array_equal(drawing.band_top_m, derived.band_top_m)
    assert drawing.height_m[0] >= derived.surface_elevation_m and drawing.temperature_k.shape == drawing.height_m.shape


def test_day_inputs_are_the_derived_day_rounded_as_a_pilot_types_it():
    # The plan's day: the band top of each hour with a working band (whole metres), the band
    # bottom, hourly strength (0.01 m/s) with one hour of no lift each side, the lift's end
    # down to the minute, the band's mean wind (WindProfile.mean_between).
    derived = _afternoon(26.0)
    inputs = sounding_inputs.day_inputs(derived)
    band = np.isfinite(derived.band_top_m)
    assert inputs.band_top.times_s == tuple(derived.times_s[band])
    assert inputs.band_top.values == tuple(float(round(v)) for v in derived.band_top_m[band])
    assert inputs.band_top_m == max(inputs.band_top.values)
    assert inputs.band_bottom_m == round(derived.surface_elevation_m + derived.band_bottom_agl_m)
    strength = dict(zip(derived.times_s, derived.thermal_strength_ms))
    assert inputs.thermal_strength.values[0] == 0.0 and inputs.thermal_strength.values[-1] == 0.0
    assert all(v == pytest.approx(strength[t], abs=0.005) for t, v in zip(*[inputs.thermal_strength.times_s,
                                                                          inputs.thermal_strength.values]))
    assert 0.0 <= derived.lift_end_s - inputs.lift_ends_s < 60.0 and inputs.lift_ends_s % 60.0 == 0.0
    mean = inputs.wind_profile.mean_between(inputs.band_bottom_m, inputs.band_top_m)
    assert inputs.wind.speed_ms == pytest.approx(mean.speed_ms, abs=0.05 / 3.6 + 1e-12)
    assert inputs.wind.from_deg == pytest.approx(mean.from_deg, abs=0.5)


def test_a_day_without_a_working_band_gives_the_plan_nothing():
    sounding = analytic_sounding(surface_c=15.0, lapse_k_per_km=3.0, spread_c=10.0)
    derived = snd.derive_day(sounding, surface([10, 16], [15.5, 16.0], [5.0, 5.0]))  # never triggers
    with pytest.raises(sounding_inputs.NoWorkingBandError):
        sounding_inputs.day_inputs(derived)


def test_a_day_without_a_working_band_flies_with_no_lift():
    # Issue 16: no lift is a result. The day starts at the band bottom (ground + 600 m AGL,
    # common practice) unless a start height is typed, with no thermal strength at all.
    sounding = analytic_sounding(surface_c=15.0, lapse_k_per_km=3.0, spread_c=10.0)
    derived = snd.derive_day(sounding, surface([10, 16], [15.5, 16.0], [5.0, 5.0]))  # never triggers
    inputs = sounding_inputs.no_lift_inputs(derived, 12 * 3600.0)
    assert inputs.no_lift and inputs.band_bottom_m == round(derived.surface_elevation_m + 600.0)
    assert inputs.thermal_strength.values == (0.0,) and inputs.band_top_m > inputs.band_bottom_m
    assert inputs.lift_ends_s > 12 * 3600.0
    typed = sounding_inputs.no_lift_inputs(derived, 12 * 3600.0, 1800.0)
    assert typed.band_top_m == 1800.0 and typed.band_bottom_m == inputs.band_bottom_m


def test_a_task_s_day_source_carries_what_the_drawing_needs():
    from pathlib import Path

    from glidetask.formats.task_file import load_scenario

    source = load_scenario(Path(__file__).resolve().parents[2] / "demo_tasks" / "vardmoor-forecast-day.toml").day_source
    drawing = snd.sounding_drawing(source.sounding, source.derived)
    assert drawing.height_m[0] == source.derived.surface_elevation_m  # the demo sounding has a level at the ground
    np.testing.assert_array_equal(drawing.times_s, source.derived.times_s)
