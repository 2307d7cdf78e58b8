"""Ballast against thermal strength and the sensitivity of the task time (engine/compare.py)."""

from __future__ import annotations

import dataclasses
import math

import numpy as np
import pytest
from hypothesis import HealthCheck, given, settings
from hypothesis import strategies as st

from glidetask.engine import compare, flight
from glidetask.engine import sensitivity as what_ifs
from glidetask.engine.atmosphere import density_ratio
from glidetask.engine.circling import achieved_climb
from glidetask.engine.plan import plan
from glidetask.engine.polar import PolarSpec, scaled_polar
from glidetask.engine.scenario import Day, GliderSetup, Profile, Safety, Scenario, Wind, with_what_ifs
from glidetask.engine.task import Task, TaskPoint, Turnpoint
from glidetask.engine.zones import Zone
from glidetask.engine import geodesy
from glidetask.formats.task_file import load_scenario

KMH = 1000.0 / 3600.0
HOUR = 3600.0
ELEVATION = 200.0

# An invented 15 m example polar with water ballast (not any real aircraft).
SPEC = PolarSpec(label="test example", wing_area_m2=10.5, reference_mass_kg=350.0, empty_mass_kg=260.0,
                 max_ballast_kg=160.0, max_mass_kg=525.0, vne_ias_ms=270 * KMH, min_speed_ias_ms=72 * KMH,
                 points=((80 * KMH, 0.62), (120 * KMH, 0.80), (180 * KMH, 1.85)))


def triangle_task() -> Task:
    """Three 100 km legs from an invented point in the open Atlantic; 100 m cylinders."""
    lat, lon = 46.0, -33.0
    points = [TaskPoint(Turnpoint("Start", None, lat, lon, ELEVATION), Zone.line(1000.0))]
    for i, bearing in enumerate((0.0, 120.0, 240.0)):
        lat, lon = geodesy.destination(lat, lon, bearing, 100e3)
        name = "Finish" if i == 2 else f"TP{i + 1}"
        points.append(TaskPoint(Turnpoint(name, None, float(lat), float(lon), ELEVATION), Zone.cylinder(100.0)))
    return Task(name="test triangle", kind="racing", points=tuple(points))


TRIANGLE = triangle_task()


def synthetic(*, wind=Wind(), radius=150.0, strength=3.0, ballast=0.0, lift_ends=19 * HOUR,
              climb=None) -> Scenario:
    day = Day(start_time_s=12 * HOUR, band_top_m=1800.0, band_bottom_m=800.0, lift_ends_s=lift_ends, wind=wind,
              thermal_strength=None if climb is not None else Profile.constant(strength),
              climb=None if climb is None else Profile.constant(climb), thermal_radius_m=radius)
    return Scenario(task=TRIANGLE, glider=GliderSetup(SPEC, pilot_kg=90.0, ballast_kg=ballast), day=day,
                    safety=Safety(arrival_margin_m=200.0))


@pytest.fixture(scope="module")
def demo():
    from pathlib import Path

    root = Path(__file__).resolve().parents[2] / "demo_tasks"
    return {name: load_scenario(root / f"vardmoor-{name}.toml")
            for name in ("triangle-300", "area-3h", "out-and-return", "ridge-final-glide")}


# ---------------------------------------------------------------- the ballasts swept


def test_ballasts_run_from_empty_to_the_most_the_glider_may_carry(demo):
    # Source: contract 2.1 and 3: mass = empty + pilot + ballast; ballast at most
    # max_ballast_kg, mass at most max_mass_kg. The racing example: 170 kg of water,
    # 255 + 85 + 170 = 510 kg under its 525 kg limit.
    triangle = demo["triangle-300"]
    ballast = compare.sweep_ballasts_kg(triangle)
    assert ballast.size >= 19
    assert ballast[0] == 0.0 and ballast[-1] == pytest.approx(170.0)
    # A heavier pilot (110 kg) meets the 525 kg maximum mass first: 525 - 255 - 110 = 160 kg.
    heavy = dataclasses.replace(triangle, glider=dataclasses.replace(triangle.glider, pilot_kg=110.0))
    assert compare.sweep_ballasts_kg(heavy)[-1] == pytest.approx(160.0)


def test_a_glider_without_water_gets_one_column_and_says_so(demo):
    ridge = demo["ridge-final-glide"]  # the club example carries no water (its polar file)
    sweep = compare.ballast_sweep(ridge)
    assert sweep.ballast_kg.tolist() == [0.0]
    assert any(note.code == "no_water_ballast" for note in sweep.notes)
    assert list(sweep.thermal_strength_ms) == pytest.approx([0.5 * i for i in range(1, 11)])


# ---------------------------------------------------------------- climb and cruise


def test_achieved_climb_falls_with_ballast_in_every_thermal():
    # Source: circling physics (contract section 3; F. Thomas, Fundamentals of Sailplane
    # Design, 1999; H. Reichmann, Cross-Country Soaring, 1978, on water ballast; from
    # memory): a heavier glider circles faster, so on a wider circle (r = V^2/(g tan phi))
    # where the updraft is weaker, and it sinks faster (speeds and sinks scale with
    # sqrt(m)); in the same thermal it climbs less.
    climb, _ = compare.climb_table(synthetic(), np.linspace(0.0, 160.0, 9), compare.SWEEP_STRENGTHS_MS)
    assert np.all(np.diff(climb, axis=1) < 0.0)
    # and a stronger thermal always gives more climb
    assert np.all(np.diff(climb, axis=0) > 0.0)


def test_cruise_speed_is_the_macready_average_speed_at_the_achieved_climb():
    # Source: MacCready theory (P. B. MacCready 1958, from memory): in still air with a
    # quadratic polar, v = sqrt((c + m)/a) and Vc = m v / (m + sink(v)).
    s = synthetic()
    ballast = np.array([0.0, 80.0, 160.0])
    climb, cruise = compare.climb_table(s, ballast, [2.0, 4.0])
    sigma = density_ratio(1300.0)  # the middle of the 800-1800 m band
    for j, b in enumerate(ballast):
        polar = scaled_polar(SPEC, 260.0 + 90.0 + b, 0.0, sigma)
        for i in range(2):
            m = climb[i, j]
            if m <= 0.0:
                # Full water in a 2 m/s core no longer climbs now that circling keeps 1.15 x the
                # banked stall speed (issue 12): no climb, no cruise (contract section 3).
                assert math.isnan(cruise[i, j])
                continue
            v = min(max(math.sqrt((polar.c + m) / polar.a), polar.min_speed_ms), polar.vne_ms)
            # Tolerance: both closed forms; the engine's solver converges to 1e-9 relative.
            assert cruise[i, j] == pytest.approx(m * v / (m + polar.sink(v)), rel=1e-6)


def test_climb_of_another_ballast_in_the_same_thermals():
    # An achieved-climb day is the glider as loaded; other ballasts climb as the circling
    # model says in the thermal that gives that climb (contract section 3).
    s = synthetic(climb=2.0, ballast=80.0)
    s = dataclasses.replace(s, day=dataclasses.replace(s.day, climb_ballast_kg=80.0))
    profile, is_strength = flight.day_lift(s)
    assert profile.values == (2.0,) and not is_strength  # the file's own ballast: the profile unchanged, exactly
    strength = float(flight.climb_strengths(s)[0])
    # Round trip through the inverted model: the thermal found gives 2.0 m/s back (the
    # inversion converges to about 1e-6 m/s, circling.strength_for_climb).
    polar = compare._band_polar(s, 80.0)
    assert float(achieved_climb(polar, strength, 150.0).climb_ms) == pytest.approx(2.0, abs=1e-5)
    climbs = []
    for ballast in (0.0, 160.0):
        other = with_what_ifs(s, ballast_kg=ballast)
        profile, is_strength = flight.day_lift(other)
        assert is_strength and profile.values == pytest.approx((strength,))
        climbs.append(float(achieved_climb(compare._band_polar(s, ballast), strength, 150.0).climb_ms))
    assert climbs[0] > 2.0 > climbs[1]
    # No lift stays no lift for every ballast.
    zero = synthetic(climb=0.0, ballast=80.0)
    zero = dataclasses.replace(zero, day=dataclasses.replace(zero.day, climb_ballast_kg=80.0))
    assert flight.day_lift(with_what_ifs(zero, ballast_kg=160.0))[0].values == (0.0,)


# ---------------------------------------------------------------- the sweep's flights


def test_the_sweep_flies_the_planners_flight():
    # One source of truth: with one phase, a cell is plan() of the same scenario with the
    # thermal strength held at the row's value (MacCready following the climb).
    s = synthetic(strength=3.0, ballast=80.0, wind=Wind(250.0, 15 * KMH))
    sweep = compare.ballast_sweep(s, strengths_ms=[3.0], ballasts_kg=[0.0, 80.0, 160.0], phases=1)
    for j, b in enumerate(sweep.ballast_kg):
        expected = plan(s, ballast_kg=float(b))
        assert expected.finished
        # Tolerance: the same core, the same inputs, batch-independent: 1e-9 s.
        assert sweep.task_time_s[0, j] == pytest.approx(expected.total_time_s, abs=1e-6)


def test_phase_average_is_the_macready_time_from_the_real_start():
    # Source: MacCready theory (from memory): at the setting m = the climb, height is
    # worth 1/m seconds per metre, so in calm air with a final glide at the same setting
    # the task takes D/Vc - (h0 - floor)/m wherever along the route the climbs fall.
    # Tolerance 1 %: the final glide is flown at the density of its own middle height,
    # not the band's (speeds ~3 % apart over its last ~15 % of the task: ~0.5 %).
    s = synthetic(strength=3.0)
    sweep = compare.ballast_sweep(s, strengths_ms=[3.0], ballasts_kg=[0.0, 160.0])
    for j in range(2):
        m, vc = sweep.achieved_climb_ms[0, j], sweep.cruise_speed_ms[0, j]
        expected = sweep.planned_distance_m / vc - (1800.0 - (ELEVATION + 200.0)) / m
        assert sweep.task_time_s[0, j] == pytest.approx(expected, rel=0.01)


# ---------------------------------------------------------------- the physics of ballast

# Why these hold (H. Reichmann, Cross-Country Soaring, ch. on water ballast; F. Thomas,
# Fundamentals of Sailplane Design; both from memory): water raises the wing loading, so
# every speed of the polar grows by sqrt(m/m0) and the glide at speed improves, but in a
# thermal the heavier glider circles faster and wider and sinks faster, so it climbs less.
# In weak, narrow thermals the lost climb costs more time than the faster glides win;
# as thermals strengthen the climb lost matters less against the glides won, so the best
# ballast can only grow.


def _check_monotone_in_strength(sweep):
    times = np.where(np.isfinite(sweep.task_time_s), sweep.task_time_s, np.inf)
    # Stronger thermals never make the task slower at a given ballast (and a task finished
    # in weaker thermals is finished in stronger ones). Tolerance 1e-6 s: arithmetic only.
    weaker, stronger = times[:-1], times[1:]
    assert np.all(np.isinf(weaker) | (stronger <= weaker + 1e-6))


@settings(max_examples=20, deadline=None, suppress_health_check=[HealthCheck.too_slow])
@given(direction=st.floats(0.0, 359.0), speed_kmh=st.floats(0.0, 40.0), radius=st.floats(100.0, 400.0))
def test_stronger_thermals_never_slow_the_task_and_lighter_water_never_gains(direction, speed_kmh, radius):
    s = synthetic(wind=Wind(direction, speed_kmh * KMH), radius=radius)
    sweep = compare.ballast_sweep(s)
    _check_monotone_in_strength(sweep)
    # The best ballast never falls as thermals strengthen, to the sweep's resolution: at a
    # stronger thermal no ballast lighter than the weaker thermal's best is faster than
    # that best by more than the tolerance the sweep resolves (BALLAST_GAIN_TOLERANCE).
    rows = np.flatnonzero(np.isfinite(sweep.best_ballast_kg))
    for weak, strong in zip(rows[:-1], rows[1:]):
        previous = sweep.best_ballast_kg[weak]
        at_previous = sweep.task_time_s[strong, sweep.ballast_kg == previous][0]
        lighter = sweep.task_time_s[strong, sweep.ballast_kg < previous]
        assert np.all(lighter >= at_previous * (1.0 - compare.BALLAST_GAIN_TOLERANCE))


@pytest.mark.parametrize("radius", [150.0, 250.0, 350.0])
@pytest.mark.parametrize("task", ["triangle-300", "area-3h"])
def test_best_ballast_never_falls_as_thermals_strengthen(demo, task, radius):
    s = demo[task]
    s = dataclasses.replace(s, day=dataclasses.replace(s.day, thermal_radius_m=radius))
    sweep = compare.ballast_sweep(s)
    _check_monotone_in_strength(sweep)
    best = sweep.best_ballast_kg[np.isfinite(sweep.best_ballast_kg)]
    assert best.size >= 5
    assert np.all(np.diff(best) >= 0.0)


@pytest.mark.parametrize("task", ["triangle-300", "area-3h"])
def test_in_weak_thermals_no_ballast_beats_full_ballast(demo, task):
    sweep = compare.ballast_sweep(demo[task])
    full = sweep.task_time_s[:, -1]
    weakest = np.flatnonzero(np.isfinite(full))[0]  # the weakest thermal full ballast finishes in
    assert sweep.task_time_s[weakest, 0] < full[weakest]
    assert sweep.best_ballast_kg[weakest] == 0.0
    # and in the weakest thermals anything finishes in, only light gliders get round
    first = np.flatnonzero(np.isfinite(sweep.best_ballast_kg))[0]
    assert first < weakest and sweep.best_ballast_kg[first] == 0.0


def test_ballast_pays_sooner_in_wider_thermals():
    # Source: as above: a wider thermal costs the wider circle less updraft, so the
    # heavier glider loses less climb and its faster glides pay from weaker thermals.
    narrow = compare.ballast_sweep(synthetic(radius=150.0))
    wide = compare.ballast_sweep(synthetic(radius=350.0))
    assert math.isfinite(wide.ballast_pays_from_ms) and math.isfinite(wide.full_ballast_from_ms)
    assert wide.ballast_pays_from_ms <= wide.full_ballast_from_ms
    assert math.isnan(narrow.ballast_pays_from_ms) or narrow.ballast_pays_from_ms > wide.ballast_pays_from_ms
    # the definitions: below where ballast pays the best is empty; from there on it is not
    below = wide.thermal_strength_ms < wide.ballast_pays_from_ms
    assert np.all(wide.best_ballast_kg[below & np.isfinite(wide.best_ballast_kg)] == 0.0)
    assert wide.best_ballast_kg[wide.thermal_strength_ms == wide.ballast_pays_from_ms][0] > 0.0
    assert wide.best_ballast_kg[wide.thermal_strength_ms == wide.full_ballast_from_ms][0] == wide.ballast_kg[-1]


def test_task_that_cannot_be_finished_is_null_not_a_number():
    short_day = synthetic(lift_ends=13 * HOUR)  # one hour of lift for 300 km
    sweep = compare.ballast_sweep(short_day)
    assert np.all(np.isnan(sweep.task_time_s)) and np.all(np.isnan(sweep.best_ballast_kg))
    assert math.isnan(sweep.ballast_pays_from_ms) and math.isnan(sweep.full_ballast_from_ms)


def test_bad_sweep_options_are_value_errors():
    with pytest.raises(ValueError):
        compare.ballast_sweep(synthetic(), ballasts_kg=[-10.0, 0.0])
    with pytest.raises(ValueError):
        compare.ballast_sweep(synthetic(), strengths_ms=[0.0, 1.0])
    with pytest.raises(ValueError):
        compare.ballast_sweep(synthetic(), phases=0)


# ---------------------------------------------------------------- sensitivity


def _what_if_plans(s: Scenario) -> dict:
    day = s.day
    weaker = Profile(day.climb.times_s, tuple(max(v - 0.5, 0.0) for v in day.climb.values))
    return {
        "forecast": plan(s),
        "weaker_climbs": plan(dataclasses.replace(s, day=dataclasses.replace(day, climb=weaker))),
        "more_wind": plan(s, wind=Wind(day.wind.from_deg, day.wind.speed_ms + 10 * KMH)),
        "later_start": plan(s, start_time_s=day.start_time_s + 1800.0),
        "more_bugs": plan(s, bugs_percent=s.glider.bugs_percent + 5.0),
        "pure_model": plan(dataclasses.replace(s, day=dataclasses.replace(day, centring_s=0.0, detour_percent=0.0))),
    }


@pytest.mark.parametrize("task", ["triangle-300", "out-and-return", "ridge-final-glide"])
def test_sensitivity_rows_are_what_the_planner_gives_for_each_what_if(demo, task):
    s = demo[task]
    result = what_ifs.sensitivity(s)
    assert [row.key for row in result.rows] == list(what_ifs.WHAT_IFS)
    plans = _what_if_plans(s)
    for row in result.rows:
        expected = plans[row.key]
        assert row.finished == expected.finished
        # Tolerance: the same core and inputs in one batch: batch-independent to 1e-9 s.
        assert row.total_time_s == pytest.approx(expected.total_time_s, abs=1e-6)
        assert row.delta_s == pytest.approx(expected.total_time_s - plans["forecast"].total_time_s, abs=1e-6)


def test_weaker_climbs_more_bugs_and_more_wind_cost_time(demo):
    # Source: MacCready theory (from memory): a weaker climb or a polar with more sink
    # lowers the average cross-country speed at every setting; on an out-and-return any
    # steady wind costs more on the upwind leg than it gives back downwind.
    result = what_ifs.sensitivity(demo["out-and-return"])
    delta = {row.key: row.delta_s for row in result.rows}
    assert delta["weaker_climbs"] > 0.0 and delta["more_bugs"] > 0.0 and delta["more_wind"] > 0.0
    assert result.forecast.delta_s == 0.0
    # Centring time and detours cost time: the pure model is faster (contract section 3).
    assert delta["pure_model"] < 0.0


def test_a_start_after_the_end_of_lift_is_not_flown():
    s = synthetic(climb=2.0, lift_ends=12.25 * HOUR)  # lift ends 15 min after the start
    result = what_ifs.sensitivity(s)
    later = [row for row in result.rows if row.key == "later_start"][0]
    assert not later.finished and math.isnan(later.total_time_s) and later.facts["refused"] == "[day] start_time"


def test_area_task_sensitivity_keeps_the_forecast_targets(demo):
    s = demo["area-3h"]
    result = what_ifs.sensitivity(s)
    assert result.notes and result.notes[0].code == "what_ifs_area_targets"
    forecast = plan(s)
    assert result.forecast.total_time_s == pytest.approx(forecast.total_time_s, abs=1e-6)
    assert result.forecast.task_speed_ms == pytest.approx(forecast.task_speed_ms, rel=1e-12)


# ---------------------------------------------------------------- ballast by thermal size


def test_best_ballast_by_thermal_size_side_by_side(demo):
    # Source: H. Reichmann, Cross-Country Soaring, 1978 (from memory): ballast costs climb most
    # in narrow thermals, so the best ballast never falls as the thermal widens; the sizes are
    # the day's radius divided and multiplied by thermals.RADIUS_SPREAD (1.5, our choice).
    s = demo["triangle-300"]
    sweep = compare.sweep_by_thermal_size(s)
    names = [size.name for size in sweep.by_thermal_size]
    assert names == ["narrow", "typical", "broad"]
    narrow, typical, broad = sweep.by_thermal_size
    assert typical.thermal_radius_m == s.day.effective_thermal_radius_m
    assert narrow.thermal_radius_m == pytest.approx(typical.thermal_radius_m / 1.5)
    assert broad.thermal_radius_m == pytest.approx(typical.thermal_radius_m * 1.5)
    # The typical column is the day's own sweep, and each size is the sweep at its radius.
    own = compare.ballast_sweep(s)
    np.testing.assert_array_equal(typical.best_ballast_kg, own.best_ballast_kg)
    np.testing.assert_array_equal(sweep.task_time_s, own.task_time_s)
    wide = compare.ballast_sweep(dataclasses.replace(s, day=dataclasses.replace(s.day, thermal_radius_m=broad.thermal_radius_m)))
    np.testing.assert_array_equal(broad.best_ballast_kg, wide.best_ballast_kg)
    np.testing.assert_array_equal(broad.achieved_climb_ms, wide.achieved_climb_ms)
    # Where all three finish, the wider the thermal the more water pays (never less).
    both = np.isfinite(narrow.best_ballast_kg) & np.isfinite(broad.best_ballast_kg)
    assert np.all(narrow.best_ballast_kg[both] <= typical.best_ballast_kg[both])
    assert np.all(typical.best_ballast_kg[both] <= broad.best_ballast_kg[both])
    # and on this day the answer really does rest on the size: water pays in strong broad thermals
    assert broad.ballast_pays_from_ms < typical.ballast_pays_from_ms < narrow.ballast_pays_from_ms
    assert math.isfinite(broad.full_ballast_from_ms)
    # The climb in the same thermal falls as it narrows (circling model; every mass).
    assert np.all(narrow.achieved_climb_ms < typical.achieved_climb_ms)
    assert np.all(typical.achieved_climb_ms < broad.achieved_climb_ms)


def test_thermal_sizes_of_a_day_from_its_layer(demo):
    # Source: Allen, AIAA 2006-1510 (from memory), through thermals.thermal_radii: without a
    # radius in the task the typical size is Allen's for the day's layer.
    s = demo["area-3h"]
    from glidetask.engine.thermals import thermal_radii

    radii = thermal_radii(s.day.layer_depth_m) if s.day.thermal_radius_m is None else None
    sizes = compare.thermal_size_radii_m(s)
    if radii is not None:
        assert sizes == pytest.approx({"narrow": radii.narrow_m, "typical": radii.typical_m, "broad": radii.broad_m})
    assert sizes["typical"] == s.day.effective_thermal_radius_m
