"""Snapshots of every view with the demo data (layout and drawing only: the numbers are
asserted against the engine in the Pilot tests). Review a diff before ``--snapshot-update``."""

from __future__ import annotations

import pytest
from conftest import settle

from glidetask.tui.app import VIEWS, make_app

pytest.importorskip("glidetask.engine.planner")


def demo_app():
    return make_app(show_cautions=False)


def showing(view_key: str):
    async def run_before(pilot) -> None:
        await settle(pilot)
        if view_key:
            await pilot.press(view_key)
            await settle(pilot)
        for field in pilot.app.screen.query("Input"):
            field.cursor_blink = False
        await settle(pilot)

    return run_before


@pytest.mark.parametrize("index,view", list(enumerate(VIEWS, start=1)))
def test_view_at_120x40(snap_compare, acknowledged, index, view):
    assert snap_compare(demo_app(), terminal_size=(120, 40), run_before=showing(str(index)))


def test_task_view_at_80x24(snap_compare, acknowledged):
    assert snap_compare(demo_app(), terminal_size=(80, 24), run_before=showing(""))


def test_first_start_cautions(snap_compare, config_home):
    assert snap_compare(make_app(show_cautions=True), terminal_size=(100, 32), run_before=showing(""))
