"""``glidetask odds``: the simulated days as text and JSON, and bad input."""

from __future__ import annotations

import json
import re
from pathlib import Path

import pytest

from glidetask import cautions
from glidetask.cli import main

ROOT = Path(__file__).resolve().parents[2]
TRIANGLE = str(ROOT / "demo_tasks" / "vardmoor-triangle-300.toml")
ERROR_LINE = re.compile(r"^glidetask: error: [^:]+: [^:]+: .+$")


def _json(capsys, *argv: str) -> dict:
    assert main(["odds", TRIANGLE, *argv, "--json"]) == 0
    return json.loads(capsys.readouterr().out)


def _errors(capsys, *argv: str) -> list[str]:
    assert main(["odds", *argv]) == 2
    captured = capsys.readouterr()
    assert captured.out == "" and "Traceback" not in captured.err
    lines = captured.err.strip().splitlines()
    assert lines and all(ERROR_LINE.match(line) for line in lines), lines
    return lines


def test_json_keys_and_meanings(capsys):
    data = _json(capsys, "--runs", "300", "--seed", "5")
    assert data["runs"] == 300 and data["seed"] == 5
    assert data["cautions"][:len(cautions.GENERAL)] == cautions.general()
    assert [c["ballast_kg"] for c in data["choices"]] == [0.0, 85.0, 170.0]  # empty, half, full (170 kg)
    legs = data["task"]["legs"]
    assert [leg["leg"] for leg in legs] == [1, 2, 3]
    for choice in data["choices"]:
        assert choice["runs"] == 300
        # finish_probability: the share of days finished; its binomial standard error
        p = choice["finish_probability"]
        assert p == pytest.approx(choice["finished_runs"] / 300, abs=1e-4)
        assert choice["finish_probability_se"] == pytest.approx((p * (1 - p) / 300) ** 0.5, abs=1e-4)
        times = choice["task_time_s"]
        assert times["p10"] <= times["p50"] <= times["p90"]
        assert sum(leg["count"] for leg in choice["landouts_by_leg"]) == 300 - choice["finished_runs"]
        assert sum(choice["landouts_by_reason"].values()) == 300 - choice["finished_runs"]
    for key in ("climb_log_sd", "wind_speed_sd_kmh", "wind_direction_sd_deg", "lift_end_sd_s",
                "thermal_search_mean_km"):
        assert key in data["assumptions"]


def test_the_same_seed_gives_the_same_json(capsys):
    first = _json(capsys, "--runs", "200", "--seed", "9")
    assert _json(capsys, "--runs", "200", "--seed", "9") == first


def test_ballast_choices_from_the_command_line(capsys):
    data = _json(capsys, "--runs", "50", "--ballast-kg", "40", "--ballast-kg", "120")
    assert [c["ballast_kg"] for c in data["choices"]] == [40.0, 120.0]
    assert data["choices"][1]["mass_kg"] == pytest.approx(255.0 + 85.0 + 120.0)


def test_text_output(capsys):
    assert main(["odds", TRIANGLE, "--runs", "200", "--seed", "2"]) == 0
    text = capsys.readouterr().out
    assert "Odds of getting home: Vardmoor 300 km triangle" in text
    assert "200 simulated days" in text and "seed 2" in text
    assert "Land-outs by leg" in text and "1 Vardmoor Aerodrome > Kellow Hill" in text
    assert "not a forecast" in text and "CAUTION" in text


@pytest.mark.parametrize("argv, where, what", [
    (["--runs", "0"], "--runs", "must be at least 1, got 0"),
    (["--runs", "-5"], "--runs", "must be at least 1, got -5"),
    (["--seed", "-1"], "--seed", "must be 0 or more, got -1"),
    (["--ballast-kg", "-10"], "--ballast-kg", "must be a finite number of 0 kg or more, got -10"),
])
def test_bad_options_exit_2_with_the_contract_line(capsys, argv, where, what):
    lines = _errors(capsys, TRIANGLE, *argv)
    assert f"glidetask: error: command line: {where}: {what}" in lines


def test_ballast_above_the_maximum_is_refused(capsys):
    # Source: contract 2.1: ballast at most max_ballast_kg (170 kg for this polar).
    lines = _errors(capsys, TRIANGLE, "--ballast-kg", "50", "--ballast-kg", "200")
    assert len(lines) == 1 and lines[0].startswith("glidetask: error: command line: --ballast-kg: ballast 200 kg")


def test_every_problem_is_reported_together(capsys, tmp_path):
    missing = tmp_path / "none.toml"
    lines = _errors(capsys, str(missing), "--runs", "0", "--seed", "-2")
    assert len(lines) == 3 and any(str(missing) in line for line in lines)


def test_a_usage_error_exits_2(capsys):
    assert main(["odds", TRIANGLE, "--runs", "many"]) == 2
    assert "usage:" in capsys.readouterr().err


def test_json_finish_against_thermal_spacing(capsys):
    # Source: issue 12 item 6: the finishing odds at 0.5, 1, 2 and 4 times the day's
    # thermal spacing (Allen 2006, from memory: zi / 1.2 between thermals met along a track).
    data = _json(capsys, "--runs", "200", "--seed", "3")
    spacing = data["thermal_spacing"]
    assert [row["factor"] for row in spacing] == [0.5, 1.0, 2.0, 4.0]
    day_km = data["assumptions"]["thermal_search_mean_km"]
    assert day_km == pytest.approx((2.2 - 0.265) / 1.2, abs=1e-3)  # the triangle's 1.935 km layer
    assert "Allen (2006)" in data["assumptions"]["thermal_search_source"]
    for row in spacing:
        assert row["thermal_search_mean_km"] == pytest.approx(day_km * row["factor"], abs=0.0005 * (1 + row["factor"]))  # each rounded to 1 m
        assert [c["ballast_kg"] for c in row["choices"]] == [c["ballast_kg"] for c in data["choices"]]
    own = spacing[1]["choices"]
    assert [c["finish_probability"] for c in own] == [c["finish_probability"] for c in data["choices"]]
    # With --spread 0 every day is the forecast: no search, no table.
    assert _json(capsys, "--runs", "5", "--spread", "0")["thermal_spacing"] == []


def test_text_shows_the_spacing_table(capsys):
    assert main(["odds", TRIANGLE, "--runs", "100", "--seed", "2"]) == 0
    text = capsys.readouterr().out
    assert "Finish against thermal spacing" in text
    assert re.search(r"^\s+4 x\s+6\.5 km(\s+\d+\.\d %){3}$", text, re.M)
    assert "1 day in 10 the lift ends 1-2 h early" in text
