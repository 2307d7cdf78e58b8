"""The odds of getting home over simulated days (engine/simulate.py)."""

from __future__ import annotations

import dataclasses
import math
from pathlib import Path

import numpy as np
import pytest

from glidetask.engine import simulate
from glidetask.engine.day_spread import DaySpread, day_search_mean_m, draw_days, stretched_profiles
from glidetask.engine.plan import plan
from glidetask.engine.scenario import Profile
from glidetask.engine.simulate import simulate_days
from glidetask.errors import InputError
from glidetask.formats.task_file import load_scenario

DEMO = Path(__file__).resolve().parents[2] / "demo_tasks"
TASKS = ("triangle-300", "area-3h", "out-and-return", "ridge-final-glide")


@pytest.fixture(scope="module")
def demo():
    return {name: load_scenario(DEMO / f"vardmoor-{name}.toml") for name in TASKS}


def strength_day(scenario):
    """The triangle flown on a thermal-strength day (so every ballast flies as plan() does)."""
    day = scenario.day
    strength = Profile(day.climb.times_s, tuple(2.0 * v for v in day.climb.values))
    return dataclasses.replace(scenario, day=dataclasses.replace(day, climb=None, thermal_strength=strength))


# ---------------------------------------------------------------- zero spread is the plan


@pytest.mark.parametrize("task", TASKS)
def test_zero_spread_reproduces_the_plan_exactly(demo, task):
    # By construction: the planner's own inputs, untouched, through the same core.
    s = demo[task]
    expected = plan(s)
    odds = simulate_days(s, runs=7, seed=3, spread=DaySpread.none(), ballasts_kg=[s.glider.ballast_kg])
    choice = odds.choices[0]
    assert choice.finished == (7 if expected.finished else 0)
    assert np.all(choice.finish_times_s == expected.total_time_s)  # exactly, every run
    assert choice.forecast_time_s == expected.total_time_s
    assert choice.forecast_finished == expected.finished


def test_zero_spread_reproduces_the_plan_at_every_ballast_on_a_strength_day(demo):
    s = strength_day(demo["triangle-300"])
    ballasts = [0.0, 85.0, 170.0]
    odds = simulate_days(s, runs=3, seed=1, spread=DaySpread.none(), ballasts_kg=ballasts)
    for choice, ballast in zip(odds.choices, ballasts):
        expected = plan(s, ballast_kg=ballast)
        assert expected.finished and choice.finished == 3
        assert np.all(choice.finish_times_s == expected.total_time_s)


# ---------------------------------------------------------------- seeds and convergence


def test_a_fixed_seed_gives_the_same_answer_and_another_seed_another(demo):
    s = demo["out-and-return"]
    first = simulate_days(s, runs=300, seed=42)
    again = simulate_days(s, runs=300, seed=42)
    other = simulate_days(s, runs=300, seed=43)
    for a, b in zip(first.choices, again.choices):
        assert a.finished == b.finished and a.landouts_by_leg == b.landouts_by_leg
        assert np.array_equal(a.finish_times_s, b.finish_times_s)
    assert not np.array_equal(first.choices[0].finish_times_s, other.choices[0].finish_times_s)


def test_finishing_probability_converges_as_one_over_root_runs(demo):
    # Source: the binomial standard error sqrt(p(1-p)/n): four times the runs, half the
    # error. Tolerance 0.1 on the ratio 2: by the delta method the ratio's own sd is
    # about |1-2p|/2 * sqrt(p(1-p)/400)/(p(1-p)) * 2, under 0.03 for p in 0.3-0.9, so
    # 0.1 is more than three of them. Thermals twice as far apart as the default make
    # the odds a real question on this day.
    s = demo["out-and-return"]
    spread = DaySpread(thermal_search_mean_m=4000.0)
    small = simulate_days(s, runs=400, seed=7, spread=spread).choices[0]
    large = simulate_days(s, runs=1600, seed=8, spread=spread).choices[0]
    assert 0.3 < large.finish_probability < 0.9  # a day where the odds are in question
    assert small.finish_probability_se / large.finish_probability_se == pytest.approx(2.0, abs=0.1)
    # and the smaller estimate lies within three of its standard errors of the larger's
    both = math.hypot(small.finish_probability_se, large.finish_probability_se)
    assert abs(small.finish_probability - large.finish_probability) < 3.0 * both


def test_the_same_days_for_every_ballast_choice(demo):
    s = demo["triangle-300"]
    alone = simulate_days(s, runs=200, seed=5, ballasts_kg=[170.0]).choices[0]
    among = simulate_days(s, runs=200, seed=5, ballasts_kg=[0.0, 170.0]).choices[1]
    assert np.array_equal(alone.finish_times_s, among.finish_times_s)
    assert alone.landouts_by_leg == among.landouts_by_leg


# ---------------------------------------------------------------- the drawn days


def test_days_follow_the_stated_spread(demo):
    # Source: the spread documented in engine/day_spread.py (our planning assumptions).
    # Tolerances: five standard errors of each estimate at 200,000 draws.
    s = demo["triangle-300"]
    spread = DaySpread(bad_day_probability=0.0)  # the bad days on their own below
    n = 200_000
    days = draw_days(s, spread, n, seed=11)
    log_factor = np.log(days.climb_factor)
    assert np.median(log_factor) == pytest.approx(0.0, abs=5 * 1.2533 * 0.2 / math.sqrt(n))
    assert np.std(log_factor) == pytest.approx(0.2, abs=5 * 0.2 / math.sqrt(2 * n))
    turn = (days.wind_from_deg - s.day.wind.from_deg + 180.0) % 360.0 - 180.0
    assert np.std(turn) == pytest.approx(20.0, abs=5 * 20.0 / math.sqrt(2 * n))
    assert np.std(days.lift_ends_s) == pytest.approx(1800.0, abs=5 * 1800.0 / math.sqrt(2 * n))
    assert np.mean(days.lift_ends_s) == pytest.approx(s.day.lift_ends_s, abs=5 * 1800.0 / math.sqrt(n))
    assert np.mean(days.search_unit) == pytest.approx(1.0, abs=5 / math.sqrt(days.search_unit.size))
    assert np.all(days.search_mean_m == pytest.approx(day_search_mean_m(s) / days.climb_factor))
    assert np.all(days.wind_speed_ms >= 0.0)


def test_the_afternoon_decay_moves_with_the_end_of_lift(demo):
    s = demo["triangle-300"]  # climbs 1.2 at 17:30 and 0 at 18:15 after a 15:30 peak
    ends = s.day.lift_ends_s + np.array([0.0, -1800.0, 2700.0])
    times, values, new_ends = stretched_profiles(s, ends)
    original = s.day.climb.at(times)
    # No shift: the profile itself (up to rounding in the time arithmetic).
    assert values[0] == pytest.approx(original, abs=1e-12)
    # Before the peak every day is the forecast.
    before = times <= 15.5 * 3600.0
    assert np.array_equal(values[1][before], original[before]) and np.array_equal(values[2][before], original[before])
    # The 17:30 value (2 h after the peak, 2 h 45 min before the end) comes 2/2.75 of the
    # way along the new decay: 15:30 + 2 h x (2.25/2.75) for lift ending 30 min early.
    for row, end in ((1, new_ends[1]), (2, new_ends[2])):
        at = 15.5 * 3600.0 + 2.0 * 3600.0 * (end - 15.5 * 3600.0) / (2.75 * 3600.0)
        # Tolerance: linear interpolation on the 5-minute grid across a kink is off by at
        # most (change of slope) x step / 4; the slopes -0.5 and -1.6 m/s per hour squeezed
        # by 2.75/2.25 change by 1.35 per hour: 1.35 x (5/60) / 4 = 0.028 m/s.
        assert np.interp(at, times, values[row]) == pytest.approx(1.2, abs=0.03)
    assert np.array_equal(new_ends, ends)


# ---------------------------------------------------------------- what the odds say


def test_land_outs_add_up_by_leg_and_by_reason(demo):
    odds = simulate_days(demo["ridge-final-glide"], runs=500, seed=2)
    assert len(odds.legs) == 3
    for choice in odds.choices:
        out = choice.runs - choice.finished
        assert out > 0
        assert sum(choice.landouts_by_leg) == out
        assert sum(n for _, n in choice.landouts_by_reason) == out
        assert {key for key, _ in choice.landouts_by_reason} <= {k for k, _ in simulate.LANDOUT_REASONS.values()}
        p10, p50, p90 = choice.task_time_s
        assert p10 <= p50 <= p90


def test_thermals_further_apart_mean_more_land_outs(demo):
    # Days shared (same seed): each search distance scales with the mean.
    s = demo["out-and-return"]
    odds = [simulate_days(s, runs=600, seed=9, spread=DaySpread(thermal_search_mean_m=m)).choices[0]
            for m in (0.0, 1000.0, 3000.0)]
    probabilities = [c.finish_probability for c in odds]
    # Tolerance: a longer search can shift a flight's later climbs onto a better moment, so on
    # the same days a short search may finish a run or two more (of 600); the trend is clear.
    assert probabilities[0] + 2.0 / 600 >= probabilities[1] > probabilities[2]
    assert probabilities[0] > probabilities[2]
    no_search = dict(odds[0].landouts_by_reason)
    assert "no_thermal_found" not in no_search  # no search, no failed search


def test_the_forecast_day_is_inside_the_spread_of_times(demo):
    # The forecast is the median day of the spread, so its time lies between the 10th
    # and 90th percentiles of the finishers' times.
    odds = simulate_days(demo["triangle-300"], runs=1000, seed=4)
    for choice in odds.choices:
        p10, _, p90 = choice.task_time_s
        assert p10 < choice.forecast_time_s < p90


def test_default_choices_are_empty_half_and_full(demo):
    assert simulate.default_ballasts_kg(demo["triangle-300"]) == (0.0, 85.0, 170.0)
    assert simulate.default_ballasts_kg(demo["out-and-return"]) == (0.0,)  # a trainer carries no water


def test_bad_options_are_refused(demo):
    s = demo["triangle-300"]
    with pytest.raises(ValueError):
        simulate_days(s, runs=0)
    with pytest.raises(ValueError):
        DaySpread(climb_log_sd=-0.1)
    with pytest.raises(InputError) as error:
        simulate_days(s, runs=10, ballasts_kg=[200.0])
    assert (error.value.problems[0].file, error.value.problems[0].where) == ("what-if", "[glider] ballast_kg")


# ---------------------------------------------------------------- calibrated odds


def test_the_search_distance_comes_from_the_convective_layer(demo):
    # Source: M. J. Allen, AIAA 2006-1510 (from memory): N = 0.6 X Y / (zi r2) thermals
    # over an area X by Y; a straight track meets those within r2 of it, 2 r2 N / (X Y)
    # per metre, so the mean distance between them is zi / 1.2 (derivation in thermals.py).
    s = demo["triangle-300"]
    zi = s.day.band_top_m - s.day.ground_m  # 2200 m band top over 265 m of ground
    assert zi == pytest.approx(1935.0)
    odds = simulate_days(s, runs=20, seed=1)
    assert odds.spread.thermal_search_mean_m == pytest.approx(zi / 1.2)
    assert odds.search_layer_m == pytest.approx(zi)  # worded "Allen (2006) for a 1.9 km convective layer"
    given = simulate_days(s, runs=20, seed=1, spread=DaySpread(thermal_search_mean_m=2000.0))
    assert given.spread.thermal_search_mean_m == 2000.0 and math.isnan(given.search_layer_m)
    # A deeper layer: thermals further apart (the same thermal density per layer depth and radius).
    deep = dataclasses.replace(s, day=dataclasses.replace(s.day, ground_m=s.day.ground_m - 600.0))
    assert day_search_mean_m(deep) == pytest.approx((zi + 600.0) / 1.2)


def test_bad_days_end_the_lift_one_to_two_hours_early(demo):
    # Source: the bad-day mode documented in engine/day_spread.py (our planning assumption,
    # common practice): one day in ten, the lift ends early by a time drawn evenly in 1-2 h.
    # Tolerances: five standard errors at 100,000 draws (binomial share; uniform mean,
    # sd 3600/sqrt(12) s).
    s = demo["triangle-300"]
    n = 100_000
    days = draw_days(s, DaySpread(lift_end_sd_s=0.0), n, seed=3)
    early = s.day.lift_ends_s - days.lift_ends_s
    bad = days.bad_day
    assert bad.mean() == pytest.approx(0.1, abs=5 * math.sqrt(0.1 * 0.9 / n))
    assert np.all(early[~bad] == 0.0)
    assert early[bad].min() >= 3600.0 and early[bad].max() <= 7200.0
    assert early[bad].mean() == pytest.approx(5400.0, abs=5 * 3600.0 / math.sqrt(12.0 * bad.sum()))
    # The other errors of each day are as they were without bad days (draws in a fixed order).
    calm = draw_days(s, DaySpread(lift_end_sd_s=0.0, bad_day_probability=0.0), n, seed=3)
    assert np.array_equal(calm.climb_factor, days.climb_factor)
    assert np.array_equal(calm.search_unit, days.search_unit)
    assert np.all(calm.lift_ends_s == s.day.lift_ends_s)
    with pytest.raises(ValueError):
        DaySpread(bad_day_probability=1.5)
    with pytest.raises(ValueError):
        DaySpread(bad_day_early_s=(7200.0, 3600.0))


def test_bad_days_cost_finishes_late_in_the_day(demo):
    # A day whose lift ends soon after the plan finishes: one day in ten ending 1-2 h early
    # must land out more often than with no bad days, on the same days otherwise.
    s = demo["triangle-300"]
    short = dataclasses.replace(s, day=dataclasses.replace(s.day, lift_ends_s=s.day.lift_ends_s - 3600.0))
    without = simulate_days(short, runs=600, seed=4, ballasts_kg=[0.0],
                            spread=DaySpread(bad_day_probability=0.0)).choices[0]
    with_bad = simulate_days(short, runs=600, seed=4, ballasts_kg=[0.0]).choices[0]
    assert with_bad.finished < without.finished
    assert dict(with_bad.landouts_by_reason).get("lift_ended", 0) > dict(without.landouts_by_reason).get("lift_ended", 0)


def test_the_spacing_table_flies_the_same_days_at_other_spacings(demo):
    s = demo["out-and-return"]
    odds = simulate.spacing_odds(s, simulate_days(s, runs=400, seed=6))
    assert [row.factor for row in odds.spacing] == list(simulate.SPACING_FACTORS)
    base = odds.spread.thermal_search_mean_m
    for row in odds.spacing:
        assert row.search_mean_m == pytest.approx(base * row.factor)
    # The day's own row is the odds themselves.
    [own] = [row for row in odds.spacing if row.factor == 1.0]
    assert own.finish_probability == tuple(c.finish_probability for c in odds.choices)
    # Each other row is the simulation with that search distance, the same seed and runs.
    far = simulate_days(s, runs=400, seed=6, spread=DaySpread(thermal_search_mean_m=4.0 * base)).choices[0]
    assert odds.spacing[-1].finish_probability[0] == far.finish_probability
    # Thermals four times as far apart finish clearly less often than at half the spacing
    # (the trend; neighbouring rows may swap by a run or two, see the test above).
    assert odds.spacing[-1].finish_probability[0] < odds.spacing[0].finish_probability[0] - 0.1
    # No search, no table: the forecast day alone.
    alone = simulate.spacing_odds(s, simulate_days(s, runs=5, seed=6, spread=DaySpread.none()))
    assert alone.spacing == ()
