"""Polar fit and scaling: least squares, derived figures, mass/density/bugs scaling."""

from __future__ import annotations

from dataclasses import replace

import numpy as np
import pytest
from hypothesis import given, settings
from hypothesis import strategies as st

from glidetask.engine.polar import PolarSpec, fit_quadratic, scaled_polar
from glidetask.engine.scenario import GliderSetup

KMH = 1 / 3.6
# An invented polar (IAS km/h, sink m/s at 350 kg), not any real aircraft.
SPEC = PolarSpec(
    label="test 15 m", wing_area_m2=10.5, reference_mass_kg=350.0, empty_mass_kg=260.0,
    max_ballast_kg=170.0, max_mass_kg=525.0, vne_ias_ms=270 * KMH, min_speed_ias_ms=70 * KMH,
    points=((80 * KMH, 0.62), (100 * KMH, 0.64), (120 * KMH, 0.80), (150 * KMH, 1.20), (180 * KMH, 1.85)),
)

masses = st.floats(250.0, 600.0)
sigmas = st.floats(0.45, 1.1)


def test_fit_agrees_with_numpy_polyfit():
    # Source: numpy.polynomial least squares as an independent reference implementation.
    speeds, sinks = zip(*SPEC.points)
    a, b, c, rms = fit_quadratic(speeds, sinks)
    reference = np.polynomial.polynomial.polyfit(speeds, sinks, 2)
    assert (c, b, a) == pytest.approx(tuple(reference), rel=1e-9)
    residual = np.array(sinks) - (a * np.array(speeds) ** 2 + b * np.array(speeds) + c)
    assert rms == pytest.approx(np.sqrt(np.mean(residual**2)), rel=1e-12)
    assert rms > 0.0  # five points that are not on one parabola


def test_three_points_are_fitted_exactly():
    # Source: a quadratic through three points is unique (interpolation): zero residual.
    a, b, c, rms = fit_quadratic([20.0, 30.0, 45.0], [0.7, 0.8, 1.6])
    assert rms == pytest.approx(0.0, abs=1e-12)
    assert a * 30.0**2 + b * 30.0 + c == pytest.approx(0.8, abs=1e-12)


def test_fit_rejects_too_few_speeds():
    with pytest.raises(ValueError):
        fit_quadratic([20.0, 20.0, 30.0], [0.7, 0.8, 0.9])


def test_min_sink_and_best_glide_match_a_dense_search():
    # Source: definitions (minimum of sink(v); maximum of v/sink(v)) checked by brute force
    # on a 0.001 m/s grid; tolerance from the grid spacing.
    polar = scaled_polar(SPEC, 400.0)
    v = np.arange(polar.min_speed_ms, polar.vne_ms, 0.001)
    sink = polar.sink(v)
    assert polar.min_sink_ms == pytest.approx(sink.min(), abs=1e-6)
    assert polar.min_sink_speed_ms == pytest.approx(v[sink.argmin()], abs=2e-3)
    assert polar.best_ld == pytest.approx((v / sink).max(), rel=1e-6)
    assert polar.best_ld_speed_ms == pytest.approx(v[(v / sink).argmax()], abs=2e-3)


def test_best_glide_speed_is_the_tangent_from_the_origin():
    # Source: glide polar theory: best L/D where the line from the origin touches the polar,
    # v = sqrt(c/a) for a quadratic (Reichmann, Cross-Country Soaring; from memory).
    polar = scaled_polar(SPEC, 350.0)
    assert polar.best_ld_speed_ms == pytest.approx(np.sqrt(polar.c / polar.a), rel=1e-12)
    slope_of_tangent = polar.sink_slope(polar.best_ld_speed_ms)
    assert slope_of_tangent == pytest.approx(polar.sink(polar.best_ld_speed_ms) / polar.best_ld_speed_ms, rel=1e-9)


def test_bugs_multiply_every_sink_rate():
    # Source: shared/CONTRACT.md section 3: bugs multiply every sink rate by (1 + p/100).
    clean, dirty = scaled_polar(SPEC, 400.0), scaled_polar(SPEC, 400.0, bugs_percent=15.0)
    v = np.linspace(25.0, 70.0, 10)
    assert np.allclose(dirty.sink(v), 1.15 * clean.sink(v), rtol=1e-12)
    assert dirty.best_ld == pytest.approx(clean.best_ld / 1.15, rel=1e-12)


def test_vne_is_an_indicated_limit_that_mass_does_not_change():
    # Source: shared/CONTRACT.md section 3 (vne TAS = vne_ias / sqrt(sigma)).
    light, heavy = scaled_polar(SPEC, 320.0, sigma=0.8), scaled_polar(SPEC, 520.0, sigma=0.8)
    assert light.vne_ms == heavy.vne_ms == pytest.approx(SPEC.vne_ias_ms / np.sqrt(0.8))


@settings(max_examples=100, deadline=None)
@given(masses, masses, sigmas, sigmas)
def test_best_glide_ratio_does_not_depend_on_mass_or_density(m1, m2, s1, s2):
    # Source: glide polar theory: at a given lift coefficient, L/D is independent of wing
    # loading and density; only the speeds change (Thomas, Fundamentals of Sailplane Design).
    # Range clamps could break this only at extremes; this polar's tangent speed stays inside.
    one, two = scaled_polar(SPEC, m1, sigma=s1), scaled_polar(SPEC, m2, sigma=s2)
    assert one.best_ld == pytest.approx(two.best_ld, rel=1e-9)


@settings(max_examples=100, deadline=None)
@given(masses, masses)
def test_speeds_and_sinks_scale_with_the_square_root_of_mass(m1, m2):
    # Source: glide polar theory, k = sqrt(m2/m1) for speeds and sink rates (contract section 3).
    one, two = scaled_polar(SPEC, m1), scaled_polar(SPEC, m2)
    k = np.sqrt(m2 / m1)
    assert two.best_ld_speed_ms == pytest.approx(k * one.best_ld_speed_ms, rel=1e-9)
    assert two.min_sink_speed_ms == pytest.approx(k * one.min_sink_speed_ms, rel=1e-9)
    assert two.min_sink_ms == pytest.approx(k * one.min_sink_ms, rel=1e-9)
    assert two.min_speed_ms == pytest.approx(k * one.min_speed_ms, rel=1e-12)
    assert two.sink(k * 30.0) == pytest.approx(k * one.sink(30.0), rel=1e-9)


@settings(max_examples=100, deadline=None)
@given(sigmas)
def test_density_scales_speeds_by_one_over_root_sigma(sigma):
    # Source: contract section 3 (k = 1/sqrt(sigma)); the same dynamic pressure at TAS = IAS/sqrt(sigma).
    sea, high = scaled_polar(SPEC, 400.0), scaled_polar(SPEC, 400.0, sigma=sigma)
    k = 1.0 / np.sqrt(sigma)
    assert high.best_ld_speed_ms == pytest.approx(k * sea.best_ld_speed_ms, rel=1e-9)
    assert high.min_sink_ms == pytest.approx(k * sea.min_sink_ms, rel=1e-9)


def test_array_fields_broadcast_like_separate_polars():
    masses_kg = np.array([350.0, 430.0, 520.0])
    together = scaled_polar(SPEC, masses_kg, bugs_percent=np.array([[0.0], [10.0]]))
    assert together.shape == (2, 3)
    for i, bugs in enumerate((0.0, 10.0)):
        for j, mass in enumerate(masses_kg):
            alone = scaled_polar(SPEC, mass, bugs_percent=bugs)
            assert together.best_ld[i, j] == pytest.approx(alone.best_ld, rel=1e-12)
            assert together.min_sink_ms[i, j] == pytest.approx(alone.min_sink_ms, rel=1e-12)


def test_scaled_polar_rejects_impossible_options():
    with pytest.raises(ValueError):
        scaled_polar(SPEC, 0.0)
    with pytest.raises(ValueError):
        scaled_polar(SPEC, 400.0, sigma=-1.0)
    with pytest.raises(ValueError):
        scaled_polar(SPEC, 400.0, bugs_percent=-100.0)


def test_polar_for_a_setup_uses_its_mass_and_the_density_at_altitude():
    # Source: contract section 3: mass = empty + pilot + ballast; sigma from ISO 2533
    # (0.7423 at 3000 m, table value from memory).
    setup = GliderSetup(spec=SPEC, pilot_kg=85.0, ballast_kg=100.0, bugs_percent=5.0)
    polar = setup.polar_at(altitude_m=3000.0)
    assert polar.mass_kg == pytest.approx(445.0)
    assert polar.wing_loading_kgm2 == pytest.approx(445.0 / 10.5)
    k = np.sqrt(445.0 / 350.0) / np.sqrt(0.7423)
    assert polar.min_speed_ms == pytest.approx(SPEC.min_speed_ias_ms * k, rel=1e-4)
    reference = scaled_polar(SPEC, 445.0, 5.0, 0.742248445103431)
    assert polar.best_ld == pytest.approx(reference.best_ld, rel=1e-12)


def test_stall_speed_scales_with_mass_and_density_at_a_fixed_lift_coefficient():
    # Source: the lift equation m g = 1/2 rho V^2 S CL (any flight mechanics text, e.g.
    # Anderson, Introduction to Flight; from memory): the stall is at CL_max, so the CL_max
    # found at the reference mass and sea level (ISO 2533: rho0 = 1.225 kg/m^3) gives the
    # stall at another mass and density.
    spec = replace(SPEC, stall_speed_ias_ms=65 * KMH)
    rho0, g, sigma = 1.225, 9.80665, 0.8
    cl_max = 2 * spec.reference_mass_kg * g / (rho0 * spec.stall_ias_ms**2 * spec.wing_area_m2)
    expected = np.sqrt(2 * 450.0 * g / (sigma * rho0 * spec.wing_area_m2 * cl_max))
    polar = scaled_polar(spec, 450.0, sigma=sigma)
    assert polar.stall_speed_ms == pytest.approx(expected, rel=1e-12)
    assert polar.wings_level_stall_ms == pytest.approx(expected, rel=1e-12)
    assert float(expected) * 3.6 == pytest.approx(82.40, abs=0.01)  # 65 sqrt(450/350)/sqrt(0.8), by hand


def test_stall_speed_defaults_to_min_speed_over_1_1_and_says_so():
    # Source: shared/CONTRACT.md 2.4.
    assert SPEC.stall_speed_defaulted and SPEC.stall_ias_ms == pytest.approx(70 * KMH / 1.1, rel=1e-12)
    given = replace(SPEC, stall_speed_ias_ms=60 * KMH)
    assert not given.stall_speed_defaulted and given.stall_ias_ms == 60 * KMH
    polar = scaled_polar(SPEC, 400.0)
    assert polar.stall_speed_ms == pytest.approx(polar.min_speed_ms / 1.1, rel=1e-12)
    # A polar built without a stall speed reads it from its lowest valid speed.
    bare = replace(polar, stall_speed_ms=float("nan"))
    assert bare.wings_level_stall_ms == pytest.approx(polar.min_speed_ms / 1.1, rel=1e-12)
