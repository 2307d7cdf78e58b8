"""The totals' final-glide line: the engine's speed to fly as indicated, shortened to fit."""

import pytest

from glidetask.engine.final_glide_speeds import final_glide_speeds
from glidetask.engine.plan import plan
from glidetask.formats.task_file import load_scenario
from glidetask.tui.widgets.plan_totals import FINAL_GLIDE_LABEL, final_glide_text
from glidetask.units import AVIATION, METRIC


@pytest.fixture(scope="module")
def triangle():
    return plan(load_scenario("demo_tasks/vardmoor-triangle-300.toml"))


def test_the_line_flies_the_engines_indicated_speed(triangle):
    (leg,) = final_glide_speeds(triangle)
    text = final_glide_text(triangle, METRIC)
    assert text.startswith("from 283.1 km (30.8 km out) at 1449 m, MacCready 2.0 m/s")
    assert text.endswith(f", fly {leg.indicated_airspeed_ms * 3.6:.0f} km/h IAS")
    # Source: the international knot, 1852 m per hour (ISO 80000-3)
    assert final_glide_text(triangle, AVIATION).endswith(f", fly {leg.indicated_airspeed_ms * 3600 / 1852:.0f} kt IAS")


@pytest.mark.parametrize("units", [METRIC, AVIATION])
def test_on_80_columns_it_drops_where_the_glide_starts_and_fits(triangle, units):
    wide, narrow = final_glide_text(triangle, units), final_glide_text(triangle, units, 80)
    assert len(FINAL_GLIDE_LABEL) + len(wide) > 80 >= len(FINAL_GLIDE_LABEL) + len(narrow)
    assert not narrow.startswith("from ") and " out at " in narrow
    assert narrow.split(" out at ")[1] == wide.split(" out) at ")[1]  # height, setting and speed kept
