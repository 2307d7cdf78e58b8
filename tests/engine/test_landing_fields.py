"""Land-outs without an elevation model end in the field the glide reaches
(glidetask.engine.landing_fields), the plan and the odds alike."""

from __future__ import annotations

import dataclasses

import numpy as np
import pytest
from geographiclib.geodesic import Geodesic

from glidetask.engine.compare import planned_route
from glidetask.engine.flight import course_for, fly, flights_for
from glidetask.engine.landing_fields import LandingFields
from glidetask.engine.plan import plan
from glidetask.engine.day_spread import DaySpread
from glidetask.engine.simulate import simulate_days
from glidetask.engine.turnpoint import Turnpoint
from tests.engine.test_plan import ELEVATION, HOME, OUT_AND_RETURN, band_polar, scenario

WGS84 = Geodesic.WGS84  # Source: geographiclib (Karney 2013), an independent reference library.


def field(name, along_m, north_m, elevation_m):
    """A landable field ``along_m`` east of home on the first leg (bearing 90), ``north_m`` off it."""
    on = WGS84.Direct(HOME[0], HOME[1], 90.0, along_m)
    at = WGS84.Direct(on["lat2"], on["lon2"], 0.0, north_m)
    return Turnpoint(name, None, at["lat2"], at["lon2"], elevation_m, landable=True, kind="field")


def with_fields(*fields):
    s = scenario(OUT_AND_RETURN, climb=0.0, start_height=1500.0)
    return dataclasses.replace(s, turnpoints=tuple(fields))


def test_the_glide_ends_at_the_reached_field_s_elevation_plus_the_margin():
    # Source: common practice - at MacCready 0 in still air a glider covers height x L/D.
    # With no climb the flight glides from 1,500 m to the band bottom (800 m), (700 m x L/D,
    # ~30 km), where the climbs stop. From there only the high field (400 m) is in reach
    # (200 m x L/D ~ 8.5 km, it is ~5 km ahead); the low one at 60 km needs 500 m x L/D ~ 21 km.
    s = with_fields(field("High Lea", 35e3, 1e3, 400.0), field("Far Meadow", 60e3, 1e3, 100.0))
    ld = band_polar(s).best_ld
    stop = (1500.0 - 800.0) * ld
    assert np.hypot(35e3 - stop, 1e3) < (800.0 - 400.0 - 200.0) * ld
    assert np.hypot(60e3 - stop, 1e3) > (800.0 - 100.0 - 200.0) * ld
    p = plan(s)
    assert not p.finished
    assert p.landout.field == "High Lea" and p.landout.elevation_m == 400.0
    # The glide ends at the field's elevation plus the margin, not the finish's (200 m):
    # the glide along the course is closed form (to round-off).
    assert p.landout_m == pytest.approx((1500.0 - 400.0 - 200.0) * ld, rel=1e-9)


def test_with_no_field_in_reach_the_glide_ends_at_the_finish_elevation():
    s = with_fields(field("Far Meadow", 110e3, 1e3, 100.0))
    p = plan(s)
    assert p.landout.field is None and p.landout.elevation_m == ELEVATION
    assert p.landout_m == pytest.approx((1500.0 - ELEVATION - 200.0) * band_polar(s).best_ld, rel=1e-9)


def test_of_several_in_reach_it_lands_in_the_one_nearest_its_own_end():
    # Both in reach from where the climbs stop (~30 km). High Lea's glide would end at
    # 900 m x L/D (~38 km, ~3 km past it); Low Lea's at 1,050 m x L/D (~45 km, ~1 km from
    # it): Low Lea is the nearer to where its own glide ends.
    low = field("Low Lea", 44e3, -500.0, 250.0)
    s = with_fields(field("High Lea", 35e3, 1e3, 400.0), low)
    ld = band_polar(s).best_ld
    assert np.hypot(44e3 - 700.0 * ld, 500.0) < (800.0 - 250.0 - 200.0) * ld
    p = plan(s)
    assert p.landout.field == "Low Lea" and p.landout.elevation_m == 250.0
    assert p.landout_m == pytest.approx((1500.0 - 250.0 - 200.0) * ld, rel=1e-9)
    assert (p.landout.lat, p.landout.lon) == (low.lat, low.lon)  # the field itself, not a point on the course


def test_odds_with_no_spread_land_where_the_plan_does():
    s = with_fields(field("High Lea", 35e3, 1e3, 400.0), field("Far Meadow", 60e3, 1e3, 100.0))
    p = plan(s)
    path, hook = planned_route(s)
    assert isinstance(hook, LandingFields)
    flights = flights_for(s)
    many = dataclasses.replace(flights, mass_kg=np.full(4, flights.mass_kg))
    flown = fly(course_for(path, s.day.detour_percent), many, requirement=hook, detail=False)
    np.testing.assert_allclose(flown.landout_m, p.landout_m, rtol=0, atol=1e-6)
    assert list(flown.landout_field) == [hook.names.index("High Lea")] * 4
    still = DaySpread(climb_log_sd=0.0, wind_speed_sd_ms=0.0, wind_direction_sd_deg=0.0, lift_end_sd_s=0.0,
                      thermal_search_mean_m=0.0)
    odds = simulate_days(s, runs=20, seed=3, spread=still, ballasts_kg=(0.0,))
    assert odds.choices[0].finished == 0 and odds.choices[0].landouts_by_leg[0] == 20


def test_an_explicit_path_flies_with_the_plan_s_hook_and_lands_in_the_same_field():
    # planned_route with the plan's own path (as the odds and the sweep are given one) must
    # fly it with the hook the plan flies it with: without terrain, the landable fields.
    # Source: the setup of test_the_glide_ends_at_the_reached_field_s_elevation_plus_the_margin
    # (common practice: height x L/D at MacCready 0 in still air): High Lea is in reach, and
    # the glide ends at its elevation plus the margin, (1,500 - 400 - 200) m x L/D along the course.
    s = with_fields(field("High Lea", 35e3, 1e3, 400.0), field("Far Meadow", 60e3, 1e3, 100.0))
    p = plan(s)
    path, hook = planned_route(s, p.path)
    assert isinstance(hook, LandingFields) and hook.names == ("High Lea", "Far Meadow")
    flown = fly(course_for(path, s.day.detour_percent), flights_for(s), requirement=hook, detail=False)
    assert not flown.finished[0] and not p.finished
    assert hook.names[int(flown.landout_field[0])] == p.landout.field == "High Lea"
    assert float(flown.landout_m[0]) == pytest.approx(p.landout_m, abs=1e-6)
    assert p.landout_m == pytest.approx((1500.0 - 400.0 - 200.0) * band_polar(s).best_ld, rel=1e-9)
