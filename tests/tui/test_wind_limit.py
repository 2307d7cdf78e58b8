"""Issue 15 item 3: the UI's wind limit is the task file's (200 km/h) in the same words,
and a negative ground speed never reaches the screen (Pilot tests)."""

from __future__ import annotations

import pytest
from conftest import settle, text_of

from glidetask.errors import InputError
from glidetask.formats.task_file import load_scenario
from glidetask.tui import edits
from glidetask.tui.app import make_app
from glidetask.units import AVIATION, KMH, METRIC
from glidetask import paths


def file_wind_problem(tmp_path, speed_kmh: float) -> str:
    """What the task-file reader says about a wind of ``speed_kmh`` (empty if accepted)."""
    import re
    import shutil

    root = paths.demo_task().parents[1]
    folder = tmp_path / f"w{speed_kmh}"
    shutil.copytree(root / "demo_tasks", folder / "demo_tasks")
    shutil.copytree(root / "polars", folder / "polars")
    task = folder / "demo_tasks" / paths.demo_task().name
    task.write_text(re.sub(r"wind = \{[^}]*\}", f"wind = {{ from_deg = 270.0, speed_kmh = {speed_kmh} }}",
                           task.read_text()))
    try:
        load_scenario(task)
    except InputError as error:
        return error.problems[0].what
    return ""


def test_the_ui_takes_the_files_limit_in_the_files_words(tmp_path):
    spec = edits.FIELDS["day-wind"]
    # the task file: 200 accepted, 201 refused
    assert file_wind_problem(tmp_path, 200.0) == ""
    refused = file_wind_problem(tmp_path, 201.0)
    assert refused == "must be in [0, 200], got 201"
    assert edits.parse_wind(spec, "270/200", METRIC).speed_ms == pytest.approx(200.0 * KMH)
    with pytest.raises(InputError) as error:
        edits.parse_wind(spec, "270/201", METRIC)
    assert error.value.problems[0].what == "speed " + refused.replace("], got", "] km/h, got")
    # 200 km/h is 107.99 kt (Source: 1 kt = 1852 m/h, ICAO Annex 5): the limit shown is never above it
    assert edits.parse_wind(spec, "270/107.9", AVIATION).speed_ms < 200.0 * KMH
    with pytest.raises(InputError) as error:
        edits.parse_wind(spec, "270/108", AVIATION)
    assert error.value.problems[0].what == "speed must be in [0, 107.9] kt, got 108"


async def test_a_gale_shows_no_negative_ground_speed(acknowledged):
    app = make_app(paths.demo_task())
    async with app.run_test(size=(120, 40)) as pilot:
        await settle(pilot)
        await pilot.press("3")
        await settle(pilot)
        await pilot.click("#day-wind")
        await pilot.press("home", "ctrl+k", *"270/190", "enter")
        await settle(pilot)
        assert app.scenario.day.wind.speed_ms == pytest.approx(190 * KMH)
        leg = app.plan.plan.legs[0]
        assert leg.glide_ground_speed_ms < 0  # the engine's figure: the glider is blown back
        await pilot.press("1")
        await settle(pilot)
        table = app.screen.query_one("#legs-table")
        assert table.cell(0, "glide_ground_speed_kmh") == "none"
        assert table.cell(0, "time_s") == "out"  # not a 0:05 leg
        for row in range(table.row_count):
            for column in table.columns:
                assert not table.cell(row, column.value).startswith("-"), (row, column)
        await pilot.press("4")
        await settle(pilot)
        assert "-" not in text_of(app.screen.query_one("#glide-verdict")).split("Ground speed")[1].split("\n")[0]
