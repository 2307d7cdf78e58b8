"""``glidetask plan``: the text plan, the contract JSON, units, what-ifs and bad input."""

from __future__ import annotations

import json
import re
from pathlib import Path

import pytest

from glidetask import cautions
from glidetask.cli import main
from glidetask.units import FOOT, KNOT, NAUTICAL_MILE

ROOT = Path(__file__).resolve().parents[2]
DEMO = ROOT / "demo_tasks"
TRIANGLE = str(DEMO / "vardmoor-triangle-300.toml")
RIDGE = str(DEMO / "vardmoor-ridge-final-glide.toml")
ERROR_LINE = re.compile(r"^glidetask: error: [^:]+: [^:]+: .+$")  # contract section 7


def _plan(capsys, *argv: str) -> dict:
    assert main(["plan", *argv, "--json"]) == 0
    return json.loads(capsys.readouterr().out)


def _errors(capsys, *argv: str) -> list[str]:
    assert main(["plan", *argv]) == 2
    captured = capsys.readouterr()
    assert captured.out == "" and "Traceback" not in captured.err
    lines = captured.err.strip().splitlines()
    assert lines and all(ERROR_LINE.match(line) for line in lines)
    return lines


@pytest.mark.parametrize("task", sorted(p.name for p in DEMO.glob("*.toml")))
def test_every_demo_task_plans_to_a_finish(capsys, task):
    data = _plan(capsys, str(DEMO / task))
    assert data["finished"] is True
    # A credible day for a club or racing glider: 50-130 km/h over 2-5 hours (common practice).
    assert 50.0 < data["task_speed_kmh"] < 130.0
    assert 2 * 3600 < data["total_time_s"] < 5 * 3600
    assert data["cautions"][:len(cautions.GENERAL)] == list(cautions.GENERAL)


def test_text_plan_shows_legs_totals_heights_verdict_and_cautions(capsys):
    assert main(["plan", TRIANGLE]) == 0
    text = capsys.readouterr().out
    data = _plan(capsys, TRIANGLE)
    assert data["task"]["name"] in text
    for leg in data["legs"]:
        assert f"{leg['from']} > {leg['to']}"[:30] in text
        assert f"{leg['distance_km']:.1f}" in text
        assert f"{leg['arrival_height_m']:.0f}" in text
    assert f"finish {data['finish_time']}" in text
    assert f"FINISHED at {data['finish_time']}" in text
    assert f"{data['final_glide']['start_height_m']:.0f} m" in text
    assert "Heights needed to final-glide home" in text
    # The circling model's default margin, shown with the other practical defaults (common practice).
    assert "centring 30 s a climb, detour 5 %, circling at 1.15 x the banked stall speed (common practice)" in text
    for caution in cautions.GENERAL:
        assert caution in text


def test_aviation_units_convert_every_column(capsys):
    # Source: contract section 6 - NM, ft, kt; 1 NM = 1852 m, 1 ft = 0.3048 m, 1 kt = 0.514444 m/s.
    from glidetask.engine.plan import plan
    from glidetask.formats.task_file import load_scenario

    assert main(["plan", TRIANGLE, "--units", "aviation"]) == 0
    text = capsys.readouterr().out
    leg = plan(load_scenario(TRIANGLE)).legs[0]
    row = next(line for line in text.splitlines() if line.strip().startswith("1 ")).split()
    assert f"{leg.distance_m / NAUTICAL_MILE:.1f}" in row
    assert f"{leg.arrival_height_m / FOOT:.0f}" in row
    assert "above" in row and leg.required_height_m > load_scenario(TRIANGLE).day.band_top_m  # no final glide from there
    assert f"{leg.airspeed_ms / KNOT:.0f}" in row and f"{leg.average_speed_ms / KNOT:.0f}" in row
    assert f"{leg.indicated_airspeed_ms / KNOT:.0f}" in row
    assert f"{leg.climb_ms / KNOT:.1f}" in row
    assert " NM " in text and " ft" in text and " kt" in text


def test_what_ifs_change_the_plan(capsys):
    base = _plan(capsys, TRIANGLE)
    heavier = _plan(capsys, TRIANGLE, "--ballast-kg", "160")
    assert heavier["glider"]["mass_kg"] == pytest.approx(base["glider"]["mass_kg"] + 60.0)
    bugs = _plan(capsys, TRIANGLE, "--bugs-percent", "15")
    assert bugs["total_time_s"] > base["total_time_s"]  # bugs only ever cost time
    later = _plan(capsys, TRIANGLE, "--start", "13:00")
    assert later["start_time"] == "13:00" and later["legs"][0]["start_time"] == "13:00"
    fixed = _plan(capsys, TRIANGLE, "--mc-ms", "1.0")
    assert all(leg["mc_ms"] == 1.0 for leg in fixed["legs"] if not leg["final_glide"])
    windy = _plan(capsys, TRIANGLE, "--wind", "250/30")
    assert windy["day"]["wind"] == {"from_deg": 250.0, "speed_kmh": 30.0}


def test_wind_too_strong_is_a_result_with_exit_0(capsys):
    # Contract section 7: a task that cannot be completed is a result, exit 0.
    data = _plan(capsys, TRIANGLE, "--wind", "250/200")
    assert data["finished"] is False and data["finish_time"] is None
    assert data["landout_km"] is not None
    assert any("too strong" in c for c in data["cautions"])
    assert main(["plan", TRIANGLE, "--wind", "250/200"]) == 0
    assert "ENDS SHORT" in capsys.readouterr().out


@pytest.mark.parametrize("options, where, what", [
    (["--ballast-kg", "200"], "--ballast-kg", "outside 0-170 kg"),
    (["--ballast-kg", "-5"], "--ballast-kg", "at least 0"),
    (["--start", "19:00"], "--start", "must be before lift ends (18:15)"),
    (["--start", "noon"], "--start", "HH:MM"),
    (["--wind", "270"], "--wind", "FROM_DEG/SPEED_KMH"),
    (["--mc-ms", "12"], "--mc-ms", "at most 10"),
    (["--bugs-percent", "-1"], "--bugs-percent", "at least 0"),
    (["--wind", "270/900"], "--wind", "the wind speed must be 0-200 km/h, got 900"),
])
def test_bad_what_ifs_exit_2_with_the_contract_line(capsys, options, where, what):
    lines = _errors(capsys, TRIANGLE, *options)
    assert any(line.startswith(f"glidetask: error: command line: {where}: ") and what in line for line in lines)


def test_every_problem_is_reported_together(capsys):
    lines = _errors(capsys, TRIANGLE, "--ballast-kg", "200", "--start", "19:00", "--wind", "x")
    assert {line.split(": ")[3] for line in lines} == {"--ballast-kg", "--start", "--wind"}


def test_a_missing_task_file_is_an_input_error(capsys, tmp_path):
    lines = _errors(capsys, str(tmp_path / "nope.toml"))
    assert lines == [f"glidetask: error: {tmp_path / 'nope.toml'}: file: no such file"]


def test_an_inconsistent_day_in_the_file_is_an_input_error(capsys, tmp_path):
    text = Path(TRIANGLE).read_text(encoding="utf-8").replace('start_time = "12:15"', 'start_time = "18:30"')
    text = text.replace('turnpoints = "vardmoor.geojson"', f'turnpoints = "{DEMO / "vardmoor.geojson"}"')
    text = text.replace('polar = "../polars/racing-15m.toml"', f'polar = "{ROOT / "polars" / "racing-15m.toml"}"')
    text = text.replace('file = "terrain.tif"', f'file = "{DEMO / "terrain.tif"}"')
    task = tmp_path / "late.toml"
    task.write_text(text, encoding="utf-8")
    lines = _errors(capsys, str(task))
    assert any("[day] start_time" in line and "before lift_ends" in line for line in lines)


def test_need_only_within_the_band_and_where_a_final_glide_from_its_top_starts(capsys):
    # Source: issue 12 item 7 ("Need" only where it is a final glide within the band); the
    # distance by linear interpolation of the heights needed, exact for a pure glide at one
    # setting in one wind (height used in proportion to distance, contract 3).
    from glidetask.engine.plan import plan
    from glidetask.formats.task_file import load_scenario

    p = plan(load_scenario(RIDGE))
    top = p.scenario.day.band_top_m
    assert main(["plan", RIDGE]) == 0
    text = capsys.readouterr().out
    rows = [line for line in text.splitlines() if re.match(r"^\s+\d ", line)][:len(p.legs)]
    for row, leg in zip(rows, p.legs):
        assert (" above " in row) == (leg.required_height_m > top)
        if leg.required_height_m <= top:
            assert f" {leg.required_height_m:.0f} " in row
    to_go = p.planned_distance_m - p.path.cumulative_m
    need = [leg.required_height_m for leg in p.legs] + [p.arrival_floor_m]
    i = max(k for k in range(len(need)) if need[k] > top)  # the last point that needs more than the top
    x = to_go[i + 1] + (to_go[i] - to_go[i + 1]) * (top - need[i + 1]) / (need[i] - need[i + 1])
    assert f"final glide from {x / 1000:.1f} km at band top ({top:.0f} m)" in text
