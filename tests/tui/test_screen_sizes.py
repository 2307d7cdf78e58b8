"""Issue 15 item 8, as tried by eye at 60x20, 80x24, 120x40 and 200x60: nothing cut mid-word
(whole words, scrolled or abbreviated by design) and a wide terminal using its width."""

from __future__ import annotations

import pytest
from conftest import settle
from test_fit import screen_lines
from test_small_screens import inside_screen

from glidetask import paths
from glidetask.tui.app import make_app
from glidetask.tui.views import VIEWS


async def test_a_wide_legs_table_names_the_turnpoints_in_full(acknowledged):
    app = make_app(paths.demo_task())
    async with app.run_test(size=(200, 60)) as pilot:
        await settle(pilot)
        legs = app.screen.query_one("#legs-table")
        first = str(legs.get_cell("leg-1", "leg"))
        assert "Vardmoor Aerodrome → Kellow Hill" in first  # as `glidetask plan` names them
        assert legs.virtual_size.width <= legs.scrollable_content_region.width
        await pilot.resize_terminal(120, 40)
        await settle(pilot)
        assert "VAR→KLH" in str(legs.get_cell("leg-1", "leg"))  # the codes where the width is needed


@pytest.mark.parametrize("size", [(80, 24), (120, 40), (200, 60)])
async def test_the_gliders_name_is_shown_whole(acknowledged, size):
    app = make_app(paths.demo_task())
    async with app.run_test(size=size) as pilot:
        await settle(pilot)
        await pilot.press("2")
        await settle(pilot)
        assert "…" not in "\n".join(screen_lines(app))
        region = app.screen.query_one("#glider-label").region
        shown = [line[region.x:region.right].strip() for line in screen_lines(app)[region.y:region.bottom]]
        assert " ".join(shown) == app.scenario.glider.spec.label  # wrapped at spaces, whole
        assert app.screen.query_one("#glider-loading").border_subtitle == "ballast up to 170 kg"


async def test_the_safety_cautions_stand_apart_from_the_figures_scrolling_beneath(acknowledged):
    app = make_app(paths.demo_task())
    async with app.run_test(size=(80, 24)) as pilot:
        await settle(pilot)
        await pilot.press("5")
        await settle(pilot, 6)
        lines = screen_lines(app)
        assert any(line.startswith("─Cautions─") for line in lines)  # a titled rule, not text running on
        app.screen.query_one("#safety-airspace").scroll_visible(animate=False)
        await settle(pilot)
        text = "\n".join(screen_lines(app))
        assert "178.0 km: climb no higher there." in " ".join(text.split())  # the airspace line whole, above the rule


@pytest.mark.parametrize("key", list("12345678"))
async def test_a_60_column_view_bar_shows_whole_names_or_keys_only(acknowledged, key):
    app = make_app(paths.demo_task())
    async with app.run_test(size=(60, 20)) as pilot:
        await settle(pilot)
        await pilot.press(key)
        await settle(pilot)
        tabs = list(app.screen.query(".view-tab"))
        assert len(tabs) == len(VIEWS) and all(inside_screen(app, tab) for tab in tabs)
        titles = [f"{i} {title}" for i, (_, _, title) in enumerate(VIEWS.values(), start=1)]
        shown = [str(tab.render()).strip() for tab in tabs]
        active = int(key) - 1
        assert shown[active] in (titles[active], titles[active].replace("Final glide", "Final"))
        assert all(text == str(i) for i, text in enumerate(shown, start=1) if i - 1 != active)
        state = app.screen.query_one("#view-bar-state")
        assert inside_screen(app, state) and "metric" in str(state.render())


async def test_the_fields_in_reach_fit_their_panel_and_survive_a_resize(acknowledged):
    app = make_app(paths.demo_task())
    async with app.run_test(size=(200, 60)) as pilot:
        await settle(pilot)
        await pilot.press("5")
        await settle(pilot, 6)
        table = app.screen.query_one("#alternates-table")
        also = str(table.get_cell("alt-0", "also"))
        assert "Gorbeck Lea 3.0" in also  # wide: the fields by name
        await pilot.resize_terminal(120, 40)
        await settle(pilot, 6)
        # 120 columns: names would run off the panel ("Bramblehithe F"), so the fields go by their codes
        assert table.virtual_size.width <= table.scrollable_content_region.width
        assert str(table.get_cell("alt-0", "also")) == "GBL 3.0, TCF 13.1"
        await pilot.resize_terminal(80, 24)
        await settle(pilot, 6)
        lines = screen_lines(app)
        # a line drawn before the widths settled is drawn again: the reason whole, not "no"
        assert any(line.rstrip().endswith("13.9  no field within a glide") for line in lines), "\n".join(lines)
