"""``glidetask day``: the contract 2.7 JSON, the text table, bad input, and MetPy kept off
the other commands' path."""

from __future__ import annotations

import contextlib
import io
import json
import os
import re
import subprocess
import sys
from pathlib import Path

import pytest

from glidetask import cautions
from glidetask.cli import main

ROOT = Path(__file__).resolve().parents[2]
FORECAST = str(ROOT / "demo_tasks" / "vardmoor-forecast-day.toml")
TRIANGLE = str(ROOT / "demo_tasks" / "vardmoor-triangle-300.toml")
ERROR_LINE = re.compile(r"^glidetask: error: [^:]+: [^:]+: .+$")
HOUR_KEYS = {"time", "thermal_top_m", "cloud_base_m", "cumulus", "band_top_m", "band_bottom_m", "thermal_strength_ms"}


def _run(argv) -> tuple[int, str, str]:
    out, err = io.StringIO(), io.StringIO()
    with contextlib.redirect_stdout(out), contextlib.redirect_stderr(err):
        code = main(argv)
    return code, out.getvalue(), err.getvalue()


@pytest.fixture(scope="module")
def day_json():
    code, out, _ = _run(["day", FORECAST, "--json"])
    assert code == 0
    return json.loads(out)


def test_json_has_the_contract_keys(day_json):
    # Source: shared/CONTRACT.md 2.7.
    hours = day_json["hours"]
    assert [h["time"] for h in hours] == [f"{h:02d}:00" for h in range(8, 20)]
    for hour in hours:
        assert HOUR_KEYS <= set(hour)
        assert isinstance(hour["cumulus"], bool)
        assert (hour["cloud_base_m"] is None) is (not hour["cumulus"])
        if hour["cumulus"]:
            assert hour["cloud_base_m"] < hour["thermal_top_m"]
        if hour["band_top_m"] is not None:
            # Source: contract 2.7: the band from the lower of base and top less the margin,
            # and the ground plus the task's band_bottom_agl_m (700 m over 325 m).
            assert hour["band_top_m"] == pytest.approx(min(hour["cloud_base_m"] or 1e9, hour["thermal_top_m"]) - 200.0)
            assert hour["band_bottom_m"] == pytest.approx(1025.0)
    assert {"height_m", "from_deg", "speed_kmh"} == set(day_json["wind"][0])
    assert day_json["wind"][0] == {"height_m": 325.0, "from_deg": 250.0, "speed_kmh": pytest.approx(8.0)}
    assert set(cautions.GENERAL) <= set(day_json["cautions"]) and cautions.SOUNDING[0] in day_json["cautions"]


def test_the_demo_day_is_a_plausible_soaring_day_and_the_plan_flies_it(day_json):
    # Source (common practice): a good day over a temperate plain: lift from mid-morning to
    # early evening, cloud base 1600-2300 m, thermals of 2-4 m/s at their best. The demo
    # task types none of the derived keys: its plan's day is the derived day, rounded as a
    # pilot types it (heights to the metre, the lift's end down to the minute).
    from glidetask.formats.task_file import load_scenario

    hours = {h["time"]: h for h in day_json["hours"]}
    assert "09:00" <= day_json["lift_start"] <= "10:30" and "17:30" <= day_json["lift_end"] <= "18:30"
    assert 1600.0 <= hours["14:00"]["cloud_base_m"] <= 2300.0
    assert 2.0 <= max(h["thermal_strength_ms"] for h in hours.values()) <= 4.0
    day = load_scenario(FORECAST).day
    assert day.band_top_m == round(max(h["band_top_m"] for h in hours.values() if h["band_top_m"] is not None))
    assert float(day.band_top_at(14 * 3600.0)) == round(hours["14:00"]["band_top_m"])
    assert day.band_bottom_m == hours["14:00"]["band_bottom_m"]
    assert day.lift_ends_s / 60.0 == pytest.approx(int(day_json["lift_end"][:2]) * 60 + int(day_json["lift_end"][3:]))


def test_text_output_has_the_table_the_wind_and_the_cautions():
    code, out, err = _run(["day", FORECAST])
    assert code == 0 and err == ""
    assert "Thermal" in out and "cumulus" in out and "Lift      09:" in out
    assert "Wind from the sounding" in out and "CAUTION" in out and cautions.GENERAL[0] in out
    code, aviation, _ = _run(["day", FORECAST, "--units", "aviation"])
    assert code == 0 and "ft" in aviation and "kt" in aviation


def test_a_task_without_a_sounding_is_an_error_naming_the_key():
    code, out, err = _run(["day", TRIANGLE])
    assert code == 2 and out == ""
    lines = err.strip().splitlines()
    assert len(lines) == 1 and ERROR_LINE.match(lines[0]) and "[day] sounding: missing key" in lines[0]


def test_a_bad_sounding_exits_2_with_every_problem(tmp_path):
    (tmp_path / "s.csv").write_text("pressure_hpa,height_m,temperature_c,dewpoint_c,wind_from_deg,wind_speed_kmh\n"
                                    "970,350,18,19,250,10\n960,300,17,5,250,10\n")
    (tmp_path / "t.toml").write_text('[day]\nsounding = "s.csv"\nsurface = [["12:00", 20.0, 5.0], ["14:00", 21.0, 5.0]]\n')
    code, out, err = _run(["day", str(tmp_path / "t.toml"), "--json"])
    lines = err.strip().splitlines()
    assert code == 2 and out == "" and all(ERROR_LINE.match(line) for line in lines)
    assert any("row 1: the dew point" in line for line in lines)
    assert any("row 2: heights must increase" in line for line in lines)
    assert any("at least 5 levels" in line for line in lines)


def _fresh(script: str) -> str:
    result = subprocess.run([sys.executable, "-c", script], cwd=ROOT, capture_output=True, text=True,
                            env={**os.environ, "PYTHONPATH": str(ROOT)}, timeout=120)
    assert result.returncode == 0, result.stderr
    return result.stdout.strip().splitlines()[-1]


@pytest.mark.parametrize("argv", [
    ["plan", TRIANGLE, "--json"],
    ["polar", str(ROOT / "polars" / "club.toml"), "--json"],
])
def test_plan_and_polar_import_no_metpy(argv):
    # Speed: MetPy (with pint, xarray, pandas) costs about twice the bare numpy + scipy +
    # pyproj start-up; only `glidetask day` and tasks whose day comes from a sounding may
    # pay for it. Checked in a fresh interpreter.
    script = ("import contextlib, io, sys\n"
              "from glidetask.cli import main\n"
              "with contextlib.redirect_stdout(io.StringIO()):\n"
              f"    code = main({argv!r})\n"
              "print(code, 'metpy' in sys.modules)\n")
    assert _fresh(script) == "0 False"


@pytest.mark.parametrize("command", ["day", "plan"])
def test_the_day_command_and_a_task_with_a_sounding_do_use_metpy(command):
    script = ("import contextlib, io, sys\n"
              "from glidetask.cli import main\n"
              "with contextlib.redirect_stdout(io.StringIO()):\n"
              f"    code = main([{command!r}, {FORECAST!r}, '--json'])\n"
              "print(code, 'metpy' in sys.modules)\n")
    assert _fresh(script) == "0 True"


def test_check_reads_a_sounding_and_a_tasks_sounding_keys(tmp_path):
    code, out, err = _run(["check", FORECAST, str(ROOT / "demo_tasks" / "vardmoor-sounding.csv"), "--json"])
    assert code == 0 and err == ""
    task, sounding = json.loads(out)
    assert task["sounding"]["levels"] == 19 and task["sounding"]["surface_from"] == "08:00"
    assert sounding["kind"] == "sounding" and sounding["height_range_m"] == [325.0, 10000.0]
    text = (ROOT / "demo_tasks" / "vardmoor-forecast-day.toml").read_text()
    bad = tmp_path / "task.toml"
    bad.write_text(text.replace('"vardmoor-sounding.csv"', '"s.csv"').replace('"vardmoor.geojson"', '"nowhere.geojson"'))
    (tmp_path / "s.csv").write_text("pressure_hpa,height_m,temperature_c,dewpoint_c,wind_from_deg,wind_speed_kmh\n"
                                    "970,350,18,9,250,10\n")
    code, _, err = _run(["check", str(bad)])
    lines = err.strip().splitlines()
    assert code == 2 and all(ERROR_LINE.match(line) for line in lines)
    assert any("[task] turnpoints: no such file" in line for line in lines)  # the task's problems
    assert any("s.csv: file: a sounding needs at least 5 levels" in line for line in lines)  # and the sounding's


def test_a_day_that_never_triggers_says_so(tmp_path):
    (tmp_path / "s.csv").write_text("pressure_hpa,height_m,temperature_c,dewpoint_c,wind_from_deg,wind_speed_kmh\n"
                                    "970,350,18,9,250,10\n948,550,19,7,255,14\n915,850,19.5,5,260,18\n"
                                    "880,1180,19,2,265,20\n845,1520,17,-1,270,22\n795,2030,14,-6,270,25\n")
    (tmp_path / "t.toml").write_text('[day]\nsounding = "s.csv"\nsurface = [["12:00", 19.0, 5.0], ["16:00", 20.0, 5.0]]\n')
    code, out, _ = _run(["day", str(tmp_path / "t.toml"), "--json"])
    data = json.loads(out)
    assert code == 0 and data["lift_start"] is None and data["lift_end"] is None
    assert all(h["thermal_strength_ms"] == 0.0 and h["band_top_m"] is None for h in data["hours"])
    assert any(text.startswith("No usable thermals") for text in data["cautions"])
    code, out, _ = _run(["day", str(tmp_path / "t.toml")])
    assert code == 0 and "Lift      none" in out and "CAPE      not judged" in out
