"""What the pilot reads about circling and the final glide's speeds: the circling card (core,
air's rise on the circle, sink in the turn, climb) and the final glide's speed to fly."""

import dataclasses
import math

import numpy as np
import pytest
from scipy.optimize import minimize_scalar

from glidetask.engine.circling import achieved_climb, circling_sink
from glidetask.engine.circling_card import day_circling
from glidetask.engine.final_glide_speeds import final_glide_speeds
from glidetask.engine.plan import plan
from glidetask.engine.polar import scaled_polar
from glidetask.engine.scenario import Day, Profile, Wind
from glidetask.engine.thermals import thermal_radii
from glidetask.formats.polar_file import load_polar_spec
from tests.engine.invented_polar import SPEC
from tests.engine.test_plan import HOUR, OUT_AND_RETURN, TRIANGLE, course_task, scenario

POLARS = ("two-seat-trainer", "club", "racing-15m", "open-18m")


def isa_density_ratio(height_m: float, deviation_c: float = 0.0) -> float:
    # Source: ISO 2533:1975 troposphere, T = 288.15 - 0.0065 h, p = p0 (T/288.15)^5.25588;
    # a column warmer by the deviation at every height, the pressure integrated through it:
    # p/p0 = (T/T0')^5.25588 with T0' = 288.15 + deviation, T = T0' - 0.0065 h; rho ~ p/T.
    base = 288.15 + deviation_c
    t = base - 0.0065 * height_m
    return (t / base) ** 5.25588 * 288.15 / t


def test_climb_is_the_rise_on_the_circle_less_the_sink_in_the_turn():
    # Source: turn physics (J. D. Anderson, Introduction to Flight, level turn, from memory):
    # at the same lift coefficient a turn at load factor n sinks n^1.5 times the wings-level
    # sink; the climb is the updraft on the circle less that sink.
    polar = scaled_polar(SPEC, 420.0)
    for core, radius in ((2.0, 80.0), (3.5, 150.0), (5.0, 300.0)):
        best = achieved_climb(polar, core, radius)
        n = 1.0 / math.cos(math.radians(best.bank_deg))
        assert best.sink_ms == pytest.approx(float(polar.sink(best.wings_level_speed_ms)) * n**1.5, rel=1e-12)
        assert best.sink_ms == pytest.approx(float(circling_sink(polar, best.wings_level_speed_ms, best.bank_deg)))
        assert best.updraft_ms == pytest.approx(core * math.exp(-(best.turn_radius_m / radius) ** 2), rel=1e-12)
        assert best.climb_ms == pytest.approx(best.updraft_ms - best.sink_ms, abs=1e-12)


@pytest.mark.parametrize("name", POLARS)
@pytest.mark.parametrize("loading", ["reference", "full"])
def test_coach_reading_the_climb_is_about_one_metre_per_second_below_the_netto_on_the_circle(name, loading):
    # Source: facts of the trade (from memory): in a well-centred turn a sailplane climbs
    # about 1 m/s less than the air rises where it circles (its sink at 35-45 deg bank is
    # about 0.8-1.2 m/s, more when heavy in narrow thermals; H. Reichmann, Cross-Country Soaring, circling polars, from memory).
    # Thermals of the Allen (2006) typical size for convective layers 1.5-3 km deep, cores 2-5 m/s.
    spec = load_polar_spec(f"polars/{name}.toml")
    mass = spec.reference_mass_kg if loading == "reference" else spec.max_mass_kg
    polar = scaled_polar(spec, mass)
    radii = np.asarray(thermal_radii(np.array([1500.0, 2000.0, 3000.0])).typical_m)[:, None]
    best = achieved_climb(polar, np.array([2.0, 3.0, 4.0, 5.0])[None, :], radii)
    sink = np.asarray(best.sink_ms)
    assert np.all((sink > 0.7) & (sink < 1.5)), sink
    # and the climb is then below the air's rise on the circle by exactly that sink
    np.testing.assert_allclose(np.asarray(best.updraft_ms) - sink, np.asarray(best.climb_ms), atol=1e-12)


def strength_day(strength=3.0, radius=200.0) -> Day:
    return Day(start_time_s=12 * HOUR, band_top_m=1800.0, band_bottom_m=800.0, lift_ends_s=19 * HOUR,
               thermal_strength=Profile((11 * HOUR, 14 * HOUR, 17 * HOUR), (1.0, strength, 1.5)),
               thermal_radius_m=radius, isa_deviation_c=10.0)


def test_card_in_the_days_strongest_thermals_matches_the_circling_model():
    s = dataclasses.replace(scenario(TRIANGLE), day=strength_day())
    card = day_circling(s)
    assert card.time_s == 14 * HOUR and card.strength_ms == 3.0 and card.height_m == 1300.0
    polar = s.glider.polar_at(1300.0, 10.0)
    direct = achieved_climb(polar, 3.0, 200.0)
    assert card.solution.climb_ms == pytest.approx(direct.climb_ms, rel=1e-12)
    # IAS = TAS sqrt(sigma) at the band middle in a +10 C column.
    sigma = isa_density_ratio(1300.0, 10.0)
    assert card.indicated_airspeed_ms == pytest.approx(direct.airspeed_ms * math.sqrt(sigma), rel=2e-4)


def test_card_for_a_day_of_achieved_climbs_reads_back_the_typed_climb():
    s = scenario(TRIANGLE, profile=Profile((11 * HOUR, 15 * HOUR), (1.5, 2.4)))
    card = day_circling(s)
    assert card.time_s == 15 * HOUR
    assert card.solution.climb_ms == pytest.approx(2.4, abs=1e-5)
    assert card.strength_ms > card.solution.updraft_ms > 2.4


def test_no_lift_no_card():
    s = scenario(TRIANGLE, profile=Profile((11 * HOUR, 15 * HOUR), (0.0, 0.0)))
    assert day_circling(s) is None


def macready_speed_by_search(polar, mc):
    # Source: MacCready theory (P. B. MacCready 1958; Reichmann, Cross-Country Soaring, from
    # memory): in still air the speed to fly maximises v / (sink(v) + m).
    found = minimize_scalar(lambda v: -v / (float(polar.sink(v)) + mc), bounds=(15.0, 80.0), method="bounded",
                            options={"xatol": 1e-9})
    return found.x


def test_final_glide_speed_in_still_air_is_the_macready_speed_as_indicated():
    s = scenario(OUT_AND_RETURN, climb=2.0, final_mc=1.5)
    p = plan(s)
    legs = final_glide_speeds(p)
    assert legs and legs[-1].to_m == pytest.approx(p.planned_distance_m)
    assert legs[0].from_m == pytest.approx(p.final_glide_from_m)
    sigma = float(p.flown.final_glide_sigma[0])
    # the core's density height lies between the arrival floor and the final glide's start
    heights = np.linspace(p.arrival_floor_m, p.final_glide_height_m, 2001)
    height = heights[np.argmin(abs(np.array([isa_density_ratio(h) for h in heights]) - sigma))]
    assert abs(isa_density_ratio(height) - sigma) < 1e-4
    polar = s.glider.polar_at(height)
    tas = macready_speed_by_search(polar, 1.5)
    for leg in legs:
        assert leg.airspeed_ms == pytest.approx(tas, rel=1e-4)
        assert leg.indicated_airspeed_ms == pytest.approx(tas * math.sqrt(isa_density_ratio(height)), rel=2e-4)
        assert leg.ground_speed_ms == pytest.approx(leg.airspeed_ms, rel=1e-12)  # calm air


def test_final_glide_speed_into_a_headwind_is_faster_and_agrees_with_the_core_on_a_whole_final_leg():
    # A short last leg flown entirely in final glide: the core's own record of that leg's
    # airspeed must be the speed given here.
    task = course_task([0.0, 180.0], [60e3, 20e3])
    s = scenario(task, climb=2.0, final_mc=1.0, wind=Wind(from_deg=180.0, speed_ms=8.0))
    p = plan(s)
    legs = final_glide_speeds(p)
    last = p.legs[-1]
    assert last.final_glide
    assert legs[-1].airspeed_ms == pytest.approx(last.airspeed_ms, rel=1e-6)
    calm = final_glide_speeds(plan(scenario(task, climb=2.0, final_mc=1.0)))
    # the last leg flies south into the wind from 180 deg: fly faster than in calm air
    assert legs[-1].airspeed_ms > calm[-1].airspeed_ms + 1.0


def test_heights_card_speeds_are_the_macready_speeds_on_the_last_leg():
    from glidetask.engine.final_glide_speeds import last_leg_speeds_to_fly

    s = scenario(OUT_AND_RETURN, climb=2.0)
    p = plan(s)
    speeds = last_leg_speeds_to_fly(p, [0.0, 1.0, 2.0, 3.0])
    height = 0.5 * (s.day.band_top_m + p.arrival_floor_m)
    polar = s.glider.polar_at(height)
    sigma = isa_density_ratio(height)
    for mc, ias in zip([0.0, 1.0, 2.0, 3.0], speeds):
        assert ias == pytest.approx(macready_speed_by_search(polar, mc) * math.sqrt(sigma), rel=2e-4)
    assert np.all(np.diff(speeds) > 0.0)  # a higher setting flies faster


def test_card_circles_at_the_days_stall_margin():
    # A wider margin over the banked stall: the card's climb is the circling model's at that margin.
    day = dataclasses.replace(strength_day(), stall_margin=1.3)
    s = dataclasses.replace(scenario(TRIANGLE), day=day)
    card = day_circling(s)
    direct = achieved_climb(s.glider.polar_at(1300.0, 10.0), 3.0, 200.0, stall_margin=1.3)
    assert card.solution.climb_ms == pytest.approx(direct.climb_ms, rel=1e-12)
    assert card.solution.climb_ms < day_circling(dataclasses.replace(s, day=strength_day())).solution.climb_ms
