"""``glidetask glide --airspace`` and ``glidetask check`` of airspace files.

The glide west to east over the invented Brennick Airfield crosses its control zone (an
8 km circle from the ground to 1500 m, ``demo_tasks/make_airspace.py``); where it enters and
leaves is found independently with GeographicLib: the points of the geodesic 8 km from the
airfield. The zone's outline is a 72-gon inscribed in that circle, whose edges lie at most
8000 (1 - cos 2.5 deg) = 7.6 m inside it, well within the 50 m tolerance.
"""

from __future__ import annotations

import json
import re
from pathlib import Path

import pytest
from geographiclib.geodesic import Geodesic
from scipy.optimize import brentq

from glidetask import cautions
from glidetask.cli import main

ROOT = Path(__file__).resolve().parents[2]
DEMO_AIRSPACE = str(ROOT / "demo_tasks" / "vardmoor-airspace.geojson")
CLUB = str(ROOT / "polars" / "club.toml")
BRENNICK = (45.48, -34.15)  # invented, demo_tasks/vardmoor.geojson
START, GOAL = (45.50, -34.45), (45.46, -33.85)
ERROR_LINE = re.compile(r"^glidetask: error: [^:]+: [^:]+: .+$")


def _zone_entry_and_exit_m() -> tuple[float, float]:
    line = Geodesic.WGS84.InverseLine(*START, *GOAL)

    def off_circle(s):
        point = line.Position(s)
        return Geodesic.WGS84.Inverse(point["lat2"], point["lon2"], *BRENNICK)["s12"] - 8000.0

    closest = min(range(0, int(line.s13), 100), key=lambda s: off_circle(s))
    return brentq(off_circle, 0.0, closest), brentq(off_circle, closest, line.s13)


def _glide(capsys, *extra):
    status = main(["glide", "--polar", CLUB, "--height-m", "1300", "--arrival-elevation-m", "312",
                   "--from", f"{START[0]},{START[1]}", "--to", f"{GOAL[0]},{GOAL[1]}",
                   "--airspace", DEMO_AIRSPACE, *extra])
    captured = capsys.readouterr()
    assert status == 0 and captured.err == ""
    return captured.out


def test_glide_reports_the_zone_crossed_with_its_stretch(capsys):
    data = json.loads(_glide(capsys, "--json"))
    air = data["airspace"]
    assert air["source"] == DEMO_AIRSPACE and air["ok"] is False
    [conflict] = air["conflicts"]
    entry, leave = _zone_entry_and_exit_m()
    assert (conflict["name"], conflict["class"], conflict["leg"]) == ("Brennick Zone", "D", 1)
    assert conflict["from_km"] * 1000.0 == pytest.approx(entry, abs=50.0)
    assert conflict["to_km"] * 1000.0 == pytest.approx(leave, abs=50.0)
    assert conflict["ceiling_m"] == 1500.0
    # The glide falls linearly from 1300 m; within the zone it is between those heights.
    assert 312.0 < conflict["planned_min_m"] < conflict["planned_max_m"] < 1300.0
    names = [row["name"] for row in air["crossed"]]
    assert names.count("Brennick Area Step 1") == 1 and "Brennick Zone" in names
    step_1 = next(row for row in air["crossed"] if row["name"] == "Brennick Area Step 1")
    assert step_1["floor_m"] == 1500.0 and step_1["planned_max_m"] <= 1300.0
    assert any("Brennick Zone (class D)" in c and "clearance or another route" in c for c in data["cautions"])
    assert cautions.AIRSPACE[0] in data["cautions"]


def test_glide_text_names_the_conflict_in_the_units_chosen(capsys):
    text = _glide(capsys, "--units", "aviation")
    assert re.search(r"CONFLICT\s+Brennick Zone \[D\]: [\d.]+ NM to [\d.]+ NM, ground to 4921 ft", text)
    assert "The glide enters Brennick Zone (class D), the ground to 4921 ft" in text


def test_glide_airspace_needs_positions_and_a_good_file(capsys, tmp_path):
    assert main(["glide", "--polar", CLUB, "--height-m", "1300", "--distance-km", "30",
                 "--airspace", DEMO_AIRSPACE]) == 2
    assert capsys.readouterr().err.strip() == ("glidetask: error: command line: --airspace: needs --from and "
                                               "--to (the path to check)")
    bad = tmp_path / "bad.geojson"
    bad.write_text('{"type": "FeatureCollection", "features": [{"type": "Feature", "properties": {"name": "X"},'
                   ' "geometry": {"type": "Polygon", "coordinates": [[[0, 0], [1, 0], [0, 0]]]}}]}')
    assert main(["glide", "--polar", CLUB, "--height-m", "1300", "--from", "0.5,-0.5", "--to", "0.5,1.5",
                 "--airspace", str(bad)]) == 2
    err = capsys.readouterr().err.splitlines()
    assert len(err) == 3 and all(ERROR_LINE.match(line) for line in err)
    assert err[0].startswith(f"glidetask: error: {bad}: feature 1 (X): floor is required")


def test_check_validates_airspace_files(capsys, tmp_path):
    assert main(["check", DEMO_AIRSPACE, "--json"]) == 0
    [result] = json.loads(capsys.readouterr().out)
    assert (result["kind"], result["ok"], result["count"]) == ("airspace", True, 4)
    assert result["by_class"] == {"D": 3, "danger": 1} and result["from_ground"] == 2 and result["holes"] == 1
    assert main(["check", DEMO_AIRSPACE]) == 0
    out = capsys.readouterr().out
    assert "vardmoor-airspace.geojson: airspace, ok" in out and "4 volumes (3 D, 1 danger)" in out
    bad = tmp_path / "air.json"
    bad.write_text('{"type": "FeatureCollection", "features": [{"type": "Feature", "properties": '
                   '{"name": "Y", "floor": {"value": 0, "unit": "m", "ref": "AGL"}, "ceiling": '
                   '{"value": 5, "unit": "km", "ref": "MSL"}}, "geometry": {"type": "MultiPolygon", '
                   '"coordinates": [[[[0, 0], [1, 0], [1, 1], [0, 1]]]]}}]}')
    assert main(["check", str(bad)]) == 2
    captured = capsys.readouterr()
    assert f"{bad}: airspace, 2 problem(s)" in captured.out
    assert captured.err.splitlines() == [
        f'glidetask: error: {bad}: feature 1 (Y): ceiling unit must be one of m, ft, FL, got "km"',
        f"glidetask: error: {bad}: feature 1 (Y): polygon 1, outline: the ring is not closed "
        "(its last position must repeat the first)"]
