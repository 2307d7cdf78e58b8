"""Issue 15 item 9: Compare and Odds say what they compute while they run, the screen stays
responsive meanwhile, and the figures follow (Pilot tests; the times are benchmarks in
tests/benchmarks/test_bench_tui.py)."""

from __future__ import annotations

from conftest import settle
from textual.widgets import ProgressBar

from glidetask import paths
from glidetask.tui.app import make_app
from glidetask.tui.widgets.progress_notice import ProgressNotice


async def test_progress_before_the_figures_and_keys_still_work(acknowledged):
    app = make_app(paths.demo_task())
    async with app.run_test(size=(120, 40)) as pilot:
        await settle(pilot)
        for key, ready, words in (("6", "sweep", "ballast sweep"), ("7", "odds", "simulated days")):
            await pilot.press(key)
            await pilot.pause()
            view = app.screen
            notice = view.query_one(ProgressNotice)
            if getattr(view, ready) is None:  # still computing: it says so, with a moving bar
                assert notice.display and words in notice.text and "Vardmoor 300 km triangle" in notice.text
                assert notice.query_one(ProgressBar).display
                await pilot.press("1")  # the keys work while it computes
                await pilot.pause()
                assert app.current_mode == "task"
                await pilot.press(key)
            await settle(pilot, 6)
            assert getattr(view, ready) is not None
            assert not notice.display  # the figures replace the progress line
