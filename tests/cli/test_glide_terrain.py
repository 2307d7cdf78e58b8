"""``glidetask glide --terrain``: the final glide between two positions checked over an elevation model.

The expected clearance over the demo's Skarren Ridge is computed independently from the
demo generator's analytic surface (``demo_tasks/make_terrain.py``) along GeographicLib's
geodesic; the tolerance comes from the bilinear interpolation error on the model's grid.
"""

from __future__ import annotations

import importlib.util
import json
import re
from pathlib import Path

import numpy as np
import pytest
import rasterio
from affine import Affine
from geographiclib.geodesic import Geodesic

from glidetask import cautions
from glidetask.cli import main

ROOT = Path(__file__).resolve().parents[2]
RACING = str(ROOT / "polars" / "racing-15m.toml")
DEMO_TERRAIN = str(ROOT / "demo_tasks" / "terrain.tif")
ERROR_LINE = re.compile(r"^glidetask: error: [^:]+: [^:]+: .+$")
# From north of the Skarren Ridge due south to Vardmoor Aerodrome (invented demo region).
NORTH_OF_RIDGE, VARDMOOR, VARDMOOR_ELEVATION = (46.70, -33.30), (46.05, -33.30), "325"


def _generator():
    spec = importlib.util.spec_from_file_location("make_terrain", ROOT / "demo_tasks" / "make_terrain.py")
    module = importlib.util.module_from_spec(spec)
    spec.loader.exec_module(module)
    return module


def _glide(capsys, *argv: str) -> dict:
    assert main(["glide", *argv, "--json"]) == 0
    return json.loads(capsys.readouterr().out)


def _over_ridge(capsys, height: str, *extra: str) -> dict:
    return _glide(capsys, "--polar", RACING, "--from", "{:.2f},{:.2f}".format(*NORTH_OF_RIDGE),
                  "--to", "{:.2f},{:.2f}".format(*VARDMOOR), "--height-m", height, "--arrival-elevation-m",
                  VARDMOOR_ELEVATION, "--wind", "0/25", "--terrain", DEMO_TERRAIN, *extra)


def test_a_glide_too_low_over_the_ridge_is_told_its_least_clearance_and_the_height_it_needs(capsys):
    data = _over_ridge(capsys, "1700")
    terrain = data["terrain"]
    for key in ("source", "ok", "final_glide_min_clearance_m", "at_km"):
        assert key in terrain
    assert terrain["source"] == DEMO_TERRAIN and terrain["ok"] is False
    # Independent check: along the geodesic (GeographicLib, every 50 m) the glide line is
    # H - s * (height used / distance); the least clearance is the least of that line minus
    # the generator's analytic elevation. Tolerance: bilinear interpolation on the model's
    # 0.005 deg grid (cells up to 556 m) errs by at most h^2/8 |f''|; at the ridge crest
    # |f''| <= 2 x 830 m / (3.5 km)^2, which gives 5.2 m, plus 1 m for the 250 m sampling.
    line = Geodesic.WGS84.InverseLine(*NORTH_OF_RIDGE, *VARDMOOR)
    s = np.arange(0.0, line.s13, 50.0)
    points = [line.Position(x) for x in s]
    lats, lons = np.array([p["lat2"] for p in points]), np.array([p["lon2"] for p in points])
    per_metre = data["height_used_m"] / (line.s13)
    clearance = 1700.0 - per_metre * s - _generator().elevation(lats, lons)
    least = int(np.argmin(clearance))
    assert terrain["final_glide_min_clearance_m"] == pytest.approx(clearance[least], abs=6.5)
    assert terrain["at_km"] == pytest.approx(s[least] / 1000.0, abs=0.5)
    # The height needed: the least clearance must rise to 150 m.
    needed = 1700.0 + 150.0 - clearance[least]
    assert terrain["required_height_for_clearance_m"] == pytest.approx(needed, abs=6.5)
    assert terrain["shortfall_m"] == pytest.approx(needed - 1700.0, abs=6.5)
    assert terrain["raised_by_m"] == pytest.approx(terrain["required_height_for_clearance_m"]
                                                   - data["required_height_m"], abs=1e-6)
    assert terrain["obstacle"]["at_km"] == pytest.approx(terrain["at_km"])
    assert all(c in data["cautions"] for c in cautions.TERRAIN)
    assert any("does not clear the terrain" in c for c in data["cautions"])


def test_a_glide_high_enough_clears_the_terrain(capsys):
    data = _over_ridge(capsys, "2600")
    terrain = data["terrain"]
    assert terrain["ok"] is True and terrain["shortfall_m"] == 0.0
    assert terrain["final_glide_min_clearance_m"] >= 150.0
    assert terrain["clearance_margin_m"] == pytest.approx(2600.0 - terrain["required_height_for_clearance_m"])
    assert terrain["clearance_margin_m"] >= 0.0
    # The glide as flown starts 2600 m up; where it is closest to the ground it is the
    # start height less the height to spare for the clearance above the demanded 150 m
    # (a pure glide that starts higher stays higher by the same amount, contract 3).
    assert terrain["final_glide_min_clearance_m"] == pytest.approx(
        150.0 + terrain["clearance_margin_m"] if terrain["raised_by_m"] > 0.0 else
        200.0 + 2600.0 - data["required_height_m"], abs=1e-6)


def test_the_clearance_option_moves_the_needed_height_one_for_one(capsys):
    base = _over_ridge(capsys, "1700")["terrain"]
    more = _over_ridge(capsys, "1700", "--clearance-m", "300")["terrain"]
    assert more["required_height_for_clearance_m"] - base["required_height_for_clearance_m"] == pytest.approx(150.0)


def test_a_start_outside_the_model_is_never_a_silent_pass(capsys):
    # The demo model ends at 47.5 N: from 47.8 N the first stretch has no terrain data.
    data = _glide(capsys, "--polar", RACING, "--from", "47.80,-33.30", "--to", "47.20,-33.30", "--height-m", "3000",
                  "--terrain", DEMO_TERRAIN)
    terrain = data["terrain"]
    assert terrain["ok"] is False
    assert 0.0 < terrain["covered_percent"] < 100.0
    (stretch,) = terrain["uncovered"]
    # Source: GeographicLib meridian arc from 47.8 N to the model's edge at 47.5 N;
    # tolerance one sample spacing (250 m).
    edge = Geodesic.WGS84.Inverse(47.8, -33.3, 47.5, -33.3)["s12"] / 1000.0
    assert stretch["from_km"] == 0.0 and stretch["to_km"] == pytest.approx(edge, abs=0.25)
    assert any("does not cover" in c for c in data["cautions"])


def test_text_output_has_the_terrain_section_and_a_profile(capsys):
    argv = ["glide", "--polar", RACING, "--from", "46.70,-33.30", "--to", "46.05,-33.30", "--height-m", "1700",
            "--arrival-elevation-m", "325", "--wind", "0/25", "--terrain", DEMO_TERRAIN, "--units", "aviation"]
    assert main(argv) == 0
    out = capsys.readouterr().out
    assert "Final glide over the terrain" in out and "NOT CLEARED" in out
    assert "# terrain, * glide" in out and " ft" in out
    assert cautions.TERRAIN[0] in out


def _error_lines(capsys, terrain: str) -> list[str]:
    assert main(["glide", "--polar", RACING, "--from", "46.7,-33.3", "--to", "46.05,-33.3", "--height-m", "2000",
                 "--terrain", terrain]) == 2
    captured = capsys.readouterr()
    assert captured.out == "" and "Traceback" not in captured.err
    lines = captured.err.strip().splitlines()
    assert len(lines) == 1 and ERROR_LINE.match(lines[0]), lines
    return lines


def test_a_missing_terrain_file_is_one_clear_error(capsys, tmp_path):
    missing = str(tmp_path / "missing.tif")
    (line,) = _error_lines(capsys, missing)
    assert line == f"glidetask: error: {missing}: --terrain: no such file"


def test_a_file_that_is_not_a_raster_is_one_clear_error(capsys, tmp_path):
    notes = tmp_path / "notes.tif"
    notes.write_text("not an elevation model")
    (line,) = _error_lines(capsys, str(notes))
    assert line.startswith(f"glidetask: error: {notes}: --terrain: not a raster")


def test_a_raster_without_crs_is_one_clear_error(capsys, tmp_path):
    path = tmp_path / "nocrs.tif"
    with rasterio.open(path, "w", driver="GTiff", height=4, width=4, count=1, dtype="float32",
                       transform=Affine(0.01, 0.0, -33.5, 0.0, -0.01, 46.8)) as dst:
        dst.write(np.zeros((4, 4), dtype="float32"), 1)
    (line,) = _error_lines(capsys, str(path))
    assert "coordinate reference system" in line and str(path) in line


def test_out_of_reach_against_the_wind_is_reported_not_checked(capsys):
    data = _glide(capsys, "--polar", RACING, "--from", "46.05,-33.30", "--to", "46.70,-33.30", "--height-m", "2000",
                  "--wind", "0/320", "--terrain", DEMO_TERRAIN)
    assert data["terrain"]["ok"] is False and data["terrain"]["final_glide_min_clearance_m"] is None
    assert any("not checked" in c for c in data["cautions"])


# ---------------------------------------------------------------- the goal's elevation


def _to_vardmoor(capsys, *extra: str) -> dict:
    return _glide(capsys, "--polar", RACING, "--from", "{:.2f},{:.2f}".format(*NORTH_OF_RIDGE),
                  "--to", "{:.2f},{:.2f}".format(*VARDMOOR), "--height-m", "2600", "--wind", "0/25",
                  "--terrain", DEMO_TERRAIN, *extra)


def test_without_a_goal_elevation_the_model_gives_it_and_both_checks_use_it(capsys):
    data = _to_vardmoor(capsys)
    # Source: the demo generator's analytic surface at the goal; tolerance: the bilinear
    # error on the model's 0.005 deg grid over the gentle ground around the aerodrome
    # (h^2/8 |f''| well under 1 m there), 1 m.
    expected = float(_generator().elevation(np.array([VARDMOOR[0]]), np.array([VARDMOOR[1]]))[0])
    assert data["arrival_elevation_source"] == "terrain"
    assert data["arrival_elevation_m"] == pytest.approx(expected, abs=1.0)
    assert data["goal_terrain_elevation_m"] == data["arrival_elevation_m"]
    # Contract 5.2: required = arrival elevation + margin + height used; the terrain check's
    # requirement less what the ridge adds is the same number, so verdict and check agree.
    assert data["required_height_m"] == pytest.approx(data["arrival_elevation_m"] + 200.0 + data["height_used_m"])
    terrain = data["terrain"]
    assert terrain["required_start_height_m"] - terrain["raised_by_m"] == pytest.approx(data["required_height_m"],
                                                                                        abs=1e-6)
    assert not any("differs from the terrain model" in c for c in data["cautions"])


def test_the_text_says_where_the_goal_elevation_came_from(capsys):
    argv = ["glide", "--polar", RACING, "--from", "46.70,-33.30", "--to", "46.05,-33.30", "--height-m", "2600",
            "--terrain", DEMO_TERRAIN]
    assert main(argv) == 0
    assert "from the terrain model at --to" in capsys.readouterr().out


def test_a_given_goal_elevation_is_used_and_cautioned_when_far_from_the_model(capsys):
    close = _to_vardmoor(capsys, "--arrival-elevation-m", "340")
    assert close["arrival_elevation_m"] == 340.0 and close["arrival_elevation_source"] == "option"
    assert not any("differs from the terrain model" in c for c in close["cautions"])
    far = _to_vardmoor(capsys, "--arrival-elevation-m", "100")
    assert far["arrival_elevation_m"] == 100.0
    # More than 50 m from the model (about 325 m there): a caution naming both.
    (caution,) = [c for c in far["cautions"] if "differs from the terrain model" in c]
    assert "(100 m)" in caution and "(326 m)" in caution


def test_a_goal_outside_the_model_needs_its_elevation(capsys):
    assert main(["glide", "--polar", RACING, "--from", "47.40,-33.30", "--to", "47.90,-33.30", "--height-m", "2600",
                 "--terrain", DEMO_TERRAIN]) == 2
    captured = capsys.readouterr()
    (line,) = captured.err.strip().splitlines()
    assert ERROR_LINE.match(line) and line.startswith("glidetask: error: command line: --arrival-elevation-m: ")
    # With the elevation given it is a result, the uncovered stretch never a silent pass.
    data = _glide(capsys, "--polar", RACING, "--from", "47.40,-33.30", "--to", "47.90,-33.30", "--height-m", "2600",
                  "--terrain", DEMO_TERRAIN, "--arrival-elevation-m", "300")
    assert data["terrain"]["ok"] is False
