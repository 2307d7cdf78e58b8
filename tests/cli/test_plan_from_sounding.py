"""A task whose day comes from a sounding: planned end to end, the same as the day typed
by hand, typed keys overriding the derived ones (and named), and no MetPy without one."""

from __future__ import annotations

import json
import re
from pathlib import Path

import pytest

from glidetask import cautions, units
from glidetask.cli import main
from glidetask.engine.sounding_inputs import DERIVED_KEYS, day_inputs
from glidetask.formats.sounding_file import load_derived_day
from glidetask.formats.task_file import load_scenario
from glidetask.units import KMH, format_clock

ROOT = Path(__file__).resolve().parents[2]
DEMO = ROOT / "demo_tasks"
FORECAST = DEMO / "vardmoor-forecast-day.toml"
SOUNDING_KEYS = ("sounding", "surface", "surface_elevation_m", "band_top_margin_m", "band_bottom_agl_m")


def _json(capsys, command: str, task, *argv: str) -> dict:
    assert main([command, str(task), *argv, "--json"]) == 0
    return json.loads(capsys.readouterr().out)


def _absolute(text: str) -> str:
    """The demo task's text with its file paths made absolute (to copy it elsewhere)."""
    for key, value in (("turnpoints", "vardmoor.geojson"), ("polar", "../polars/club.toml"),
                       ("file", "terrain.tif"), ("sounding", "vardmoor-sounding.csv")):
        text = text.replace(f'{key} = "{value}"', f'{key} = "{(DEMO / value).resolve().as_posix()}"')
    return text


def _without_day_keys(text: str, keys) -> str:
    """The task text without the [day] lines of ``keys`` (the surface list spans lines)."""
    out, skipping = [], False
    for line in text.splitlines():
        name = line.split("=", 1)[0].strip()
        if skipping:
            skipping = not line.rstrip().endswith("]]")
            continue
        if name in keys:
            skipping = name == "surface" and not line.rstrip().endswith("]]")
            continue
        out.append(line)
    return "\n".join(out) + "\n"


def _with_day_lines(text: str, lines) -> str:
    return text.replace("[day]\n", "[day]\n" + "".join(f"{line}\n" for line in lines), 1)


def _typed_lines(inputs) -> list[str]:
    """The derived day written as typed keys: what a pilot copies from `glidetask day`."""
    pairs = lambda profile: ", ".join(f'["{format_clock(t)}", {v!r}]'  # noqa: E731
                                      for t, v in zip(profile.times_s, profile.values))
    return [f"band_top_m = [{pairs(inputs.band_top)}]",
            f"band_bottom_m = {inputs.band_bottom_m!r}",
            f"thermal_strength_ms = [{pairs(inputs.thermal_strength)}]",
            f'lift_ends = "{format_clock(inputs.lift_ends_s)}"',
            "wind = [" + ", ".join(f"{{ height_m = {level.height_m!r}, from_deg = {level.from_deg!r}, "
                                   f"speed_kmh = {round(level.speed_ms / KMH, 1)!r} }}"
                                   for level in inputs.wind_profile.levels) + "]"]


@pytest.fixture(scope="module")
def inputs():
    return day_inputs(load_derived_day(FORECAST)[1])


def _strip_source(data: dict) -> dict:
    """The plan without what only says where the day came from: the cautions (notes) and
    ``day.source``."""
    data = json.loads(json.dumps(data))
    data.pop("cautions")
    data["day"].pop("source", None)
    return data


def test_the_forecast_day_demo_types_none_of_the_derived_keys():
    # The demo flies the derived day: no typed fallback is left in it.
    scenario = load_scenario(FORECAST)
    assert scenario.day_source is not None
    assert scenario.day_source.overridden == ()
    assert scenario.day_source.derived_keys == DERIVED_KEYS


def test_a_task_with_a_sounding_plans_end_to_end_on_the_derived_day(capsys, inputs):
    # Source: the derivation's own output (`glidetask day`), checked against MetPy and hand
    # calculations in tests/engine/test_sounding.py; here the plan must fly exactly that day.
    data = _json(capsys, "plan", FORECAST)
    day = _json(capsys, "day", FORECAST)
    assert data["finished"] is True
    band = [hour for hour in day["hours"] if hour["band_top_m"] is not None]
    assert data["day"]["band_top"] == [[hour["time"], round(hour["band_top_m"])] for hour in band]
    assert data["day"]["band_top_m"] == max(round(hour["band_top_m"]) for hour in band)
    assert data["day"]["band_bottom_m"] == round(day["surface_elevation_m"] + day["band_bottom_agl_m"])
    strengths = {hour["time"]: hour["thermal_strength_ms"] for hour in day["hours"]}
    assert all(value == pytest.approx(strengths[time], abs=0.005) for time, value in data["day"]["lift"])
    assert data["day"]["lift_ends"] == day["lift_end"]
    # The start height is the band top at the start time (12:30, between 12:00 and 13:00).
    assert data["day"]["start_height_m"] == pytest.approx(0.5 * (1718.0 + 1801.0), abs=0.5)
    assert data["day"]["source"] == {"sounding": str(DEMO / "vardmoor-sounding.csv"),
                                     "derived": list(DERIVED_KEYS), "typed": []}
    # The sounding's cautions travel with the plan, after the general ones.
    assert data["cautions"][:len(cautions.GENERAL)] == list(cautions.GENERAL)
    assert cautions.SOUNDING[0] in data["cautions"]


def test_the_band_wind_is_the_mean_of_the_sounding_between_band_bottom_and_top(inputs):
    # Source: hand calculation from the demo sounding (vector mean of the levels between the
    # band bottom 1025 m and the highest band top 1941 m, trapezoidal in height).
    import numpy as np

    levels = inputs.wind_profile.levels
    z = np.array([lv.height_m for lv in levels])
    to = np.radians([lv.from_deg + 180.0 for lv in levels])
    east, north = np.array([lv.speed_ms for lv in levels]) * np.sin(to), np.array([lv.speed_ms for lv in levels]) * np.cos(to)
    grid = np.linspace(1025.0, 1941.0, 20001)
    e, n = np.interp(grid, z, east).mean(), np.interp(grid, z, north).mean()
    assert inputs.wind.speed_ms / KMH == pytest.approx(np.hypot(e, n) / KMH, abs=0.051)
    assert inputs.wind.from_deg == pytest.approx(np.degrees(np.arctan2(-e, -n)) % 360.0, abs=0.51)


@pytest.mark.parametrize("command", ["plan", "sweep", "odds"])
def test_the_same_day_typed_by_hand_plans_the_same(capsys, tmp_path, inputs, command):
    # The derived values written as typed keys (no sounding): byte-identical output except
    # the notes (cautions) and the day's source.
    text = _absolute(FORECAST.read_text(encoding="utf-8"))
    derived_task, typed_task = tmp_path / "derived.toml", tmp_path / "typed.toml"
    derived_task.write_text(text, encoding="utf-8")
    # surface_elevation_m stays: typed, it is the ground under the convective layer (the
    # thermal size and spacing, task_file), as the sounding's surface is for the derived day.
    kept = tuple(key for key in SOUNDING_KEYS if key != "surface_elevation_m")
    typed_task.write_text(_with_day_lines(_without_day_keys(text, kept), _typed_lines(inputs)),
                          encoding="utf-8")
    assert load_scenario(typed_task).day_source is None
    assert load_scenario(typed_task).day.ground_m == load_scenario(derived_task).day.ground_m
    derived, typed = _json(capsys, command, derived_task), _json(capsys, command, typed_task)
    if command == "plan":
        derived, typed = _strip_source(derived), _strip_source(typed)
        assert "source" not in typed["day"]
    else:
        notes = derived.pop("cautions"), typed.pop("cautions")
        # The derived day's cautions travel with every output (and only they differ).
        assert cautions.SOUNDING[0] in notes[0] and cautions.SOUNDING[0] not in notes[1]
        assert [text for text in notes[0] if text not in notes[1]] == cautions.day_source_cautions(
            load_scenario(derived_task).day_source, units.METRIC)
    assert json.dumps(derived, sort_keys=True) == json.dumps(typed, sort_keys=True)


def test_typed_keys_override_the_derived_ones_and_are_named(capsys, tmp_path):
    text = _absolute(FORECAST.read_text(encoding="utf-8"))
    task = tmp_path / "override.toml"
    task.write_text(_with_day_lines(text, ["band_top_m = 1500.0", 'wind = { from_deg = 90.0, speed_kmh = 10.0 }',
                                           "climb_ms = [[\"10:00\", 1.5]]"]), encoding="utf-8")
    data = _json(capsys, "plan", task)
    assert data["day"]["band_top_m"] == 1500.0 and "band_top" not in data["day"]
    assert data["day"]["wind"] == {"from_deg": 90.0, "speed_kmh": 10.0}
    assert data["day"]["lift_profile"] == "climb_ms" and data["day"]["lift"] == [["10:00", 1.5]]
    assert data["day"]["source"]["typed"] == ["band_top_m", "climb_ms", "wind"]
    assert data["day"]["source"]["derived"] == ["band_bottom_m", "lift_ends"]
    note = cautions.overridden_text(("band_top_m", "climb_ms", "wind"))
    assert "[day] band_top_m, [day] climb_ms, [day] wind" in note
    assert note in data["cautions"]
    assert main(["plan", str(task)]) == 0
    out = capsys.readouterr().out
    assert "typed over it: band_top_m, climb_ms, wind" in out and note in out


def test_a_start_before_the_derived_lift_is_a_caution(capsys, inputs):
    data = _json(capsys, "plan", FORECAST, "--start", "09:30")
    assert any(text.startswith("The task starts at 09:30, before thermals start "
                               f"({format_clock(inputs.lift_start_s)})") for text in data["cautions"])


def _cold_task(tmp_path, extra=()):
    """The demo forecast task on a cold surface forecast: 8-9 C never reaches the trigger."""
    text = _absolute(FORECAST.read_text(encoding="utf-8"))
    text = re.sub(r"surface = \[\[.*?\]\]\n", 'surface = [["08:00", 8.0, 2.0], ["18:00", 9.0, 2.0]]\n', text,
                  flags=re.S)
    if extra:
        text = _with_day_lines(text, list(extra))
    task = tmp_path / "cold.toml"
    task.write_text(text, encoding="utf-8")
    return task


def test_a_sounding_day_without_a_working_band_is_a_result_with_no_lift(capsys, tmp_path):
    # Issue 16: a surface forecast that never triggers thermals is a result, a day with no
    # lift and a caution. The flight starts at the band bottom the sounding gives (ground +
    # 600 m AGL by default, common practice), finds no climb and lands out.
    from glidetask.formats.sounding_file import derive_task_day
    from glidetask.formats.toml_reader import read_toml

    task = _cold_task(tmp_path)
    document, _ = read_toml(task, str(task))
    _, _, derived = derive_task_day(document, task)
    assert derived.lift_start_s is None  # the sounding's own verdict: no lift
    data = _json(capsys, "plan", task)
    bottom = round(derived.surface_elevation_m + derived.band_bottom_agl_m)
    assert data["finished"] is False and data["day"]["start_height_m"] == bottom == data["day"]["band_bottom_m"]
    assert data["landout"] is not None and data["landout"]["at_km"] > 0.0
    # Source: the distance a glider covers from a height is at most the height times its best
    # glide ratio (here 35, the polar's), stretched by a tail wind (handbook glide rule).
    lowest = min(t for t in data["profile"]["terrain_m"] if t is not None)
    strongest = max(level["speed_kmh"] for level in data["day"]["wind"]) / 3.6
    assert data["landout"]["at_km"] * 1000.0 <= (bottom - lowest) * 35.0 * (1.0 + strongest / 27.0)
    assert cautions.NO_LIFT_DAY in data["cautions"]
    assert any(text.startswith("No usable thermals: the surface never reaches the trigger") for text in data["cautions"])
    assert main(["plan", str(task)]) == 0
    assert "ENDS SHORT" in capsys.readouterr().out


def test_a_no_lift_day_starts_at_the_typed_start_height(capsys, tmp_path):
    task = _cold_task(tmp_path, ["start_height_m = 1400.0"])
    data = _json(capsys, "plan", task)
    assert data["day"]["start_height_m"] == 1400.0 and data["finished"] is False
    low = _json(capsys, "plan", _cold_task(tmp_path))
    assert data["landout"]["at_km"] > low["landout"]["at_km"]  # higher start, longer glide out


def test_check_of_a_no_lift_sounding_day_is_ok_with_a_note(capsys, tmp_path):
    task = _cold_task(tmp_path)
    assert main(["check", str(task), "--json"]) == 0
    result = json.loads(capsys.readouterr().out)[0]
    assert result["problems"] == [] and result["sounding"]["no_lift"] is True
    assert cautions.NO_LIFT_DAY in result["cautions"]
    assert main(["check", str(task)]) == 0
    assert f"note: {cautions.NO_LIFT_DAY}" in capsys.readouterr().out


def test_a_saved_task_keeps_its_sounding_and_types_only_what_was_edited(tmp_path):
    # Nothing the user saved is lost: the sounding keys are written back, the derived keys
    # are not typed (the sounding gives them again), an edited value is.
    import dataclasses

    from glidetask.formats.task_file import save_task

    scenario = load_scenario(FORECAST)
    target = tmp_path / "saved.toml"
    save_task(target, scenario)
    text = target.read_text(encoding="utf-8")
    for key in SOUNDING_KEYS:
        assert f"\n{key} = " in text
    for key in ("band_top_m", "band_bottom_m", "thermal_strength_ms", "lift_ends", "wind"):
        assert f"\n{key} = " not in text
    again = load_scenario(target)
    assert again.day == scenario.day and again.day_source == scenario.day_source
    edited = dataclasses.replace(scenario, day=dataclasses.replace(scenario.day, band_bottom_m=1100.0))
    save_task(target, edited)
    reread = load_scenario(target)
    assert reread.day.band_bottom_m == 1100.0 and reread.day_source.overridden == ("band_bottom_m",)


def test_the_day_line_shows_the_wind_through_the_working_band_only(capsys):
    # The sounding's wind has levels up to 10 km; the plan flies between the band bottom and
    # its highest top, so the Day line shows the levels there and the wind at both ends.
    import csv
    import math

    import numpy as np

    day = load_scenario(FORECAST).day
    bottom, top = day.band_bottom_m, day.band_top_m
    with open(DEMO / "vardmoor-sounding.csv", newline="") as handle:
        rows = [{key: float(value) for key, value in row.items()} for row in csv.DictReader(handle)]
    heights = np.array([row["height_m"] for row in rows])
    assert bottom not in heights and top not in heights  # both ends fall between the levels
    assert main(["plan", str(FORECAST)]) == 0
    line = next(line for line in capsys.readouterr().out.splitlines() if line.startswith("  Day "))
    shown = re.findall(r"(\d{3})/(\d+) km/h at (\d+) m( \(band (?:bottom|top)\))?", line.split(", wind ", 1)[1])
    inside = [row for row in rows if bottom < row["height_m"] < top]
    assert [int(h) for _, _, h, _ in shown] == [round(bottom)] + [int(r["height_m"]) for r in inside] + [round(top)]
    assert shown[0][3] == " (band bottom)" and shown[-1][3] == " (band top)"
    for (direction, speed, _, _), row in zip(shown[1:-1], inside):  # each level as the sounding gives it
        assert (int(direction), int(speed)) == (row["wind_from_deg"], row["wind_speed_kmh"])

    def between(z):
        # Source: contract 2.3, a wind profile interpolates the wind vector linearly in height;
        # worked here by hand from the CSV (from-direction vector: east = s sin(d), north = s cos(d)).
        east = np.interp(z, heights, [r["wind_speed_kmh"] * math.sin(math.radians(r["wind_from_deg"])) for r in rows])
        north = np.interp(z, heights, [r["wind_speed_kmh"] * math.cos(math.radians(r["wind_from_deg"])) for r in rows])
        return round(math.degrees(math.atan2(east, north)) % 360.0), round(math.hypot(east, north))

    assert (int(shown[0][0]), int(shown[0][1])) == between(bottom)
    assert (int(shown[-1][0]), int(shown[-1][1])) == between(top)
