"""Task files (shared/CONTRACT.md 2.3): the whole scenario, every problem with its key path."""

from __future__ import annotations

import re
import shutil
from dataclasses import replace
from pathlib import Path

import pytest

from glidetask.engine.scenario import Scenario
from glidetask.engine.zones import Zone
from glidetask.errors import InputError
from glidetask.formats.task_file import load_scenario, save_task
from glidetask.units import KMH

ROOT = Path(__file__).resolve().parents[2]
ERROR_LINE = re.compile(r"^glidetask: error: [^:]+: [^:]+: .+$")
DEMO_TASKS = sorted((ROOT / "demo_tasks").glob("*.toml"))

TURNPOINTS = """\
name,code,lat,lon,elevation_m,landable,kind,note
Home Field,HOM,46.05,-33.30,325,true,airfield,
Kellow Hill,KLH,45.70,-34.70,657,false,waypoint,
Quellby Field,QBF,45.15,-33.75,265,true,field,
Vard Cross,VCR,46.00,-33.95,350,false,waypoint,
"""

RACING = """\
# Invented test data.
[task]
name = "Test triangle"
kind = "racing"
turnpoints = "points.csv"

[[task.points]]
at = "HOM"
zone = "line"
length_km = 10.0

[[task.points]]
at = "Kellow Hill"
zone = "sector"
radius_km = 10.0

[[task.points]]
at = "QBF"
zone = "keyhole"

[[task.points]]
at = "home field"
zone = "cylinder"
radius_km = 3.0

[glider]
polar = "polars/racing.toml"
pilot_kg = 85.0
ballast_kg = 100.0
bugs_percent = 5.0

[day]
start_time = "12:15"
start_height_m = 1700.0
band_top_m = 1900.0
band_bottom_m = 850.0
wind = { from_deg = 250.0, speed_kmh = 18.0 }
climb_ms = [["11:00", 1.2], ["12:30", 2.0], ["17:30", 1.0]]
lift_ends = "18:15"

[terrain]
file = "dem.tif"

[safety]
arrival_margin_m = 250.0
"""

AREA = """\
[task]
name = "Test area"
kind = "area"
turnpoints = "points.csv"
min_time_min = 150

[[task.points]]
at = "HOM"
zone = "line"
length_km = 10.0

[[task.points]]
at = "VCR"
zone = "cylinder"
radius_km = 20.0

[[task.points]]
at = "QBF"
zone = "sector"
inner_radius_km = 5.0
radius_km = 30.0
radial_from_deg = 300.0
radial_to_deg = 60.0

[[task.points]]
at = "HOM"
zone = "cylinder"
radius_km = 3.0

[glider]
polar = "polars/racing.toml"

[day]
start_time = "12:30"
band_top_m = 2100.0
band_bottom_m = 900.0
thermal_strength_ms = [["11:00", 2.0], ["13:00", 3.2]]
thermal_radius_m = 120.0
lift_ends = "18:30"
"""


@pytest.fixture
def folder(tmp_path):
    (tmp_path / "points.csv").write_text(TURNPOINTS)
    (tmp_path / "polars").mkdir()
    shutil.copy(ROOT / "polars" / "racing-15m.toml", tmp_path / "polars" / "racing.toml")
    (tmp_path / "dem.tif").write_bytes(b"only its existence is checked here")
    return tmp_path


def _write(folder, text, name="task.toml"):
    path = folder / name
    path.write_text(text)
    return path


def _problems(path):
    with pytest.raises(InputError) as caught:
        load_scenario(path)
    assert all(ERROR_LINE.match(str(p)) for p in caught.value.problems)
    return [(Path(p.file).name, p.where, p.what) for p in caught.value.problems]


# ---------------------------------------------------------------- good files


def test_racing_task_file_into_a_scenario(folder):
    scenario = load_scenario(_write(folder, RACING))
    task = scenario.task
    assert (task.name, task.kind, task.min_time_s) == ("Test triangle", "racing", None)
    assert task.names == ("Home Field", "Kellow Hill", "Quellby Field", "Home Field")  # by code, name, any case
    assert task.zones == (Zone.line(10_000.0), Zone.sector(10_000.0, 90.0),
                          Zone.keyhole(10_000.0, 90.0, 500.0), Zone.cylinder(3_000.0))  # contract defaults
    glider = scenario.glider
    assert (glider.pilot_kg, glider.ballast_kg, glider.bugs_percent) == (85.0, 100.0, 5.0)
    assert glider.mass_kg == pytest.approx(255.0 + 85.0 + 100.0)  # empty mass from the polar file
    assert Path(glider.polar_file) == (folder / "polars" / "racing.toml").resolve()
    day = scenario.day
    assert (day.start_time_s, day.lift_ends_s) == (12 * 3600 + 15 * 60, 18 * 3600 + 15 * 60)
    assert (day.start_height_m, day.band_top_m, day.band_bottom_m) == (1700.0, 1900.0, 850.0)
    assert day.wind.from_deg == 250.0 and day.wind.speed_ms == pytest.approx(18.0 * KMH)
    assert day.climb.times_s == (39600.0, 45000.0, 63000.0) and day.climb.values == (1.2, 2.0, 1.0)
    assert day.thermal_strength is None and day.mc_ms is None
    assert scenario.safety.arrival_margin_m == 250.0 and scenario.safety.terrain_clearance_m == 150.0
    assert Path(scenario.terrain_file) == (folder / "dem.tif").resolve()
    assert len(scenario.turnpoints) == 4 and scenario.source.endswith("task.toml")


def test_wind_profile_in_a_task_file_and_saved_back(folder, tmp_path):
    text = _edit(RACING, "wind = { from_deg = 250.0, speed_kmh = 18.0 }",
                 "wind = [{ height_m = 500.0, from_deg = 250.0, speed_kmh = 10.0 }, "
                 "{ height_m = 2500.0, from_deg = 270.0, speed_kmh = 25.0 }]")
    scenario = load_scenario(_write(folder, text))
    profile = scenario.day.wind
    assert [level.height_m for level in profile.levels] == [500.0, 2500.0]
    assert profile.levels[1].speed_ms == pytest.approx(25.0 * KMH)
    assert scenario.day.wind_at(2500.0).from_deg == pytest.approx(270.0)
    save_task(folder / "copy.toml", scenario)
    assert load_scenario(folder / "copy.toml").day.wind == profile


def test_area_task_file(folder):
    scenario = load_scenario(_write(folder, AREA))
    task = scenario.task
    assert task.kind == "area" and task.min_time_s == 150 * 60.0
    assert task.zones[1] == Zone.area_cylinder(20_000.0)
    assert task.zones[2] == Zone.area_sector(30_000.0, 300.0, 60.0, inner_radius_m=5_000.0)
    assert scenario.day.thermal_strength.values == (2.0, 3.2) and scenario.day.climb is None
    assert scenario.day.thermal_radius_m == 120.0
    assert scenario.glider.pilot_kg == 90.0 and scenario.glider.ballast_kg == 0.0  # defaults
    assert scenario.terrain_file is None


@pytest.mark.parametrize("path", DEMO_TASKS, ids=lambda p: p.name)
def test_save_then_load_gives_the_same_scenario(path, tmp_path):
    original = load_scenario(path)
    (tmp_path / "elsewhere").mkdir()
    copy = tmp_path / "elsewhere" / "copy.toml"
    save_task(copy, original)
    again = load_scenario(copy)
    assert replace(again, source=original.source) == original
    text = copy.read_text()
    assert "Invented demo data" in text  # the leading comment is kept
    assert '"../../' not in text or Path(original.glider.polar_file).is_absolute()
    save_task(tmp_path / "elsewhere" / "twice.toml", again)  # saving is stable
    assert (tmp_path / "elsewhere" / "twice.toml").read_text() == text


def test_save_writes_paths_relative_to_the_new_file(folder):
    scenario = load_scenario(_write(folder, RACING))
    (folder / "sub").mkdir()
    target = folder / "sub" / "edited.toml"
    edited = replace(scenario, task=replace(scenario.task, name="Edited"))
    save_task(target, edited)
    text = target.read_text()
    assert 'turnpoints = "../points.csv"' in text and 'polar = "../polars/racing.toml"' in text
    assert 'file = "../dem.tif"' in text
    assert load_scenario(target).task.name == "Edited"


def test_save_needs_a_turnpoint_file(folder):
    scenario = replace(load_scenario(_write(folder, RACING)), source=None, turnpoints_file=None)
    with pytest.raises(ValueError):
        save_task(folder / "x.toml", scenario)
    save_task(folder / "x.toml", scenario, turnpoints_file=folder / "points.csv")
    assert isinstance(load_scenario(folder / "x.toml"), Scenario)


# ---------------------------------------------------------------- every bad input


def _edit(text, old, new):
    assert old in text, old
    return text.replace(old, new, 1)


BAD_RACING = [
    ('at = "Kellow Hill"', 'at = "Nowhere"', "[[task.points]] 2 at", "no turnpoint named or coded 'Nowhere'"),
    ('at = "Kellow Hill"', 'at = "Kellow Hil"', "[[task.points]] 2 at", "did you mean 'Kellow Hill'"),
    ('zone = "line"', 'zone = "sector"\nradius_km = 5.0', "[[task.points]] 1 zone", "a sector cannot be the start"),
    ('zone = "sector"', 'zone = "line"\nlength_km = 2.0', "[[task.points]] 2 zone", "a line cannot be a turn"),
    ('zone = "cylinder"\nradius_km = 3.0', 'zone = "keyhole"', "[[task.points]] 4 zone",
     "a keyhole cannot be the finish"),
    ('zone = "keyhole"', 'zone = "triangle"', "[[task.points]] 3 zone", "unknown zone 'triangle'"),
    ('zone = "keyhole"', 'zone = "area_cylinder"\nradius_km = 20.0', "[[task.points]] 3 zone",
     "belongs in an area task"),
    ("radius_km = 3.0", "radius_km = 0.0", "[[task.points]] 4 radius_km", "must be greater than 0"),
    ("radius_km = 3.0", "radius_km = -1", "[[task.points]] 4 radius_km", "must be greater than 0"),
    ("length_km = 10.0", "", "[[task.points]] 1 length_km", "missing key"),
    ("radius_km = 3.0", "radius_km = 3.0\nangle_deg = 90.0", "[[task.points]] 4 angle_deg", "does not apply"),
    ('zone = "keyhole"', 'zone = "keyhole"\ncolour = "red"', "[[task.points]] 3 colour", "unknown key"),
    ('kind = "racing"', 'kind = "relay"', "[task] kind", "unknown task kind 'relay'"),
    ('kind = "racing"', 'kind = "racing"\nmin_time_min = 120', "[task] min_time_min", "area tasks"),
    ('["12:30", 2.0]', '["10:30", 2.0]', "[day] climb_ms[2]", "times must increase: 10:30 is not after 11:00"),
    ('["12:30", 2.0]', '["half past", 2.0]', "[day] climb_ms[2]", "HH:MM"),
    ('["12:30", 2.0]', '["12:30", -2.0]', "[day] climb_ms[2]", "in [0, 15] m/s"),
    ('["12:30", 2.0]', '[2.0]', "[day] climb_ms[2]", "must be a pair"),
    ('start_time = "12:15"', 'start_time = "25:00"', "[day] start_time", "HH:MM"),
    ('start_time = "12:15"', 'start_time = "18:30"', "[day] start_time", "before lift_ends"),
    ("band_bottom_m = 850.0", "band_bottom_m = 1950.0", "[day] band_top_m", "must be above band_bottom_m"),
    ("start_height_m = 1700.0", "start_height_m = 2500.0", "[day] start_height_m", "above band_top_m"),
    ("climb_ms = ", "thermal_strength_ms = [[\"12:00\", 3.0]]\nclimb_ms = ", "[day] climb_ms", "exactly one"),
    ("from_deg = 250.0", "from_deg = 400.0", "[day] wind from_deg", "must be in [0, 360]"),
    ("wind = { from_deg = 250.0, speed_kmh = 18.0 }", 'wind = "250/18"', "[day] wind", "must be a table"),
    ("lift_ends", "lift_ends_at", "[day] lift_ends_at", "unknown key"),
    ("wind = { from_deg = 250.0, speed_kmh = 18.0 }", "wind = []", "[day] wind", "at least one"),
    ("wind = { from_deg = 250.0, speed_kmh = 18.0 }", "wind = [{ height_m = 900.0, from_deg = 250.0, speed_kmh = 10.0 }, "
     "{ height_m = 900.0, from_deg = 260.0, speed_kmh = 20.0 }]", "[day] wind[2] height_m", "heights must increase"),
    ("wind = { from_deg = 250.0, speed_kmh = 18.0 }", "wind = [{ height_m = 900.0, from_deg = 250.0 }]",
     "[day] wind[1] speed_kmh", "missing key"),
    ("wind = { from_deg = 250.0, speed_kmh = 18.0 }", "wind = [{ height_m = 900.0, from_deg = 250.0, speed_kmh = 10.0, "
     "gust_kmh = 5.0 }]", "[day] wind[1] gust_kmh", "unknown key"),
    ("wind = { from_deg = 250.0, speed_kmh = 18.0 }", "wind = [250.0]", "[day] wind[1]", "must be a table"),
    ("ballast_kg = 100.0", "ballast_kg = 300.0", "[glider] ballast_kg", "outside 0-170 kg, the polar's maximum"),
    ("bugs_percent = 5.0", "bugs_percent = 150.0", "[glider] bugs_percent", "must be in [0, 100]"),
    ('polar = "polars/racing.toml"', 'polar = "polars/none.toml"', "[glider] polar", "no such file"),
    ('file = "dem.tif"', 'file = "missing.tif"', "[terrain] file", "no such file"),
    ('turnpoints = "points.csv"', 'turnpoints = "nope.csv"', "[task] turnpoints", "no such file"),
    ("arrival_margin_m = 250.0", "arrival_margin_m = -5.0", "[safety] arrival_margin_m", "must be in"),
    ("[safety]", "[weather]", "[weather]", "unknown table"),
    ('lift_ends = "18:15"', 'lift_ends = "18:15"\nstall_margin = 1.01', "[day] stall_margin", "must be in [1.05, 1.5]"),
    ('lift_ends = "18:15"', 'lift_ends = "18:15"\nstall_margin = 2', "[day] stall_margin", "must be in [1.05, 1.5]"),
    ('name = "Test triangle"', 'name = 42', "[task] name", "must be non-empty text"),
]


@pytest.mark.parametrize("old, new, where, what", BAD_RACING, ids=[b[2] + " " + b[3][:20] for b in BAD_RACING])
def test_bad_racing_input(folder, old, new, where, what):
    problems = _problems(_write(folder, _edit(RACING, old, new)))
    assert any(p[0] == "task.toml" and p[1] == where and what in p[2] for p in problems), problems


BAD_AREA = [
    ("min_time_min = 150\n", "", "[task] min_time_min", "needs its minimum time"),
    ("min_time_min = 150", "min_time_min = 0", "[task] min_time_min", "must be greater than 0"),
    ('zone = "cylinder"\nradius_km = 20.0', 'zone = "keyhole"', "[[task.points]] 2 zone",
     "a keyhole cannot be a turn of an area task"),
    ("inner_radius_km = 5.0", "inner_radius_km = 35.0", "[[task.points]] 3 inner_radius_km", "below radius_km"),
    ("radial_from_deg = 300.0\n", "", "[[task.points]] 3 radial_from_deg", "missing key"),
    ("radial_to_deg = 60.0", "radial_to_deg = 361.0", "[[task.points]] 3 radial_to_deg", "must be in [0, 360]"),
    ("radial_to_deg = 60.0", "radial_to_deg = 60.0\nangle_deg = 90.0", "[[task.points]] 3 angle_deg",
     "does not apply"),
    ("thermal_radius_m = 120.0", "thermal_radius_m = 0.0", "[day] thermal_radius_m", "greater than 0"),
    ('thermal_strength_ms = [["11:00", 2.0], ["13:00", 3.2]]\n', "", "[day] climb_ms", "got neither"),
]


@pytest.mark.parametrize("old, new, where, what", BAD_AREA, ids=[b[2] + " " + b[3][:20] for b in BAD_AREA])
def test_bad_area_input(folder, old, new, where, what):
    problems = _problems(_write(folder, _edit(AREA, old, new)))
    assert any(p[1] == where and what in p[2] for p in problems), problems


def test_every_problem_is_reported_at_once(folder):
    text = _edit(_edit(_edit(RACING, 'at = "Kellow Hill"', 'at = "Nowhere"'), "radius_km = 3.0", "radius_km = 0"),
                 '["12:30", 2.0]', '["10:30", 2.0]')
    places = {p[1] for p in _problems(_write(folder, text))}
    assert {"[[task.points]] 2 at", "[[task.points]] 4 radius_km", "[day] climb_ms[2]"} <= places


def test_problems_in_referenced_files_carry_their_names(folder):
    (folder / "points.csv").write_text(TURNPOINTS + "Broken,,95,-33,1,false,,\n")
    polar = folder / "polars" / "racing.toml"
    polar.write_text(polar.read_text().replace("wing_area_m2 = ", "wing_area_m2 = -"))
    problems = _problems(_write(folder, RACING))
    assert ("points.csv", "line 6", "lat must be in [-90, 90], got 95") in problems
    assert any(p[0] == "racing.toml" and p[1] == "[glider] wing_area_m2" for p in problems)


def test_syntax_errors_and_missing_tables(folder):
    problems = _problems(_write(folder, RACING.replace('kind = "racing"', 'kind = "racing')))
    assert problems[0][1].startswith("line ") and "TOML syntax error" in problems[0][2]
    problems = _problems(_write(folder, "[task]\nturnpoints = \"points.csv\"\n"))
    places = {p[1] for p in problems}
    assert {"[glider]", "[day]", "[[task.points]]"} <= places
    problems = _problems(_write(folder, _edit(RACING, 'at = "QBF"\n', "")))
    assert ("task.toml", "[[task.points]] 3 at", "missing key") in problems
    with pytest.raises(InputError, match="no such file"):
        load_scenario(folder / "missing.toml")


def test_too_few_points(folder):
    text = RACING.split("[[task.points]]")[0] + '[[task.points]]\nat = "HOM"\nzone = "line"\nlength_km = 1.0\n' + \
        "[glider]" + RACING.split("[glider]")[1]
    problems = _problems(_write(folder, text))
    assert any(p[1] == "[[task.points]]" and "at least 2 points" in p[2] for p in problems)


def test_loaded_scenario_remembers_its_turnpoint_file(folder):
    # A task built in the UI from a loaded one is saved with the same turnpoint file.
    scenario = load_scenario(_write(folder, RACING))
    assert scenario.turnpoints_file == str((folder / "points.csv").resolve())
    moved = folder / "sub"
    moved.mkdir()
    save_task(moved / "copy.toml", replace(scenario, source=None))
    assert load_scenario(moved / "copy.toml").turnpoints == scenario.turnpoints


def test_a_60_degree_sector_and_a_non_default_keyhole_are_built_and_flown(folder):
    # Source: FAI Sporting Code Section 3, Annex A (zone shapes; the sector's angle and the
    # keyhole's sizes as given), checked against the independent brute-force search of
    # tests/engine/_brute_force.py (pyproj geodesics, exhaustive outline sampling).
    import sys

    sys.path.insert(0, str(ROOT / "tests" / "engine"))
    from _brute_force import brute_force

    from glidetask.engine.task_search import optimized_path

    text = _edit(_edit(RACING, 'zone = "sector"\nradius_km = 10.0', 'zone = "sector"\nradius_km = 10.0\nangle_deg = 60.0'),
                 'zone = "keyhole"', 'zone = "keyhole"\nradius_km = 8.0\nangle_deg = 60.0\ncylinder_radius_km = 1.0')
    task = load_scenario(_write(folder, text)).task
    assert task.zones[1] == Zone.sector(10_000.0, 60.0)
    assert task.zones[2] == Zone.keyhole(8_000.0, 60.0, 1_000.0)
    default = load_scenario(_write(folder, RACING, "default.toml")).task  # 90 deg sector, default keyhole
    # Tolerance: the brute force's grid error is centimetres (tests/engine/test_task.py MATCH_M).
    assert optimized_path(task).total_m == pytest.approx(brute_force(task)[0], abs=0.5)
    # The keyhole's 1 km cylinder (not 0.5) lets the path cut closer: it differs from the default.
    assert optimized_path(task).total_m < optimized_path(default).total_m - 500.0


# ---------------------------------------------------------------- [day] stall_margin


def test_the_stall_margin_sets_the_achieved_climb_as_the_circling_model_says(folder):
    # A constant thermal strength of 3 m/s (on the core's strength grid, so no interpolation):
    # every leg's climb is the circling model's for the glider at the band middle.
    from glidetask.engine import circling
    from glidetask.engine.plan import plan

    text = _edit(AREA, 'thermal_strength_ms = [["11:00", 2.0], ["13:00", 3.2]]', 'thermal_strength_ms = [["11:00", 3.0]]')
    common = load_scenario(_write(folder, text))
    careful = load_scenario(_write(folder, text.replace('lift_ends = "18:30"', 'lift_ends = "18:30"\nstall_margin = 1.3'),
                                   "careful.toml"))
    assert common.day.stall_margin == 1.15  # the default (common practice)
    assert careful.day.stall_margin == 1.3
    day = common.day
    polar = common.glider.polar_at(day.band_middle_m, day.isa_deviation_c)
    climbs = []
    for scenario, margin in ((common, 1.15), (careful, 1.3)):
        expected = float(circling.achieved_climb(polar, 3.0, 120.0, stall_margin=margin).climb_ms)
        legs = [leg for leg in plan(scenario).legs if not leg.final_glide]
        assert legs
        # Tolerance: the core reads the model from a table on a 0.05 m/s strength grid; 3.0 lies on it.
        assert all(leg.climb_ms == pytest.approx(expected, rel=1e-9) for leg in legs)
        climbs.append(expected)
    # Source: circling faster over the stall (a bigger margin) widens the circle into weaker
    # lift and sinks faster (contract section 3, the circling model): less climb.
    assert climbs[1] < climbs[0]


def test_the_stall_margin_is_saved_back(folder):
    text = AREA.replace('lift_ends = "18:30"', 'lift_ends = "18:30"\nstall_margin = 1.25  # a careful pilot')
    scenario = load_scenario(_write(folder, text))
    save_task(folder / "copy.toml", replace(scenario, day=replace(scenario.day, stall_margin=1.2)))
    saved = (folder / "copy.toml").read_text()
    assert "stall_margin = 1.2  # a careful pilot" in saved  # the user's comment kept
    assert load_scenario(folder / "copy.toml").day.stall_margin == 1.2
    save_task(folder / "plain.toml", load_scenario(_write(folder, AREA, "plain-source.toml")))
    assert "stall_margin" not in (folder / "plain.toml").read_text()  # the default is not written


def test_a_bad_stall_margin_is_one_line_naming_file_and_key(folder):
    import subprocess
    import sys

    path = _write(folder, AREA.replace('lift_ends = "18:30"', 'lift_ends = "18:30"\nstall_margin = 1.01'))
    run = subprocess.run([sys.executable, "-m", "glidetask", "plan", str(path)], capture_output=True, text=True)
    assert run.returncode == 2 and run.stdout == ""
    assert run.stderr.splitlines() == [f"glidetask: error: {path}: [day] stall_margin: must be in [1.05, 1.5], got 1.01"]
