"""``glidetask sweep``: the contract 5.4 JSON, the readable table, and bad input."""

from __future__ import annotations

import json
import re
from pathlib import Path

import numpy as np
import pytest

from glidetask import cautions
from glidetask.cli import main
from glidetask.engine.compare import ballast_sweep
from glidetask.formats.task_file import load_scenario

ROOT = Path(__file__).resolve().parents[2]
TRIANGLE = str(ROOT / "demo_tasks" / "vardmoor-triangle-300.toml")
RIDGE = str(ROOT / "demo_tasks" / "vardmoor-ridge-final-glide.toml")
ERROR_LINE = re.compile(r"^glidetask: error: [^:]+: [^:]+: .+$")


@pytest.fixture(scope="module")
def triangle_json():
    import contextlib
    import io

    out = io.StringIO()
    with contextlib.redirect_stdout(out):
        assert main(["sweep", TRIANGLE, "--json"]) == 0
    return json.loads(out.getvalue())


def test_json_has_the_contract_keys_and_shapes(triangle_json):
    # Source: shared/CONTRACT.md 5.4, and the issue: at least 19 ballasts from empty to
    # the polar's maximum (170 kg for this example), strengths 0.5 ... 5.0 m/s.
    data = triangle_json
    ballast, strengths = data["ballast_kg"], data["thermal_strength_ms"]
    assert len(ballast) >= 19 and ballast[0] == 0.0 and ballast[-1] == pytest.approx(170.0)
    assert strengths == pytest.approx([0.5 * i for i in range(1, 11)])
    assert len(data["task_time_s"]) == len(strengths)
    assert all(len(row) == len(ballast) for row in data["task_time_s"])
    assert len(data["best_ballast_kg"]) == len(strengths)
    for row, best in zip(data["task_time_s"], data["best_ballast_kg"]):
        if best is None:
            assert all(t is None for t in row)  # no ballast finishes in this strength
        else:
            assert best in ballast and row[ballast.index(best)] is not None
    assert data["cautions"][:len(cautions.GENERAL)] == cautions.general()
    for key in ("achieved_climb_ms", "cruise_speed_kmh", "ballast_pays_from_ms", "full_ballast_from_ms"):
        assert key in data


def test_json_times_are_the_engines_sweep(triangle_json):
    # task_time_s[i][j]: strength i, ballast j, in seconds (null: not finished).
    sweep = ballast_sweep(load_scenario(TRIANGLE))
    times = np.array([[np.nan if t is None else t for t in row] for row in triangle_json["task_time_s"]])
    assert np.array_equal(np.isnan(times), np.isnan(sweep.task_time_s))
    finite = np.isfinite(times)
    # Tolerance: the JSON rounds to the second.
    assert times[finite] == pytest.approx(sweep.task_time_s[finite], abs=0.5)


def test_text_table_has_strengths_as_rows_and_ballast_as_columns(capsys, triangle_json):
    sweep = ballast_sweep(load_scenario(TRIANGLE))
    assert main(["sweep", TRIANGLE]) == 0
    text = capsys.readouterr().out
    lines = text.splitlines()
    header = next(line for line in lines if line.strip().startswith("thermal") and " 170" in line)
    assert header.split()[1:] == [f"{b:.0f}" for b in triangle_json["ballast_kg"]]
    for strength, best, row in zip(sweep.thermal_strength_ms, sweep.best_ballast_kg, sweep.task_time_s):
        line = next(x for x in lines if x.strip().startswith(f"{strength:.1f} m/s") and len(x.split()) > 10)
        cells = line.split()[2:]
        assert len(cells) == len(row)
        for cell, time, ballast in zip(cells, row, sweep.ballast_kg):
            if np.isnan(time):
                assert cell == "-"
            else:
                minutes = int(round(time / 60))  # H:MM rounded to the minute
                mark = "*" if ballast == best else ""
                assert cell == f"{mark}{minutes // 60}:{minutes % 60:02d}"
    assert "CAUTION" in text


def test_a_glider_without_water_sweeps_one_column(capsys):
    assert main(["sweep", RIDGE, "--json"]) == 0
    data = json.loads(capsys.readouterr().out)
    assert data["ballast_kg"] == [0.0]
    assert any("no water ballast" in c for c in data["cautions"])


def test_aviation_units(capsys):
    assert main(["sweep", TRIANGLE, "--units", "aviation"]) == 0
    text = capsys.readouterr().out
    # Source: 1 kt = 0.514444 m/s and 1 ft = 0.3048 m (contract section 6): 5.0 m/s = 9.7 kt;
    # the triangle's 250 m thermal radius = 820 ft
    assert "9.7 kt" in text and "820 ft" in text


def test_bad_task_file_exits_2_with_the_contract_line(capsys, tmp_path):
    missing = tmp_path / "nowhere.toml"
    assert main(["sweep", str(missing)]) == 2
    captured = capsys.readouterr()
    assert captured.out == "" and "Traceback" not in captured.err
    assert captured.err.strip() == f"glidetask: error: {missing}: file: no such file"
    broken = tmp_path / "broken.toml"
    broken.write_text("[task\n", encoding="utf-8")
    assert main(["sweep", str(broken)]) == 2
    lines = capsys.readouterr().err.strip().splitlines()
    assert lines and all(ERROR_LINE.match(line) for line in lines)


def test_json_and_text_give_the_best_ballast_by_thermal_size(capsys, triangle_json):
    # Source: issue 12 item 2: narrow, typical and broad thermals side by side (the engine's
    # sweep_by_thermal_size, checked in tests/engine/test_compare.py).
    from glidetask.engine.compare import sweep_by_thermal_size

    sweep = sweep_by_thermal_size(load_scenario(TRIANGLE))
    sizes = triangle_json["by_thermal_size"]
    assert [size["name"] for size in sizes] == ["narrow", "typical", "broad"]
    assert [size["thermal_radius_m"] for size in sizes] == pytest.approx([250.0 / 1.5, 250.0, 375.0], abs=0.05)
    for size, engine in zip(sizes, sweep.by_thermal_size):
        assert len(size["best_ballast_kg"]) == len(triangle_json["thermal_strength_ms"])
        assert [None if b is None else round(b, 2) for b in size["best_ballast_kg"]] == \
            [None if np.isnan(b) else round(float(b), 2) for b in engine.best_ballast_kg]
    assert sizes[1]["best_ballast_kg"] == triangle_json["best_ballast_kg"]
    assert main(["sweep", TRIANGLE]) == 0
    lines = capsys.readouterr().out.splitlines()
    start = next(i for i, line in enumerate(lines) if line.startswith("Best ballast by thermal size"))
    assert lines[start + 1].split() == ["thermal", "narrow", "167", "m", "typical", "250", "m", "broad", "375", "m"]
    row = next(line for line in lines[start:] if line.strip().startswith("5.0 m/s"))
    expected = [f"{b:.0f}" for b in (s.best_ballast_kg[-1] for s in sweep.by_thermal_size)]
    assert row.split()[2::2] == expected
