"""The Task and Day views against the planner: change the day or the glider, read the legs.

Expected figures come from the engine itself (``engine.planner.plan`` on the same edited
scenario, put in contract form by ``formats.plan_json``) and are formatted through
``glidetask.units``: the UI must show exactly what the plan says.
"""

from __future__ import annotations

from dataclasses import replace

import pytest
from conftest import settle, text_of

from glidetask import paths
from glidetask.engine.scenario import Wind
from glidetask.tui.app import make_app
from glidetask.units import AVIATION, KMH, METRIC

pytest.importorskip("glidetask.engine.planner")


def expected_summary(scenario):
    from glidetask.engine.planner import plan
    from glidetask.formats.plan_json import plan_to_dict

    return plan_to_dict(plan(scenario))


async def type_into(pilot, field_id: str, text: str) -> None:
    await pilot.click(f"#{field_id}")
    await pilot.press("home", "ctrl+k", *text, "enter")
    await settle(pilot)


def assert_legs_match(table, summary, units) -> None:
    assert table.row_count == len(summary["legs"])
    for row, leg in enumerate(summary["legs"]):
        assert table.cell(row, "distance_km") == units.fmt_distance(leg["distance_km"] * 1000.0).split()[0]
        assert table.cell(row, "cruise_speed_kmh") == units.fmt_speed(leg["cruise_speed_kmh"] * KMH).split()[0]
        assert table.cell(row, "airspeed_kmh") == units.fmt_speed(leg["airspeed_kmh"] * KMH).split()[0]
        assert table.cell(row, "required_height_m") == units.fmt_height(leg["required_height_m"]).split()[0]
        assert table.cell(row, "arrival_height_m") == units.fmt_height(leg["arrival_height_m"]).split()[0]
        assert table.cell(row, "climb_ms") == units.fmt_vertical(leg["climb_ms"]).split()[0]
        assert table.cell(row, "time_s") == f"{int(round(leg['time_s'] / 60)) // 60}:{int(round(leg['time_s'] / 60)) % 60:02d}"


async def test_demo_legs_are_the_plans_legs(acknowledged):
    app = make_app()
    async with app.run_test(size=(120, 40)) as pilot:
        await settle(pilot)
        assert app.plan is not None
        assert_legs_match(app.screen.query_one("#legs-table"), expected_summary(app.scenario), METRIC)


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
        assert_legs_match(app.screen.query_one("#legs-table"), expected_summary(app.scenario), METRIC)


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
        assert_legs_match(app.screen.query_one("#legs-table"), expected_summary(edited), AVIATION)


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
        assert_legs_match(app.screen.query_one("#legs-table"), good_plan.summary, METRIC)
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
        assert_legs_match(app.screen.query_one("#legs-table"), expected_summary(app.scenario), METRIC)


async def test_totals_show_the_finish_and_the_final_glide(acknowledged):
    app = make_app(paths.demo_task())
    async with app.run_test(size=(120, 40)) as pilot:
        await settle(pilot)
        summary = expected_summary(app.scenario)
        text = text_of(app.screen.query_one("#plan-totals"))
        assert summary["finish_time"] in text
        assert METRIC.fmt_distance(summary["final_glide"]["from_km"] * 1000.0) in text
        assert METRIC.fmt_height(summary["final_glide"]["start_height_m"]) in text


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
