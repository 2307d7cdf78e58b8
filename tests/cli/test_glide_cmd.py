"""``glidetask glide``: the contract 5.2 JSON and its meanings, the verdict text, bad input."""

from __future__ import annotations

import importlib.util
import json
import math
import re
import subprocess
import sys
from pathlib import Path

import pytest
from geographiclib.geodesic import Geodesic

from glidetask import cautions
from glidetask.cli import main

ROOT = Path(__file__).resolve().parents[2]
CLUB = str(ROOT / "polars" / "club.toml")
RACING = str(ROOT / "polars" / "racing-15m.toml")
ERROR_LINE = re.compile(r"^glidetask: error: [^:]+: [^:]+: .+$")
CONTRACT_KEYS = ("required_height_m", "margin_m", "speed_to_fly_kmh", "ground_speed_kmh", "heading_deg",
                 "time_s", "ld_required", "ld_achievable", "mc_to_arrive_ms")


def _glide(capsys, *argv: str) -> dict:
    assert main(["glide", *argv, "--json"]) == 0
    return json.loads(capsys.readouterr().out)


def _polar(capsys, *argv: str) -> dict:
    assert main(["polar", *argv, "--json"]) == 0
    return json.loads(capsys.readouterr().out)


def _errors(capsys, *argv: str) -> list[str]:
    assert main(["glide", *argv]) == 2
    captured = capsys.readouterr()
    assert captured.out == "" and "Traceback" not in captured.err
    lines = captured.err.strip().splitlines()
    assert lines and all(ERROR_LINE.match(line) for line in lines), lines
    return lines


def test_json_has_every_contract_key_with_its_meaning(capsys):
    # Source: shared/CONTRACT.md 5.2 (definitions of each field).
    data = _glide(capsys, "--polar", RACING, "--distance-km", "45", "--height-m", "1800", "--course-deg", "120",
                  "--wind", "250/25", "--mc-ms", "1.5", "--arrival-elevation-m", "180", "--margin-m", "250")
    for key in CONTRACT_KEYS + ("cautions",):
        assert key in data
    assert data["margin_m"] == pytest.approx(1800.0 - data["required_height_m"], abs=1e-9)
    assert data["required_height_m"] == pytest.approx(180.0 + 250.0 + data["height_used_m"], abs=1e-9)
    assert data["ld_required"] == pytest.approx(45000.0 / (1800.0 - 180.0 - 250.0))
    assert data["time_s"] == pytest.approx(45000.0 / (data["ground_speed_kmh"] / 3.6))
    assert data["ld_achievable"] == pytest.approx(45000.0 / data["height_used_m"], rel=1e-9)
    assert data["ld_achievable"] == pytest.approx(data["ground_speed_kmh"] / 3.6 / data["sink_ms"], rel=1e-9)
    assert data["cautions"][:len(cautions.GENERAL)] == list(cautions.GENERAL)


def test_heading_and_ground_speed_close_the_wind_triangle(capsys):
    # Source: vector addition of air velocity and wind (air navigation), worked here.
    data = _glide(capsys, "--polar", CLUB, "--distance-km", "30", "--height-m", "1500", "--course-deg", "40",
                  "--wind", "300/30", "--mc-ms", "1")
    v, heading = data["speed_to_fly_kmh"], math.radians(data["heading_deg"])
    to = math.radians(300.0 + 180.0)
    east = v * math.sin(heading) + 30.0 * math.sin(to)
    north = v * math.cos(heading) + 30.0 * math.cos(to)
    assert math.degrees(math.atan2(east, north)) % 360.0 == pytest.approx(40.0, abs=1e-6)
    assert math.hypot(east, north) == pytest.approx(data["ground_speed_kmh"], rel=1e-9)


def test_required_height_at_mc_to_arrive_equals_the_height(capsys):
    # Source: shared/CONTRACT.md 5.2 (tolerance 1 m: the JSON is rounded by no one; 1 m is
    # far below any height a pilot reads).
    args = ["--polar", RACING, "--distance-km", "50", "--height-m", "2100", "--course-deg", "200",
            "--wind", "180/20", "--arrival-elevation-m", "150"]
    first = _glide(capsys, *args)
    assert 0.0 < first["mc_to_arrive_ms"] < 10.0
    again = _glide(capsys, *args, "--mc-ms", repr(first["mc_to_arrive_ms"]))
    assert again["required_height_m"] == pytest.approx(2100.0, abs=1.0)


def test_below_glide_has_null_mc_and_says_so(capsys):
    data = _glide(capsys, "--polar", CLUB, "--distance-km", "60", "--height-m", "1200")
    assert data["margin_m"] < 0.0 and data["mc_to_arrive_ms"] is None
    assert data["above_glide"] is False
    assert any("Below final glide" in c for c in data["cautions"])
    low = _glide(capsys, "--polar", CLUB, "--distance-km", "5", "--height-m", "150")
    assert low["ld_required"] is None  # no usable height above goal + margin


def test_still_air_glide_uses_height_times_glide_ratio_at_mid_glide_density(capsys):
    # Source: "distance = height x L/D" in still air at MacCready 0 (common practice); density
    # at the middle of the glide (contract section 3): start 5800 m, arrival 0 + 200 m ->
    # 3000 m, where ISO 2533 gives sigma = 0.7423 (from memory; 4 decimals, hence rel 1e-4).
    polar_3000 = _polar(capsys, CLUB, "--altitude-m", "3000")
    data = _glide(capsys, "--polar", CLUB, "--distance-km", "100", "--height-m", "5800")
    assert data["height_used_m"] == pytest.approx(100000.0 / polar_3000["best_ld"], rel=1e-9)
    assert data["speed_to_fly_kmh"] == pytest.approx(polar_3000["best_ld_speed_kmh"], rel=1e-9)
    assert data["speed_to_fly_ias_kmh"] == pytest.approx(data["speed_to_fly_kmh"] * math.sqrt(0.7423), rel=1e-4)


def test_positions_give_the_geodesic_distance_and_course(capsys):
    # Source: GeographicLib (C. F. F. Karney) as the independent geodesic reference, WGS84.
    data = _glide(capsys, "--polar", CLUB, "--from", "46.10,-33.20", "--to", "46.45,-32.55", "--height-m", "1900")
    line = Geodesic.WGS84.Inverse(46.10, -33.20, 46.45, -32.55)
    assert data["distance_km"] == pytest.approx(line["s12"] / 1000.0, abs=1e-6)
    assert data["course_deg"] == pytest.approx(line["azi1"] % 360.0, abs=1e-7)


def test_text_verdicts(capsys):
    args = ["--polar", CLUB, "--distance-km", "40", "--height-m", "1500", "--course-deg", "90", "--wind", "270/20",
            "--mc-ms", "1"]
    data = _glide(capsys, *args)
    assert main(["glide", *args]) == 0
    text = capsys.readouterr().out
    assert f"ABOVE final glide by {data['margin_m']:,.0f} m at MacCready 1.0 m/s" in text
    assert f"required height      {data['required_height_m']:,.0f} m" in text
    assert f"speed to fly         {data['speed_to_fly_kmh']:.0f} km/h" in text
    assert f"ground speed         {data['ground_speed_kmh']:.0f} km/h" in text
    assert f"heading              {data['heading_deg']:03.0f} deg" in text
    assert f"required 1:{data['ld_required']:.1f}, achievable 1:{data['ld_achievable']:.1f}" in text
    assert f"MacCready to arrive  {data['mc_to_arrive_ms']:.1f} m/s" in text
    assert "CAUTION" in text
    below = ["--polar", CLUB, "--distance-km", "60", "--height-m", "1500", "--course-deg", "270", "--wind", "270/20"]
    data = _glide(capsys, *below)
    assert main(["glide", *below, "--units", "aviation"]) == 0
    text = capsys.readouterr().out
    # Source: 1 ft = 0.3048 m (international definition).
    assert (f"BELOW final glide by {-data['margin_m'] / 0.3048:,.0f} ft at MacCready 0.0 kt: "
            f"need {data['required_height_m'] / 0.3048:,.0f} ft") in text


def test_out_of_reach_is_a_result_not_an_error(capsys):
    data = _glide(capsys, "--polar", CLUB, "--distance-km", "20", "--height-m", "2000", "--wind", "0/300")
    assert data["reachable"] is False and data["required_height_m"] is None
    assert any("cannot be reached" in c for c in data["cautions"])


@pytest.mark.parametrize("argv, where", [
    (["--distance-km", "-4", "--height-m", "1500"], "--distance-km"),
    (["--distance-km", "40", "--height-m", "1500", "--wind", "270-20"], "--wind"),
    (["--distance-km", "40", "--height-m", "1500", "--wind", "400/20"], "--wind"),
    (["--distance-km", "40", "--height-m", "1500", "--ballast-kg", "10"], "--ballast-kg"),  # club: no water
    (["--distance-km", "40", "--height-m", "1500", "--pilot-kg", "150"], "--pilot-kg"),  # 390 kg > 380 kg
    (["--height-m", "1500"], "--distance-km"),
    (["--height-m", "1500", "--from", "60,-30"], "--to"),
    (["--height-m", "1500", "--from", "60,-30", "--to", "61,-30", "--distance-km", "5"], "--distance-km"),
    (["--distance-km", "40", "--height-m", "1500", "--terrain", "x.tif"], "--terrain"),
    (["--distance-km", "40", "--height-m", "1500", "--mc-ms", "inf"], "--mc-ms"),
    (["--distance-km", "40", "--height-m", "1500", "--margin-m", "-5"], "--margin-m"),
])
def test_bad_options_exit_2(capsys, argv, where):
    lines = _errors(capsys, "--polar", CLUB, *argv)
    assert any(f": command line: {where}: " in line for line in lines), lines


def test_bad_polar_file_and_bad_options_are_reported_together(capsys, tmp_path):
    path = tmp_path / "p.toml"
    path.write_text("[glider]\nwing_area_m2 = 0\n[polar]\npoints = []\n", encoding="utf-8")
    lines = _errors(capsys, "--polar", str(path), "--distance-km", "-1", "--height-m", "1000")
    assert any(line.startswith(f"glidetask: error: {path}: [glider] wing_area_m2: ") for line in lines)
    assert any(line.startswith(f"glidetask: error: {path}: [polar] points: ") for line in lines)
    assert any(": command line: --distance-km: " in line for line in lines)


def test_whole_process_bad_option_gives_exit_2_and_no_traceback():
    result = subprocess.run([sys.executable, "-m", "glidetask", "glide", "--polar", CLUB, "--distance-km", "-1",
                             "--height-m", "1000", "--wind", "west"], cwd=ROOT, capture_output=True, text=True,
                            timeout=60, env={"PYTHONPATH": str(ROOT), "PATH": "/usr/bin:/bin"})
    assert result.returncode == 2
    assert "Traceback" not in result.stderr
    assert result.stderr.splitlines() == [
        "glidetask: error: command line: --distance-km: must be at least 0, got -1",
        "glidetask: error: command line: --wind: expected FROM_DEG/SPEED_KMH like 270/20, got 'west'",
    ]


@pytest.mark.skipif(importlib.util.find_spec("glidetask.commands.glide_terrain") is None,
                    reason="the terrain check (glidetask.commands.glide_terrain) is not in this tree yet")
def test_terrain_check_adds_the_terrain_cautions(capsys):
    data = _glide(capsys, "--polar", CLUB, "--from", "46.00,-33.00", "--to", "46.60,-33.20", "--height-m", "2500",
                  "--terrain", str(ROOT / "demo_tasks" / "terrain.tif"))
    for key in CONTRACT_KEYS:
        assert key in data
    assert all(c in data["cautions"] for c in cautions.TERRAIN)
