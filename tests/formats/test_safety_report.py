"""The safety report: contract JSON objects, text and Markdown sections, and the cautions
that go with them (worded in glidetask.cautions, which the plan itself uses too).

The results rendered are built by the engine from hand-computable cases (a triangular
ridge under a 1:40 glide, fields on a meridian), so every number shown can be checked.
"""

from __future__ import annotations

import json
import math

import numpy as np
import pytest
from geographiclib.geodesic import Geodesic

from glidetask import cautions
from glidetask.engine.polar import PolarSpec, scaled_polar
from glidetask.engine.reach_coverage import coverage
from glidetask.engine.scenario import Wind
from glidetask.engine.task import Turnpoint
from glidetask.engine.clearance import final_glide_clearance
from glidetask.formats import safety_report as report
from glidetask.units import AVIATION, METRIC

# A 50 km final glide at 1:40 to a goal at 100 m with a 200 m margin, starting 200 km
# along the task; a 1000 m ridge at 220 km demands 1150 m where R = 1050 m: +100 m.
S = np.linspace(0.0, 50_000.0, 201)
REQUIRED = 300.0 + (50_000.0 - S) / 40.0
RIDGE = 100.0 + np.maximum(0.0, 900.0 * (1.0 - np.abs(S - 20_000.0) / 1000.0))
LATS = 46.0 + S / 111_000.0
LONS = np.full(S.shape, -33.0)
LANDMARKS = [("Orsby Gliding Field", 46.15, -33.02)]


def ridge_check(**kwargs):
    return final_glide_clearance(S + 200_000.0, REQUIRED, kwargs.pop("terrain", RIDGE), 150.0, lats=LATS,
                                 lons=LONS, landmarks=LANDMARKS, source="terrain.tif", **kwargs)


KMH = 1 / 3.6
SPEC = PolarSpec(  # invented, not any real aircraft
    label="test 15 m", wing_area_m2=10.5, reference_mass_kg=350.0, empty_mass_kg=260.0,
    max_ballast_kg=170.0, max_mass_kg=525.0, vne_ias_ms=270 * KMH, min_speed_ias_ms=70 * KMH,
    points=((80 * KMH, 0.62), (100 * KMH, 0.64), (120 * KMH, 0.80), (150 * KMH, 1.20), (180 * KMH, 1.85)),
)
POLAR = scaled_polar(SPEC, 350.0)


def fields_coverage():
    """Fields at 0, 80 and 160 km on a meridian; two legs split at 80 km; calm; band bottom 1000 m."""
    line = Geodesic.WGS84.Line(46.0, -33.0, 0.0)
    s = np.arange(0.0, 160_001.0, 1000.0)
    points = [line.Position(x) for x in s]
    lats, lons = np.array([p["lat2"] for p in points]), np.array([p["lon2"] for p in points])
    fields = [Turnpoint(name, None, line.Position(at)["lat2"], line.Position(at)["lon2"], 0.0, True, "field")
              for name, at in (("Ashfield", 0.0), ("Bramble", 80_000.0), ("Cobham", 160_000.0))]
    return coverage(lats, lons, s, (s >= 80_000.0).astype(int), fields, POLAR, Wind(), 1000.0, 200.0)


# ---------------------------------------------------------------- JSON


def test_terrain_object_has_the_contract_keys_in_contract_units():
    # Source: shared/CONTRACT.md 5.3 ``terrain`` {source, ok, final_glide_min_clearance_m, at_km}.
    data = report.terrain_to_dict(ridge_check())
    assert data["source"] == "terrain.tif" and data["ok"] is True
    assert data["final_glide_min_clearance_m"] == pytest.approx(150.0)
    assert data["at_km"] == pytest.approx(220.0)
    assert data["raised_by_m"] == pytest.approx(100.0)
    assert data["required_start_height_m"] == pytest.approx(300.0 + 50_000.0 / 40.0 + 100.0)
    assert data["obstacle"]["at_km"] == pytest.approx(220.0) and data["obstacle"]["elevation_m"] == pytest.approx(1000.0)
    assert data["obstacle"]["near"] == "Orsby Gliding Field"
    assert report.terrain_to_dict(ridge_check(), source="dem.tif")["source"] == "dem.tif"
    json.dumps(data, allow_nan=False)  # plain JSON, no NaN


def test_unknown_values_are_null_not_nan():
    data = report.terrain_to_dict(ridge_check(terrain=np.full(S.shape, np.nan)))
    assert data["ok"] is False and data["final_glide_min_clearance_m"] is None and data["at_km"] is None
    assert data["covered_percent"] == 0.0 and data["lowest"] is None
    json.dumps(data, allow_nan=False)


def test_landables_object_has_the_contract_keys_and_legs_numbered_from_one():
    # Source: shared/CONTRACT.md 5.3 ``landables`` {coverage_percent, gaps [{from_km, to_km}],
    # by_leg [{leg, nearest, distance_km}]}; the gaps by hand: R = 800 m x L/D either side.
    result = fields_coverage()
    data = report.landables_to_dict(result, leg_names=[("Ashfield", "Bramble"), ("Bramble", "Cobham")])
    reach_km = 800.0 * POLAR.best_ld / 1000.0
    assert data["coverage_percent"] == pytest.approx(result.coverage_percent)
    assert [(g["from_km"], g["to_km"]) for g in data["gaps"]] == [
        (pytest.approx(reach_km, abs=1e-5), pytest.approx(80.0 - reach_km, abs=1e-5)),
        (pytest.approx(80.0 + reach_km, abs=1e-5), pytest.approx(160.0 - reach_km, abs=1e-5))]
    assert all(g["reason"] == "range" for g in data["gaps"])
    # Each gap's length by cause, from the 1 km samples inside it (within one sample).
    for gap in data["gaps"]:
        assert gap["by_reason_km"]["range"] == pytest.approx(gap["to_km"] - gap["from_km"], abs=1.0)
        assert gap["by_reason_km"]["terrain"] == 0.0 and gap["by_reason_km"]["unknown"] == 0.0
    first = data["by_leg"][0]
    assert first["leg"] == 1 and first["nearest"] == "Ashfield" and first["distance_km"] == pytest.approx(0.0)
    assert (first["from"], first["to"]) == ("Ashfield", "Bramble")
    assert first["alternates"][1] == {"name": "Bramble", "distance_km": pytest.approx(1.0)}
    assert data["band_bottom_m"] == 1000.0 and data["terrain_checked"] is False
    assert data["terrain_clearance_m"] is None
    json.dumps(data, allow_nan=False)


# ---------------------------------------------------------------- text


def test_text_shows_the_least_clearance_and_the_deciding_obstacle_in_the_chosen_units():
    text = report.terrain_text(ridge_check(), METRIC)
    assert "clears the terrain by at least 150 m" in text
    assert "150 m over terrain of 1000 m at 220.0 km" in text
    assert "1650 m at the start, 100 m more" in text
    # Source: 1 ft = 0.3048 m, 1 NM = 1852 m (international definitions).
    feet = report.terrain_text(ridge_check(), AVIATION)
    assert f"{150 / 0.3048:.0f} ft over terrain of {1000 / 0.3048:.0f} ft at {220_000 / 1852:.1f} NM" in feet


def test_a_glide_below_the_clearance_says_how_much_height_is_missing():
    # By hand: starting at 1600 m instead of the 1650 m the ridge demands: 50 m short.
    text = report.terrain_text(ridge_check(start_height_m=1600.0), METRIC)
    assert "NOT CLEARED" in text and "height missing    50 m (starting at 1600 m)" in text


def test_the_obstacle_is_placed_from_the_nearest_turnpoint_with_a_compass_point():
    text = report.terrain_text(ridge_check(), METRIC)
    # Source: GeographicLib for distance and bearing from the landmark to the crest.
    crest = int(np.argmax(RIDGE))
    line = Geodesic.WGS84.Inverse(46.15, -33.02, LATS[crest], LONS[crest])
    assert f"{line['s12'] / 1000:.1f} km {cautions.compass(line['azi1'])} of Orsby Gliding Field" in text


@pytest.mark.parametrize("bearing, name", [(0.0, "N"), (11.0, "N"), (11.3, "NNE"), (45.0, "NE"), (180.0, "S"),
                                           (259.0, "W"), (348.8, "N"), (-90.0, "W"), (337.5, "NNW")])
def test_compass_points(bearing, name):
    # Source: the 16-point compass rose, 22.5 deg per point centred on each (common practice).
    assert cautions.compass(bearing) == name


def test_landables_text_lists_gaps_and_alternates_per_leg():
    text = report.landables_text(fields_coverage(), METRIC, [("Ashfield", "Bramble"), ("Bramble", "Cobham")])
    reach_km = 800.0 * POLAR.best_ld / 1000.0
    assert f"coverage   {100.0 * (1 - 2 * (80 - 2 * reach_km) / 160):.0f}% of the task" in text
    assert f"gap        {reach_km:.1f} km to {80 - reach_km:.1f} km" in text
    assert "leg 1 Ashfield > Bramble: Ashfield 0.0 km off track (also Bramble 1.0 km)" in text


# ---------------------------------------------------------------- Markdown and the profile


def test_profile_picture_marks_glide_terrain_and_the_least_clearance():
    picture = report.terrain_profile_ascii(ridge_check(), METRIC, width=51, height=12).splitlines()
    rows = picture[:12]
    # The glide starts at the top left (the highest height drawn) and the ground fills the bottom row.
    assert rows[0][8] == "*"
    assert set(rows[11][8:]) <= {"#", "*"}
    assert sum(row.count("X") for row in rows) == 1
    column = rows[[i for i, row in enumerate(rows) if "X" in row][0]].index("X") - 8
    # The crest is 20 km into the 50 km glide: column 20/50 x 50 = 20.
    assert column == 20
    unknown = RIDGE.copy()
    unknown[150:] = np.nan
    assert "?" in report.terrain_profile_ascii(ridge_check(terrain=unknown), METRIC)


def test_briefing_sections_carry_tables_profile_and_cautions():
    terrain_md = report.terrain_markdown(ridge_check(), METRIC)
    assert terrain_md.startswith("## Final glide over the terrain")
    assert "```" in terrain_md and "| Along (km) | Terrain (m) | Glide (m) | Clearance (m) | |" in terrain_md
    assert "| 220.0 | 1000 | 1150 | 150 | least clearance, decides the height |" in terrain_md
    for caution in cautions.TERRAIN:
        assert caution in terrain_md
    land_md = report.landables_markdown(fields_coverage(), METRIC)
    assert "**Coverage:" in land_md and "| Gap from (km) |" in land_md
    for caution in cautions.LANDABLES:
        assert caution in land_md


def test_cautions_name_partial_coverage_raised_heights_and_gaps():
    partial = RIDGE.copy()
    partial[180:] = np.nan
    texts = cautions.terrain_cautions(ridge_check(terrain=partial), METRIC)
    assert texts[:len(cautions.TERRAIN)] == list(cautions.TERRAIN)
    assert any("does not cover" in t and "unknown" in t for t in texts)
    raised = cautions.terrain_cautions(ridge_check(), METRIC)
    assert any("raises the final-glide height by 100 m" in t for t in raised)
    gaps = cautions.landables_cautions(fields_coverage(), METRIC)
    assert gaps[:len(cautions.LANDABLES)] == list(cautions.LANDABLES)
    assert any("2 stretches" in t for t in gaps)


def test_the_report_words_its_cautions_from_the_one_source():
    # The text, JSON and briefing (here) and the plan (glidetask.engine.plan) take the same
    # functions from glidetask.cautions, so their wording cannot drift apart.
    assert report.terrain_cautions is cautions.terrain_cautions
    assert report.landables_cautions is cautions.landables_cautions
    assert report.compass is cautions.compass


def test_a_partly_covered_path_is_worded_in_the_readers_units():
    # By hand: 40 km of 160 km uncovered is 25 %; 200 km = 107.99 NM, 240 km = 129.59 NM
    # Source: 1 NM = 1852 m exactly (international nautical mile).
    text = cautions.path_not_covered("terrain.tif", 0.75, [(200_000.0, 240_000.0)], AVIATION)
    assert text.startswith("The terrain model terrain.tif does not cover 25% of the planned path")
    assert "(108.0 NM to 129.6 NM)" in text
    assert cautions.path_not_covered(None, 0.75, [(0.0, 1000.0)], METRIC).startswith("The terrain model does")


def test_no_landables_is_said_not_hidden():
    line = Geodesic.WGS84.Line(46.0, -33.0, 0.0)
    s = np.arange(0.0, 10_001.0, 1000.0)
    lats = [line.Position(x)["lat2"] for x in s]
    lons = [line.Position(x)["lon2"] for x in s]
    empty = coverage(lats, lons, s, 0, [], POLAR, Wind(), 1000.0, 200.0)
    assert "no turnpoint is marked landable" in report.landables_text(empty, METRIC)
    assert cautions.NO_LANDABLES in cautions.landables_cautions(empty, METRIC)
    assert math.isclose(report.landables_to_dict(empty)["coverage_percent"], 0.0)
