"""Sounding files (shared/CONTRACT.md 2.7) and a task's sounding keys: every problem, by row."""

from __future__ import annotations

import re
from pathlib import Path

import numpy as np
import pytest

from glidetask.errors import InputError
from glidetask.formats.sounding_file import (
    COLUMNS,
    load_derived_day,
    looks_like_sounding,
    parse_sounding,
    read_day_sounding,
    read_sounding,
)
from glidetask.units import KMH

ROOT = Path(__file__).resolve().parents[2]
DEMO = ROOT / "demo_tasks"
ERROR_LINE = re.compile(r"^glidetask: error: [^:]+: [^:]+: .+$")
HEADER = ",".join(COLUMNS)
GOOD_ROWS = [
    "970.0,350,18.0,9.0,250,10",
    "948.0,550,16.4,7.0,255,14",
    "915.0,850,14.0,5.0,260,18",
    "880.0,1180,11.0,2.0,265,20",
    "845.0,1520,8.0,-1.0,270,22",
    "795.0,2030,4.0,-6.0,270,25",
]


def _csv(rows, header=HEADER) -> str:
    return "\n".join([header, *rows]) + "\n"


def _problems(text: str) -> list[tuple[str, str]]:
    with pytest.raises(InputError) as caught:
        parse_sounding(text, "s.csv")
    for problem in caught.value.problems:
        assert ERROR_LINE.match(str(problem)), str(problem)
        assert problem.file == "s.csv"
    return [(p.where, p.what) for p in caught.value.problems]


def test_a_good_sounding_is_read_in_si_units():
    sounding = parse_sounding(_csv(GOOD_ROWS))
    assert sounding.pressure_pa[0] == 97000.0 and sounding.height_m[-1] == 2030.0
    assert sounding.temperature_k[0] == pytest.approx(291.15) and sounding.dewpoint_k[0] == pytest.approx(282.15)
    assert sounding.wind_from_deg[1] == 255.0 and sounding.wind_speed_ms[1] == pytest.approx(14.0 * KMH)


def test_columns_may_come_in_any_order_and_a_bom_is_accepted():
    order = [5, 4, 3, 2, 1, 0]
    header = ",".join(COLUMNS[i] for i in order)
    rows = [",".join(row.split(",")[i] for i in order) for row in GOOD_ROWS]
    assert np.array_equal(parse_sounding("\ufeff" + _csv(rows, header)).height_m,
                          parse_sounding(_csv(GOOD_ROWS)).height_m)


def test_every_bad_row_is_reported_in_one_run():
    rows = list(GOOD_ROWS)
    rows[1] = "948.0,550,16.4,17.0,255,14"       # dew point above temperature
    rows[2] = "915.0,abc,14.0,5.0,260,18"        # not a number
    rows[3] = "880.0,1180,11.0,2.0,265,nan"      # not finite
    rows[4] = "845.0,1520,8.0,-1.0,400,22"       # direction out of range
    rows.append("800.0,2000,3.0,-7.0,270,25")    # height not above 2030, pressure not below 795
    rows.append("700.0,3000,-3.0,-9.0,270")      # a value missing
    rows.append("650.0,3500,-6.0,-12.0,270," + "9" * 200)  # a huge cell
    found = _problems(_csv(rows))
    where = [w for w, _ in found]
    assert "row 2" in where and "row 3" in where and "row 4" in where and "row 5" in where
    text = " | ".join(f"{w}: {m}" for w, m in found)
    assert "row 2: the dew point (17 C) is above the temperature (16.4 C)" in text
    assert "row 3: height_m must be a number, got 'abc'" in text
    assert "row 4: wind_speed_kmh must be in [0, 500], got nan" in text
    assert "row 5: wind_from_deg must be in [0, 360], got 400" in text
    assert "row 7: heights must increase from the ground up: 2000 m is not above 2030 m" in text
    assert "row 7: pressures must decrease with height: 800 hPa is not below 795 hPa" in text
    assert "row 8: expected 6 values as in the header, got 5" in text
    assert "row 9: wind_speed_kmh: a value of 200 characters is not a number" in text
    assert all(len(m) < 200 for _, m in found)


def test_too_few_levels_and_a_bad_header():
    assert _problems(_csv(GOOD_ROWS[:4])) == [("file", "a sounding needs at least 5 levels, got 4")]
    found = _problems(_csv(GOOD_ROWS, header="pressure_hpa,height_m,temp,dewpoint_c,wind_from_deg,wind_speed_kmh"))
    assert ("header", f"unknown column 'temp'; expected {HEADER}") in found
    assert ("header", "missing column(s): temperature_c") in found
    assert _problems("") == [("header", f"no header row; expected {HEADER}")]


def test_unreadable_files(tmp_path):
    for path, what in ((tmp_path / "missing.csv", "no such file"), (tmp_path, "is a folder, not a file")):
        with pytest.raises(InputError) as caught:
            read_sounding(path)
        assert caught.value.problems[0].what == what
    binary = tmp_path / "b.csv"
    binary.write_bytes(b"\xff\xfe\x00bad")
    with pytest.raises(InputError) as caught:
        read_sounding(binary)
    assert caught.value.problems[0].what.startswith("is not UTF-8 text")


def test_the_demo_sounding_is_recognised_and_a_turnpoint_file_is_not():
    assert looks_like_sounding(DEMO / "vardmoor-sounding.csv")
    assert not looks_like_sounding(DEMO / "vardmoor.csv")
    assert read_sounding(DEMO / "vardmoor-sounding.csv").height_m[0] == 325.0


# ---------------------------------------------------------------- the task's [day] keys


def _day(tmp_path, **day) -> tuple[dict, Path]:
    (tmp_path / "s.csv").write_text(_csv(GOOD_ROWS))
    return {"day": {"sounding": "s.csv", **day}}, tmp_path / "task.toml"


def test_the_day_keys_with_their_defaults(tmp_path):
    document, task = _day(tmp_path, surface=[["10:00", 20.0, 9.0], ["15:00", 26.0, 10.0]])
    settings = read_day_sounding(document, task)
    assert settings.sounding_file == str(tmp_path / "s.csv")
    assert settings.surface.times_s == (36000.0, 54000.0) and settings.surface.dewpoint_c == (9.0, 10.0)
    assert settings.surface_elevation_m is None
    assert (settings.band_top_margin_m, settings.band_bottom_agl_m) == (200.0, 600.0)
    assert read_day_sounding({"day": {"band_top_m": 1800.0}}, task) is None


def test_bad_day_keys_are_all_reported_with_their_key(tmp_path):
    document, task = _day(tmp_path, surface=[["10:00", 20.0, 21.0], ["09:00", 26.0, 10.0], ["11:00", "warm", 3.0],
                                             ["25:00", 20.0, 5.0]],
                          band_top_margin_m=-5.0, surface_elevation_m="high")
    document["day"]["sounding"] = "nowhere.csv"
    with pytest.raises(InputError) as caught:
        read_day_sounding(document, task)
    found = {(p.where, p.what) for p in caught.value.problems}
    assert ("[day] sounding", f"no such file: {tmp_path / 'nowhere.csv'}") in found
    assert ("[day] surface[1]", "the dew point (21 C) is above the temperature (20 C)") in found
    assert ("[day] surface[2]", "times must increase: 09:00 is not after 10:00") in found
    assert ("[day] surface[3]", "must be [\"HH:MM\", temperature_c, dewpoint_c], got a list") in found
    assert ("[day] surface[4]", "expected a local time as HH:MM, got '25:00'") in found
    assert ("[day] band_top_margin_m", "must be in [0, 3000], got -5") in found
    assert ("[day] surface_elevation_m", "must be a number, got 'high'") in found
    document, task = _day(tmp_path)
    with pytest.raises(InputError) as caught:
        read_day_sounding(document, task)
    assert caught.value.problems[0].where == "[day] surface"


def test_a_sounding_that_does_not_reach_the_thermal_top_is_an_error_at_its_last_row(tmp_path):
    # The good rows end at 2030 m; a 30 C afternoon over an 18 C morning lifts thermals above it.
    (tmp_path / "task.toml").write_text('[day]\nsounding = "s.csv"\nsurface = [["12:00", 30.0, 5.0], '
                                        '["14:00", 31.0, 5.0]]\n')
    (tmp_path / "s.csv").write_text(_csv(GOOD_ROWS))
    with pytest.raises(InputError) as caught:
        load_derived_day(tmp_path / "task.toml")
    (problem,) = caught.value.problems
    assert problem.file == str(tmp_path / "s.csv") and problem.where == "row 6"
    assert problem.what.startswith("the sounding ends at 2030 m, below the thermal top at 12:00")


def test_a_surface_elevation_outside_the_sounding_is_an_error(tmp_path):
    (tmp_path / "task.toml").write_text('[day]\nsounding = "s.csv"\nsurface_elevation_m = 200.0\n'
                                        'surface = [["12:00", 20.0, 5.0], ["14:00", 21.0, 5.0]]\n')
    (tmp_path / "s.csv").write_text(_csv(GOOD_ROWS))
    with pytest.raises(InputError) as caught:
        load_derived_day(tmp_path / "task.toml")
    assert caught.value.problems[0].where == "[day] surface_elevation_m"


def test_the_task_reader_accepts_the_sounding_keys():
    from glidetask.formats.task_file import load_scenario

    scenario = load_scenario(DEMO / "vardmoor-forecast-day.toml")
    assert scenario.day_source is not None and scenario.day.band_top_profile is not None
