"""Turnpoint files (shared/CONTRACT.md 2.2): GeoJSON (RFC 7946) and CSV, every problem reported."""

from __future__ import annotations

import json
import re

import pytest

from glidetask.engine.task import Turnpoint
from glidetask.errors import InputError
from glidetask.formats.turnpoints import parse_csv, parse_geojson, read_turnpoints, write_turnpoints

ERROR_LINE = re.compile(r"^glidetask: error: [^:]+: [^:]+: .+$")

POINTS = (
    Turnpoint("Home Field", "HOM", 46.05, -33.3, 325.0, True, "airfield", 85.0, 1100.0, "winch; tow"),
    Turnpoint("North, Farm", None, 46.9, -33.0, 402.5, True, "field", None, None, 'says "keep left"'),
    Turnpoint("Mast", "MST", 46.42, -32.95, 1173.0, False, "waypoint", None, None, ""),
    Turnpoint("Dateline Rock", "DLR", -17.0, -179.999999, 3.0),
)


def _feature(**properties):
    coordinates = properties.pop("coordinates", [-33.0, 46.0])
    return {"type": "Feature", "geometry": {"type": "Point", "coordinates": coordinates}, "properties": properties}


def _geojson(*features):
    return json.dumps({"type": "FeatureCollection", "features": list(features)})


def _problems(parse, text):
    with pytest.raises(InputError) as caught:
        parse(text, "tp.file")
    lines = [str(p) for p in caught.value.problems]
    assert all(ERROR_LINE.match(line) for line in lines), lines
    return [(p.where, p.what) for p in caught.value.problems]


# ---------------------------------------------------------------- round trips


@pytest.mark.parametrize("suffix", [".geojson", ".json", ".csv"])
def test_write_then_read_gives_the_same_points(tmp_path, suffix):
    path = tmp_path / f"points{suffix}"
    write_turnpoints(path, POINTS, note="Invented test data.")
    back = read_turnpoints(path)
    assert [p.name for p in back] == [p.name for p in POINTS]
    for got, want in zip(back, POINTS):
        assert got.code == want.code and got.kind == want.kind and got.landable == want.landable
        assert got.note == want.note and got.elevation_m == want.elevation_m
        assert got.runway_heading_deg == want.runway_heading_deg and got.runway_length_m == want.runway_length_m
        # positions are written to 1e-6 deg (0.1 m)
        assert got.lat == pytest.approx(want.lat, abs=1e-6) and got.lon == pytest.approx(want.lon, abs=1e-6)
    assert "Invented test data." in path.read_text()


def test_writer_rejects_unknown_suffix(tmp_path):
    with pytest.raises(ValueError):
        write_turnpoints(tmp_path / "points.txt", POINTS)


def test_geojson_elevation_from_the_third_coordinate_and_longitude_normalised():
    points = parse_geojson(_geojson(_feature(name="A", coordinates=[190.0, 46.0, 512.0]),
                                    _feature(name="B", elevation_m=10, coordinates=[-180.0, 0.0])))
    assert points[0].elevation_m == 512.0 and points[0].lon == pytest.approx(-170.0)
    assert points[1].lon == -180.0
    assert points[0].kind == "waypoint" and points[0].landable is False  # contract defaults


def test_csv_minimal_columns_comments_and_quoting():
    text = ("# invented\n# data\nname,lat,lon,elevation_m\n"
            '"Farm, North",46.5,-33.25,300\n'
            "Peak,46.4,190,1200.5\n")
    points = parse_csv(text)
    assert [p.name for p in points] == ["Farm, North", "Peak"]
    assert points[1].lon == pytest.approx(-170.0) and points[1].elevation_m == 1200.5
    assert points[0].code is None and points[0].landable is False and points[0].kind == "waypoint"


# ---------------------------------------------------------------- every problem at once


def test_geojson_reports_every_problem_with_its_feature():
    text = _geojson(
        _feature(name="Good", elevation_m=100),
        _feature(name="Too North", elevation_m=100, coordinates=[-33.0, 91.0]),
        _feature(elevation_m=100),
        _feature(name="No Height"),
        _feature(name="Good", elevation_m=100),
        _feature(name="Bad Kind", elevation_m=100, kind="hangar", landable="yes"),
        _feature(name="Runway", elevation_m=100, runway_heading_deg=400, runway_length_m=-5),
        {"type": "Feature", "geometry": {"type": "LineString", "coordinates": [[0, 0], [1, 1]]},
         "properties": {"name": "Line", "elevation_m": 1}},
        _feature(name="Height Mismatch", elevation_m=100, coordinates=[-33.0, 46.0, 150.0]),
        _feature(name="Infinite", elevation_m="inf"),
    )
    problems = _problems(parse_geojson, text)
    assert ("feature 2 (Too North)", "lat must be in [-90, 90], got 91") in problems
    assert ("feature 3", "name is required") in problems
    assert any(w == "feature 4 (No Height)" and "elevation_m is required" in m for w, m in problems)
    assert ("feature 5 (Good)", "name 'Good' is used again (first at feature 1 (Good))") in problems
    assert any(w == "feature 6 (Bad Kind)" and "kind must be one of" in m for w, m in problems)
    assert any(w == "feature 6 (Bad Kind)" and "landable must be true or false" in m for w, m in problems)
    assert any(w == "feature 7 (Runway)" and "runway_heading_deg" in m for w, m in problems)
    assert any(w == "feature 7 (Runway)" and "runway_length_m must be greater than 0" in m for w, m in problems)
    assert any(w == "feature 8 (Line)" and "Point" in m for w, m in problems)
    assert any(w == "feature 9 (Height Mismatch)" and "disagrees" in m for w, m in problems)
    assert any(w == "feature 10 (Infinite)" and "elevation_m must be a number" in m for w, m in problems)
    assert len(problems) == 11


def test_geojson_duplicate_codes():
    problems = _problems(parse_geojson, _geojson(_feature(name="A", code="X", elevation_m=1),
                                                 _feature(name="B", code="X", elevation_m=1)))
    assert problems == [("feature 2 (B)", "code 'X' is used again (first at feature 1 (A))")]


def test_csv_reports_every_problem_with_its_line():
    text = ("# comment line 1\n"
            "name,code,lat,lon,elevation_m,landable,kind,note\n"  # line 2
            "Good,G,46.0,-33.0,100,true,airfield,\n"  # line 3
            "Bad Lat,,-95,-33.0,100,false,field,\n"  # line 4
            ",,46.0,-33.0,100,false,,\n"  # line 5
            "Short,,46.0\n"  # line 6
            '"Two\nLines",,46.0,-33.0,abc,false,,\n'  # lines 7-8
            "Good,G,46.1,-33.1,nan,maybe,waypoint,\n"  # line 9
            "No Lon,,46.0,,100,,,\n")  # line 10
    problems = _problems(parse_csv, text)
    assert ("line 4", "lat must be in [-90, 90], got -95") in problems
    assert ("line 5", "name is required") in problems
    assert ("line 6", "expected 8 fields as in the header, got 3") in problems
    assert ("line 7", "elevation_m must be a number, got 'abc'") in problems
    assert ("line 9", "elevation_m must be a finite number, got nan") in problems
    assert any(w == "line 9" and "landable must be true or false" in m for w, m in problems)
    assert ("line 10", "lon is required") in problems
    # line 9's duplicates of line 3 are not reported: line 9 has other problems and is dropped
    assert len(problems) == 7


def test_csv_duplicates_name_their_first_line():
    text = "name,code,lat,lon,elevation_m\nA,X,46,-33,1\nB,X,46,-33,1\nA,,46,-33,1\n"
    assert _problems(parse_csv, text) == [("line 4", "name 'A' is used again (first at line 2)"),
                                          ("line 3", "code 'X' is used again (first at line 2)")]


def test_csv_header_problems():
    problems = _problems(parse_csv, "name,lat,longitude,elevation_m\nA,1,2,3\n")
    assert ("line 1", "missing required column(s): lon") in problems
    assert any(w == "line 1" and "unknown column 'longitude'" in m for w, m in problems)
    assert _problems(parse_csv, "") == [("line 1", "no header row; expected name,code,lat,lon,elevation_m,"
                                                   "landable,kind,note")]


@pytest.mark.parametrize("text, where, what", [
    ("{not json", "line 1", "not valid JSON"),
    ('{"type": "Feature"}', "top level", "FeatureCollection"),
    ('{"type": "FeatureCollection", "features": {}}', "features", "list of features"),
    ('{"type": "FeatureCollection", "features": []}', "features", "no turnpoints"),
])
def test_geojson_document_problems(text, where, what):
    problems = _problems(parse_geojson, text)
    assert len(problems) == 1 and problems[0][0] == where and what in problems[0][1]


def test_file_problems(tmp_path):
    with pytest.raises(InputError, match="no such file"):
        read_turnpoints(tmp_path / "missing.csv")
    with pytest.raises(InputError, match="must end in"):
        read_turnpoints(tmp_path / "points.txt")
    binary = tmp_path / "latin1.csv"
    binary.write_bytes("name,lat,lon,elevation_m\nK\xf6ln,1,2,3\n".encode("latin-1"))
    with pytest.raises(InputError, match="not UTF-8"):
        read_turnpoints(binary)
    problem = _problems(parse_csv, "name,lat,lon,elevation_m\n")
    assert problem == [("line 2", "the file has no turnpoints")]


def test_demo_files_agree(demo_dir):
    geojson = read_turnpoints(demo_dir / "vardmoor.geojson")
    csv = read_turnpoints(demo_dir / "vardmoor.csv")
    assert geojson == csv
