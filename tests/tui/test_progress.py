"""Issue 15 item 9: Compare and Odds say what they compute while they run, the screen stays
responsive meanwhile, and the figures follow (Pilot tests; the times are benchmarks in
tests/benchmarks/test_bench_tui.py)."""

from __future__ import annotations

import dataclasses

import numpy as np
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


async def test_the_progress_line_is_drawn_before_the_worker_starts(acknowledged, monkeypatch):
    """The worker's numpy would hold the interpreter while the first frame is drawn: the view
    starts it only once the frame with the progress line has been painted."""
    import glidetask.engine.simulate as simulate

    seen = []
    real = simulate.simulate_days

    def recording(*args, **kwargs):
        notice = app.screen.query_one(ProgressNotice)
        seen.append(notice.first_painted)
        return real(*args, **kwargs)

    monkeypatch.setattr(simulate, "simulate_days", recording)
    app = make_app(paths.demo_task())
    async with app.run_test(size=(120, 40)) as pilot:
        await settle(pilot)
        await pilot.press("7")
        await settle(pilot, 8)
        assert app.screen.odds is not None
    assert seen and all(painted is not None for painted in seen)


async def test_odds_draw_the_first_ballast_choice_while_the_others_are_flown(acknowledged, monkeypatch):
    """The bar and percentiles of the first choice are drawn as soon as it is flown; the others
    say they are being flown; the whole is then exactly the engine's one simulation of every
    choice (the same seed flies the same days for each)."""
    import threading

    import glidetask.engine.simulate as simulate
    from glidetask.engine.simulate import simulate_days
    from glidetask.tui.widgets.strategy_odds import OddsTable, ProbabilityBars

    release = threading.Event()
    real = simulate.simulate_days

    def held(*args, ballasts_kg=None, **kwargs):
        if ballasts_kg is not None and len(ballasts_kg) > 1:
            release.wait(60)  # the other choices wait while the test looks at the first
        return real(*args, ballasts_kg=ballasts_kg, **kwargs)

    monkeypatch.setattr(simulate, "simulate_days", held)
    app = make_app(paths.demo_task())
    async with app.run_test(size=(120, 40)) as pilot:
        await settle(pilot)
        await pilot.press("7")
        view = app.screen
        for _ in range(600):
            await pilot.pause(0.02)
            if view.partial is not None:
                break
        await pilot.pause()
        try:
            assert view.odds is None and len(view.partial.choices) == 1
            notice = view.query_one(ProgressNotice)
            assert notice.display and "1 of 3 ballast choices flown" in notice.text
            bar = notice.query_one(ProgressBar)
            assert bar.display and (bar.progress, bar.total) == (1, 3)
            bars = str(view.query_one(ProbabilityBars).render())
            first = view.partial.choices[0]
            assert f"{100 * first.finish_probability:5.1f} %" in bars and bars.count("flying the days") == 2
            table = view.query_one(OddsTable)
            assert table.row_count == 3 and str(table.get_cell("choice-1", "finish")).strip() == "…"
        finally:
            release.set()
        await settle(pilot, 6)
        assert view.partial is None and not notice.display
        plan = app.plan.plan
        whole = simulate_days(app.scenario, runs=view.runs, seed=view.seed, path=plan.path,
                              requirement=getattr(plan, "requirement", None))
        assert len(view.odds.choices) == len(whole.choices) == 3
        for shown, engine in zip(view.odds.choices, whole.choices):
            for field in dataclasses.fields(engine):
                assert np.array_equal(np.asarray(getattr(shown, field.name), dtype=object),
                                      np.asarray(getattr(engine, field.name), dtype=object)), field.name


async def test_a_first_visit_styles_its_view_without_restyling_the_app(acknowledged, monkeypatch):
    """A new view is styled widget by widget as it mounts; Textual's refresh of the whole style
    sheet (re-read and every other view restyled, 50-100 ms before the first frame) is not run."""
    app = make_app(paths.demo_task())
    async with app.run_test(size=(120, 40)) as pilot:
        await settle(pilot)
        refreshes = []
        real = app.refresh_css
        monkeypatch.setattr(app, "refresh_css", lambda *a, **k: (refreshes.append(1), real(*a, **k)))
        await pilot.press("6")
        await settle(pilot, 6)
        assert not refreshes
        view = app.screen
        assert view.query_one("#sweep-summary").styles.width.value == 46  # the view's own styles
        assert view.query_one("#sweep-panel").styles.border_top[0] == "round"  # the app's .panel
