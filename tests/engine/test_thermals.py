"""The day's thermals: Allen's radius, the narrow/typical/broad radii, the search distance."""

from __future__ import annotations

import math

import numpy as np
import pytest

from glidetask.engine.thermals import allen_updraft_radius, thermal_radii, thermal_search_distance


@pytest.mark.parametrize("ratio, expected_m", [
    # Source: Allen 2006 (AIAA 2006-1510), r2 = max(10, 0.102 (z/zi)^(1/3) (1 - 0.25 z/zi) zi)
    # (from memory), worked by hand for zi = 1000 m:
    (0.1, 46.16),   # 0.102 x 0.46416 x 0.975 x 1000
    (0.5, 70.84),   # 0.102 x 0.79370 x 0.875 x 1000
    (1.0, 76.50),   # 0.102 x 1 x 0.75 x 1000: the largest, at the top of the layer
    (0.001, 10.20), # 0.102 x 0.1 x 0.99975 x 1000, just above Allen's 10 m floor
    (0.0005, 10.0), # 8.1 m by the formula: Allen's floor
])
def test_allen_radius_by_hand(ratio, expected_m):
    assert allen_updraft_radius(ratio * 1000.0, 1000.0) == pytest.approx(expected_m, abs=0.005)


def test_allen_radius_scales_with_the_layer_and_grows_with_height():
    # Source: the formula's form (Allen 2006, from memory): r2/zi depends on z/zi only, and its
    # derivative (1/3)(z/zi)^(-2/3)(1 - z/zi) is positive up to the top of the layer.
    ratios = np.linspace(0.05, 1.0, 40)
    one = allen_updraft_radius(ratios * 1500.0, 1500.0)
    two = allen_updraft_radius(ratios * 3000.0, 3000.0)
    assert two == pytest.approx(2.0 * one, rel=1e-12)
    assert np.all(np.diff(one) > 0.0)


def test_allen_radius_is_nan_outside_the_layer():
    radius = allen_updraft_radius(np.array([-10.0, 0.0, 1200.0, 500.0]), np.array([1000.0, 1000.0, 1000.0, 0.0]))
    assert np.all(np.isnan(radius))


def test_typical_narrow_and_broad_radii():
    # Source: Allen's r2 at 0.6 zi (0.102 x 0.6^(1/3) x 0.85 = 0.073126 zi, by hand) and our
    # stated spread of 1.5 either side.
    radii = thermal_radii(2000.0)
    assert radii.typical_m == pytest.approx(146.25, abs=0.01)
    assert radii.narrow_m == pytest.approx(146.25 / 1.5, abs=0.01)
    assert radii.broad_m == pytest.approx(146.25 * 1.5, abs=0.01)
    assert thermal_radii(2000.0, height_fraction=1.0, spread=1.0).narrow_m == pytest.approx(153.0, abs=1e-9)
    both = thermal_radii(np.array([1000.0, 2000.0]))
    assert both.typical_m == pytest.approx([radii.typical_m / 2, radii.typical_m], rel=1e-12)
    with pytest.raises(ValueError):
        thermal_radii(2000.0, height_fraction=0.0)
    with pytest.raises(ValueError):
        thermal_radii(2000.0, spread=0.9)


@pytest.mark.parametrize("r2", [100.0, 150.0, 200.0])
def test_gaussian_of_radius_r2_follows_allens_profile_where_gliders_circle(r2):
    # Source: Allen 2006 (from memory): inner radius r1 = (0.0011 r2 + 0.14) r2, updraft at the
    # peak inside r1 and falling linearly to 0 at r2 (the form behind his peak-to-mean ratio
    # 3 (r2^3 - r2^2 r1)/(r2^3 - r1^3)). At the circling radii 0.3-0.6 r2 a Gaussian with
    # e-folding radius r2 differs from it by at most 0.17 of the peak (the docstring's claim).
    r1 = (0.0011 * r2 + 0.14) * r2
    r = np.linspace(0.3, 0.6, 61) * r2
    trapezoid = np.clip((r2 - r) / (r2 - r1), 0.0, 1.0)
    assert np.max(np.abs(np.exp(-(r / r2) ** 2) - trapezoid)) < 0.17
    # The peak-to-mean ratio of that profile, by integration, is Allen's.
    radii = np.linspace(0.0, r2, 200001)
    profile = np.clip((r2 - radii) / (r2 - r1), 0.0, 1.0)
    mean = np.trapezoid(profile * 2 * math.pi * radii, radii) / (math.pi * r2**2)
    assert 1.0 / mean == pytest.approx(3 * (r2**3 - r2**2 * r1) / (r2**3 - r1**3), rel=1e-6)


def test_search_distance_from_allens_thermal_density():
    # Source: Allen 2006 (from memory): N = 0.6 X Y / (zi r2). A straight track meets the
    # thermals centred within r2 of it: 2 r2 N / (X Y) per metre, so zi / 1.2 between them.
    assert thermal_search_distance(1500.0) == pytest.approx(1250.0, rel=1e-12)
    assert thermal_search_distance(np.array([1200.0, 2400.0])) == pytest.approx([1000.0, 2000.0], rel=1e-12)
    assert math.isnan(thermal_search_distance(0.0))


def test_search_distance_agrees_with_thermals_placed_at_random():
    # Source: a Monte Carlo check of the derivation: thermals of radius r2 scattered at Allen's
    # density over a wide strip; the mean gap between those a straight line passes through.
    rng = np.random.default_rng(12)
    zi, length = 2000.0, 4.0e6
    r2 = float(allen_updraft_radius(0.6 * zi, zi))
    width = 4 * r2
    count = rng.poisson(0.6 * length * width / (zi * r2))
    x = rng.uniform(0.0, length, count)
    y = rng.uniform(-width / 2, width / 2, count)
    met = np.sort(x[np.abs(y) < r2])
    # Standard error of the mean gap ~ gap / sqrt(2400 meetings): about 2 %.
    assert np.mean(np.diff(met)) == pytest.approx(thermal_search_distance(zi), rel=0.06)
