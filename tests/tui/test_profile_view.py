"""Issues 11 (item 4), 13 (item 4) and 16 (item 3) in the terminal UI: the Profile view draws
the plan's own profile over the terrain and under the airspace; the sketch draws airspace
outlines; Safety lists conflicts and capped tops; the Day view draws the sounding.

The figures drawn are the engine's (``Plan.profile``, ``Plan.airspace``,
``engine.sounding.sounding_drawing``) checked here for where they land on screen and in
which words and units; the engine's own figures are checked against outside sources in
tests/engine.
"""

from __future__ import annotations

import re
import shutil
from pathlib import Path

import numpy as np
import pytest
from conftest import settle, text_of

from glidetask import cautions, paths
from glidetask.tui.app import make_app
from glidetask.units import AVIATION, METRIC

DEMO = Path(paths.demo_task()).parent
CARELESS = DEMO / "vardmoor-careless-setter.toml"
FORECAST = DEMO / "vardmoor-forecast-day.toml"


def screen_text(app) -> str:
    return "\n".join("".join(s.text for s in strip) for strip in app.screen._compositor.render_strips())


@pytest.fixture(scope="module")
def triangle_plan():
    from glidetask.engine.plan import plan
    from glidetask.formats.task_file import load_scenario

    return plan(load_scenario(Path(paths.demo_task())))


@pytest.fixture(scope="module")
def careless_plan():
    from glidetask.engine.plan import plan
    from glidetask.formats.task_file import load_scenario

    return plan(load_scenario(CARELESS))


# ---------------------------------------------------------------- the drawing itself


def test_least_clearance_is_marked_where_the_profile_says(triangle_plan):
    from glidetask.tui.profile_drawing import profile_cells

    grid, scale = profile_cells(triangle_plan, 20, 70)
    p = triangle_plan.profile
    gap = p.height_m - p.terrain_m
    at = float(p.distance_m[int(np.nanargmin(gap))])  # the least clearance, found here from the arrays
    row, column = scale.row(float(np.interp(at, p.distance_m, p.height_m))), scale.column(at)
    assert grid[row][column] == "least"
    assert sum(cell == "least" for line in grid for cell in line) == 1


def test_terrain_fills_below_the_ground_and_never_above_the_flight(triangle_plan):
    from glidetask.tui.profile_drawing import profile_cells

    grid, scale = profile_cells(triangle_plan, 24, 60)
    p = triangle_plan.profile
    known = np.isfinite(p.terrain_m)
    for column, middle in enumerate(scale.middles_m()):
        ground = float(np.interp(middle, p.distance_m[known], p.terrain_m[known]))
        layers = [grid[row][column] for row in range(scale.rows)]
        assert layers[-1] == "terrain"  # the bottom row is the ground (0 m MSL or below)
        flight = [row for row, layer in enumerate(layers) if layer in ("glide", "final", "climb")]
        ground_row = scale.row(ground)
        # no terrain glyph above the ground's row; the flight drawn above it
        assert all(layer != "terrain" for layer in layers[:ground_row])
        if flight:
            assert max(flight) < ground_row


def test_the_capped_band_top_is_drawn_over_its_stretch_at_its_height(triangle_plan):
    from glidetask.tui.profile_drawing import profile_cells

    caps = triangle_plan.airspace.caps
    assert caps, "the demo triangle has a band capped on leg 2"
    grid, scale = profile_cells(triangle_plan, 30, 120)
    cap = caps[0]
    columns = [c for c, m in enumerate(scale.middles_m()) if cap.from_m <= m <= cap.to_m]
    row = scale.row(cap.top_m)
    drawn = [grid[row][c] for c in columns]
    # the cap, or the flight touching it at the tops of its climbs; nothing else on that row
    assert set(drawn) <= {"cap", "climb", "glide", "least"} and drawn.count("cap") >= len(columns) // 3
    outside = [c for c, m in enumerate(scale.middles_m()) if not (cap.from_m - 5000 <= m <= cap.to_m + 5000)]
    assert all(grid[row][c] != "cap" for c in outside)


def test_a_crossed_volume_is_shaded_as_crossed(careless_plan):
    from glidetask.tui.profile_drawing import profile_cells

    conflicts = careless_plan.airspace.conflicts
    assert conflicts
    grid, scale = profile_cells(careless_plan, 24, 100)
    zone = next(c for c in conflicts if c.from_ground)
    middle = 0.5 * (zone.from_m + zone.to_m)
    column = scale.column(middle)
    layers = {grid[row][column] for row in range(scale.rows)}
    assert "conflict" in layers
    # outside every stretch of airspace along the path, no column is shaded
    stretches = careless_plan.airspace.stretches
    free = [c for c, m in enumerate(scale.middles_m())
            if all(not (s.from_m - 3000 <= m <= s.to_m + 3000) for s in stretches)]
    assert free
    assert all(grid[row][c] not in ("conflict", "airspace") for c in free for row in range(scale.rows))


@pytest.mark.parametrize("units", [METRIC, AVIATION])
def test_heights_and_distances_are_labelled_in_the_units(triangle_plan, units):
    from glidetask.tui.profile_drawing import profile_facts, profile_text

    text = profile_text(triangle_plan, units, 78, 16).plain
    assert f" {units.height_label} ┤" in text
    other = "ft" if units is METRIC else " m "
    assert other not in text.splitlines()[0]
    facts = profile_facts(triangle_plan, units)
    least = triangle_plan.profile.least_clearance
    assert facts[0] == (f"Least clearance over the terrain {units.fmt_height(least[0])} at "
                        f"{units.fmt_distance(least[1])}")
    assert cautions.airspace_cap(triangle_plan.airspace.caps[0], units) in facts


def test_the_drawing_fits_its_box(triangle_plan):
    from glidetask.tui.profile_drawing import profile_text

    for width, height in ((78, 14), (118, 28), (40, 10)):
        lines = profile_text(triangle_plan, METRIC, width, height).plain.split("\n")
        assert len(lines) <= height
        assert max(len(line) for line in lines) <= width


# ---------------------------------------------------------------- in the app (Pilot)


@pytest.mark.parametrize("size", [(80, 24), (120, 40)])
async def test_profile_view_shows_the_plan_profile(acknowledged, size):
    app = make_app(paths.demo_task())
    async with app.run_test(size=size) as pilot:
        await settle(pilot)
        await pilot.press("8")
        await settle(pilot)
        plan = app.plan.plan
        text = screen_text(app)
        assert "8 Profile" in text and "Planned height along the task" in text
        least = plan.profile.least_clearance
        assert f"Least clearance over the terrain {METRIC.fmt_height(least[0])}" in text
        assert "≈" in text and "✕" in text and "┃" in text and "█" in text
        assert "…" not in text.replace("planning …", "")
        await pilot.press("u")
        await settle(pilot)
        text = screen_text(app)
        assert f"Least clearance over the terrain {AVIATION.fmt_height(least[0])}" in text
        assert " ft ┤" in text and " m ┤" not in text


async def test_profile_view_follows_an_edit(acknowledged):
    app = make_app(paths.demo_task())
    async with app.run_test(size=(120, 40)) as pilot:
        await settle(pilot)
        await pilot.press("8")
        await settle(pilot)
        before = str(app.screen.query_one("#flight-profile").render())
        await pilot.press("3")
        await settle(pilot)
        field = app.screen.query_one("#day-band_bottom_m")
        field.value = "700"
        await field.action_submit()
        await settle(pilot, 6)
        await pilot.press("8")
        await settle(pilot)
        assert app.scenario.day.band_bottom_m == 700.0
        widget = app.screen.query_one("#flight-profile")
        from glidetask.tui.profile_drawing import profile_text

        region = widget.content_region
        assert str(widget.render()) == profile_text(app.plan.plan, METRIC, region.width, region.height,
                                                    widget.codes).plain
        assert before != str(widget.render())


async def test_sketch_and_safety_show_the_crossed_zone(acknowledged):
    app = make_app(CARELESS)
    async with app.run_test(size=(120, 40)) as pilot:
        await settle(pilot)
        sketch = app.screen.query_one("#task-sketch").sketch
        kinds = {kind for _, _, kind in sketch.airspace}
        assert {"conflict", "crossed"} <= kinds or "conflict" in kinds
        assert "near" in kinds or "crossed" in kinds
        plan = app.plan.plan
        await pilot.press("5")
        await settle(pilot)
        text = screen_text(app).replace("\n", " ")
        first = cautions.airspace_conflict(plan.airspace.conflicts[0], METRIC)
        assert first.split(",")[0] in text  # "Leg 2 enters Brennick Zone (class D)"
        assert "Airspace along the task" in text and "conflict" in text
        panel = re.sub(r"\s+", " ", text_of(app.screen.query_one("#safety-airspace"), 116))
        assert cautions.AIRSPACE[0] in panel  # the airspace caution beside the airspace figures


async def test_sketch_draws_outlines_near_the_task_only(acknowledged, triangle_plan):
    from glidetask.tui.sketch_geometry import NEAR_DEG, near_volumes

    scenario = triangle_plan.scenario
    task = scenario.task
    near = near_volumes(scenario.airspace, task.lats, task.lons)
    for index, volume in enumerate(scenario.airspace.volumes):
        west, south, east, north = volume.bbox
        far = (south > max(task.lats) + NEAR_DEG or north < min(task.lats) - NEAR_DEG
               or west > max(task.lons) + NEAR_DEG or east < min(task.lons) - NEAR_DEG)
        assert (index in near) == (not far)


# ---------------------------------------------------------------- the day from a sounding


async def test_day_view_draws_the_sounding(acknowledged):
    from glidetask.engine.sounding import sounding_drawing

    app = make_app(FORECAST)
    async with app.run_test(size=(120, 60)) as pilot:
        await settle(pilot)
        await pilot.press("3")
        await settle(pilot)
        panel = app.screen.query_one("#day-sounding")
        assert panel.display
        text = screen_text(app)
        assert "From vardmoor-sounding.csv" in text and "Typed over it: none" in text
        assert "● temperature" in text and "○ dew point" in text and "╱ rising" in text
        assert "━ band" in text and "☁ cloud base" in text
        source = app.scenario.day_source
        drawing = sounding_drawing(source.sounding, source.derived)
        assert f"{METRIC.fmt_height(drawing.height_m[0])}┤" in text.replace(" ┤", "┤")
        await pilot.press("u")
        await settle(pilot)
        assert f"{AVIATION.fmt_height(drawing.height_m[0])}┤" in screen_text(app).replace(" ┤", "┤")


def test_the_sounding_is_drawn_where_its_temperatures_are():
    from glidetask.engine.sounding import sounding_drawing
    from glidetask.formats.task_file import load_scenario
    from glidetask.tui.sounding_text import sounding_text

    source = load_scenario(FORECAST).day_source
    drawing = sounding_drawing(source.sounding, source.derived)
    lines = sounding_text(drawing, METRIC, 42, 9).plain.split("\n")
    bottom = lines[8]
    # the surface level: temperature right of the dew point (dew point below temperature)
    assert bottom.index("●") > bottom.index("○")
    # the parcel starts at the surface temperature of the warmest hour: its stroke reaches the bottom row
    assert "╱" in bottom or "╱" in lines[7]
    left, right = lines[9].split()[0], lines[9].split()[2]
    # the temperature axis spans the surface dew point and the warmest surface parcel
    assert float(left) <= drawing.dewpoint_k[0] - 273.15
    assert float(right) >= float(drawing.parcel_temperature_k[0] - 273.15)


async def test_day_view_names_the_keys_typed_over_the_sounding(acknowledged, tmp_path):
    for name in ("vardmoor-sounding.csv", "terrain.tif", "vardmoor-turnpoints.csv"):
        if (DEMO / name).exists():
            shutil.copy(DEMO / name, tmp_path / name)
    text = FORECAST.read_text().replace('start_time = "12:30"', 'start_time = "12:30"\nband_bottom_m = 1100.0')
    for line in text.splitlines():  # every file the task names, copied beside it
        if line.strip().startswith(("file =", "turnpoints =", "polar =")):
            name = line.split("=", 1)[1].strip().strip('"')
            if (DEMO / name).exists() and not (tmp_path / name).exists():
                (tmp_path / name).parent.mkdir(parents=True, exist_ok=True)
                shutil.copy(DEMO / name, tmp_path / name)
    task = tmp_path / "typed.toml"
    task.write_text(text)
    app = make_app(task)
    async with app.run_test(size=(120, 60)) as pilot:
        await settle(pilot)
        await pilot.press("3")
        await settle(pilot)
        assert app.scenario.day_source.overridden == ("band_bottom_m",)
        panel = re.sub(r"\s+", " ", text_of(app.screen.query_one("#day-sounding"), 40))
        assert "Typed over it: band_bottom_m." in panel
        assert "typed: band_bottom_m" in screen_text(app)  # under the Air panel, in view at any size


async def test_day_view_without_a_sounding_draws_none(acknowledged):
    app = make_app(paths.demo_task())
    async with app.run_test(size=(120, 40)) as pilot:
        await settle(pilot)
        await pilot.press("3")
        await settle(pilot)
        assert not app.screen.query_one("#day-sounding").display
