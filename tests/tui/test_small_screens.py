"""The app in a plain 80x24 terminal: nothing a pilot needs is cut off or hidden."""

from __future__ import annotations

import pytest
from conftest import settle, text_of

from glidetask import cautions
from glidetask.tui.app import VIEWS, make_app


def inside_screen(app, widget) -> bool:
    region = widget.region
    return region.width > 0 and region.height > 0 and region.right <= app.size.width and region.bottom <= app.size.height


async def test_first_start_notice_keeps_its_button_on_an_80x24_screen(synthetic, config_home):
    app = make_app(scenario=synthetic, compute_on_start=False)
    async with app.run_test(size=(80, 24)) as pilot:
        await pilot.pause()
        assert app.screen.id == "cautions-modal"
        button = app.screen.query_one("#cautions-ok")
        assert inside_screen(app, button) and button.has_focus
        assert inside_screen(app, app.screen.query_one("#cautions-hint"))
        text = app.screen.query_one("#cautions-text")
        assert text.region.bottom <= button.region.y  # the text scrolls above the button, not over it
        shown = str(text.query_one("Static").render())
        for caution in (*cautions.GENERAL, *cautions.TERRAIN, *cautions.LANDABLES):
            assert caution[:30] in " ".join(shown.split())
        await pilot.press("enter")
        await pilot.pause()
        assert app.screen.id != "cautions-modal"


@pytest.mark.parametrize("width", [80, 100, 104])
async def test_view_bar_keeps_units_and_the_unsaved_mark(synthetic, acknowledged, width):
    app = make_app(scenario=synthetic, compute_on_start=False, units="aviation")
    async with app.run_test(size=(width, 24)) as pilot:
        await settle(pilot)
        app.dirty = True
        await pilot.pause()
        label = app.screen.query_one("#view-bar-state")
        assert "aviation" in str(label.render()) and "●" in str(label.render())
        assert inside_screen(app, label) and label.region.width >= len("●  aviation")
        tabs = list(app.screen.query(".view-tab"))
        assert len(tabs) == len(VIEWS) and all(inside_screen(app, tab) for tab in tabs)


async def test_task_view_at_80x24_shows_every_leg_column_and_the_whole_totals(acknowledged):
    app = make_app()
    async with app.run_test(size=(80, 24)) as pilot:
        await settle(pilot)
        legs = app.screen.query_one("#legs-table")
        assert legs.virtual_size.width <= legs.size.width  # no column hidden off to the right
        assert [c.key.value for c in legs.ordered_columns][-4:] == ["time_s", "start_clock", "required_height_m", "arrival_height_m"]
        points = app.screen.query_one("#points-table")
        assert points.virtual_size.width <= points.size.width
        assert "elevation" not in [c.key.value for c in points.ordered_columns]  # left out when narrow
        totals = text_of(app.screen.query_one("#plan-totals"), width=app.screen.query_one("#plan-totals").size.width)
        # narrow: the final glide's line says how far out, not where it starts (test_final_glide_line)
        assert "…" not in totals and "Final glide 30.8 km out at 1449 m" in totals
        await pilot.resize_terminal(120, 40)
        await settle(pilot)
        assert "elevation" in [c.key.value for c in app.screen.query_one("#points-table").ordered_columns]


async def test_final_glide_verdict_leads_with_what_decides_the_glide(synthetic, acknowledged):
    app = make_app(scenario=synthetic)
    async with app.run_test(size=(80, 24)) as pilot:
        await settle(pilot)
        await pilot.press("4")
        await settle(pilot)
        verdict = app.screen.query_one("#glide-verdict")
        lines = [line.strip() for line in text_of(verdict, width=verdict.size.width).splitlines() if line.strip()]
        assert "final glide by" in lines[0] or "OUT OF REACH" in lines[0]
        assert [line.split("  ")[0] for line in lines[1:4]] == ["Required height", "Margin", "MacCready to arrive"]
        # the verdict and those three rows are on screen (the rest scrolls)
        assert verdict.region.y + 1 + 4 <= app.screen.query_one("#status-line").region.y


def bottom_line(app) -> str:
    strips = app.screen._compositor.render_strips()
    return "".join(segment.text for segment in strips[-1])


@pytest.mark.parametrize("size", [(80, 24), (120, 40)])
async def test_footer_keeps_save_export_and_cautions_on_every_view(synthetic, acknowledged, size):
    app = make_app(scenario=synthetic, compute_on_start=False)
    async with app.run_test(size=size) as pilot:
        for index in range(1, 8):
            await pilot.press(str(index))
            await settle(pilot)
            footer = bottom_line(app)
            for key in ("^s", "^e", "f1"):
                assert key in footer, (index, footer)
