"""``glidetask check FILE...``: summaries of good files, every problem of bad ones, exit 0 or 2."""

from __future__ import annotations

import json
import re
from pathlib import Path

import pytest

from glidetask.cli import main
from glidetask.engine.polar import scaled_polar
from glidetask.engine.task import nominal_distance_m
from glidetask.engine.task_search import area_distance_range, optimized_path
from glidetask.formats.polar_file import load_polar_spec
from glidetask.formats.task_file import load_scenario
from glidetask.units import NAUTICAL_MILE

ROOT = Path(__file__).resolve().parents[2]
DEMO = ROOT / "demo_tasks"
ERROR_LINE = re.compile(r"^glidetask: error: [^:]+: [^:]+: .+$")


def _demo_files():
    return sorted(str(p) for p in DEMO.iterdir())


def _run(capsys, *argv):
    status = main(["check", *argv])
    captured = capsys.readouterr()
    assert "Traceback" not in captured.err
    return status, captured.out, captured.err


def test_the_whole_demo_folder_passes(capsys):
    status, out, err = _run(capsys, *_demo_files(), *(str(p) for p in (ROOT / "polars").glob("*.toml")))
    assert status == 0 and err == ""
    assert "make_terrain.py: skipped (not a glidetask file)" in out
    assert "vardmoor.geojson: turnpoints, ok" in out and "vardmoor.csv: turnpoints, ok" in out
    for task in DEMO.glob("*.toml"):
        assert f"{task.name}: task, ok" in out
    assert "club.toml: polar, ok" in out


def test_json_results_carry_the_engine_figures(capsys):
    status, out, _ = _run(capsys, *_demo_files(), str(ROOT / "polars" / "club.toml"), "--json")
    assert status == 0
    results = {Path(r["file"]).name: r for r in json.loads(out)}
    assert all(r["ok"] and r["problems"] == [] for r in results.values())
    for name in ("vardmoor-triangle-300.toml", "vardmoor-area-3h.toml"):
        task = load_scenario(DEMO / name).task
        result = results[name]
        assert result["kind"] == "task" and result["task_kind"] == task.kind
        assert result["nominal_distance_km"] == pytest.approx(nominal_distance_m(task) / 1000.0)
        assert result["optimized_distance_km"] == pytest.approx(optimized_path(task).total_m / 1000.0)
        assert result["cautions"]
    low, high = area_distance_range(load_scenario(DEMO / "vardmoor-area-3h.toml").task)
    area = results["vardmoor-area-3h.toml"]
    assert (area["min_distance_km"], area["max_distance_km"]) == pytest.approx((low / 1000.0, high / 1000.0))
    assert area["min_time_s"] == 180 * 60.0
    points = results["vardmoor.geojson"]
    assert points["count"] >= 45 and points["landable"] >= 19
    assert points["landable_by_kind"]["airfield"] >= 7 and points["landable_by_kind"]["field"] >= 12
    spec = load_polar_spec(ROOT / "polars" / "club.toml")
    assert results["club.toml"]["best_ld"] == pytest.approx(scaled_polar(spec, spec.reference_mass_kg).best_ld)
    assert results["make_terrain.py"]["kind"] == "skipped"
    terrain = results["terrain.tif"]
    if terrain.get("checked"):
        assert terrain["bounds"] == pytest.approx([-35.5, 45.0, -31.5, 47.5])
        assert terrain["crs"] == "EPSG:4326"


def test_text_summary_numbers(capsys):
    task = load_scenario(DEMO / "vardmoor-triangle-300.toml").task
    _, out, _ = _run(capsys, str(DEMO / "vardmoor-triangle-300.toml"))
    assert f"optimized {optimized_path(task).total_m / 1000.0:.1f} km" in out
    assert f"nominal {nominal_distance_m(task) / 1000.0:.1f} km" in out
    assert "Planning aid only" in out
    _, out, _ = _run(capsys, str(DEMO / "vardmoor-triangle-300.toml"), "--units", "aviation")
    assert f"optimized {optimized_path(task).total_m / NAUTICAL_MILE:.1f} NM" in out


def test_bad_files_list_every_problem_and_exit_2(capsys, tmp_path):
    bad_points = tmp_path / "bad.csv"
    bad_points.write_text("name,lat,lon,elevation_m\nA,95,0,1\nA,0,0,x\n")
    neither = tmp_path / "other.toml"
    neither.write_text("[colours]\nsky = \"blue\"\n")
    status, out, err = _run(capsys, str(bad_points), str(DEMO / "vardmoor.csv"), str(neither),
                            str(tmp_path / "missing.geojson"))
    assert status == 2
    lines = err.strip().splitlines()
    assert all(ERROR_LINE.match(line) for line in lines)
    assert f"glidetask: error: {bad_points}: line 2: lat must be in [-90, 90], got 95" in lines
    assert f"glidetask: error: {bad_points}: line 3: elevation_m must be a number, got 'x'" in lines
    assert any(str(neither) in line and "neither a task" in line for line in lines)
    assert any("missing.geojson" in line and "no such file" in line for line in lines)
    assert "vardmoor.csv: turnpoints, ok" in out  # good files are still summarised
    assert "bad.csv: turnpoints, 2 problem(s)" in out


def test_json_with_problems(capsys, tmp_path):
    task = tmp_path / "task.toml"
    task.write_text("[task]\nkind = \"relay\"\n")
    status, out, err = _run(capsys, str(task), "--json")
    assert status == 2
    (result,) = json.loads(out)
    assert result["kind"] == "task" and result["ok"] is False
    assert {"where": "[task] kind", "what": "unknown task kind 'relay'; expected \"racing\" or \"area\"",
            "file": str(task)} in result["problems"]
    assert err.count("glidetask: error:") == len(result["problems"])


def test_only_skipped_files_is_fine(capsys, tmp_path):
    notes = tmp_path / "notes.txt"
    notes.write_text("hello")
    status, out, err = _run(capsys, str(notes), str(tmp_path))
    assert status == 0 and err == ""
    assert out.count("skipped (not a glidetask file)") == 2


def test_malformed_toml_says_where(capsys, tmp_path):
    broken = tmp_path / "broken.toml"
    broken.write_text("[task\nname = \"x\"\n")
    status, out, err = _run(capsys, str(broken))
    assert status == 2 and "broken.toml: toml, 1 problem(s)" in out
    assert err.startswith(f"glidetask: error: {broken}: line 1: TOML syntax error")
