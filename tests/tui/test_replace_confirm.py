"""Issue 14: the UI never replaces a file the pilot did not say it may replace.

Save As and Export over an existing file ask first, naming it (the command line asks for
``--force`` instead); "Keep it" leaves the file byte for byte as it was, "Replace" writes the
new file whole (atomically: a failed write leaves the old one); a file the task reads is
never replaced at all. (Source: shared/CONTRACT.md section 7 and issue 14, "Files lost or
damaged".)
"""

from __future__ import annotations

import shutil
from pathlib import Path

import pytest
from conftest import settle

from glidetask.formats.task_file import load_scenario
from glidetask.tui.app import make_app
from glidetask.tui.screens.confirm_modal import ConfirmModal

ROOT = Path(__file__).resolve().parents[2]
OTHER = "# someone else's notes, not a task\nkeep = true\n"


@pytest.fixture
def demo_copy(tmp_path) -> Path:
    """The demo folders copied, so the task's relative paths (../polars) still hold."""
    shutil.copytree(ROOT / "demo_tasks", tmp_path / "demo_tasks")
    shutil.copytree(ROOT / "polars", tmp_path / "polars")
    return tmp_path / "demo_tasks" / "vardmoor-triangle-300.toml"


def leftovers(folder: Path) -> list[str]:
    return [p.name for p in folder.iterdir() if p.name.endswith(".tmp")]


def question(app) -> str:
    assert isinstance(app.screen, ConfirmModal), f"no question asked (on {type(app.screen).__name__})"
    return str(app.screen.query_one(".question-text").render())


async def save_as(pilot, target: Path) -> None:
    pilot.app.action_save_as()
    await pilot.pause()
    pilot.app.screen.query_one("#path-input").value = str(target)
    await pilot.press("enter")
    await settle(pilot)


async def export_to(pilot, target: Path) -> None:
    await pilot.press("ctrl+e")
    await pilot.pause()
    pilot.app.screen.query_one("#export-path").value = str(target)
    await pilot.press("enter")
    await settle(pilot)


@pytest.mark.parametrize("answer", ["no", "escape"])
async def test_save_as_over_an_existing_file_asks_and_no_keeps_it(demo_copy, acknowledged, answer):
    target = demo_copy.parent / "notes.toml"
    target.write_text(OTHER, encoding="utf-8")
    before = target.read_bytes()
    app = make_app(demo_copy)
    async with app.run_test(size=(80, 24)) as pilot:
        await settle(pilot)
        await save_as(pilot, target)
        assert str(target) in question(app) and "Replace" in question(app)
        if answer == "no":
            await pilot.click("#answer-no")
        else:
            await pilot.press("escape")
        await settle(pilot)
        assert not isinstance(app.screen, ConfirmModal)
        assert app.task_path == demo_copy  # still the task's own file
        assert "kept" in app.notice
    assert target.read_bytes() == before


async def test_enter_on_the_question_does_not_replace(demo_copy, acknowledged):
    """The focus starts on "Keep it": a stray enter never replaces a file."""
    target = demo_copy.parent / "notes.toml"
    target.write_text(OTHER, encoding="utf-8")
    app = make_app(demo_copy)
    async with app.run_test(size=(80, 24)) as pilot:
        await settle(pilot)
        await save_as(pilot, target)
        question(app)
        await pilot.press("enter")
        await settle(pilot)
    assert target.read_text(encoding="utf-8") == OTHER


async def test_save_as_over_an_existing_file_replaces_it_whole_on_yes(demo_copy, acknowledged):
    target = demo_copy.parent / "notes.toml"
    target.write_text(OTHER, encoding="utf-8")
    app = make_app(demo_copy)
    async with app.run_test(size=(80, 24)) as pilot:
        await settle(pilot)
        await save_as(pilot, target)
        await pilot.click("#answer-yes")
        await settle(pilot)
        assert app.task_path == target and not app.dirty
        assert app.notice == f"saved {target}"
    assert load_scenario(target).task.name == "Vardmoor 300 km triangle"
    assert "keep = true" not in target.read_text(encoding="utf-8")
    assert not leftovers(target.parent)


async def test_a_failed_replace_leaves_the_old_file(demo_copy, acknowledged, monkeypatch):
    """Replaced atomically: a write that fails at the rename leaves the old file whole and no
    temporary file behind."""
    import os

    from glidetask.formats import atomic

    target = demo_copy.parent / "notes.toml"
    target.write_text(OTHER, encoding="utf-8")

    def failing_replace(source, destination):
        raise OSError(28, "No space left on device")

    app = make_app(demo_copy)
    async with app.run_test(size=(80, 24)) as pilot:
        await settle(pilot)
        await save_as(pilot, target)
        monkeypatch.setattr(atomic.os, "replace", failing_replace)
        await pilot.click("#answer-yes")
        await settle(pilot)
        monkeypatch.setattr(atomic.os, "replace", os.replace)
        assert "not saved" in app.notice and app.task_path == demo_copy
    assert target.read_text(encoding="utf-8") == OTHER
    assert not leftovers(target.parent)


async def test_save_as_to_the_tasks_own_file_asks_nothing(demo_copy, acknowledged):
    app = make_app(demo_copy)
    async with app.run_test(size=(80, 24)) as pilot:
        await settle(pilot)
        await save_as(pilot, demo_copy)
        assert not isinstance(app.screen, ConfirmModal)
        assert app.notice == f"saved {demo_copy}"


@pytest.mark.parametrize("name", ["vardmoor.geojson", "../polars/racing-15m.toml", "terrain.tif",
                                  "vardmoor-airspace.geojson"])
async def test_save_as_never_replaces_a_file_the_task_reads(demo_copy, acknowledged, name):
    target = (demo_copy.parent / name).resolve()
    before = target.read_bytes()
    app = make_app(demo_copy)
    async with app.run_test(size=(80, 24)) as pilot:
        await settle(pilot)
        await save_as(pilot, target)
        assert not isinstance(app.screen, ConfirmModal)  # not even asked
        assert "a file the task reads" in app.notice and app.task_path == demo_copy
        assert any("a file the task reads" in p.what for p in app.problems)
    assert target.read_bytes() == before


async def test_save_as_never_replaces_the_sounding(demo_copy, acknowledged):
    task = demo_copy.parent / "vardmoor-forecast-day.toml"
    sounding = demo_copy.parent / "vardmoor-sounding.csv"
    before = sounding.read_bytes()
    app = make_app(task)
    async with app.run_test(size=(80, 24)) as pilot:
        await settle(pilot)
        await save_as(pilot, sounding)
        assert not isinstance(app.screen, ConfirmModal)
        assert "a file the task reads" in app.notice and "vardmoor-sounding.csv" in app.notice
    assert sounding.read_bytes() == before


@pytest.mark.parametrize("answer", ["answer-no", "answer-yes"])
async def test_export_over_an_existing_file_asks(demo_copy, acknowledged, answer):
    from glidetask.formats.export import render

    target = demo_copy.parent / "old-briefing.md"
    target.write_text("# my own notes\n", encoding="utf-8")
    before = target.read_bytes()
    app = make_app(demo_copy)
    async with app.run_test(size=(80, 24)) as pilot:
        await settle(pilot)
        await export_to(pilot, target)
        assert str(target) in question(app) and "Replace" in question(app)
        await pilot.click(f"#{answer}")
        await settle(pilot)
        if answer == "answer-no":
            assert app.screen.id == "export-modal"  # the dialog stays for another name
            assert "kept as it is" in str(app.screen.query_one("#export-error").render())
            assert target.read_bytes() == before
        else:
            assert app.screen.id != "export-modal" and app.notice == f"exported {target}"
            assert target.read_text(encoding="utf-8") == render(app.plan.plan, ".md", "metric")
            assert not leftovers(target.parent)


async def test_export_onto_the_tasks_own_turnpoint_file_is_refused(demo_copy, acknowledged):
    """Issue 14's reproducer in the UI: the turnpoint file renamed to .json, exported onto."""
    (demo_copy.parent / "vardmoor.geojson").rename(demo_copy.parent / "vardmoor.json")
    demo_copy.write_text(demo_copy.read_text(encoding="utf-8").replace('"vardmoor.geojson"', '"vardmoor.json"'),
                         encoding="utf-8")
    turnpoints = demo_copy.parent / "vardmoor.json"
    before = turnpoints.read_bytes()
    app = make_app(demo_copy)
    async with app.run_test(size=(80, 24)) as pilot:
        await settle(pilot)
        await export_to(pilot, turnpoints)
        assert app.screen.id == "export-modal"  # no question: refused outright
        message = str(app.screen.query_one("#export-error").render())
        assert "not written" in message and "a file the task reads" in message and "vardmoor.json" in message
    assert turnpoints.read_bytes() == before
    assert load_scenario(demo_copy).task.name == "Vardmoor 300 km triangle"
