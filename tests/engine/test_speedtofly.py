"""MacCready speed to fly: closed form, glide in wind, drift-aware cruise."""

from __future__ import annotations

import math

import numpy as np
import pytest
from hypothesis import assume, given, settings
from hypothesis import strategies as st
from scipy.optimize import minimize_scalar

from glidetask.engine.polar import scaled_polar
from glidetask.engine.speedtofly import (
    cruise_in_wind,
    glide_in_wind,
    macready_for_speed,
    speed_to_fly_still_air,
)
from invented_polar import POLAR, SPEC


settings_ = st.floats(0.0, 5.0)
winds = st.floats(-15.0, 15.0)


def _best_by_scipy(objective, lo, hi):
    """Independent reference: scipy's bounded scalar minimiser, checked against a fine grid
    (``objective`` takes arrays) in case the bounded search settles on a local minimum."""
    found = minimize_scalar(lambda v: float(objective(v)), bounds=(lo, hi), method="bounded",
                            options={"xatol": 1e-7})
    grid = np.linspace(lo, hi, 20001)
    values = objective(grid)
    return found.x if found.fun <= values.min() else grid[values.argmin()]


def test_still_air_closed_form():
    # Source: MacCready theory for a quadratic polar: v = sqrt((c + m)/a) (P. B. MacCready,
    # "Optimum airspeed selector", Soaring 1958; Reichmann, Cross-Country Soaring; from memory).
    for mc in (0.5, 1.0, 2.0, 3.5):
        expected = math.sqrt((POLAR.c + mc) / POLAR.a)
        assert speed_to_fly_still_air(POLAR, mc) == pytest.approx(expected, rel=1e-12)


@pytest.mark.parametrize("mc", [0.5, 1.0, 2.0, 4.0])
def test_still_air_speed_maximises_the_cross_country_speed(mc):
    # Source: MacCready theory: the speed to fly maximises m v / (m + sink(v)) (average speed
    # with climbs at m); checked with scipy's minimiser (tolerance from its xatol and grid).
    best = _best_by_scipy(lambda v: -mc * v / (mc + POLAR.sink(v)), POLAR.min_speed_ms, POLAR.vne_ms)
    assert speed_to_fly_still_air(POLAR, mc) == pytest.approx(best, abs=2e-3)


def test_cruise_speed_is_where_the_macready_tangent_meets_the_speed_axis():
    # Source: the graphical MacCready construction (Reichmann, Cross-Country Soaring; from
    # memory): the tangent to the polar from the climb rate m on the vertical axis crosses
    # the speed axis at the average cross-country speed.
    mc = 2.0
    v = speed_to_fly_still_air(POLAR, mc)
    slope = POLAR.sink_slope(v)
    assert slope == pytest.approx((POLAR.sink(v) + mc) / v, rel=1e-9)  # the line touches the polar
    crossing = mc / slope  # where the line from (0, -m) with that slope reaches sink 0
    assert cruise_in_wind(POLAR, mc, 0.0, 0.0).cruise_speed_ms == pytest.approx(crossing, rel=1e-9)


def test_zero_setting_flies_best_glide_and_sinking_air_speeds_up():
    # Source: MacCready theory: m = 0 is the best glide speed; in sinking air fly faster
    # (Reichmann, Cross-Country Soaring; common practice).
    assert speed_to_fly_still_air(POLAR, 0.0) == pytest.approx(POLAR.best_ld_speed_ms, rel=1e-12)
    assert speed_to_fly_still_air(POLAR, 1.0, airmass_ms=-1.0) > speed_to_fly_still_air(POLAR, 1.0)


def test_strong_lift_is_flown_at_the_lowest_valid_speed():
    assert speed_to_fly_still_air(POLAR, 0.0, airmass_ms=3.0) == pytest.approx(POLAR.min_speed_ms)
    assert speed_to_fly_still_air(POLAR, 50.0) == pytest.approx(POLAR.vne_ms)


@settings(max_examples=100, deadline=None)
@given(settings_, settings_)
def test_speed_to_fly_rises_with_the_setting(m1, m2):
    # Source: MacCready theory: a higher expected climb means a faster speed to fly.
    assume(abs(m1 - m2) > 1e-6)
    low, high = sorted((m1, m2))
    assert speed_to_fly_still_air(POLAR, low) < speed_to_fly_still_air(POLAR, high)
    assert glide_in_wind(POLAR, low, -5.0, 3.0).airspeed_ms < glide_in_wind(POLAR, high, -5.0, 3.0).airspeed_ms


@settings(max_examples=60, deadline=None)
@given(settings_, winds, winds, st.floats(-1.5, 0.5))
def test_glide_in_wind_maximises_the_contract_objective(mc, along, across, airmass):
    # Source: shared/CONTRACT.md section 3: v maximises m Vg/(m + sink - u), or for m = 0
    # Vg/(sink - u), with Vg = sqrt(v^2 - Wn^2) + We; checked with scipy (tolerance: the
    # objective at the engine's answer is within 1e-6 relative of scipy's best).
    solution = glide_in_wind(POLAR, mc, along, across, airmass)
    lo = max(POLAR.min_speed_ms, abs(across) + 1e-9)

    def cost(v):  # time per metre over the ground, counting the climb at m
        ground = np.sqrt(np.maximum(v * v - across * across, 0.0)) + along
        with np.errstate(divide="ignore", invalid="ignore"):
            return np.where(ground > 0, (mc + POLAR.sink(v) - airmass) / ground, np.inf)

    best = _best_by_scipy(cost, lo, POLAR.vne_ms)
    assert cost(solution.airspeed_ms) <= cost(best) + 1e-6 * abs(cost(best))
    assert solution.airspeed_ms == pytest.approx(best, abs=0.02)
    assert solution.height_per_metre == pytest.approx((solution.sink_ms - airmass) / solution.ground_speed_ms)


def test_glide_in_still_air_matches_the_closed_form():
    for mc in (0.0, 1.0, 3.0):
        assert glide_in_wind(POLAR, mc, 0.0, 0.0).airspeed_ms == pytest.approx(
            speed_to_fly_still_air(POLAR, mc), rel=1e-9)


def test_fly_faster_into_a_headwind_and_slower_downwind():
    # Source: final-glide practice (Reichmann, Cross-Country Soaring; common practice).
    calm = glide_in_wind(POLAR, 0.0, 0.0, 0.0).airspeed_ms
    assert glide_in_wind(POLAR, 0.0, -8.0, 0.0).airspeed_ms > calm
    assert glide_in_wind(POLAR, 0.0, 8.0, 0.0).airspeed_ms < calm


def test_macready_for_speed_inverts_the_speed_to_fly():
    for mc, along, across in ((0.0, -6.0, 4.0), (1.5, 5.0, -7.0), (3.0, 0.0, 0.0)):
        v = glide_in_wind(POLAR, mc, along, across).airspeed_ms
        assert macready_for_speed(POLAR, v, along, across) == pytest.approx(mc, abs=1e-7)


def test_no_progress_is_nan_not_an_error():
    solution = glide_in_wind(POLAR, 1.0, -POLAR.vne_ms - 1.0, 0.0)
    assert math.isnan(solution.airspeed_ms) and math.isnan(solution.ground_speed_ms)
    assert math.isnan(cruise_in_wind(POLAR, 2.0, -60.0, 0.0).cruise_speed_ms)
    assert math.isnan(cruise_in_wind(POLAR, 0.0, 0.0, 0.0).cruise_speed_ms)  # no climbs, no progress


def test_drift_aware_cruise_matches_a_simulated_climb_and_glide_cycle():
    # Source: kinematics of one cycle, worked independently: climb height h at m_c drifting
    # with the wind, then glide it off at airspeed v on a heading chosen so that the whole
    # cycle's crosswind drift cancels; average speed = along-course distance / cycle time.
    climb, along, across = 1.8, -4.0, 6.0
    cruise = cruise_in_wind(POLAR, climb, along, across)
    v = cruise.airspeed_ms
    assert v == pytest.approx(speed_to_fly_still_air(POLAR, climb), rel=1e-12)  # drift-aware: still-air speed
    h = 500.0
    t_climb, t_glide = h / climb, h / POLAR.sink(v)
    cycle = t_climb + t_glide
    crab = math.asin(across * cycle / (v * t_glide))  # cancels the cycle's crosswind drift
    distance = v * math.cos(crab) * t_glide + along * cycle
    assert cruise.cruise_speed_ms == pytest.approx(distance / cycle, rel=1e-12)
    assert cruise.glide_fraction == pytest.approx(t_glide / cycle, rel=1e-12)


def test_fixed_setting_changes_the_speed_but_the_real_climb_sets_the_average():
    cruise = cruise_in_wind(POLAR, 2.0, 0.0, 0.0, mc_ms=1.0)
    v = speed_to_fly_still_air(POLAR, 1.0)
    assert cruise.airspeed_ms == pytest.approx(v)
    assert cruise.cruise_speed_ms == pytest.approx(2.0 * v / (2.0 + POLAR.sink(v)))
    # MacCready theory: the setting equal to the real climb gives the best average speed.
    assert cruise_in_wind(POLAR, 2.0, 0.0, 0.0).cruise_speed_ms > cruise.cruise_speed_ms


def test_array_polars_and_cases_broadcast():
    polars = scaled_polar(SPEC, np.array([350.0, 450.0, 525.0]))
    mc = np.array([[0.0], [1.0], [2.5]])
    solution = glide_in_wind(polars, mc, -5.0, 4.0)
    assert solution.airspeed_ms.shape == (3, 3)
    for i in range(3):
        for j, mass in enumerate((350.0, 450.0, 525.0)):
            alone = glide_in_wind(scaled_polar(SPEC, mass), float(mc[i, 0]), -5.0, 4.0)
            assert solution.airspeed_ms[i, j] == pytest.approx(alone.airspeed_ms, rel=1e-9)
    assert cruise_in_wind(polars, mc, 3.0, 2.0).cruise_speed_ms.shape == (3, 3)


# ---------------------------------------------------------------- the Newton step on its own


def _newton_path(func, lo, hi, guess, args=()):
    """Every point ``solve_increasing`` evaluates ``func`` at, for a one-element problem."""
    from glidetask.engine.speedtofly import solve_increasing

    points = []

    def recording(x, *rest):
        points.append(float(x[0]))
        return func(x, *rest)

    root = solve_increasing(recording, np.array([lo]), np.array([hi]), np.array([guess]), args=args)
    return float(root[0]), points


def _converges_quadratically(root, points, constant):
    """Newton's signature: once within 0.1 of the root, each error is at most
    ``constant x`` the previous one squared (a bisection or a wrong slope only halves it)."""
    errors = [abs(x - root) for x in points]
    close = [(e0, e1) for e0, e1 in zip(errors, errors[1:]) if 1e-7 < e0 < 0.1]
    return bool(close) and all(e1 <= constant * e0 * e0 for e0, e1 in close)


def _cubic(x):
    return x**3 + x - 3.0, 3.0 * x * x + 1.0


def test_newton_path_converges_quadratically_and_a_wrong_slope_would_show():
    # Source: Newton's method converges quadratically, e_{k+1} ~ f''/(2 f') e_k^2 (any numerical
    # analysis text, e.g. Press et al., Numerical Recipes, root finding; from memory); for
    # x^3 + x - 3 at its root 1.2134 the constant is 0.67, checked here with 3.
    root, points = _newton_path(_cubic, 0.0, 3.0, 2.0)
    assert root**3 + root - 3.0 == pytest.approx(0.0, abs=1e-9)
    assert len(points) <= 7
    assert _converges_quadratically(root, points, 3.0)
    # The same checks catch a slope off by a factor 2, though the bracket still finds the root.
    wrong_root, wrong_points = _newton_path(lambda x: (_cubic(x)[0], 2.0 * _cubic(x)[1]), 0.0, 3.0, 2.0)
    assert wrong_root == pytest.approx(root, abs=1e-8)
    assert len(wrong_points) > 7 and not _converges_quadratically(wrong_root, wrong_points, 3.0)


@settings(max_examples=200, deadline=None)
@given(st.floats(0.3, 5.0), winds, st.floats(0.0, 12.0), st.floats(-1.0, 1.0), st.floats(0.05, 0.6))
def test_glide_stationarity_slope_is_its_derivative(mc, along, across, airmass, offset):
    # Source: a central finite difference (step 1e-5 m/s, error ~1e-9 relative) of the very
    # function the glide solver's Newton step differentiates.
    from glidetask.engine.speedtofly import _stationarity

    a, b, c = (np.asarray(x, dtype=float) for x in (POLAR.a, POLAR.b, POLAR.c))
    v = np.array([np.sqrt(across * across + np.minimum(along, 0.0) ** 2) + 2.0 + 60.0 * offset])
    args = (a, b, c, along, across * across, airmass, mc)
    step = 1e-5
    ahead, _ = _stationarity(v + step, *args)
    behind, _ = _stationarity(v - step, *args)
    _, slope = _stationarity(v, *args)
    assert slope == pytest.approx((ahead - behind) / (2 * step), rel=1e-5, abs=1e-8)


def test_glide_solver_newton_path_converges_quadratically():
    # Source: as above (Newton's quadratic convergence): the glide solver's own iteration, in a
    # crosswind and headwind, settles in a few steps with errors squaring.
    from glidetask.engine.speedtofly import _stationarity

    a, b, c = (np.asarray(x, dtype=float) for x in (POLAR.a, POLAR.b, POLAR.c))
    along, across, mc = -6.0, 8.0, 2.0
    lo, hi = float(np.hypot(across, along)), float(POLAR.vne_ms)
    root, points = _newton_path(_stationarity, lo, hi, 0.5 * (lo + hi), args=(a, b, c, along, across**2, 0.0, mc))
    assert root == pytest.approx(glide_in_wind(POLAR, mc, along, across).airspeed_ms, rel=1e-9)
    assert len(points) <= 8
    assert _converges_quadratically(root, points, 1.0)
