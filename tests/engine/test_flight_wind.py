"""The flight core in wind, against closed forms: a steady crosswind with constant climb,
and a wind that changes with height (glides at the band middle, climbs drifting with the
mean wind through the band, the final glide at its middle height)."""

from __future__ import annotations

import numpy as np
import pytest

from glidetask.engine import flight
from glidetask.engine.atmosphere import density_ratio
from glidetask.engine.flight import Course, Flights, fly
from glidetask.engine.polar import PolarSpec, scaled_polar
from glidetask.engine.scenario import WindLevel, WindProfile
from glidetask.engine.speedtofly import glide_in_wind

KMH = 1000.0 / 3600.0
HOUR = 3600.0

# An invented 15 m class example polar (not any real aircraft).
SPEC = PolarSpec(label="test example", wing_area_m2=10.5, reference_mass_kg=350.0, empty_mass_kg=260.0,
                 max_ballast_kg=150.0, max_mass_kg=525.0, vne_ias_ms=270 * KMH, min_speed_ias_ms=70 * KMH,
                 points=((80 * KMH, 0.62), (120 * KMH, 0.80), (180 * KMH, 1.85)))
TOP, BOTTOM, FLOOR, CLIMB, MC_FINAL = 1800.0, 800.0, 400.0, 2.0, 1.0


def day(**changes) -> Flights:
    base = dict(spec=SPEC, mass_kg=380.0, start_time_s=12 * HOUR, start_height_m=TOP, band_top_m=TOP,
                band_bottom_m=BOTTOM, lift_ends_s=19 * HOUR, lift_times_s=[0.0], lift_values=[CLIMB],
                finish_elevation_m=200.0, arrival_margin_m=200.0, final_glide_mc_ms=MC_FINAL)
    base.update(changes)
    return Flights(**base)


def _band_polar():
    return scaled_polar(SPEC, 380.0, 0.0, density_ratio(0.5 * (TOP + BOTTOM)))


def _expected_time(total, glide_ground, climb_drift, final_glide):
    """Closed-form time of the drift-aware cycle (contract section 3; H. Reichmann,
    Cross-Country Soaring, 1978, drift in thermals, from memory): from the band top, glides
    top-to-bottom at sink ``sink(v)`` over the ground at ``glide_ground``, climbs bottom-to-top
    at ``CLIMB`` drifting ``climb_drift`` along the course; the final glide starts in the first
    climb from which its requirement is within the band. ``final_glide(start_height)`` gives
    its (height used per metre, ground speed)."""
    polar = _band_polar()
    v = np.sqrt((polar.c + CLIMB) / polar.a)
    sink = (polar.a * v + polar.b) * v + polar.c
    band = TOP - BOTTOM
    glide_m, glide_s, climb_s = band / sink * glide_ground, band / sink, band / CLIMB
    x, t = glide_m, glide_s  # at the band bottom, about to climb
    for _ in range(60):
        # The cycle's final-glide table is solved where its climb starts (flight_simulation:
        # one table per cycle): its density and wind at the middle of that requirement's start
        # and arrival heights, a fixed point.
        start = TOP + 1.0
        for _ in range(30):
            per_metre, ground = final_glide(start)
            start = FLOOR + (total - x) * per_metre
        # The final glide starts in this climb where the height meets the requirement at the
        # drifted position: BOTTOM + CLIMB tau = FLOOR + (total - x - drift tau) per_metre.
        tau = (FLOOR + (total - x) * per_metre - BOTTOM) / (CLIMB + climb_drift * per_metre)
        required = BOTTOM + CLIMB * tau
        if required <= TOP:
            return t + tau + (total - x - climb_drift * tau) / ground, x + climb_drift * tau, required
        x, t = x + climb_drift * climb_s + glide_m, t + climb_s + glide_s
    raise AssertionError("no final glide")


def _final_glide(wind_along, wind_across=0.0):
    def solve(start_height):
        # The final glide's polar at the density of the middle of its start and arrival heights (contract 3).
        middle = 0.5 * (start_height + FLOOR)
        polar = scaled_polar(SPEC, 380.0, 0.0, density_ratio(middle))
        along = wind_along(middle) if callable(wind_along) else wind_along
        glide = glide_in_wind(polar, MC_FINAL, along, wind_across)
        return glide.height_per_metre, glide.ground_speed_ms
    return solve


def test_steady_crosswind_constant_climb_matches_the_drift_aware_cycle():
    # Source: the drift-aware cycle of contract section 3 worked by hand: a pure crosswind Wn
    # drifts each climb sideways by Wn * t_climb; the glides head into it so that their air
    # velocity across the course is -Wn/f (f the gliding share of the cycle), giving a glide
    # ground speed sqrt(v^2 - (Wn/f)^2) and the cycle's speed sqrt((f v)^2 - Wn^2).
    # (H. Reichmann, Cross-Country Soaring, 1978, drift in thermals, from memory.)
    wn = 25 * KMH
    course = Course([250e3], [0.0])  # north, wind from the east: blowing across it
    polar = _band_polar()
    v = np.sqrt((polar.c + CLIMB) / polar.a)
    sink = (polar.a * v + polar.b) * v + polar.c
    f = CLIMB / (CLIMB + sink)
    glide_ground = np.sqrt(v * v - (wn / f) ** 2)
    across = np.asarray(flight.Simulation(course, day(wind_from_deg=90.0, wind_speed_ms=wn), None, None).wind_across)[0, 0]
    expected, start, height = _expected_time(250e3, glide_ground, 0.0, _final_glide(0.0, across))
    flown = fly(course, day(wind_from_deg=90.0, wind_speed_ms=wn))
    assert flown.finished[0] and flown.reason[0] == flight.FINAL_GLIDE
    assert flown.leg_cruise_speed_ms[0, 0] == pytest.approx(np.sqrt((f * v) ** 2 - wn * wn), rel=1e-12)
    heading = np.degrees(np.arcsin((wn / f) / v))  # turned into the wind (from the east: right of north)
    assert flown.leg_heading_deg[0, 0] == pytest.approx(heading, abs=1e-9)
    # Tolerance: the core's density fixed point is converged to centimetres (a second or two of climb).
    assert flown.final_glide_from_m[0] == pytest.approx(start, abs=1.0)
    assert flown.final_glide_height_m[0] == pytest.approx(height, abs=0.1)
    assert flown.total_time_s[0] == pytest.approx(expected, abs=2.0)


# A westerly strengthening with height, not linearly: calm at the ground, 10 km/h at the band
# middle (1300 m), 60 km/h at the band top (1800 m) and above.
SHEAR = WindProfile((WindLevel(0.0, 270.0, 0.0), WindLevel(1300.0, 270.0, 10 * KMH), WindLevel(1800.0, 270.0, 60 * KMH)))


def _shear_speed(height):
    return np.interp(height, [0.0, 1300.0, 1800.0], [0.0, 10 * KMH, 60 * KMH])


def test_wind_with_height_glides_at_the_band_middle_and_climbs_drift_with_the_band_mean():
    # Source: contract section 3 (wind with height) worked by hand for a tailwind (course east,
    # wind from the west, one direction so the speeds interpolate linearly): the glides fly in
    # the band middle's 10 km/h; a climb from the band bottom to its top drifts with the mean
    # over 800-1800 m, the average of two trapezoids: ((6.15 + 10)/2 + (10 + 60)/2)/2 km/h;
    # the final glide in the wind at the middle of its start and arrival heights.
    course = Course([300e3], [90.0])
    glide_wind = 10 * KMH
    climb_drift = 0.5 * (0.5 * (_shear_speed(BOTTOM) + glide_wind) + 0.5 * (glide_wind + 60 * KMH))
    polar = _band_polar()
    v = np.sqrt((polar.c + CLIMB) / polar.a)
    sink = (polar.a * v + polar.b) * v + polar.c
    f = CLIMB / (CLIMB + sink)
    expected, start, height = _expected_time(300e3, v + glide_wind, climb_drift, _final_glide(_shear_speed))
    flown = fly(course, day(wind_from_deg=270.0, wind_speed_ms=glide_wind, wind_profile=SHEAR))
    assert flown.finished[0] and flown.reason[0] == flight.FINAL_GLIDE
    assert flown.leg_cruise_speed_ms[0, 0] == pytest.approx(f * (v + glide_wind) + (1 - f) * climb_drift, rel=1e-9)
    # Tolerance: the core takes two fixed-point passes for the table's density and wind
    # (flight_requirement.final_table: "a few decimetres from a poor first guess"); the
    # wind's change with height makes the pass contract less than the density alone.
    assert flown.final_glide_from_m[0] == pytest.approx(start, abs=1.0)
    assert flown.final_glide_height_m[0] == pytest.approx(height, abs=0.3)
    assert flown.total_time_s[0] == pytest.approx(expected, abs=2.0)


def test_a_profile_of_one_wind_flies_as_that_wind():
    # Invariant: the same wind at every level is a steady wind (to rounding).
    course = Course([120e3, 120e3, 120e3], [30.0, 150.0, 270.0])
    steady = fly(course, day(wind_from_deg=250.0, wind_speed_ms=30 * KMH))
    same = WindProfile((WindLevel(0.0, 250.0, 30 * KMH), WindLevel(3000.0, 250.0, 30 * KMH)))
    profiled = fly(course, day(wind_from_deg=250.0, wind_speed_ms=30 * KMH, wind_profile=same))
    assert profiled.total_time_s[0] == pytest.approx(steady.total_time_s[0], rel=1e-9)
    np.testing.assert_allclose(profiled.leg_heading_deg, steady.leg_heading_deg, rtol=1e-9)


def test_a_drawn_wind_error_shifts_the_whole_profile():
    # The odds draw the cruise's wind; the profile keeps its shape around it: a flight whose
    # band-middle wind is the profile's own flies as with the profile alone, and an extra
    # headwind at every height slows it.
    course = Course([200e3], [90.0])
    forecast = fly(course, day(wind_from_deg=270.0, wind_speed_ms=10 * KMH, wind_profile=SHEAR))
    weaker = fly(course, day(wind_from_deg=270.0, wind_speed_ms=0.0, wind_profile=SHEAR))
    assert weaker.total_time_s[0] > forecast.total_time_s[0]
