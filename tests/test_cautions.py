"""The cautions worded at the edge (glidetask.cautions): a plan's facts in the reader's units."""

from __future__ import annotations

import dataclasses
import re

from glidetask import cautions
from glidetask.engine.plan import plan
from glidetask.engine.scenario import Wind
from glidetask.formats.task_file import load_scenario
from glidetask.units import AVIATION, KMH, METRIC

METRIC_QUANTITY = re.compile(r"\d(?:\.\d+)? ?(?:m|km|km/h|m/s)\b")


def _short_plan(demo_dir):
    # An invented demo task made to end short with a thin margin and rising air counted on.
    scenario = load_scenario(demo_dir / "vardmoor-ridge-final-glide.toml")
    scenario = dataclasses.replace(
        scenario, safety=dataclasses.replace(scenario.safety, arrival_margin_m=100.0),
        day=dataclasses.replace(scenario.day, glide_airmass_ms=0.3))
    return plan(scenario, wind=Wind(270.0, 180.0 * KMH))


def test_the_plans_own_cautions_follow_the_chosen_units(demo_dir):
    # Conversions: 1 ft = 0.3048 m and 1 kt = 1852/3600 m/s exactly (international
    # definitions, from memory): 100 m = 328.08 ft, 150 m = 492.1 ft, 300 m = 984.25 ft,
    # 0.3 m/s = 0.583 kt.
    p = _short_plan(demo_dir)
    codes = [n.code for n in p.notices]
    assert {"ends_short", "thin_margin", "rising_air_counted"} <= set(codes)
    aviation = cautions.plan_cautions(p, AVIATION)[len(cautions.GENERAL):]
    assert "The arrival margin of 328 ft is thin: most pilots plan 492-984 ft over the finish." in aviation
    assert "The plan counts on rising air while gliding (+0.6 kt): if it is not there, every glide loses " \
           "more height." in aviation
    short = next(text for text in aviation if text.startswith("Task not completed"))
    # With the demo's terrain the plan lands in a field in reach, its elevation in feet.
    assert " NM along the task" in short and re.search(r"lands in [A-Za-z ]+ \(\d+ ft\)", short)
    for text in aviation:
        assert not METRIC_QUANTITY.search(text), text


def test_the_metric_wording_is_the_plans_json_cautions(demo_dir):
    p = _short_plan(demo_dir)
    metric = cautions.plan_cautions(p, METRIC)
    assert tuple(metric) == p.cautions
    assert metric[: len(cautions.GENERAL)] == list(cautions.GENERAL)
    assert "The arrival margin of 100 m is thin: most pilots plan 150-300 m over the finish." in metric
    assert len(set(metric)) == len(metric)  # each caution once


def test_the_whole_flight_cautions_follow_the_chosen_units():
    # Source: units by definition: 1 ft = 0.3048 m, 1 NM = 1852 m (ICAO Annex 5).
    from glidetask.engine.clearance import TerrainPoint
    from glidetask.engine.plan import Notice
    from glidetask.units import by_name

    aviation = by_name("aviation")
    floor = Notice("raised_floor", dict(from_m=18520.0, to_m=37040.0, floor_m=1524.0, band_bottom_m=1219.2,
                                        band_top_m=2438.4))
    text = cautions.notice_text(floor, aviation)
    assert "10.0 NM to 20.0 NM" in text and "5000 ft" in text and "4000 ft" in text
    place = TerrainPoint(18520.0, 45.0, -34.0, 1524.0, 150.0, 1674.0, "Kellow Hill", 3704.0, 90.0)
    short = Notice("ends_short", dict(why="terrain_above_band", stop_time_s=0.0, lift_ends_s=0.0, wind_from_deg=0.0,
                                      wind_speed_ms=0.0, at_m=18520.0, leg_from="A", leg_to="B", floor_m=500.0,
                                      place=place))
    text = cautions.notice_text(short, aviation)
    assert "10.0 NM along the task" in text and "terrain of 5000 ft" in text and "2.0 NM E of Kellow Hill" in text
    assert "cannot be flown as set" in text


def test_the_sweep_odds_and_what_if_notes_follow_the_chosen_units(demo_dir):
    # The engine gives the notes as facts; worded here once, for the CLI text, the briefing
    # and the UI in the units shown, and in metric for JSON. Conversions as above:
    # 200 m = 656 ft, 8 km/h = 4.3 kt.
    from glidetask.engine.compare import ballast_sweep
    from glidetask.engine.simulate import simulate_days

    scenario = load_scenario(demo_dir / "vardmoor-forecast-day.toml")  # thermals of 200 m given in the task
    sweep, odds = ballast_sweep(scenario), simulate_days(scenario, runs=10, seed=1)
    aviation = cautions.notes_text(sweep.notes, AVIATION) + cautions.notes_text(odds.notes, AVIATION)
    metric = cautions.notes_text(sweep.notes, METRIC) + cautions.notes_text(odds.notes, METRIC)
    assert "(656 ft radius, given in the task)" in aviation[0] and "(200 m radius, given in the task)" in metric[0]
    assert any("wind speed +/- 4 kt" in text for text in aviation)
    assert any("wind speed +/- 8 km/h" in text for text in metric)
    assert not any(METRIC_QUANTITY.search(text) for text in aviation), aviation


def test_odds_landout_note_follows_the_rule_the_task_is_flown_with():
    # the plan's land-out rule (shared/CONTRACT.md section 3 as built): with terrain the glide
    # after the climbs comes down to the clearance; without, to the reached field (else the finish)
    from glidetask.engine.plan import Notice
    from glidetask.units import METRIC

    with_terrain = cautions.notice_text(Notice("odds_landout_meaning", {"terrain": True}), METRIC)
    without = cautions.notice_text(Notice("odds_landout_meaning", {"terrain": False}), METRIC)
    assert "comes down to the terrain clearance" in with_terrain
    assert "elevation of the field in reach plus the arrival margin" in without
