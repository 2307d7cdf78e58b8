"""Circling: turn physics, the Gaussian thermal, the achieved climb."""

from __future__ import annotations

import math

import numpy as np
import pytest
from hypothesis import given, settings
from hypothesis import strategies as st

from glidetask.engine.circling import (
    achieved_climb,
    circling_sink,
    circling_speed,
    load_factor,
    turn_radius,
    updraft,
)
from glidetask.engine.polar import scaled_polar
from invented_polar import KMH, SPEC



def test_load_factor_of_standard_banks():
    # Source: level-turn flight mechanics, n = 1/cos(phi): 30 deg -> 1.155 g, 45 deg -> 1.414 g,
    # 60 deg -> 2 g (any pilot's handbook, e.g. FAA Pilot's Handbook of Aeronautical
    # Knowledge, load factor chart; from memory).
    assert load_factor(30.0) == pytest.approx(1.155, abs=5e-4)
    assert load_factor(45.0) == pytest.approx(1.414, abs=5e-4)
    assert load_factor(60.0) == pytest.approx(2.0, abs=1e-12)


def test_turn_radius_at_45_degrees_and_90_kmh():
    # Source: r = V^2/(g tan(phi)) (standard flight mechanics): 25 m/s at 45 deg -> 63.7 m.
    assert turn_radius(90 * KMH, 45.0) == pytest.approx(63.7, abs=0.05)


def test_turn_radius_agrees_with_the_turn_rate_formula():
    # Source: rate of turn omega = g tan(phi)/V (standard flight mechanics); a full circle
    # at 100 km/h and 40 deg bank then has circumference V * 2 pi / omega.
    v, bank = 100 * KMH, 40.0
    omega = 9.80665 * math.tan(math.radians(bank)) / v
    assert 2 * math.pi * turn_radius(v, bank) == pytest.approx(v * 2 * math.pi / omega, rel=1e-12)


def test_circling_speed_and_sink_follow_the_load_factor():
    # Source: at the same lift coefficient speed grows by sqrt(n), sink by n^1.5
    # (Thomas, Fundamentals of Sailplane Design; from memory): at 60 deg, x1.414 and x2.828.
    polar = scaled_polar(SPEC, 400.0)
    assert circling_speed(25.0, 60.0) == pytest.approx(25.0 * math.sqrt(2.0), rel=1e-12)
    assert circling_sink(polar, 25.0, 60.0) == pytest.approx(polar.sink(25.0) * 2.0**1.5, rel=1e-12)


def test_gaussian_profile():
    # Source: definition of the e-folding radius of w(r) = W0 exp(-(r/R)^2).
    assert updraft(0.0, 3.0, 150.0) == pytest.approx(3.0)
    assert updraft(150.0, 3.0, 150.0) == pytest.approx(3.0 / math.e)
    assert updraft(300.0, 3.0, 150.0) == pytest.approx(3.0 * math.exp(-4.0))


@pytest.mark.parametrize("mass, core", [(350.0, 3.0), (450.0, 2.0), (525.0, 4.5), (400.0, 1.0)])
def test_achieved_climb_is_the_best_over_a_dense_grid(mass, core):
    # Source: the definition (contract section 3), checked by brute force on a fine grid of
    # bank (0.05 deg) and wings-level speed (0.02 m/s); tolerance from that grid.
    polar = scaled_polar(SPEC, mass)
    climb = achieved_climb(polar, core)
    bank = np.arange(15.0, 60.0001, 0.05)[:, None]
    speed = np.arange(polar.min_speed_ms, 1.6 * polar.min_speed_ms, 0.02)[None, :]
    n = 1.0 / np.cos(np.radians(bank))
    grid = updraft(turn_radius(speed * np.sqrt(n), bank), core) - polar.sink(speed) * n**1.5
    assert climb.climb_ms == pytest.approx(grid.max(), abs=2e-4)
    assert climb.turn_radius_m == pytest.approx(turn_radius(climb.airspeed_ms, climb.bank_deg))
    assert climb.climb_ms == pytest.approx(
        updraft(climb.turn_radius_m, core) - circling_sink(polar, climb.wings_level_speed_ms, climb.bank_deg))


def test_typical_figures_are_plausible():
    # Source: soaring practice (common practice): in a 3 m/s-core thermal of 150 m radius a
    # 15 m glider climbs at roughly 1-2 m/s at 35-50 deg bank.
    climb = achieved_climb(scaled_polar(SPEC, 400.0), 3.0, 150.0)
    assert 1.0 < climb.climb_ms < 2.0
    assert 35.0 < climb.bank_deg < 50.0


def test_weak_thermal_gives_no_climb():
    assert achieved_climb(scaled_polar(SPEC, 400.0), 0.5).climb_ms < 0.0


@settings(max_examples=50, deadline=None)
@given(st.floats(1.0, 6.0), st.floats(80.0, 300.0), st.floats(0.0, 170.0), st.floats(0.0, 170.0))
def test_climb_falls_as_ballast_rises(core, radius, b1, b2):
    # Source: soaring practice and the scaling laws: a heavier glider circles faster and
    # wider and sinks faster, so in a given thermal it climbs less (Reichmann,
    # Cross-Country Soaring; from memory).
    light, heavy = sorted((b1, b2))
    masses = 350.0 + np.array([light, heavy])
    climbs = achieved_climb(scaled_polar(SPEC, masses), core, radius).climb_ms
    assert climbs[1] <= climbs[0] + 1e-6


def test_broadcasts_over_cores_and_polars():
    polars = scaled_polar(SPEC, np.array([350.0, 450.0, 525.0]))
    cores = np.array([[1.5], [3.0]])
    together = achieved_climb(polars, cores)
    assert together.climb_ms.shape == (2, 3)
    alone = achieved_climb(scaled_polar(SPEC, 450.0), 3.0)
    assert together.climb_ms[1, 1] == pytest.approx(alone.climb_ms, rel=1e-12)
    assert np.all(together.climb_ms[1] > together.climb_ms[0])  # a stronger core climbs better
