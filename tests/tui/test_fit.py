"""Issue 15 item 8: every view reads at 80x24 with nothing cut mid-word (tables fit their
panels or the view scrolls by design), and a wide terminal uses its width (Pilot tests)."""

from __future__ import annotations

import pytest
from conftest import settle
from textual.widgets import DataTable

from glidetask import paths
from glidetask.tui.app import make_app


def screen_lines(app) -> list[str]:
    return ["".join(segment.text for segment in strip) for strip in app.screen._compositor.render_strips()]


@pytest.mark.parametrize("units", ["metric", "aviation"])
async def test_every_view_fits_80x24(acknowledged, units):
    app = make_app(paths.demo_task(), units=units)
    async with app.run_test(size=(80, 24)) as pilot:
        await settle(pilot)
        for key in "12345678":
            await pilot.press(key)
            await settle(pilot, 6)
            for table in app.screen.query(DataTable):
                if table.display and table.row_count:
                    # no column runs off to the right (a cell cut mid-word at the panel's edge)
                    assert table.virtual_size.width <= table.scrollable_content_region.width, (key, table.id)
            text = "\n".join(screen_lines(app))
            # no title or figure cut short with an ellipsis ("(h:…", "no field wit")
            assert "…" not in text.replace("planning …", "").replace("recomputing …", ""), (key, text)
            assert "no field wit\n" not in text


async def test_a_wide_terminal_uses_its_width(acknowledged):
    app = make_app(paths.demo_task())
    async with app.run_test(size=(200, 60)) as pilot:
        await settle(pilot)
        legs = app.screen.query_one("#legs-table")
        assert "airspeed_kmh" in [c.key.value for c in legs.ordered_columns]  # TAS beside IAS when there is room
        assert legs.region.width > 190
        await pilot.press("7")
        await settle(pilot, 6)
        assert app.screen.query_one("#odds-right").region.width > 100  # side by side, not stacked
    narrow = make_app(paths.demo_task())
    async with narrow.run_test(size=(80, 24)) as pilot:
        await settle(pilot)
        legs = narrow.screen.query_one("#legs-table")
        assert "airspeed_kmh" not in [c.key.value for c in legs.ordered_columns]  # narrow: IAS only
