"""Export from the UI: the same files ``glidetask export`` writes, atomically."""

from __future__ import annotations

import xml.etree.ElementTree as ET

import pytest
from conftest import settle

from glidetask import cautions
from glidetask.tui.app import make_app



async def export_to(pilot, path, radio_id: str | None = None) -> None:
    await pilot.press("ctrl+e")
    await pilot.pause()
    if radio_id:
        pilot.app.screen.query_one(f"#{radio_id}").value = True
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
        await export_to(pilot, route, "export-gpx")
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
