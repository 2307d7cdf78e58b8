"""Snapshots of every view with the demo data (layout and drawing only: the numbers are
asserted against the engine and ``glidetask plan`` in the Pilot tests). Review a diff
before ``--snapshot-update``.

Each snapshot is taken only once the screen has stopped changing: the plan (and the
view's own result: the final-glide answer, the ballast sweep, the simulated days) is on
screen, no worker is running, the status line shows the plan, and no cursor blinks. The
config folder is the test's own (conftest), and no clock time of the run is shown.
"""

from __future__ import annotations

import time

import pytest
from conftest import settle

from glidetask.tui.app import VIEWS, make_app


TIMEOUT_S = 60.0


def demo_app(**kwargs):
    return make_app(show_cautions=kwargs.pop("show_cautions", False), **kwargs)


def view_result_shown(app) -> bool:
    """The result the current view computes for itself is on screen."""
    screen = app.screen
    mode = app.current_mode
    if mode == "compare":
        return getattr(screen, "sweep", None) is not None
    if mode == "odds":
        return getattr(screen, "odds", None) is not None
    if mode == "glide":
        return getattr(screen, "answer", None) is not None
    return True


def settled(app) -> bool:
    return (app.plan is not None and not app.busy and app.notice == "plan updated"
            and not any(worker.is_running for worker in app.workers) and view_result_shown(app))


async def until_settled(pilot) -> None:
    """Wait for the plan and the view's own result, then for the screen to take them in."""
    deadline = time.monotonic() + TIMEOUT_S
    quiet = 0
    while quiet < 3:  # settled three looks in a row: no late call_from_thread still on its way
        assert time.monotonic() < deadline, "the plan never settled on screen"
        await settle(pilot, 1)
        await pilot.pause(0.05)
        quiet = quiet + 1 if settled(pilot.app) else 0
    for field in pilot.app.screen.query("Input"):
        field.cursor_blink = False
    await pilot.wait_for_scheduled_animations()
    await pilot.pause()
    # the plots redraw once the layout has settled (a scroll bar coming and going at 80x24)
    screen = pilot.app.screen
    if hasattr(screen, "_draw_plot"):  # the day's plot drawn again at its settled size
        screen._draw_plot()
    for plot in screen.query("PlotextPlot"):
        plot.refresh(layout=True)
    await pilot.pause(0.2)
    await pilot.pause()


def showing(view_key: str = ""):
    async def run_before(pilot) -> None:
        await until_settled(pilot)
        if view_key:
            await pilot.press(view_key)
            await until_settled(pilot)

    return run_before


@pytest.mark.parametrize("index,view", list(enumerate(VIEWS, start=1)))
def test_view_at_120x40(snap_compare, acknowledged, index, view):
    assert snap_compare(demo_app(), terminal_size=(120, 40), run_before=showing(str(index)))


@pytest.mark.parametrize("index,view", list(enumerate(VIEWS, start=1)))
def test_view_at_80x24(snap_compare, acknowledged, index, view):
    """The classic terminal: every view readable, nothing cut mid-word."""
    assert snap_compare(demo_app(), terminal_size=(80, 24), run_before=showing(str(index)))


def test_first_start_cautions(snap_compare, config_home):
    assert snap_compare(demo_app(show_cautions=True), terminal_size=(100, 32), run_before=showing())
