"""Issue 15 items 2 and 4: a refused entry is never saved, the figures say they are for
the last valid input, and error lines clear once the input is corrected (Pilot tests)."""

from __future__ import annotations

import shutil
from pathlib import Path

import pytest
from conftest import settle, text_of

from glidetask.formats.task_file import load_scenario
from glidetask.tui.app import make_app

ROOT = Path(__file__).resolve().parents[2]


@pytest.fixture
def demo_copy(tmp_path) -> Path:
    shutil.copytree(ROOT / "demo_tasks", tmp_path / "demo_tasks")
    shutil.copytree(ROOT / "polars", tmp_path / "polars")
    return tmp_path / "demo_tasks" / "vardmoor-triangle-300.toml"


async def type_keys(pilot, field_id: str, text: str) -> None:
    """Type ``text`` into a field key by key (every keystroke is tried, as the pilot's are)."""
    await pilot.click(f"#{field_id}")
    await pilot.press("home", "ctrl+k", *text)
    await settle(pilot)


def status(app) -> str:
    return text_of(app.screen.query_one("#status-line"))


async def test_a_refused_entry_is_never_saved(demo_copy, acknowledged):
    before = demo_copy.read_text()
    app = make_app(demo_copy)
    async with app.run_test(size=(120, 40)) as pilot:
        await settle(pilot)
        await pilot.press("3")
        await settle(pilot)
        await type_keys(pilot, "day-isa_deviation_c", "12:05")  # "12" was accepted on the way
        assert "ISA deviation" in status(app) and "expected a number" in status(app)
        await pilot.press("ctrl+s")
        await settle(pilot)
        assert demo_copy.read_text() == before  # nothing written
        assert app.dirty  # the unsaved mark stays
        assert "not saved" in status(app) and "ISA deviation" in status(app)
        # corrected: now it saves
        await type_keys(pilot, "day-isa_deviation_c", "5")
        await pilot.press("ctrl+s")
        await settle(pilot)
        assert not app.dirty
    assert load_scenario(demo_copy).day.isa_deviation_c == 5.0


async def test_figures_say_they_are_for_the_last_valid_input(demo_copy, acknowledged):
    app = make_app(demo_copy)
    async with app.run_test(size=(120, 40)) as pilot:
        await settle(pilot)
        await pilot.press("2")
        await settle(pilot)
        await type_keys(pilot, "glider-ballast_kg", "200")  # "20" is accepted, "200" is too much water
        assert app.scenario.glider.ballast_kg == 20.0  # the last valid input
        assert app.plan.scenario.glider.ballast_kg == 20.0
        shown = status(app)
        assert "Water ballast" in shown
        assert "figures are for the last valid input" in shown
        for key in "12345678":  # every view says so
            await pilot.press("escape", key)
            await settle(pilot)
            assert "figures are for the last valid input" in status(app), key
        await pilot.press("2")
        await settle(pilot)
        await type_keys(pilot, "glider-ballast_kg", "60")
        assert "last valid input" not in status(app)


# ---------------------------------------------------------------- item 4


async def test_a_corrected_wind_leaves_no_error_line_on_any_view(demo_copy, acknowledged):
    app = make_app(demo_copy)
    async with app.run_test(size=(120, 40)) as pilot:
        await settle(pilot)
        await pilot.press("3")
        await settle(pilot)
        await type_keys(pilot, "day-wind", "270/")
        assert "✗ Wind from/speed" in status(app)
        await pilot.press("escape", "4")  # the calculator takes the day's wind
        await settle(pilot)
        await type_keys(pilot, "glide-wind", "270/")
        verdict = text_of(app.screen.query_one("#glide-verdict"))
        assert "✗ Wind: expected a number" in verdict
        await type_keys(pilot, "glide-wind", "270/20")
        assert "✗" not in text_of(app.screen.query_one("#glide-verdict"))
        await pilot.press("escape", "3")
        await settle(pilot)
        await type_keys(pilot, "day-wind", "270/20")
        for key in "12345678":
            await pilot.press("escape", key)
            await settle(pilot)
            assert "✗" not in status(app) and "expected a number" not in status(app), key


async def test_a_failed_open_does_not_hide_later_news(demo_copy, acknowledged, tmp_path):
    broken = tmp_path / "broken.toml"
    broken.write_text("[task\nname = ")
    app = make_app(demo_copy)
    async with app.run_test(size=(120, 40)) as pilot:
        await settle(pilot)
        app._open_path(broken)
        await settle(pilot)
        assert "✗" in status(app)
        await pilot.press("2")
        await settle(pilot)
        await type_keys(pilot, "glider-ballast_kg", "60")
        await pilot.press("escape", "ctrl+s")
        await settle(pilot)
        assert not app.dirty
        assert "saved" in status(app) and "✗" not in status(app)
        await pilot.press("ctrl+e")
        await settle(pilot)
        await pilot.press("enter")
        await settle(pilot)
        assert "exported" in status(app)
