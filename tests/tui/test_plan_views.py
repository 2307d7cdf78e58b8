"""The Task and Day views against the planner: change the day or the glider, read the legs.

Expected figures come from ``glidetask plan``'s own text (the command run as a process for
the demo task, its text renderer for an edited scenario): the UI must show exactly the
figures the command line prints for the same task.
"""

from __future__ import annotations

from dataclasses import replace

import os
import subprocess
import sys
from pathlib import Path

import pytest
from conftest import settle, text_of

from glidetask import paths
from glidetask.engine.scenario import Wind
from glidetask.tui.app import make_app
from glidetask.units import KMH



async def type_into(pilot, field_id: str, text: str) -> None:
    await pilot.click(f"#{field_id}")
    await pilot.press("home", "ctrl+k", *text, "enter")
    await settle(pilot)


# the columns of ``glidetask plan``'s legs table, right to left of the leg's name
CLI_COLUMNS = ("distance_km", "course_deg", "climb_ms", "mc_ms", "indicated_airspeed_kmh", "airspeed_kmh",
               "heading_deg", "glide_ground_speed_kmh", "average_speed_kmh", "time_s", "required_height_m",
               "arrival_height_m")


def legs_of_plan_text(text: str) -> list[dict[str, str]]:
    """The legs table of ``glidetask plan``'s text output, cell by cell."""
    lines = text.splitlines()
    start = next(i for i, line in enumerate(lines) if line.split()[:2] == ["Leg", "Dist"]) + 2
    legs = []
    for line in lines[start:]:
        words = line.split()
        if not words or not words[0].isdigit():
            break
        if words[-1] == "FG":
            words.pop()
        cells = ["–" if w == "-" else "000" if w == "360" else w for w in words[-len(CLI_COLUMNS):]]
        legs.append(dict(zip(CLI_COLUMNS, cells)))
    return legs


def cli_legs(task: Path, units: str = "metric", *options: str) -> list[dict[str, str]]:
    """``glidetask plan TASK --units UNITS OPTIONS`` run as a process: its legs."""
    root = Path(__file__).resolve().parents[2]
    result = subprocess.run([sys.executable, "-m", "glidetask", "plan", str(task), "--units", units, *options],
                            capture_output=True, text=True, check=True, cwd=root,
                            env={**os.environ, "PYTHONPATH": str(root)})
    return legs_of_plan_text(result.stdout)


def text_legs(scenario, units: str = "metric") -> list[dict[str, str]]:
    """The legs ``glidetask plan``'s text renderer prints for an edited scenario."""
    from glidetask.commands.plan import plan_text
    from glidetask.engine.plan import plan

    return legs_of_plan_text(plan_text(plan(scenario), units))


TEXT_ONLY = ()  # at 120 columns the UI shows every column the text plan shows
UI_ONLY = ("start_clock",)  # the clock time at each leg's start (the text plan has it per turnpoint)


def assert_legs_match(table, legs: list[dict[str, str]]) -> None:
    assert legs and table.row_count == len(legs)
    shown = [c.key.value for c in table.ordered_columns][1:]
    assert [k for k in shown if k not in UI_ONLY] == [k for k in CLI_COLUMNS if k not in TEXT_ONLY]
    for row, leg in enumerate(legs):
        for key, expected in ((k, v) for k, v in leg.items() if k not in TEXT_ONLY):
            assert table.cell(row, key) == expected, (row, key)


async def test_demo_legs_are_the_plans_legs(acknowledged):
    app = make_app()
    async with app.run_test(size=(120, 40)) as pilot:
        await settle(pilot)
        assert app.plan is not None
        assert_legs_match(app.screen.query_one("#legs-table"), cli_legs(paths.demo_task()))


async def test_wind_change_in_the_day_view_replans_the_legs(acknowledged):
    app = make_app()
    async with app.run_test(size=(120, 40)) as pilot:
        await settle(pilot)
        first = app.plan
        await pilot.press("3")
        await settle(pilot)
        await type_into(pilot, "day-wind", "300/30")
        assert app.plan is not first
        assert app.scenario.day.wind == Wind(300.0, 30.0 * KMH)
        await pilot.press("1")
        await settle(pilot)
        assert_legs_match(app.screen.query_one("#legs-table"), cli_legs(paths.demo_task(), "metric", "--wind", "300/30"))


async def test_ballast_change_replans_in_aviation_units(acknowledged):
    app = make_app(units="aviation")
    async with app.run_test(size=(120, 40)) as pilot:
        await settle(pilot)
        await pilot.press("2")
        await settle(pilot)
        await type_into(pilot, "glider-ballast_kg", "0")
        await pilot.press("1")
        await settle(pilot)
        edited = app.scenario
        assert edited.glider.ballast_kg == 0.0
        assert_legs_match(app.screen.query_one("#legs-table"),
                          cli_legs(paths.demo_task(), "aviation", "--ballast-kg", "0"))


async def test_invalid_band_is_refused_and_the_last_good_plan_kept(acknowledged):
    app = make_app()
    async with app.run_test(size=(120, 40)) as pilot:
        await settle(pilot)
        await pilot.press("3")
        await settle(pilot)
        good_plan, good_scenario = app.plan, app.scenario
        # pasted in one go (typed key by key, "2" and "25" and "250" would each be a good band)
        app.screen.query_one("#day-band_bottom_m").value = "2500"  # above the band top (2000 m)
        await settle(pilot)
        assert app.scenario.day.band_bottom_m == good_scenario.day.band_bottom_m
        assert app.plan is good_plan
        assert app.screen.query_one("#day-band_bottom_m").has_class("-invalid")
        assert any("band" in p.what for p in app.problems)
        await pilot.press("1")
        await settle(pilot)
        assert "last good plan" in text_of(app.screen.query_one("#plan-totals"))
        assert_legs_match(app.screen.query_one("#legs-table"), text_legs(good_plan.scenario))
        await pilot.press("3")
        await settle(pilot)
        app.screen.query_one("#day-band_top_m").value = "2800"  # now the refused bottom fits
        await settle(pilot)
        assert app.scenario.day.band_bottom_m == 2500.0
        assert not app.invalid_fields


async def test_lift_profile_edit_replans(acknowledged):
    app = make_app()
    async with app.run_test(size=(120, 40)) as pilot:
        await settle(pilot)
        await pilot.press("3")
        await settle(pilot)
        before = app.scenario.day.climb
        app.screen.query_one("#profile-table").focus()
        await pilot.press("down")  # the 12:30 row
        await settle(pilot)
        assert app.screen.query_one("#profile-time").value == "12:30"
        await pilot.click("#profile-value")
        await pilot.press("home", "ctrl+k", *"3.0", "enter")
        await settle(pilot)
        climb = app.scenario.day.climb
        assert climb.times_s == before.times_s
        assert climb.values[1] == 3.0 and climb.values[0] == before.values[0]
        await pilot.press("1")
        await settle(pilot)
        assert_legs_match(app.screen.query_one("#legs-table"), text_legs(app.scenario))


async def test_totals_show_what_glidetask_plan_prints(acknowledged):
    root = Path(__file__).resolve().parents[2]
    for units in ("metric", "aviation"):
        printed = subprocess.run([sys.executable, "-m", "glidetask", "plan", str(paths.demo_task()), "--units", units],
                                 capture_output=True, text=True, check=True, cwd=root,
                                 env={**os.environ, "PYTHONPATH": str(root)}).stdout
        total = next(line for line in printed.splitlines() if line.startswith("Total "))
        final = next(line for line in printed.splitlines() if line.startswith("Final "))
        # "Total     2:57 for 313.9 km at 106 km/h task speed; finish 15:12"
        words = total.split()
        duration, distance, speed, finish = words[1], " ".join(words[3:5]), " ".join(words[6:8]), words[-1]
        app = make_app(paths.demo_task(), units)
        async with app.run_test(size=(120, 40)) as pilot:
            await settle(pilot)
            text = " ".join(text_of(app.screen.query_one("#plan-totals")).split())
        for figure in (duration, distance, speed, finish):
            assert figure in text, (figure, text)
        # "Final     glide from 287.5 km (26.4 km out) at 1279 m, MacCready 2.0 m/s, fly 169 km/h IAS (178 TAS)":
        # the UI shows all but the true airspeed
        cli = " ".join(final.split()[1:])
        assert cli.endswith(" TAS)") and cli.rsplit(" (", 1)[0] in text, (final, text)


def test_demo_task_is_the_default(acknowledged):
    assert make_app()._initial_path == paths.demo_task()


async def test_demo_scenario_unchanged_by_viewing(acknowledged):
    app = make_app()
    async with app.run_test(size=(120, 40)) as pilot:
        await settle(pilot)
        original = replace(app.scenario)
        for key in "2345671":
            await pilot.press(key)
            await settle(pilot)
        assert app.scenario == original
        assert not app.dirty
