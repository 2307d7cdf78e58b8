"""The day model through the flight core: circling from the wing's stall speed, the
thermal size from the day's convective layer."""

from __future__ import annotations

import dataclasses

import pytest

from glidetask.engine.flight import Course, Flights, fly
from glidetask.engine.polar import PolarSpec
from glidetask.engine.scenario import Day, Profile
from glidetask.engine.thermals import allen_updraft_radius

KMH = 1000.0 / 3600.0
HOUR = 3600.0

# An invented 15 m class example polar (not any real aircraft), with a stall speed given.
SPEC = PolarSpec(label="test example", wing_area_m2=10.5, reference_mass_kg=350.0, empty_mass_kg=260.0,
                 max_ballast_kg=150.0, max_mass_kg=525.0, vne_ias_ms=270 * KMH, min_speed_ias_ms=72 * KMH,
                 points=((85 * KMH, 0.62), (120 * KMH, 0.80), (180 * KMH, 1.85)), stall_speed_ias_ms=64 * KMH)


def _flights(spec):
    return Flights(spec=spec, mass_kg=450.0, start_time_s=12 * HOUR, start_height_m=1800.0, band_top_m=1800.0,
                   band_bottom_m=800.0, lift_ends_s=19 * HOUR, lift_times_s=[0.0], lift_values=[3.0],
                   finish_elevation_m=200.0, lift_is_strength=True, thermal_radius_m=120.0)


def test_moving_the_files_lowest_speed_leaves_the_climb_unchanged_when_the_stall_speed_is_given():
    # Source: the turn physics of circling.py (stall speed x sqrt(n), a margin above it; e.g.
    # F. Thomas, Fundamentals of Sailplane Design, 1999, from memory): the circling speed
    # rests on the wing's stall speed, never on the polar file's lowest valid speed. The
    # flight core once dropped the stall speed (its achieved-climb table then fell back to
    # min_speed / 1.1), so moving min_speed from 72 to 84 km/h changed every climb.
    course = Course([200e3], [0.0])
    low = fly(course, _flights(SPEC))
    high = fly(course, _flights(dataclasses.replace(SPEC, min_speed_ias_ms=84 * KMH)))
    assert low.leg_climb_ms[0, 0] > 0.3
    assert high.leg_climb_ms[0, 0] == pytest.approx(low.leg_climb_ms[0, 0], abs=1e-12)
    without = fly(course, _flights(dataclasses.replace(SPEC, stall_speed_ias_ms=None, min_speed_ias_ms=84 * KMH)))
    assert without.leg_climb_ms[0, 0] < low.leg_climb_ms[0, 0] - 0.05  # the default 84/1.1 = 76 km/h circles faster


def _day(**changes):
    base = dict(start_time_s=12 * HOUR, band_top_m=2200.0, band_bottom_m=1200.0, lift_ends_s=18 * HOUR,
                thermal_strength=Profile.constant(3.0), ground_m=300.0)
    base.update(changes)
    return Day(**base)


def test_default_thermal_radius_is_allens_for_the_layer_between_ground_and_band_top():
    # Source: M. J. Allen, AIAA 2006-1510 (from memory): r2 = 0.102 (z/zi)^(1/3) (1 - 0.25 z/zi) zi,
    # taken at z = 0.6 zi: 0.102 * 0.6^(1/3) * 0.85 = 0.0731 zi; here zi = 2200 - 300 = 1900 m.
    day = _day()
    assert day.layer_depth_m == 1900.0
    assert day.effective_thermal_radius_m == pytest.approx(0.102 * 0.6 ** (1 / 3) * 0.85 * 1900.0, rel=1e-12)
    assert day.effective_thermal_radius_m == pytest.approx(allen_updraft_radius(0.6 * 1900.0, 1900.0))
    assert "Allen" in day.thermal_radius_source and "km" not in day.thermal_radius_source  # no unit: the edges word depths


def test_a_given_thermal_radius_overrides_the_layers():
    day = _day(thermal_radius_m=250.0)
    assert day.effective_thermal_radius_m == 250.0 and day.thermal_radius_source == "given in the task"


def test_a_deeper_layer_gives_broader_thermals():
    # Source: Allen 2006 (from memory): r2 grows in proportion to zi at a fixed z/zi.
    assert _day(band_top_m=3000.0).effective_thermal_radius_m > _day().effective_thermal_radius_m


# ---------------------------------------------------------------- one day, every mass

DEMO = __import__("pathlib").Path(__file__).resolve().parents[2] / "demo_tasks" / "vardmoor-triangle-300.toml"
BALLASTS = (0.0, 40.0, 100.0, 130.0, 170.0)


@pytest.fixture(scope="module")
def demo():
    from glidetask.formats.task_file import load_scenario

    return load_scenario(DEMO)


def test_plan_and_odds_on_the_forecast_day_agree_for_every_ballast(demo):
    # Source: contract section 3 and 4 (one day, every mass; `odds --spread 0` flies the forecast
    # day exactly and must agree with `plan`): the climbs of the task file's loading are turned
    # into thermal strengths once, and every other ballast climbs as the circling model says.
    from glidetask.engine.plan import plan
    from glidetask.engine.day_spread import DaySpread
    from glidetask.engine.simulate import simulate_days

    odds = simulate_days(demo, runs=3, seed=1, ballasts_kg=BALLASTS, spread=DaySpread.none())
    for ballast, choice in zip(BALLASTS, odds.choices):
        planned = plan(demo, ballast_kg=ballast)
        assert planned.finished and choice.finished == 3
        assert choice.task_time_s[1] == pytest.approx(planned.total_time_s, rel=0.01)
        assert choice.forecast_time_s == pytest.approx(planned.total_time_s, rel=1e-9)  # the same flight


def test_ballast_answers_do_not_contradict_each_other(demo):
    # The coach's check of issue 12: full water no longer "gains 23 minutes" in plan while
    # the odds show a minute; at the file's own ballast the plan is the climbs as given.
    from glidetask.engine.plan import plan

    times = [plan(demo, ballast_kg=b).total_time_s for b in BALLASTS]
    assert max(times) - min(times) < 0.03 * min(times)
    file_ballast = plan(demo)
    assert file_ballast.total_time_s == plan(demo, ballast_kg=demo.glider.ballast_kg).total_time_s


def test_the_sweeps_row_at_the_days_thermal_strength_agrees_with_the_plan(demo):
    # A day of one achieved climb all day: its thermal strength (the one conversion) is a
    # row of the sweep, and that row's times are the plan's at each ballast (within 1 %: the
    # sweep averages where the climbs fall along the route, the plan flies them where they fall).
    from glidetask.engine.compare import ballast_sweep
    from glidetask.engine.flight import climb_strengths
    from glidetask.engine.plan import plan

    day = dataclasses.replace(demo.day, climb=Profile.constant(1.8), mc_ms=None)
    steady = dataclasses.replace(demo, day=day)
    strength = float(climb_strengths(steady)[0])
    sweep = ballast_sweep(steady, strengths_ms=(strength,), ballasts_kg=BALLASTS)
    for j, ballast in enumerate(BALLASTS):
        assert sweep.task_time_s[0, j] == pytest.approx(plan(steady, ballast_kg=ballast).total_time_s, rel=0.01)


# ---------------------------------------------------------------- practical speeds


def _calm(**changes):
    base = dict(spec=SPEC, mass_kg=400.0, start_time_s=12 * HOUR, start_height_m=1800.0, band_top_m=1800.0,
                band_bottom_m=800.0, lift_ends_s=20 * HOUR, lift_times_s=[0.0], lift_values=[2.0],
                finish_elevation_m=200.0, final_glide_mc_ms=1.0)
    base.update(changes)
    return Flights(**base)


def test_centring_time_adds_exactly_its_time_per_climb():
    # Source: contract section 3 (each climb costs centring_s more): with a steady climb that
    # never ends, time changes nothing else, so the task takes climbs x centring_s longer.
    course = Course([300e3], [45.0])
    pure = fly(course, _calm())
    practical = fly(course, _calm(centring_s=30.0))
    assert practical.climbs[0] == pure.climbs[0] > 3
    assert practical.total_time_s[0] == pytest.approx(pure.total_time_s[0] + 30.0 * pure.climbs[0], abs=1e-6)
    assert practical.final_glide_from_m[0] == pytest.approx(pure.final_glide_from_m[0], abs=1e-6)


def test_a_detour_flies_the_course_that_much_longer():
    # Source: contract section 3 (the planned path flown detour_percent longer): a 5 % detour
    # on 300 km flies as 315 km; positions come back in metres of the planned path.
    detoured = fly(Course([300e3], [45.0], detour_factor=1.05), _calm())
    longer = fly(Course([315e3], [45.0]), _calm())
    assert detoured.total_time_s[0] == pytest.approx(longer.total_time_s[0], rel=1e-12)
    assert detoured.final_glide_from_m[0] * 1.05 == pytest.approx(longer.final_glide_from_m[0], rel=1e-12)


def test_task_file_defaults_for_practical_speeds(demo):
    # Contract 2.3: centring_s default 30 s, detour_percent default 5 % (common practice).
    assert (demo.day.centring_s, demo.day.detour_percent) == (30.0, 5.0)


# ---------------------------------------------------------------- what the pilot reads


def test_each_leg_has_its_indicated_airspeed_and_its_average_speed(demo):
    # Source: ISO 2533 troposphere (from memory) in a column dT warmer at every height,
    # integrated hydrostatically: p/p0 = ((288.15 + dT - 0.0065 h)/(288.15 + dT))^5.25588,
    # rho/rho0 = (p/p0) 288.15/(288.15 - 0.0065 h + dT) (geometric h: 0.5 m off the
    # geopotential at 1.7 km, 5e-5 in sigma); IAS = TAS sqrt(rho/rho0) (the pitot reads
    # dynamic pressure). Average speed: the leg's distance over its time (issue 12).
    from glidetask.engine.plan import plan

    planned = plan(demo)
    h, warm = demo.day.band_middle_m, demo.day.isa_deviation_c
    t = 288.15 - 0.0065 * h + warm
    sigma_band = (t / (288.15 + warm)) ** 5.25588 * 288.15 / t
    for leg in planned.legs:
        assert leg.average_speed_ms == pytest.approx(leg.distance_m / leg.time_s, rel=1e-12)
        if not leg.final_glide:
            assert leg.indicated_airspeed_ms == pytest.approx(leg.airspeed_ms * sigma_band ** 0.5, rel=1e-4)


# ---------------------------------------------------------------- a warm or cold column


@pytest.mark.parametrize("height", [500.0, 1500.0, 3000.0])
def test_density_ratio_on_a_warm_day_against_the_hydrostatic_integral(height):
    # Source: hydrostatic balance dp/dz = -rho g with the ideal gas rho = p/(R T) (any
    # meteorology text), integrated numerically by scipy's quad for a column 20 C warmer
    # than ISO 2533 at every height (T0 = 288.15 K, L = 0.0065 K/m, R = 287.05287, g0 =
    # 9.80665; geopotential heights, as the standard defines them).
    import math

    from scipy.integrate import quad

    from glidetask.engine.atmosphere import density_ratio, geopotential_altitude

    warm, g0, r = 20.0, 9.80665, 287.05287
    z = float(geopotential_altitude(height))
    log_ratio, _ = quad(lambda h: -g0 / (r * (288.15 - 0.0065 * h + warm)), 0.0, z, epsabs=1e-13)
    sigma = math.exp(log_ratio) * 288.15 / (288.15 - 0.0065 * z + warm)
    assert density_ratio(height, warm) == pytest.approx(sigma, rel=1e-10)
    assert density_ratio(height, warm) < density_ratio(height, 0.0)


def test_a_plan_on_a_warm_day_scales_its_speeds_by_the_density(demo):
    # Source: contract section 3 (the polar's speeds times 1/sqrt(sigma)): the best-glide
    # speed at the band middle scales with sqrt(sigma_standard / sigma_warm) exactly.
    from glidetask.engine.atmosphere import density_ratio
    from glidetask.engine.plan import plan

    h = demo.day.band_middle_m
    standard = plan(dataclasses.replace(demo, day=dataclasses.replace(demo.day, isa_deviation_c=0.0)))
    warm = plan(dataclasses.replace(demo, day=dataclasses.replace(demo.day, isa_deviation_c=20.0)))
    ratio = (density_ratio(h, 0.0) / density_ratio(h, 20.0)) ** 0.5
    assert warm.best_ld_speed_ms == pytest.approx(standard.best_ld_speed_ms * ratio, rel=1e-12)
    assert warm.total_time_s != standard.total_time_s


# ---------------------------------------------------------------- sinking air, the solver's step


def test_glide_and_cruise_in_sinking_air_against_the_closed_form():
    # Source: MacCready theory in moving air (P. B. MacCready 1958; H. Reichmann, Cross-Country
    # Soaring, 1978; from memory): in air sinking at 0.5 m/s (u = -0.5) the speed to fly is
    # v = sqrt((c + m - u)/a), the height used per metre (sink(v) - u)/v, and the cruise
    # speed with climbs m v / (m + sink(v) - u).
    from glidetask.engine.polar import scaled_polar
    from glidetask.engine.speedtofly import cruise_in_wind, glide_in_wind

    polar = scaled_polar(SPEC, 450.0, 0.0, 0.85)
    u = -0.5
    for m in (0.0, 1.0, 2.5):
        v = ((polar.c + m - u) / polar.a) ** 0.5
        sink = (polar.a * v + polar.b) * v + polar.c
        glide = glide_in_wind(polar, m, 0.0, 0.0, u)
        assert glide.airspeed_ms == pytest.approx(v, rel=1e-9)
        assert glide.height_per_metre == pytest.approx((sink - u) / v, rel=1e-9)
        if m > 0.0:
            cruise = cruise_in_wind(polar, m, 0.0, 0.0, u)
            assert cruise.cruise_speed_ms == pytest.approx(m * v / (m + sink - u), rel=1e-9)


def test_the_core_glides_in_sinking_air_as_the_closed_form():
    # Source: as above, at MacCready 0 (no climb ahead): from 1500 m to the arrival floor (400 m)
    # the glider covers (1500 - 400) v / (sink(v) - u), v = sqrt((c - u)/a).
    from glidetask.engine.atmosphere import density_ratio
    from glidetask.engine.polar import scaled_polar

    u = -0.5
    flights = _calm(lift_values=[0.0], start_height_m=1500.0, glide_airmass_ms=u)
    polar = scaled_polar(SPEC, 400.0, 0.0, density_ratio(1300.0))
    v = ((polar.c - u) / polar.a) ** 0.5
    sink = (polar.a * v + polar.b) * v + polar.c
    flown = fly(Course([300e3], [0.0]), flights)
    assert not flown.finished[0]
    assert flown.landout_m[0] == pytest.approx((1500.0 - 400.0) * v / (sink - u), rel=1e-9)


def test_the_speed_to_fly_solvers_newton_step_on_its_own():
    # The derivative passed to the Newton iteration is checked by a central difference
    # (a wrong slope would be rescued by the bisection fallback, unseen), and one Newton step
    # from near the root lands much closer (quadratic convergence, any numerical analysis text).
    import numpy as np

    from glidetask.engine.polar import scaled_polar
    from glidetask.engine.speedtofly import _stationarity, glide_in_wind

    polar = scaled_polar(SPEC, 450.0, 0.0, 0.85)
    args = (polar.a, polar.b, polar.c, -4.0, 9.0, -0.3, 1.5)  # along, across^2, airmass, mc
    for v in (25.0, 35.0, 50.0, 70.0):
        f, slope = _stationarity(np.array(v), *args)
        h = 1e-5 * v
        numeric = (_stationarity(np.array(v + h), *args)[0] - _stationarity(np.array(v - h), *args)[0]) / (2 * h)
        assert slope == pytest.approx(numeric, rel=1e-6)
    root = float(glide_in_wind(polar, 1.5, -4.0, 3.0, -0.3).airspeed_ms)
    start = root * 1.02
    f, slope = _stationarity(np.array(start), *args)
    after = start - float(f) / float(slope)
    assert abs(after - root) < 0.05 * abs(start - root)
