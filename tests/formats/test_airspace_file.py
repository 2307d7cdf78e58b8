"""The airspace GeoJSON reader (shared/CONTRACT.md 2.6): good files read as given, and every
problem of a bad file reported in one run as ``feature N (name): WHAT``."""

from __future__ import annotations

import json
from pathlib import Path

import numpy as np
import pytest

from glidetask.engine.airspace import Limit
from glidetask.errors import InputError
from glidetask.formats.airspace_file import parse_airspace, read_airspace

ROOT = Path(__file__).resolve().parents[2]
DEMO_AIRSPACE = ROOT / "demo_tasks" / "vardmoor-airspace.geojson"
SQUARE = [[0, 0], [1, 0], [1, 1], [0, 1], [0, 0]]
GROUND = {"value": 0, "unit": "m", "ref": "AGL"}
TOP = {"value": 1500, "unit": "m", "ref": "MSL"}


def _feature(name="Zone", coordinates=None, floor=GROUND, ceiling=TOP, geometry="Polygon", **extra):
    properties = {"name": name, "floor": floor, "ceiling": ceiling, **extra}
    return {"type": "Feature", "properties": properties,
            "geometry": {"type": geometry, "coordinates": [SQUARE] if coordinates is None else coordinates}}


def _text(*features) -> str:
    return json.dumps({"type": "FeatureCollection", "features": list(features)})


def _problems(*features) -> list[str]:
    with pytest.raises(InputError) as caught:
        parse_airspace(_text(*features), "air.geojson")
    return [f"{p.where}: {p.what}" for p in caught.value.problems]


def test_the_demo_airspace_reads_and_says_it_is_invented():
    airspace = read_airspace(DEMO_AIRSPACE)
    names = [v.name for v in airspace.volumes]
    assert names == ["Brennick Zone", "Brennick Area Step 1", "Brennick Area Step 2", "Tolland Range"]
    zone, step_1, step_2, danger = airspace.volumes
    assert zone.floor.is_ground and danger.airspace_class == "danger"
    assert step_1.floor == Limit(1500.0, "m", "MSL") and step_2.floor == Limit(75.0, "FL", None)
    assert len(step_2.polygons[0]) == 2  # the upper step is a ring round the lower one
    assert "invented" in json.loads(DEMO_AIRSPACE.read_text())["note"].lower()


def test_limits_classes_notes_and_multipolygons_are_kept_as_given():
    east = [[[179.5, 0], [180, 0], [180, 1], [179.5, 1], [179.5, 0]]]
    west = [[[-180, 0], [-179.5, 0], [-179.5, 1], [-180, 1], [-180, 0]]]
    airspace = parse_airspace(_text(
        _feature("A", floor={"value": 45, "unit": "FL"}, ceiling={"value": 95, "unit": "FL"}, **{"class": "c"}),
        _feature("B", [east, west], geometry="MultiPolygon", note=" split at 180 ",
                 floor={"value": 1000, "unit": "ft", "ref": "AGL"})))
    a, b = airspace.volumes
    assert (a.airspace_class, a.floor, a.ceiling) == ("C", Limit(45.0, "FL"), Limit(95.0, "FL"))
    assert b.floor == Limit(1000.0, "ft", "AGL") and len(b.polygons) == 2 and b.note == "split at 180"


def test_holes_are_honoured():
    hole = [[0.4, 0.4], [0.6, 0.4], [0.6, 0.6], [0.4, 0.6], [0.4, 0.4]]
    volume = parse_airspace(_text(_feature(coordinates=[SQUARE, hole]))).volumes[0]
    assert volume.contains([0.2, 0.5], [0.2, 0.5]).tolist() == [True, False]


def test_every_problem_of_a_bad_file_in_one_run():
    problems = _problems(
        _feature("Open", [SQUARE[:-1]]),
        _feature("Bow", [[[0, 0], [1, 1], [1, 0], [0, 1], [0, 0]]]),
        _feature("Short", [[[0, 0], [1, 1], [0, 0]]]),
        _feature("Upside", floor={"value": 2000, "unit": "m", "ref": "MSL"}, ceiling={"value": 50, "unit": "FL"}),
        _feature("Units", floor={"value": 0, "unit": "yd", "ref": "AGL"}, ceiling={"value": 1, "unit": "m", "ref": "QNH"}),
        _feature("Far", [[[0, 0], [181, 0], [1, 1], [0, 0]]]),
        _feature("North", [[[0, 0], [1, 0], [1, 91], [0, 0]]]),
        _feature("Dateline", [[[179, 0], [-179, 0], [-179, 1], [179, 1], [179, 0]]]),
        _feature("Level", floor={"value": 0, "unit": "m", "ref": "AGL"}, ceiling={"value": 95, "unit": "FL", "ref": "MSL"}),
        _feature("Stray", [SQUARE, [[2, 2], [3, 2], [3, 3], [2, 2]]]),
        {"type": "Feature", "properties": "D", "geometry": {"type": "Polygon", "coordinates": [SQUARE]}},
        _feature("Point", [0, 0], geometry="Point"),
        _feature("Kind", **{"class": "Z"}),
    )
    expected = [
        "feature 1 (Open): outline: the ring is not closed (its last position must repeat the first)",
        "feature 2 (Bow): outline: the ring crosses itself (edges 1 and 3)",
        "feature 3 (Short): outline: a ring needs at least 4 positions (the last repeating the first), got 3",
        "feature 4 (Upside): floor (2000 m MSL) must be below the ceiling (FL50)",
        'feature 5 (Units): floor unit must be one of m, ft, FL, got "yd"',
        'feature 5 (Units): ceiling ref must be one of MSL, AGL, got "QNH"',
        "feature 6 (Far): outline: position 2 [181, 0] is outside [-180, 180] longitude, [-90, 90] latitude",
        "feature 7 (North): outline: position 3 [1, 91] is outside [-180, 180] longitude, [-90, 90] latitude",
        "feature 8 (Dateline): outline: crosses the antimeridian (longitude 179 to -179 between positions 1 "
        "and 2); split it at 180 degrees into a MultiPolygon (RFC 7946, 3.1.9)",
        'feature 9 (Level): ceiling ref must be absent for a flight level, got "MSL"',
        "feature 10 (Stray): hole 1 is not inside the outline",
        'feature 11: properties must be an object with name, floor and ceiling, got "D"',
        'feature 12 (Point): geometry must be a Polygon or MultiPolygon, got "Point"',
        "feature 13 (Kind): class must be one of A, B, C, D, E, F, G, danger, restricted, prohibited, got \"Z\"",
    ]
    assert problems == expected


def test_missing_and_mistyped_fields():
    problems = _problems({"type": "Feature", "properties": {"floor": "low"},
                          "geometry": {"type": "Polygon", "coordinates": [SQUARE]}},
                         _feature(True), _feature("Note", note=5))
    assert problems == [
        "feature 1: name is required",
        'feature 1: floor must be an object {"value", "unit", "ref"}, got "low"',
        'feature 1: ceiling is required ({"value", "unit", "ref"})',
        "feature 2: name must be text, got true",
        "feature 3 (Note): note must be text, got 5",
    ]


def test_huge_numbers_and_deep_nesting_are_refused_cleanly():
    huge = _feature("Huge", floor={"value": 10 ** 400, "unit": "m", "ref": "MSL"},
                    coordinates=[[[0, 0], [10 ** 400, 0], [1, 1], [0, 0]]])
    problems = _problems(huge, _feature("Inf", ceiling={"value": 1e308 * 10, "unit": "m", "ref": "MSL"}),
                         _feature("Big", ceiling={"value": 40000, "unit": "m", "ref": "MSL"}))
    assert problems[0].startswith("feature 1 (Huge): floor value must be a finite number")
    assert problems[1].startswith("feature 1 (Huge): outline: position 2 must be [lon, lat] finite numbers")
    assert problems[2] == "feature 2 (Inf): ceiling value must be a finite number, got Infinity"
    assert problems[3] == "feature 3 (Big): ceiling value must be in [-500, 30000] m, got 40000"
    deep = '{"type": "FeatureCollection", "features": [' + "[" * 100000 + "]" * 100000 + "]}"
    with pytest.raises(InputError) as caught:
        parse_airspace(deep, "deep.geojson")
    assert str(caught.value) == "glidetask: error: deep.geojson: top level: JSON nested too deeply: not an airspace file"
    with pytest.raises(InputError) as caught:
        parse_airspace('{"features": [' + "9" * 5000 + "]}", "long.geojson")
    assert "a number too long to read" in str(caught.value)


def test_not_a_feature_collection(tmp_path):
    with pytest.raises(InputError, match="top level: expected a GeoJSON FeatureCollection"):
        parse_airspace("[]", "x.geojson")
    with pytest.raises(InputError, match="line 1: not valid JSON"):
        parse_airspace("{", "x.geojson")
    with pytest.raises(InputError, match="file: no such file"):
        read_airspace(tmp_path / "none.geojson")


def test_a_valid_ring_in_either_winding_reads():
    # Source: RFC 7946 3.1.6 asks for counter-clockwise outlines but parsers must not reject the other.
    clockwise = SQUARE[::-1]
    volume = parse_airspace(_text(_feature(coordinates=[clockwise]))).volumes[0]
    assert np.array_equal(volume.polygons[0][0], np.array(clockwise, dtype=float))
