"""The vectorised flight core (glidetask.engine.flight): the task flown leg by leg."""

from __future__ import annotations

import dataclasses

import numpy as np
import pytest

from glidetask.engine import flight
from glidetask.engine.atmosphere import density_ratio
from glidetask.engine.circling import achieved_climb
from glidetask.engine.flight import Course, Flights, fly
from glidetask.engine.polar import PolarSpec, scaled_polar

KMH = 1000.0 / 3600.0
HOUR = 3600.0

# An invented 15 m class example polar (not any real aircraft).
SPEC = PolarSpec(label="test example", wing_area_m2=10.5, reference_mass_kg=350.0, empty_mass_kg=260.0,
                 max_ballast_kg=150.0, max_mass_kg=525.0, vne_ias_ms=270 * KMH, min_speed_ias_ms=70 * KMH,
                 points=((80 * KMH, 0.62), (120 * KMH, 0.80), (180 * KMH, 1.85)))


def calm_day(**changes) -> Flights:
    base = dict(spec=SPEC, mass_kg=380.0, start_time_s=12 * HOUR, start_height_m=1800.0, band_top_m=1800.0,
                band_bottom_m=800.0, lift_ends_s=19 * HOUR, lift_times_s=[0.0], lift_values=[2.0],
                finish_elevation_m=200.0, arrival_margin_m=200.0)
    base.update(changes)
    return Flights(**base)


def band_polar(day: Flights):
    sigma = density_ratio(0.5 * (day.band_top_m + day.band_bottom_m))
    return scaled_polar(SPEC, day.mass_kg, 0.0, sigma)


TRIANGLE = Course([100e3, 100e3, 100e3], [30.0, 150.0, 270.0])


def test_calm_constant_climb_matches_macready_cycle_arithmetic():
    # Source: MacCready theory (P. B. MacCready 1958; H. Reichmann, Cross-Country Soaring,
    # 1978, from memory): gliding at v = sqrt((c + m)/a) and climbing at m gives the average
    # speed Vc = m v / (m + sink(v)). Every glide is at v and every climb at m, so reaching
    # distance x at height H takes x / Vc - (h0 - H) / m exactly (height not climbed is time saved).
    climb, mc_final = 2.0, 1.0
    day = calm_day(lift_values=[climb], final_glide_mc_ms=mc_final)
    polar = band_polar(day)
    a, b, c = polar.a, polar.b, polar.c
    v = np.sqrt((c + climb) / a)
    sink = (a * v + b) * v + c
    cruise = climb * v / (climb + sink)
    total, floor, top, bottom = 300e3, 400.0, 1800.0, 800.0

    def final_glide_per_metre(start_height):
        # The final glide's polar at the density of the middle of its start and arrival heights,
        # iterated to convergence (contract section 3); still air: v_f = sqrt((c + m)/a).
        fg = scaled_polar(SPEC, day.mass_kg, 0.0, density_ratio(0.5 * (start_height + floor)))
        v_f = np.sqrt((fg.c + mc_final) / fg.a)
        return ((fg.a * v_f + fg.b) * v_f + fg.c) / v_f, v_f

    climbs_at = (1800.0 - bottom) * v / sink + np.arange(40) * (top - bottom) * v / sink
    for x in climbs_at:  # the first climb from which the final-glide height is within the band
        required = top + 1.0
        for _ in range(20):
            per_metre, v_final = final_glide_per_metre(required)
            required = floor + (total - x) * per_metre
        if required <= top:
            break
    expected = x / cruise - (1800.0 - required) / climb + (total - x) / v_final

    flown = fly(TRIANGLE, day)
    assert flown.finished[0] and flown.reason[0] == flight.FINAL_GLIDE
    # Tolerance: the planner's density fixed point is converged to centimetres (its docstring);
    # 0.05 m of height is 1-2 s of climbing.
    assert flown.final_glide_from_m[0] == pytest.approx(x, abs=0.01)
    assert flown.final_glide_height_m[0] == pytest.approx(required, abs=0.05)
    assert flown.total_time_s[0] == pytest.approx(expected, abs=2.0)
    assert flown.leg_arrival_height_m[0, -1] == pytest.approx(floor, abs=1e-6)


def test_best_glide_from_height_covers_height_times_glide_ratio():
    # Source: common practice - in still air at MacCready 0 a glider covers height x L/D.
    day = calm_day(lift_values=[0.0], start_height_m=1500.0)
    flown = fly(TRIANGLE, day)
    best_ld = float(band_polar(day).best_ld)
    assert not flown.finished[0]
    assert flown.reason[0] == flight.NO_CLIMB
    # Tolerance: exact arithmetic on the same polar; 1 mm.
    assert flown.landout_m[0] == pytest.approx((1500.0 - 400.0) * best_ld, abs=1e-3)
    assert flown.landout_leg[0] == 0


def test_lift_ending_before_the_final_glide_lands_out():
    # Lift ends 10 minutes after the start: the first glide (about 12 minutes) reaches the band
    # bottom after it, then glides on at best L/D to the floor (contract section 3: the plan
    # ends short).
    day = calm_day(lift_ends_s=12 * HOUR + 600.0)
    polar = band_polar(day)
    v = np.sqrt((polar.c + 2.0) / polar.a)
    sink = polar.sink(v)
    first_glide = (1800.0 - 800.0) * v / sink
    flown = fly(TRIANGLE, day)
    assert not flown.finished[0] and flown.reason[0] == flight.LIFT_ENDED
    # Source: common practice (height x L/D at MacCready 0) after the cruise glide; 1 mm.
    assert flown.landout_m[0] == pytest.approx(first_glide + (800.0 - 400.0) * polar.best_ld, abs=1e-3)
    assert np.isnan(flown.finish_time_s[0])


def test_wind_stronger_than_the_glider_ends_the_flight_short():
    # A 300 km/h headwind on the first leg is faster than the glider's never-exceed speed:
    # no airspeed makes progress (contract section 3: the leg is unreachable, a result, not a crash).
    flown = fly(TRIANGLE, calm_day(wind_from_deg=30.0, wind_speed_ms=300 * KMH))
    assert not flown.finished[0]
    assert flown.reason[0] == flight.UNREACHABLE
    assert flown.landout_m[0] == 0.0
    # At 150 km/h a fast pure glide still creeps forward, but climbing drifts back more than
    # the glides gain (Vc <= 0): the flight glides on and lands out on the first leg.
    flown = fly(TRIANGLE, calm_day(wind_from_deg=30.0, wind_speed_ms=150 * KMH))
    assert not flown.finished[0] and flown.reason[0] == flight.UNREACHABLE
    assert 0.0 < flown.landout_m[0] < 100e3


def test_arrival_is_the_floor_in_wind():
    # Contract section 3: the final glide arrives at exactly finish elevation + margin.
    day = calm_day(wind_from_deg=250.0, wind_speed_ms=25 * KMH, lift_times_s=[11 * HOUR, 14 * HOUR, 18 * HOUR],
                   lift_values=[1.0, 2.5, 1.0], arrival_margin_m=250.0)
    flown = fly(TRIANGLE, day)
    assert flown.finished[0]
    assert flown.leg_arrival_height_m[0, -1] == pytest.approx(200.0 + 250.0, abs=1e-6)
    assert np.nansum(flown.leg_time_s[0]) == pytest.approx(flown.total_time_s[0], rel=1e-12)


def _varied_flights(count: int, seed: int) -> Flights:
    rng = np.random.default_rng(seed)
    return calm_day(
        mass_kg=rng.uniform(350, 500, count), wind_from_deg=rng.uniform(0, 360, count),
        wind_speed_ms=rng.uniform(0, 40, count) * KMH, start_time_s=rng.uniform(11, 14, count) * HOUR,
        start_height_m=rng.uniform(1200, 1800, count), lift_ends_s=rng.uniform(14, 19, count) * HOUR,
        lift_times_s=[11 * HOUR, 13 * HOUR, 17 * HOUR], lift_values=[0.8, 2.2, 1.2],
        lift_scale=rng.uniform(0.3, 1.5, count), bugs_percent=rng.uniform(0, 10, count),
        mc_ms=np.where(rng.uniform(size=count) < 0.3, 1.5, np.nan),
        final_glide_mc_ms=np.where(rng.uniform(size=count) < 0.5, 1.0, np.nan))


def _assert_same(batch, single, i):
    for field in dataclasses.fields(batch):
        if field.name == "trace":  # only with record=True, for the first flight
            continue
        np.testing.assert_array_equal(getattr(batch, field.name)[i], getattr(single, field.name)[0],
                                      err_msg=field.name)


def test_many_flights_equal_the_same_flights_one_by_one():
    # The core is vectorised over flights; the same inputs must give the same numbers in any batch.
    day = _varied_flights(12, seed=3)
    batch = fly(TRIANGLE, day)
    assert not batch.finished.all() and batch.finished.any()  # both outcomes are exercised
    columns = day.columns()
    for i in range(12):
        one = dataclasses.replace(day, **{name: columns[name][i] for name in Flights._PER_FLIGHT})
        _assert_same(batch, fly(TRIANGLE, one), i)


def test_many_flights_equal_one_by_one_with_thermal_strength_and_searches():
    # The same with the circling model's tables (one per distinct polar) and a search hook
    # drawing per flight and climb number.
    day = dataclasses.replace(_varied_flights(8, seed=5), lift_is_strength=True, lift_values=[2.0, 3.5, 2.5])

    def search(rows, number):
        return 500.0 * ((rows * 7 + number * 3) % 5)  # depends only on the flight and the climb

    names = {i: i for i in range(8)}
    batch = fly(TRIANGLE, day, search=lambda rows, number: search(np.asarray([names[r] for r in rows]), number))
    columns = day.columns()
    for i in range(8):
        one = dataclasses.replace(day, **{name: columns[name][i] for name in Flights._PER_FLIGHT})
        single = fly(TRIANGLE, one, search=lambda rows, number, i=i: search(np.full(rows.size, i), number))
        _assert_same(batch, single, i)


def test_identical_flights_give_identical_results():
    # A Monte-Carlo with no spread must reproduce the single plan exactly.
    day = calm_day(wind_from_deg=200.0, wind_speed_ms=18 * KMH, lift_times_s=[11 * HOUR, 15 * HOUR],
                   lift_values=[1.2, 2.4], final_glide_mc_ms=np.nan)
    single = fly(TRIANGLE, day)
    many = fly(TRIANGLE, dataclasses.replace(day, mass_kg=np.full(257, 380.0)))
    for i in (0, 100, 256):
        _assert_same(many, single, i)


def test_search_hook_of_zero_changes_nothing_and_a_long_search_lands_out():
    day = calm_day()
    plain = fly(TRIANGLE, day)
    zero = fly(TRIANGLE, day, search=lambda rows, number: np.zeros(rows.size))
    _assert_same(zero, plain, 0)
    # A pilot who must glide 100 km beyond the band bottom for the first climb reaches the
    # floor first: the landout is where the cruise glide's line meets the floor.
    polar = band_polar(day)
    v = np.sqrt((polar.c + 2.0) / polar.a)
    per_metre = polar.sink(v) / v
    far = fly(TRIANGLE, day, search=lambda rows, number: np.full(rows.size, 100e3))
    assert not far.finished[0] and far.reason[0] == flight.NO_THERMAL_FOUND
    assert far.landout_m[0] == pytest.approx((1800.0 - 400.0) / per_metre, abs=1e-3)


def test_search_distance_is_added_to_the_glide_before_each_climb():
    # Each climb found 5 km beyond the band bottom: the flight still finishes, later.
    day = calm_day()
    plain = fly(TRIANGLE, day)
    searched = fly(TRIANGLE, day, search=lambda rows, number: np.full(rows.size, 5e3))
    assert searched.finished[0]
    assert searched.total_time_s[0] > plain.total_time_s[0]


def test_requirement_hook_raises_the_final_glide_by_its_extra():
    # A constant 120 m of extra height (as a terrain check could ask for) moves the start of
    # the final glide up by 120 m and the arrival by the same.
    day = calm_day(final_glide_mc_ms=1.0)
    flown = fly(TRIANGLE, day, requirement=lambda at, per_metre, floor: np.full(np.shape(at), 120.0))
    assert flown.finished[0]
    assert flown.leg_arrival_height_m[0, -1] == pytest.approx(400.0 + 120.0, abs=1e-6)


def test_requirement_hook_is_asked_only_for_flights_with_a_final_glide_table():
    # The hook (an elevation model, costly per question) is asked only where the pure
    # requirement is defined: flights still too far out for a final-glide table (NaN) are
    # not asked, and a batch still gives each flight what it gets alone.
    day = _varied_flights(12, seed=3)
    asked = []

    def hook(at, per_metre, floor):
        asked.append(np.asarray(per_metre).copy())
        return 40.0 + 0.001 * np.asarray(at)  # grows along the path, like a ridge near the finish

    batch = fly(TRIANGLE, day, requirement=hook)
    assert asked and all(np.isfinite(table).all() for table in asked)
    columns = day.columns()
    for i in range(12):
        one = dataclasses.replace(day, **{name: columns[name][i] for name in Flights._PER_FLIGHT})
        _assert_same(batch, fly(TRIANGLE, one, requirement=hook), i)


def test_thermal_strength_goes_through_the_circling_model():
    # With a strength profile, each climb is the circling model's achieved climb for this
    # glider (grid-interpolated; the achieved climb is smooth in strength, 0.005 m/s).
    day = calm_day(lift_is_strength=True, lift_values=[3.5], thermal_radius_m=140.0)
    flown = fly(TRIANGLE, day)
    expected = achieved_climb(band_polar(day), 3.5, 140.0).climb_ms
    assert flown.finished[0]
    assert flown.leg_climb_ms[0, 0] == pytest.approx(expected, abs=0.005)


def test_drift_in_climbs_carries_the_glider_downwind():
    # Source: contract section 3 - climbing, the glider drifts with the wind; a tailwind on
    # every leg of a straight course makes the flight faster than calm air.
    straight = Course([150e3, 150e3], [90.0, 90.0])
    calm = fly(straight, calm_day())
    tail = fly(straight, calm_day(wind_from_deg=270.0, wind_speed_ms=20 * KMH))
    head = fly(straight, calm_day(wind_from_deg=90.0, wind_speed_ms=20 * KMH))
    assert tail.total_time_s[0] < calm.total_time_s[0] < head.total_time_s[0]


def test_inconsistent_band_is_refused():
    with pytest.raises(ValueError):
        fly(TRIANGLE, calm_day(band_top_m=800.0, band_bottom_m=800.0))


def test_the_lift_is_zero_after_lift_ends_not_at_it_and_no_climb_starts_at_it():
    # Source: shared/CONTRACT.md, [day]: the profile is "zero after lift_ends". The day's
    # profile and the core's lift follow the same rule (scenario.until_lift_ends); a climb
    # that would start at the very moment lift ends has no time to climb.
    from glidetask.engine.scenario import Day, Profile, until_lift_ends

    day = Day(start_time_s=12 * HOUR, band_top_m=1800.0, band_bottom_m=800.0, lift_ends_s=18 * HOUR,
              climb=Profile((12 * HOUR, 18 * HOUR), (2.0, 1.0)))
    assert day.lift_profile_at(18 * HOUR) == 1.0
    assert day.lift_profile_at(18 * HOUR + 1.0) == 0.0
    np.testing.assert_array_equal(until_lift_ends(np.array([1.0, 1.0, 1.0]), np.array([1.0, 2.0, 3.0]), 2.0),
                                  [1.0, 1.0, 0.0])
    # Start one second before lift ends: the first glide down the band takes minutes, so
    # the first climb would start after the end; the flight makes no climb and glides on
    # with the reason "lift ended".
    flown = fly(TRIANGLE, calm_day(start_time_s=19 * HOUR - 1.0, lift_ends_s=19 * HOUR))
    assert int(flown.climbs[0]) == 0
    assert int(flown.reason[0]) == flight.LIFT_ENDED


def test_a_band_top_through_the_day_held_at_band_top_m_changes_nothing():
    # Source: the contract's band top (section 3): a band top through the day that never
    # moves is the day's band top.
    plain = fly(TRIANGLE, calm_day())
    held = fly(TRIANGLE, calm_day(band_top_times_s=(10 * HOUR, 16 * HOUR), band_top_values=(1800.0, 1800.0)))
    for name in ("total_time_s", "climbs", "final_glide_from_m", "leg_arrival_height_m"):
        np.testing.assert_array_equal(getattr(held, name), getattr(plain, name))


def test_climbs_end_at_the_band_top_of_their_time():
    # Source: MacCready cycle arithmetic (as in the first test): the number of climbs is set
    # by the band's depth, so a band top of 1300 m from the start flies the cycles of a
    # 1300 m band; only the cruise's density (the middle of the highest band) differs, which
    # moves the time by about the square root of the density ratio (a few per cent at most).
    low = calm_day(band_top_m=1300.0, start_height_m=1300.0)
    through_day = calm_day(start_height_m=1300.0, band_top_times_s=(11 * HOUR,), band_top_values=(1300.0,))
    a, b = fly(TRIANGLE, low), fly(TRIANGLE, through_day)
    assert b.finished[0] and a.finished[0]
    assert abs(int(b.climbs[0]) - int(a.climbs[0])) <= 1  # the density may move the final glide one cycle
    assert b.climbs[0] > fly(TRIANGLE, calm_day()).climbs[0] + 2  # more, shallower cycles than a 1800 m top
    ratio = np.sqrt(density_ratio(1050.0) / density_ratio(1300.0))  # middles of the 1300 and the 1800 m bands
    assert 1.0 / ratio - 1e-3 <= b.total_time_s[0] / a.total_time_s[0] <= ratio + 1e-3


def test_a_band_top_that_falls_in_the_afternoon_shortens_the_later_climbs():
    # Source: contract section 3 (climbs end at the band top); a top falling to 1000 m from
    # 14:00 leaves later cycles 200 m deep: the flight needs more climbs than one with the
    # morning's top all day.
    day = calm_day(band_top_times_s=(13.9 * HOUR, 14 * HOUR), band_top_values=(1800.0, 1000.0))
    falling, steady = fly(TRIANGLE, day), fly(TRIANGLE, calm_day())
    assert falling.climbs[0] > steady.climbs[0]
    arrivals = falling.leg_arrival_height_m[0]
    assert np.all(arrivals[np.isfinite(arrivals)] <= 1800.0 + 1e-6)
