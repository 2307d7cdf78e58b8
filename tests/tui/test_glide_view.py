"""The Final glide calculator against engine.finalglide for the same question."""

from __future__ import annotations

from conftest import settle

from glidetask.engine import geodesy
from glidetask.engine.finalglide import final_glide
from glidetask.engine.scenario import Wind
from glidetask.tui.app import make_app
from glidetask.units import KMH, METRIC


def verdict_text(app) -> str:
    from rich.console import Console

    console = Console(width=80, record=True, color_system=None)
    console.print(app.screen.query_one("#glide-verdict").content)
    return console.export_text()


async def type_into(pilot, field_id: str, text: str) -> None:
    await pilot.click(f"#{field_id}")
    await pilot.press("home", "ctrl+k", *text)
    await settle(pilot)


async def test_final_glide_from_the_last_turn_matches_the_engine(synthetic, acknowledged):
    app = make_app(scenario=synthetic, compute_on_start=False)
    async with app.run_test(size=(120, 40)) as pilot:
        await pilot.press("4")
        await settle(pilot)
        await type_into(pilot, "glide-height", "3600")
        await type_into(pilot, "glide-mc", "1")
        origin, goal = synthetic.turnpoints[2], synthetic.turnpoints[0]  # Tolland Cross -> Vardmoor
        distance, course, _ = geodesy.inverse(origin.lat, origin.lon, goal.lat, goal.lon)
        margin = synthetic.safety.arrival_margin_m
        # Source: contract section 3: a final glide takes the density at the middle of its
        # start and arrival heights
        polar = synthetic.glider.polar_at(0.5 * (3600.0 + goal.elevation_m + margin))
        expected = final_glide(polar, distance, 3600.0, course_deg=course, wind=Wind(270.0, 20.0 * KMH),
                               mc_ms=1.0, arrival_elevation_m=goal.elevation_m, margin_m=margin)
        text = verdict_text(app)
        assert METRIC.fmt_height(expected.required_height_m) in text
        assert METRIC.fmt_speed(expected.speed_to_fly_ms) in text
        assert METRIC.fmt_speed(expected.ground_speed_ms) in text
        assert f"{expected.ld_required:.1f}" in text
        assert f"{expected.ld_achievable:.1f}" in text
        assert METRIC.fmt_vertical(expected.mc_to_arrive_ms) in text
        assert ("ABOVE final glide" in text) == (expected.margin_m >= 0)


async def test_a_headwind_turns_the_verdict(synthetic, acknowledged):
    # Source: a headwind lowers the ground speed and so raises the height a glide uses
    # (contract section 3, Vg = sqrt(v^2 - Wn^2) + We)
    app = make_app(scenario=synthetic, compute_on_start=False)
    async with app.run_test(size=(120, 40)) as pilot:
        await pilot.press("4")
        await settle(pilot)
        await type_into(pilot, "glide-mc", "0")
        await type_into(pilot, "glide-wind", "calm")
        origin, goal = synthetic.turnpoints[2], synthetic.turnpoints[0]
        distance, course, _ = geodesy.inverse(origin.lat, origin.lon, goal.lat, goal.lon)
        needed_calm = final_glide(synthetic.glider.polar_at(1000.0), distance, 0.0, course_deg=course,
                                  arrival_elevation_m=goal.elevation_m).required_height_m
        height = needed_calm + 150.0
        await type_into(pilot, "glide-height", f"{height:.0f}")
        assert "ABOVE final glide" in verdict_text(app)
        await type_into(pilot, "glide-wind", f"{course:.0f}/40")  # wind from straight ahead
        assert "BELOW final glide" in verdict_text(app)


async def test_distance_and_course_mode_and_a_bad_entry(synthetic, acknowledged):
    app = make_app(scenario=synthetic, compute_on_start=False)
    async with app.run_test(size=(120, 40)) as pilot:
        await pilot.press("4")
        await settle(pilot)
        app.screen.query_one("#glide-from").value = "manual"
        await settle(pilot)
        assert not app.screen.query_one("#glide-distance").disabled
        await type_into(pilot, "glide-distance", "50")
        await type_into(pilot, "glide-course", "90")
        await type_into(pilot, "glide-wind", "calm")
        await type_into(pilot, "glide-mc", "2")
        await type_into(pilot, "glide-height", "2000")
        elevation = synthetic.turnpoints[0].elevation_m
        polar = synthetic.glider.polar_at(0.5 * (2000.0 + elevation + 200.0))
        expected = final_glide(polar, 50_000.0, 2000.0, course_deg=90.0, mc_ms=2.0, arrival_elevation_m=elevation)
        before = verdict_text(app)
        assert METRIC.fmt_height(expected.required_height_m) in before
        await type_into(pilot, "glide-height", "k2000")
        assert app.screen.query_one("#glide-height").has_class("-invalid")
        after = verdict_text(app)  # the last good answer stays, marked as such
        assert after.startswith("✗ Height now (MSL): not a usable value: 'k2000'\nthe figures below are for the last valid input")
        assert after.endswith(before)


async def test_the_calculator_names_the_plans_own_final_glide(acknowledged):
    from glidetask import paths
    from glidetask.tui.widgets.plan_totals import final_glide_text

    app = make_app(paths.demo_task())
    async with app.run_test(size=(120, 40)) as pilot:
        await settle(pilot)
        await pilot.press("4")
        await settle(pilot)
        await settle(pilot)
        text = " ".join(verdict_text(app).split())
        assert "The plan's own final glide: " + final_glide_text(app.plan.plan, METRIC) in text
