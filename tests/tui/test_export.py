"""Export from the UI: the same files ``glidetask export`` writes, atomically."""

from __future__ import annotations

import xml.etree.ElementTree as ET

import pytest
from conftest import settle

from glidetask import cautions
from glidetask.tui.app import make_app



async def export_to(pilot, path, format_key: str | None = None) -> None:
    """ctrl+e, the format picked with the arrow keys (briefing first), the name set, enter."""
    await pilot.press("ctrl+e")
    await pilot.pause()
    if format_key:
        await pilot.press(format_key)
        await pilot.pause()
    pilot.app.screen.query_one("#export-path").value = str(path)
    await pilot.press("enter")
    await settle(pilot)


async def test_export_a_briefing_and_a_route(tmp_path, acknowledged):
    from glidetask.formats.export import render

    app = make_app()
    async with app.run_test(size=(120, 40)) as pilot:
        await settle(pilot)
        briefing = tmp_path / "briefing.md"
        await export_to(pilot, briefing)
        assert briefing.read_text(encoding="utf-8") == render(app.plan.plan, ".md", "metric")
        assert cautions.GENERAL[0] in briefing.read_text(encoding="utf-8")
        route = tmp_path / "route.gpx"
        await export_to(pilot, route, "up")  # the GPX route is above the briefing
        root = ET.parse(route).getroot()  # well-formed XML
        assert root.tag.endswith("gpx")
        assert "exported" in app.notice


async def test_export_to_an_unknown_format_says_so(tmp_path, acknowledged):
    app = make_app()
    async with app.run_test(size=(120, 40)) as pilot:
        await settle(pilot)
        await export_to(pilot, tmp_path / "plan.txt")
        assert app.screen.id == "export-modal"
        assert "unknown export format" in str(app.screen.query_one("#export-error").render())
        assert not (tmp_path / "plan.txt").exists()


async def test_the_export_dialog_works_from_the_keyboard_alone(tmp_path, acknowledged, monkeypatch):
    """Issue 15 item 10: arrow keys pick the format (no space bar, no "▐●▌" drawn as text), enter writes."""
    from glidetask.tui.exporting import FORMATS

    monkeypatch.chdir(tmp_path)
    app = make_app()
    async with app.run_test(size=(80, 24)) as pilot:
        await settle(pilot)
        await pilot.press("ctrl+e")
        await pilot.pause()
        screen_text = "".join(s.text for strip in app.screen._compositor.render_strips() for s in strip)
        assert "▐●▌" not in screen_text and all(name in screen_text for name in FORMATS.values())
        await pilot.press("down")  # briefing -> plan JSON
        await pilot.pause()
        assert app.screen.query_one("#export-path").value.endswith("-plan.json")
        await pilot.press("enter")
        await settle(pilot)
        written = list(tmp_path.glob("*-plan.json"))
        assert len(written) == 1 and written[0].read_text().lstrip().startswith("{")
        assert "exported" in app.notice


async def test_open_lists_recent_files_and_the_folder(tmp_path, acknowledged):
    """Issue 15 item 10: Open is a picker: recent task files first, then the folder's."""
    import shutil
    from pathlib import Path

    from glidetask.tui import config

    root = Path(__file__).resolve().parents[2]
    shutil.copytree(root / "demo_tasks", tmp_path / "demo_tasks")
    shutil.copytree(root / "polars", tmp_path / "polars")
    ridge = tmp_path / "demo_tasks" / "vardmoor-ridge-final-glide.toml"
    triangle = tmp_path / "demo_tasks" / "vardmoor-triangle-300.toml"
    app = make_app(ridge)
    async with app.run_test(size=(80, 24)) as pilot:
        await settle(pilot)
        assert config.recent_tasks() == [ridge]
        await pilot.press("ctrl+o")
        await pilot.pause()
        options = app.screen.query_one("#open-list")
        labels = [str(options.get_option_at_index(i).prompt) for i in range(options.option_count)]
        assert labels[0] == "recent  vardmoor-ridge-final-glide.toml"
        assert "folder  vardmoor-triangle-300.toml" in labels
        for _ in range(labels.index("folder  vardmoor-triangle-300.toml")):
            await pilot.press("down")
        await pilot.press("enter")
        await settle(pilot, 5)
        assert app.scenario.task.name == "Vardmoor 300 km triangle"
        assert config.recent_tasks()[:2] == [triangle, ridge]
