"""Text, Markdown and JSON of the strategy results (formats/strategy_report.py), on
results built by hand so that every figure shown can be checked against its input."""

from __future__ import annotations

import json
import math

import numpy as np
import pytest

from glidetask import cautions
from glidetask.engine.compare import BallastSweep
from glidetask.engine.plan import Notice
from glidetask.engine.sensitivity import Sensitivity, SensitivityRow
from glidetask.engine.day_spread import DaySpread
from glidetask.engine.simulate import ChoiceOdds, Odds, SpacingOdds
from glidetask.formats import strategy_report as report
from glidetask.units import AVIATION, KMH, KNOT

NAN = math.nan


def hand_sweep() -> BallastSweep:
    ballast = np.array([0.0, 50.0, 100.0])
    times = np.array([[NAN, NAN, NAN],            # 1.0 m/s: nothing finishes
                      [4 * 3600.0, 4.5 * 3600.0, NAN],  # 2.0 m/s: empty best, full cannot finish
                      [3 * 3600.0, 2.9 * 3600.0, 2.8 * 3600.0]])  # 3.0 m/s: full best
    climb = np.array([[-0.2, -0.3, -0.4], [0.8, 0.6, 0.4], [1.6, 1.4, 1.2]])
    cruise = np.where(climb > 0, 20.0 + 10.0 * climb, NAN)
    return BallastSweep(task_name="hand-made", planned_distance_m=300e3, ballast_kg=ballast,
                        mass_kg=340.0 + ballast, thermal_strength_ms=np.array([1.0, 2.0, 3.0]),
                        thermal_radius_m=150.0, achieved_climb_ms=climb, cruise_speed_ms=cruise,
                        task_time_s=times, best_ballast_kg=np.array([NAN, 0.0, 100.0]),
                        fastest_ballast_kg=np.array([NAN, 0.0, 100.0]), ballast_pays_from_ms=3.0,
                        full_ballast_from_ms=3.0, scenario_ballast_kg=50.0, forecast_strength_ms=2.5,
                        phases=16, notes=(Notice("sweep_one_thermal", {"thermal_radius_m": 150.0, "source": "given"}),
                                          Notice("sweep_ignores_fixed_mc", {"mc_ms": 2.0}), Notice("dump_water")))


ONE_THERMAL = ("Thermals are taken as constant in strength all day and of one size (150 m radius, given): real "
               "days vary, and a narrower thermal punishes ballast more.")


# ---------------------------------------------------------------- sweep


def test_sweep_json_has_the_contract_keys_with_their_meanings():
    data = report.sweep_to_dict(hand_sweep())
    json.dumps(data, allow_nan=False)  # plain JSON, nulls for undefined numbers
    # Source: shared/CONTRACT.md 5.4.
    assert data["ballast_kg"] == [0.0, 50.0, 100.0]
    assert data["thermal_strength_ms"] == [1.0, 2.0, 3.0]
    # one row per strength, one column per ballast, null where the task cannot be finished
    assert data["task_time_s"] == [[None, None, None], [14400.0, 16200.0, None], [10800.0, 10440.0, 10080.0]]
    assert data["best_ballast_kg"] == [None, 0.0, 100.0]
    assert data["achieved_climb_ms"][1] == [0.8, 0.6, 0.4]
    # cruise speed in km/h: 20 + 10 x 0.8 = 28 m/s = 100.8 km/h
    assert data["cruise_speed_kmh"][1][0] == pytest.approx(28.0 / KMH, abs=0.05)
    assert data["cruise_speed_kmh"][0] == [None, None, None]
    assert data["ballast_pays_from_ms"] == 3.0 and data["full_ballast_from_ms"] == 3.0
    # The notes are facts worded here, in metric for JSON (as the contract keeps them).
    assert data["cautions"] == cautions.general() + [
        ONE_THERMAL, "The sweep flies at a MacCready setting equal to the achieved climb, not the day's fixed "
        "setting of 2 m/s.", cautions.STRATEGY_NOTES["dump_water"]]
    assert report.sweep_to_dict(hand_sweep(), ["a day caution"])["cautions"][len(cautions.GENERAL)] == "a day caution"


def test_sweep_text_marks_the_best_and_shows_times_as_hours_and_minutes():
    text = report.sweep_text(hand_sweep())
    lines = text.splitlines()
    row_2 = next(line for line in lines if line.strip().startswith("2.0 m/s") and "*" in line)
    assert row_2.split()[2:] == ["*4:00", "4:30", "-"]
    row_3 = next(line for line in lines if line.strip().startswith("3.0 m/s") and "*" in line)
    assert row_3.split()[2:] == ["3:00", "2:54", "*2:48"]  # 2.9 h = 2:54, 2.8 h = 2:48
    assert "Ballast pays from 3.0 m/s thermals" in text and "Full ballast is fastest from 3.0 m/s" in text
    assert "about 2.5 m/s" in text
    assert "CAUTION" in text and cautions.GENERAL[0] in text and ONE_THERMAL in text


def test_sweep_text_in_aviation_units():
    text = report.sweep_text(hand_sweep(), "aviation")
    # Source: 1 kt = 1852/3600 m/s (contract section 6): 2.0 m/s = 3.9 kt, 3.0 m/s = 5.8 kt
    assert f"{2.0 / KNOT:.1f} kt" == "3.9 kt"
    assert "3.9 kt" in text and "5.8 kt" in text and "m/s" not in text
    # The notes too: 150 m = 492 ft (0.3048 m a foot); 2 m/s = 3.89 kt, a setting as typed to two decimals.
    assert "(492 ft radius, given)" in text and "fixed setting of 3.89 kt." in text
    assert " m " not in text.split("CAUTION")[1]


def test_sweep_markdown_is_a_table_with_the_best_in_bold():
    text = report.sweep_markdown(hand_sweep())
    rows = [line for line in text.splitlines() if line.startswith("|")]
    assert rows[0] == "| Thermal | 0 kg | 50 kg | 100 kg |"
    assert rows[1] == "| :-- | --: | --: | --: |"
    assert rows[3] == "| 2.0 m/s | **4:00** | 4:30 | - |"
    assert f"- {ONE_THERMAL}" in text


def test_sweep_verdicts():
    sweep = hand_sweep()
    never = BallastSweep(**{**sweep.__dict__, "ballast_pays_from_ms": NAN, "full_ballast_from_ms": NAN})
    assert report.sweep_verdict(never) == "Ballast never pays in this range: fly without water."
    dry = BallastSweep(**{**sweep.__dict__, "ballast_kg": np.zeros(1)})
    assert report.sweep_verdict(dry) == "This glider carries no water ballast."


# ---------------------------------------------------------------- sensitivity


def hand_sensitivity() -> Sensitivity:
    def row(key, facts, time, delta, finished=True, landout=NAN):
        return SensitivityRow(key, facts, time, delta, finished, 12 * 3600.0 + time if finished else NAN,
                              landout, 300e3 / time if finished else NAN)

    rows = (row("forecast", {}, 10800.0, 0.0),
            row("weaker_climbs", {"by_ms": 0.5, "strength": False}, 12000.0, 1200.0),
            row("more_wind", {"by_ms": 10 * KMH, "from_deg": 250.0, "speed_ms": 25 * KMH}, 10810.0, 10.0),
            row("later_start", {"by_s": 1800.0, "start_time_s": 12.5 * 3600.0}, 9000.0, NAN, finished=False,
                landout=250e3),
            row("more_bugs", {"by_percent": 5.0, "bugs_percent": 5.0}, 11100.0, 300.0))
    return Sensitivity("hand-made", "racing", rows, (Notice("what_ifs_area_targets"),))


def test_sensitivity_text_shows_times_and_signed_changes():
    text = report.sensitivity_text(hand_sensitivity())
    lines = text.splitlines()
    assert lines[0] == "How the task time answers to the day"
    assert "3:00" in lines[2]  # the forecast
    assert lines[3].split()[-3:] == ["3:20", "+20", "min"]
    assert "no change" in lines[4]  # 10 s rounds to no change in minutes
    assert "lands out" in lines[5] and "250.0 km" in lines[5] and "start 12:30" in lines[5]
    assert "wind 250/25 km/h" in text and "bugs 5 % (sink rate)" in text
    assert cautions.STRATEGY_NOTES["what_ifs_area_targets"] in text


def test_what_if_words_from_the_facts():
    rows = hand_sensitivity().rows
    assert [report.what_if_words(r) for r in rows] == [
        ("Forecast", "the plan as given"), ("Climbs 0.5 m/s weaker", "achieved climb -0.5 m/s all day"),
        ("Wind 10 km/h stronger", "wind 250/25 km/h"), ("Start 30 min later", "start 12:30"),
        ("5 % more bugs", "bugs 5 % (sink rate)")]
    refused = SensitivityRow("later_start", {"by_s": 1800.0, "start_time_s": 19 * 3600.0,
                                             "refused": "[day] start_time"}, NAN, NAN, False, NAN, NAN, NAN)
    assert report.what_if_words(refused, AVIATION) == ("Start 30 min later", "start 19:00: at or after the end of lift")
    strength = SensitivityRow("weaker_climbs", {"by_ms": 0.5, "strength": True}, NAN, NAN, False, NAN, NAN, NAN)
    # Source: 1 kt = 1852/3600 m/s (contract section 6): 0.5 m/s = 0.97 kt
    assert report.what_if_words(strength, AVIATION) == ("Thermals 1.0 kt weaker", "thermal strength -1.0 kt all day")


def test_sensitivity_in_aviation_units():
    text = report.sensitivity_text(hand_sensitivity(), AVIATION)
    # Source: 1 kt = 1.852 km/h: 10 km/h = 5.4 kt, 25 km/h = 13.5 kt, 0.5 m/s = 0.97 kt
    assert "Wind 5 kt stronger" in text and "wind 250/13 kt" in text
    assert "Climbs 1.0 kt weaker" in text


def test_sensitivity_markdown_and_json():
    text = report.sensitivity_markdown(hand_sensitivity())
    assert text.startswith("## How the task time answers to the day")
    rows = [line for line in text.splitlines() if line.startswith("|")]
    assert len(rows) == 2 + 5 and rows[1] == "| :-- | :-- | --: | --: |"
    data = report.sensitivity_to_dict(hand_sensitivity())
    json.dumps(data, allow_nan=False)
    assert [r["what_if"] for r in data["rows"]] == ["forecast", "weaker_climbs", "more_wind", "later_start",
                                                  "more_bugs"]
    assert data["rows"][1]["change_s"] == 1200.0 and data["rows"][3]["landout_km"] == 250.0
    assert data["rows"][0]["finish_time"] == "15:00"


# ---------------------------------------------------------------- odds


def hand_odds() -> Odds:
    choice = ChoiceOdds(ballast_kg=0.0, mass_kg=340.0, runs=1000, finished=950, finish_probability=0.95,
                        finish_probability_se=math.sqrt(0.95 * 0.05 / 1000), task_time_s=(9000.0, 10000.0, 11000.0),
                        landouts_by_leg=(20, 0, 30), landouts_by_reason=(("no_thermal_found", 40), ("lift_ended", 10)),
                        forecast_time_s=9900.0, forecast_finished=True, finish_times_s=np.array([]))
    heavy = ChoiceOdds(ballast_kg=170.0, mass_kg=510.0, runs=1000, finished=0, finish_probability=0.0,
                       finish_probability_se=0.0, task_time_s=(NAN, NAN, NAN), landouts_by_leg=(1000, 0, 0),
                       landouts_by_reason=(("too_weak", 1000),), forecast_time_s=5000.0, forecast_finished=False,
                       finish_times_s=np.array([]))
    spacing = (SpacingOdds(0.5, 1000.0, (0.99, 0.0), (0.003, 0.0)), SpacingOdds(1.0, 2000.0, (0.95, 0.0), (0.0069, 0.0)),
               SpacingOdds(4.0, 8000.0, (0.4, 0.0), (0.0155, 0.0)))
    return Odds("hand-made", (("A", "B"), ("B", "C"), ("C", "A")), 1000, 7, DaySpread(thermal_search_mean_m=2000.0),
                (choice, heavy), (Notice("odds_spread_assumed", {"spread": DaySpread(thermal_search_mean_m=2000.0)}),
                                  Notice("odds_landout_meaning")), spacing=spacing)


def test_odds_json():
    data = report.odds_to_dict(hand_odds())
    json.dumps(data, allow_nan=False)
    assert data["runs"] == 1000 and data["seed"] == 7
    first, heavy = data["choices"]
    assert first["finish_probability"] == 0.95 and first["finish_probability_se"] == pytest.approx(0.0069, abs=1e-4)
    assert first["task_time_s"] == {"p10": 9000.0, "p50": 10000.0, "p90": 11000.0}
    assert first["landouts_by_leg"][2] == {"leg": 3, "from": "C", "to": "A", "count": 30}
    assert first["landouts_by_reason"] == {"no_thermal_found": 40, "lift_ended": 10}
    assert heavy["task_time_s"] == {"p10": None, "p50": None, "p90": None}
    assert data["assumptions"]["wind_speed_sd_kmh"] == pytest.approx(8.0)
    assert data["assumptions"]["thermal_search_mean_km"] == 2.0
    assert data["assumptions"]["thermal_search_source"] == "given"
    assert data["assumptions"]["bad_day_probability"] == 0.1
    assert data["assumptions"]["bad_day_early_s"] == [3600.0, 7200.0]
    assert [row["factor"] for row in data["thermal_spacing"]] == [0.5, 1.0, 4.0]
    last = data["thermal_spacing"][-1]
    assert last["thermal_search_mean_km"] == 8.0
    assert last["choices"][0] == {"ballast_kg": 0.0, "finish_probability": 0.4, "finish_probability_se": 0.0155}
    assert data["cautions"][-1].startswith("A land-out here means reaching the elevation of the field in reach plus "
                                           "the arrival margin")
    assert data["cautions"][-2].endswith("wind speed +/- 8 km/h and direction +/- 20 deg (1 sd), end of lift +/- 30 "
                                         "min, 1 day in 10 the lift ends 1-2 h early, next climb on average 2.0 km "
                                         "beyond the band bottom.")
    day = Odds(**{**hand_odds().__dict__, "search_layer_m": 1900.0})
    assert report.odds_to_dict(day)["assumptions"]["thermal_search_source"] == ("Allen (2006) for a 1.9 km "
                                                                                 "convective layer")


def test_probability_bar_fills_in_proportion():
    assert report.probability_bar(1.0, 10) == "█" * 10
    assert report.probability_bar(0.0, 10) == "░" * 10
    assert report.probability_bar(0.5, 10) == "█" * 5 + "░" * 5
    assert report.probability_bar(0.55, 10) == "█" * 5 + "▌" + "░" * 4  # half a cell in eighths


def test_odds_text():
    text = report.odds_text(hand_odds())
    assert "95.0 %" in text and "0.7" in text  # one standard error in points: 0.69
    assert "2:30  2:47  3:03" in text  # 9000, 10000, 11000 s
    assert "lands out" in text  # the heavy glider's forecast day
    leg_line = next(line for line in text.splitlines() if line.strip().startswith("3 C > A"))
    assert leg_line.split()[-2:] == ["30", "0"]
    assert "no climb found low down" in text and "thermals too weak to climb in" in text
    markdown = report.odds_markdown(hand_odds())
    assert "| 0 kg | 95.0 % ± 0.7 | 2:30 | 2:47 | 3:03 | 50 |" in markdown


def test_odds_text_shows_the_spacing_table_and_the_bad_days():
    text = report.odds_text(hand_odds())
    lines = text.splitlines()
    start = next(i for i, line in enumerate(lines) if line.startswith("Finish against thermal spacing"))
    assert lines[start + 1].split() == ["spacing", "next", "climb", "0", "kg", "170", "kg"]
    assert lines[start + 2].split() == ["0.5", "x", "1.0", "km", "99.0", "%", "0.0", "%"]
    assert lines[start + 3].split() == ["1", "x", "(day)", "2.0", "km", "95.0", "%", "0.0", "%"]
    assert lines[start + 4].split() == ["4", "x", "8.0", "km", "40.0", "%", "0.0", "%"]
    assert "1 day in 10 the lift ends 1-2 h early" in text
    aviation = report.odds_text(hand_odds(), AVIATION)
    assert "4.3 NM" in aviation  # 8 km = 4.32 NM
    # The spread's note in the chosen units too: 8 km/h = 4.3 kt, 2 km = 1.1 NM (1852 m).
    assert "wind speed +/- 4 kt and direction" in aviation and "on average 1.1 NM beyond" in aviation
    assert "km" not in aviation
    day = Odds(**{**hand_odds().__dict__, "search_layer_m": 1900.0})
    assert "(Allen (2006) for a 6234 ft convective layer)" in report.odds_text(day, AVIATION)  # 1900 / 0.3048
