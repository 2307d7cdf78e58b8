"""The circling card and the final glide's speed to fly, as the plan's text, JSON and briefing
word them: the engine's figures, in the chosen units."""

import re

import pytest

from glidetask.commands.plan import plan_text
from glidetask.engine.circling_card import day_circling
from glidetask.engine.final_glide_speeds import final_glide_speeds
from glidetask.engine.plan import plan
from glidetask.formats.briefing import plan_to_markdown
from glidetask.formats.plan_json import plan_to_dict
from glidetask.formats.task_file import load_scenario

TRIANGLE = "demo_tasks/vardmoor-triangle-300.toml"
KT = 1852.0 / 3600.0  # Source: the international knot, 1852 m per hour (ISO 80000-3)


@pytest.fixture(scope="module")
def triangle():
    return plan(load_scenario(TRIANGLE))


def test_final_line_flies_the_engines_speed_in_km_h_and_knots(triangle):
    (leg,) = final_glide_speeds(triangle)
    metric = plan_text(triangle, "metric")
    assert f"fly {leg.indicated_airspeed_ms * 3.6:.0f} km/h IAS ({leg.airspeed_ms * 3.6:.0f} TAS)" in metric
    aviation = plan_text(triangle, "aviation")
    assert f"fly {leg.indicated_airspeed_ms / KT:.0f} kt IAS ({leg.airspeed_ms / KT:.0f} TAS)" in aviation


def test_circling_lines_and_json_carry_the_card(triangle):
    card = day_circling(triangle.scenario)
    text = plan_text(triangle, "metric")
    assert (f"core {card.strength_ms:.1f} m/s on the thermal's axis; {card.solution.bank_deg:.0f} deg bank at "
            f"{card.indicated_airspeed_ms * 3.6:.0f} km/h IAS") in text
    assert re.search(rf"the air rises {card.solution.updraft_ms:.1f} \(the netto reading\) and the glider sinks "
                     rf"{card.solution.sink_ms:.1f}: climb {card.solution.climb_ms:.1f} m/s", text)
    circling = plan_to_dict(triangle)["day"]["circling"]
    assert circling["time"] == "15:30"
    assert circling["climb_ms"] == pytest.approx(card.solution.climb_ms, abs=0.005)
    assert circling["updraft_at_circle_ms"] - circling["circling_sink_ms"] == pytest.approx(circling["climb_ms"], abs=0.011)
    assert circling["indicated_airspeed_kmh"] == pytest.approx(card.indicated_airspeed_ms * 3.6, abs=0.05)
    # the task file gives achieved climbs: at its own loading the card reads back the typed 2.0 m/s
    assert circling["climb_ms"] == pytest.approx(2.0, abs=0.005)


def test_briefing_carries_both(triangle):
    text = plan_to_markdown(triangle, "metric")
    (leg,) = final_glide_speeds(triangle)
    assert f"fly {leg.indicated_airspeed_ms * 3.6:.0f} km/h IAS" in text
    assert "- Circling at 15:30: core" in text


def test_briefing_heights_card_ends_with_the_speeds_to_fly(triangle):
    from glidetask.engine.final_glide_speeds import last_leg_speeds_to_fly

    text = plan_to_markdown(triangle, "metric")
    (leg,) = final_glide_speeds(triangle)
    mc = [f"{v * 3.6:.0f}" for v in last_leg_speeds_to_fly(triangle, [0.0, 1.0, 2.0, 3.0])]
    row = f"| Fly on the last leg (km/h IAS) |  | {leg.indicated_airspeed_ms * 3.6:.0f} | " + " | ".join(mc) + " |"
    assert row in text
