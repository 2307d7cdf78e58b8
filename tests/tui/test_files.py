"""Open, edit, save and reopen a task file from the UI; a bad file is a message, not a crash."""

from __future__ import annotations

import shutil
from pathlib import Path

import pytest
from conftest import settle

from glidetask.formats.task_file import load_scenario
from glidetask.tui.app import make_app

ROOT = Path(__file__).resolve().parents[2]


@pytest.fixture
def demo_copy(tmp_path) -> Path:
    """The demo folders copied, so the task's relative paths (../polars) still hold."""
    shutil.copytree(ROOT / "demo_tasks", tmp_path / "demo_tasks")
    shutil.copytree(ROOT / "polars", tmp_path / "polars")
    return tmp_path / "demo_tasks" / "vardmoor-triangle-300.toml"


async def type_into(pilot, field_id: str, text: str) -> None:
    await pilot.click(f"#{field_id}")
    await pilot.press("home", "ctrl+k", *text, "enter")
    await settle(pilot)


async def test_edit_save_and_reopen(demo_copy, acknowledged):
    app = make_app(demo_copy)
    async with app.run_test(size=(120, 40)) as pilot:
        await settle(pilot)
        assert app.scenario.task.name == "Vardmoor 300 km triangle"
        await pilot.press("2")
        await settle(pilot)
        await type_into(pilot, "glider-ballast_kg", "60")
        await pilot.press("3")
        await settle(pilot)
        await type_into(pilot, "day-wind", "300/25")
        assert app.dirty
        await pilot.press("ctrl+s")
        await settle(pilot)
        assert not app.dirty
        assert "saved" in app.notice
    reread = load_scenario(demo_copy)
    assert reread.glider.ballast_kg == 60.0
    assert reread.day.wind.from_deg == 300.0
    assert abs(reread.day.wind.speed_ms - 25.0 / 3.6) < 1e-9
    leftovers = [p.name for p in demo_copy.parent.iterdir() if p.name.endswith(".tmp")]
    assert not leftovers  # an atomic save leaves no temporary file behind

    again = make_app(demo_copy)
    async with again.run_test(size=(120, 40)) as pilot:
        await settle(pilot)
        await pilot.press("3")
        await settle(pilot)
        assert again.screen.query_one("#day-wind").value == "300/25"


async def test_save_as_and_open_from_the_dialog(demo_copy, acknowledged):
    target = demo_copy.parent / "my-task.toml"
    app = make_app(demo_copy)
    async with app.run_test(size=(120, 40)) as pilot:
        await settle(pilot)
        app.action_save_as()
        await pilot.pause()
        field = app.screen.query_one("#path-input")
        field.value = str(target)
        await pilot.press("enter")
        await settle(pilot)
        assert target.exists()
        assert app.task_path == target
        app.action_open()
        await pilot.pause()
        await pilot.press("tab")  # from the list of files to the path typed
        assert app.screen.query_one("#path-input").has_focus
        app.screen.query_one("#path-input").value = str(demo_copy.parent / "vardmoor-out-and-return.toml")
        await pilot.press("enter")
        await settle(pilot)
        assert "out" in app.scenario.task.name.lower() or len(app.scenario.task.points) == 3


async def test_a_bad_task_file_is_reported_in_the_app(tmp_path, acknowledged):
    bad = tmp_path / "bad.toml"
    bad.write_text("[task]\nname = 3\n", encoding="utf-8")
    app = make_app(bad)
    async with app.run_test(size=(120, 40)) as pilot:
        await settle(pilot)
        assert app.is_running
        assert app.problems
        assert all(str(bad) in p.file or p.file.endswith("bad.toml") for p in app.problems)
        status = str(app.screen.query_one("#status-line").render())
        assert "bad.toml" in status


async def test_saving_the_bundled_demo_saves_a_copy_and_leaves_the_demo_alone(tmp_path, monkeypatch, acknowledged):
    from glidetask import paths

    monkeypatch.chdir(tmp_path)
    bundled = paths.demo_task()
    shipped = bundled.read_bytes()
    app = make_app()
    async with app.run_test(size=(120, 40)) as pilot:
        await settle(pilot)
        await pilot.press("2")
        await settle(pilot)
        await type_into(pilot, "glider-ballast_kg", "40")
        await pilot.press("ctrl+s")
        await pilot.pause()
        field = app.screen.query_one("#path-input")  # asked where, not written over the demo
        assert field.value == str(tmp_path / bundled.name)
        await pilot.press("enter")
        await settle(pilot)
        assert app.task_path == tmp_path / bundled.name and not app.dirty
        await pilot.press("ctrl+e")
        await pilot.pause()
        assert app.screen.query_one("#export-path").value.startswith(str(tmp_path))
    assert bundled.read_bytes() == shipped
    copy = load_scenario(tmp_path / bundled.name)  # its turnpoints and polar still found
    assert copy.glider.ballast_kg == 40.0 and copy.task.name == "Vardmoor 300 km triangle"


async def test_quitting_with_changes_to_the_demo_saves_a_copy(tmp_path, monkeypatch, acknowledged):
    from glidetask import paths

    monkeypatch.chdir(tmp_path)
    shipped = paths.demo_task().read_bytes()
    app = make_app()
    async with app.run_test(size=(120, 40)) as pilot:
        await settle(pilot)
        await pilot.press("2")
        await settle(pilot)
        await type_into(pilot, "glider-bugs_percent", "10")
        await pilot.press("ctrl+q")
        await pilot.pause()
        await pilot.press("s")
        await pilot.pause()
        app.screen.query_one("#path-input").value = str(tmp_path / "mine.toml")
        await pilot.press("enter")
        await settle(pilot)
    assert app.return_code == 0
    assert paths.demo_task().read_bytes() == shipped
    assert load_scenario(tmp_path / "mine.toml").glider.bugs_percent == 10.0


async def test_typing_in_the_open_dialog_adds_to_the_folder_given(demo_copy, acknowledged):
    app = make_app(demo_copy)
    async with app.run_test(size=(120, 40)) as pilot:
        await settle(pilot)
        await pilot.press("ctrl+o")
        await pilot.pause()
        field = app.screen.query_one("#path-input")
        assert field.value == str(demo_copy.parent) + "/"
        await pilot.press("tab")  # past the list of files, to the path
        await pilot.press(*"vardmoor-out-and-return.toml", "enter")
        await settle(pilot)
        assert app.task_path == demo_copy.parent / "vardmoor-out-and-return.toml"
        assert app.task_path.is_absolute()
