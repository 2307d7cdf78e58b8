"""The Day view names and edits the free assumptions behind the figures: the thermal radius
(with its source), the time to centre a climb, the detour and the circling stall margin
(issue 12 item 5: shown on the Day view; the brief: every free assumption shown with its
default and source)."""

from __future__ import annotations

import dataclasses
import shutil
from pathlib import Path

import pytest
from conftest import settle, text_of
from test_refused_input import type_keys

from glidetask.engine.plan import plan
from glidetask.formats.task_file import load_scenario
from glidetask.tui.app import make_app

ROOT = Path(__file__).resolve().parents[2]


@pytest.fixture
def demo_copy(tmp_path) -> Path:
    shutil.copytree(ROOT / "demo_tasks", tmp_path / "demo_tasks")
    shutil.copytree(ROOT / "polars", tmp_path / "polars")
    return tmp_path / "demo_tasks" / "vardmoor-out-and-return.toml"


async def test_the_practical_assumptions_are_shown_with_their_source(demo_copy, acknowledged):
    scenario = load_scenario(demo_copy)
    app = make_app(demo_copy)
    async with app.run_test(size=(80, 24)) as pilot:
        await settle(pilot)
        await pilot.press("3")
        await settle(pilot)
        assert app.screen.query_one("#day-centring_s").value == "30"
        assert app.screen.query_one("#day-detour_percent").value == "5"
        assert app.screen.query_one("#day-stall_margin").value == "1.15"
        assert app.screen.query_one("#day-thermal_radius_m").value == ""  # from the day
        note = " ".join(text_of(app.screen.query_one("#day-practice-note")).split())
        radius = scenario.day.effective_thermal_radius_m
        assert f"Radius {radius:.0f} m: Allen (2006)" in note and "common practice" in note


async def test_editing_them_replans_as_the_engine_does_and_saves_them(demo_copy, acknowledged):
    scenario = load_scenario(demo_copy)
    app = make_app(demo_copy)
    async with app.run_test(size=(120, 40)) as pilot:
        await settle(pilot)
        await pilot.press("3")
        await settle(pilot)
        await type_keys(pilot, "day-centring_s", "60")
        await type_keys(pilot, "day-detour_percent", "10")
        await type_keys(pilot, "day-stall_margin", "1.3")
        await type_keys(pilot, "day-thermal_radius_m", "180")
        expected = plan(dataclasses.replace(scenario, day=dataclasses.replace(
            scenario.day, centring_s=60.0, detour_percent=10.0, stall_margin=1.3, thermal_radius_m=180.0)))
        assert app.plan.plan.total_time_s == pytest.approx(expected.total_time_s, rel=1e-12)
        assert expected.total_time_s > plan(scenario).total_time_s  # slower than the forecast's practice
        await pilot.press("ctrl+s")
        await settle(pilot)
        assert not app.dirty
    saved = load_scenario(demo_copy).day
    assert (saved.centring_s, saved.detour_percent, saved.stall_margin, saved.thermal_radius_m) == (60.0, 10.0, 1.3, 180.0)


async def test_a_stall_margin_out_of_bounds_is_refused_naming_the_field(demo_copy, acknowledged):
    app = make_app(demo_copy)
    async with app.run_test(size=(120, 40)) as pilot:
        await settle(pilot)
        await pilot.press("3")
        await settle(pilot)
        await type_keys(pilot, "day-stall_margin", "1.01")
        shown = text_of(app.screen.query_one("#status-line"))
        assert "Circling x stall" in shown and "must be at least 1.05 x" in shown
        assert app.scenario.day.stall_margin != 1.01
