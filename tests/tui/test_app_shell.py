"""The app's frame: the caution notice on first start, views by key, units, exit status."""

from __future__ import annotations

from conftest import settle

from glidetask import cautions
from glidetask.tui import config
from glidetask.tui.app import VIEWS, make_app


async def test_first_start_shows_every_caution_and_remembers_the_acknowledgement(synthetic, config_home):
    app = make_app(scenario=synthetic, compute_on_start=False)
    async with app.run_test(size=(120, 40)) as pilot:
        await pilot.pause()
        assert app.screen.id == "cautions-modal"
        shown = " ".join(str(w.render()) for w in app.screen.query("Static"))
        for text in cautions.GENERAL:
            assert text[:40] in shown.replace("\n", " ")
        await pilot.press("enter")
        await pilot.pause()
        assert app.screen.id != "cautions-modal"
    assert config.cautions_acknowledged()
    assert (config_home / "glidetask" / config.ACKNOWLEDGEMENT_FILE).exists()

    again = make_app(scenario=synthetic, compute_on_start=False)
    async with again.run_test(size=(120, 40)) as pilot:
        await pilot.pause()
        assert again.screen.id != "cautions-modal"


async def test_compact_caution_is_on_every_view(synthetic, acknowledged):
    app = make_app(scenario=synthetic, compute_on_start=False)
    async with app.run_test(size=(120, 40)) as pilot:
        for index, name in enumerate(VIEWS, start=1):
            await pilot.press(str(index))
            await pilot.pause()
            assert app.current_mode == name
            bar = app.screen.query_one("#caution-bar")
            assert cautions.COMPACT in str(bar.render())


async def test_units_switch_redraws_inputs_in_aviation_units(synthetic, acknowledged):
    app = make_app(scenario=synthetic, compute_on_start=False)
    async with app.run_test(size=(120, 40)) as pilot:
        await pilot.press("3")
        await settle(pilot)
        assert app.screen.query_one("#day-band_top_m").value == "1800"
        await pilot.press("u")
        await settle(pilot)
        assert app.units.name == "aviation"
        # Source: 1800 m / 0.3048 m per ft = 5905.5 ft (international foot, exact definition)
        assert app.screen.query_one("#day-band_top_m").value == "5906"


async def test_ctrl_q_exits_with_status_zero(synthetic, acknowledged):
    app = make_app(scenario=synthetic, compute_on_start=False)
    async with app.run_test(size=(80, 24)) as pilot:
        await pilot.press("ctrl+q")
        await pilot.pause()
    assert app.return_code == 0


async def test_unsaved_changes_ask_before_quitting(synthetic, acknowledged):
    app = make_app(scenario=synthetic, compute_on_start=False)
    async with app.run_test(size=(120, 40)) as pilot:
        await pilot.press("2")
        await settle(pilot)
        await pilot.click("#glider-ballast_kg")
        await pilot.press("ctrl+a", *"40")
        await settle(pilot)
        assert app.dirty
        await pilot.press("ctrl+q")
        await pilot.pause()
        assert app.screen.id == "quit-modal"
        await pilot.press("escape")
        await pilot.pause()
        assert app.is_running
        await pilot.press("ctrl+q")
        await pilot.pause()
        await pilot.press("d")
        await pilot.pause()
    assert app.return_code == 0


def test_run_app_returns_non_zero_after_an_internal_fault(monkeypatch, synthetic, acknowledged):
    from glidetask.tui import app as app_module

    class Broken(app_module.GlideTaskApp):
        def on_mount(self) -> None:
            raise RuntimeError("a fault inside the UI")

    monkeypatch.setattr(app_module, "make_app", lambda *a, **k: Broken(scenario=synthetic, compute_on_start=False))
    def run_headless(self, **kwargs):
        import asyncio

        asyncio.run(self.run_async(headless=True, size=(80, 24)))

    monkeypatch.setattr(Broken, "run", run_headless)
    assert app_module.run_app(None) == 1


async def test_run_app_returns_zero_after_ctrl_q(monkeypatch, synthetic, acknowledged):
    from glidetask.tui import app as app_module

    app = app_module.GlideTaskApp(scenario=synthetic, compute_on_start=False)

    async def quit_soon(pilot):
        await pilot.pause()
        await pilot.press("ctrl+q")

    def run_with_pilot(self, **kwargs):
        import asyncio

        asyncio.run(self.run_async(headless=True, auto_pilot=quit_soon))

    monkeypatch.setattr(app_module, "make_app", lambda *a, **k: app)
    monkeypatch.setattr(app_module.GlideTaskApp, "run", run_with_pilot)
    import threading

    results = []
    thread = threading.Thread(target=lambda: results.append(app_module.run_app(None)))
    thread.start()
    thread.join(30)
    assert results == [0]


async def test_resizing_every_view_never_crashes(synthetic, acknowledged):
    app = make_app(scenario=synthetic, compute_on_start=False)
    async with app.run_test(size=(120, 40)) as pilot:
        for index in range(1, len(VIEWS) + 1):
            await pilot.press(str(index))
            for size in ((40, 10), (80, 24), (200, 60), (20, 6), (120, 40)):
                await pilot.resize_terminal(*size)
                await pilot.pause()
            assert app.is_running
    assert app.return_code in (0, None)


async def test_views_are_in_the_command_palette(synthetic, acknowledged):
    app = make_app(scenario=synthetic, compute_on_start=False)
    async with app.run_test(size=(120, 40)) as pilot:
        await pilot.press("ctrl+p")
        await pilot.pause()
        await pilot.press(*"View: Safety")
        await pilot.pause(0.5)
        await pilot.press("enter")
        await settle(pilot)
        assert app.current_mode == "safety"


async def test_a_refused_field_is_named_as_on_screen(synthetic, acknowledged):
    app = make_app(scenario=synthetic, compute_on_start=False)
    async with app.run_test(size=(120, 40)) as pilot:
        await pilot.press("2")
        await settle(pilot)
        await pilot.click("#glider-ballast_kg")
        await pilot.press("home", "ctrl+k")
        await settle(pilot)
        status = str(app.screen.query_one("#status-line").render())
        assert "Water ballast: a value is needed" in status
        assert "ballast_kg" not in status  # the task file's key is not the pilot's word


async def test_escape_hint_shows_only_while_a_field_has_the_keys(synthetic, acknowledged):
    def footer_keys(app) -> set[str]:
        return {binding.action for (_, binding, enabled, _) in app.screen.active_bindings.values() if enabled}

    app = make_app(scenario=synthetic, compute_on_start=False)
    async with app.run_test(size=(120, 40)) as pilot:
        await pilot.press("2")
        await settle(pilot)
        assert "leave_field" not in footer_keys(app)
        await pilot.click("#glider-pilot_kg")
        await pilot.pause()
        assert "leave_field" in footer_keys(app)
        await pilot.press("escape")
        await pilot.pause()
        assert app.focused is None or app.focused.id != "glider-pilot_kg"
        assert "leave_field" not in footer_keys(app)
        await pilot.press("3")  # the view keys work again
        await pilot.pause()
        assert app.current_mode == "day"
