"""One clearance rule for every glide (glidetask.engine.flight_ground), checked by brute force.

The rule: a glide keeps ``terrain_clearance_m`` above the terrain under it. The flight core
applies it twice: a cruise glide stops where it first meets terrain + clearance
(:meth:`GroundFloor.contact`), and the final glide's terrain requirement is the least start
height at which the glide home never meets it (the pure requirement plus the largest
shortfall ahead, :meth:`GroundFloor.largest_shortfall` through :class:`PathTerrain`). Here
both are checked against an independent brute force, a walk of the glide in small steps over
the sampled terrain (linear between samples, as the model is read), and against each other
on an analytic ridge written to a GeoTIFF.
"""

from __future__ import annotations

import numpy as np
import pytest
from hypothesis import HealthCheck, given, settings, strategies as st

pytest.importorskip("rasterio")

from glidetask.engine.clearance_hook import PathTerrain  # noqa: E402
from glidetask.engine.flight_ground import GroundFloor, glide_allowance  # noqa: E402
from tests.engine.test_ground_rule import BASE_M, ridge_path  # noqa: E402
from tests.engine.test_terrain import _profile  # noqa: E402

FLOOR_M = BASE_M + 200.0  # finish elevation plus the arrival margin
WALK_M = 5.0  # the brute force's step along the glide


def _floor_walk(profile, clearance, start, end, step=WALK_M):
    """Points from ``start`` to ``end`` every ``step`` plus every sample between, and terrain +
    clearance there read by linear interpolation (NaN where a neighbouring sample is unknown)."""
    inside = profile.distance_m[(profile.distance_m >= start) & (profile.distance_m <= end)]
    x = np.unique(np.concatenate((np.arange(start, end, step), inside, [start, end])))
    return x, np.interp(x, profile.distance_m, profile.elevation_m) + clearance


def _used(vertex, per_metre, start, x):
    """Height a glide losing ``per_metre[l]`` on leg ``l`` uses from ``start`` to each ``x``: the
    sum over legs of the slope times the overlap of ``[start, x]`` with the leg."""
    lo, hi = vertex[:-1], vertex[1:]
    overlap = np.clip(np.minimum(x[:, None], hi) - np.maximum(start, lo), 0.0, None)
    return overlap @ np.where(hi > lo, per_metre, 0.0)


def _least_start_by_walk(profile, clearance, per_metre, floor_m, start):
    """Brute force: the least height at ``start`` from which the glide home passes every point of
    the walk at or above terrain + clearance and arrives at ``floor_m`` or higher."""
    vertex, end = profile.vertex_distance_m, profile.vertex_distance_m[-1]
    x, floor = _floor_walk(profile, clearance, start, end)
    need = floor + _used(vertex, per_metre, start, x)
    arrival = floor_m + _used(vertex, per_metre, start, np.array([end]))[0]
    known = np.isfinite(need)
    return max(arrival, float(need[known].max())) if known.any() else arrival


@st.composite
def glides_home(draw):
    """A path of 1-3 legs over rough terrain (with gaps), a start on it and a glide table."""
    legs = draw(st.integers(1, 3))
    lengths = draw(st.lists(st.floats(2000.0, 15000.0), min_size=legs, max_size=legs))
    vertex = np.concatenate(([0.0], np.cumsum(lengths)))
    rng = np.random.default_rng(draw(st.integers(0, 2**32 - 1)))
    distance = np.unique(np.concatenate((vertex, rng.uniform(0.0, vertex[-1], rng.integers(5, 80)))))
    elevation = rng.normal(500.0, 250.0, distance.size)
    elevation[rng.uniform(size=distance.size) < draw(st.sampled_from([0.0, 0.1]))] = np.nan
    per_metre = rng.uniform(1 / 60.0, 1 / 12.0, legs)
    start = draw(st.floats(0.0, 1.0)) * vertex[-1]
    return _profile(distance, elevation, vertex), draw(st.floats(0.0, 300.0)), per_metre, start


@settings(max_examples=60, deadline=None)
@given(case=glides_home(), floor_m=st.floats(0.0, 800.0))
def test_the_final_glide_requirement_is_the_least_start_height_found_by_a_walk(case, floor_m):
    # Source: brute force (the definition of the requirement, walked in 5 m steps over the
    # sampled terrain): the least start height that never meets terrain + clearance.
    profile, clearance, per_metre, start = case
    hook = PathTerrain(profile, clearance)
    line = hook.final_glide_line(per_metre[None, :], [floor_m])
    pure = float(line.height(np.array([0]), np.array([start]), hook.ground.leg_of(np.array([start])))[0])
    extra = float(hook([start], per_metre[None, :], [floor_m])[0])
    assert extra >= 0.0
    assert pure + extra == pytest.approx(_least_start_by_walk(profile, clearance, per_metre, floor_m, start),
                                         abs=1e-6)


@settings(max_examples=60, deadline=None)
@given(case=glides_home(), above_m=st.floats(-100.0, 300.0), limit_share=st.floats(0.05, 1.0))
def test_a_cruise_glide_stops_where_a_walk_first_meets_the_floor(case, above_m, limit_share):
    # Source: brute force (a 0.5 m walk of the straight glide over the sampled terrain): the
    # first point where the glide is below terrain + clearance. Fully known terrain here
    # (unknown terrain is no floor for either).
    profile, clearance, per_metre, start = case
    profile = _profile(profile.distance_m, np.nan_to_num(profile.elevation_m, nan=400.0), profile.vertex_distance_m)
    ground = GroundFloor.from_profile(profile, clearance)
    slope = float(per_metre[0])
    limit = limit_share * (profile.total_m - start)
    height = float(ground.at(start)) + above_m  # starts above the floor, or (negative) below it
    lowest = height - slope * limit  # the glide's own lower stop: only floors above it are examined
    found = float(ground.contact(np.array([start]), np.array([height]), np.array([slope]), np.array([limit]),
                                 np.array([lowest]))[0])
    x, floor = _floor_walk(profile, clearance, start, start + limit, step=0.5)
    below = np.flatnonzero(height - slope * (x - start) < floor - 1e-9)
    if height < float(ground.at(start)) - 1e-9:
        assert found == 0.0
    elif below.size:
        # The walk sees the contact at its next point: within one step after the exact crossing.
        assert x[below[0]] - 0.5 - 1e-6 <= start + found <= x[below[0]] + 1e-6
    else:
        assert found >= limit - 0.5


@settings(max_examples=40, deadline=None)
@given(case=glides_home(), floor_m=st.floats(0.0, 800.0))
def test_the_report_s_raise_at_every_sample_is_the_largest_shortfall_from_there(case, floor_m):
    # Source: the definition (the raise at a sample is the largest shortfall from it on),
    # computed at every sample at once (the report) and one start at a time (the core).
    profile, clearance, per_metre, _ = case
    ground = PathTerrain(profile, clearance).ground
    line = PathTerrain(profile, clearance).final_glide_line(np.tile(per_metre, (profile.distance_m.size, 1)),
                                                            np.full(profile.distance_m.size, floor_m))
    heights = line.height(np.zeros(profile.distance_m.size, dtype=np.intp), profile.distance_m, ground.sample_leg)
    along = ground.shortfall_along(heights)
    one_at_a_time = ground.largest_shortfall(profile.distance_m, line)
    known = np.isfinite(along)
    np.testing.assert_array_equal(known, np.isfinite(one_at_a_time))
    np.testing.assert_allclose(along[known], one_at_a_time[known], rtol=0.0, atol=1e-9)


def test_the_requirement_counts_the_ground_at_its_own_start_between_samples():
    # Source: hand computation. Samples at 0, 1 km and 2 km with terrain 2,000, 0 and 0 m: at
    # 500 m the terrain reads 1,000 m (linear), so with 150 m clearance a glide starting there
    # needs 1,150 m, more than the arrival at 300 m plus 1,500 m / 30 = 350 m.
    profile = _profile([0.0, 1000.0, 2000.0], [2000.0, 0.0, 0.0], [0.0, 2000.0])
    hook = PathTerrain(profile, 150.0)
    assert float(hook([500.0], [[1 / 30.0]], [300.0])[0]) == pytest.approx(1150.0 - 350.0, abs=1e-9)
    assert _least_start_by_walk(profile, 150.0, np.array([1 / 30.0]), 300.0, 500.0) == pytest.approx(1150.0)


# ---------------------------------------------------------------- the two uses agree, over a ridge


@pytest.fixture(scope="module")
def hook(tmp_path_factory):
    return ridge_path(tmp_path_factory.mktemp("ridge"), 1700.0, 0.05)


def _allowance(hook, position, height, slope):
    total = hook.profile.vertex_distance_m[-1]
    ground = GroundFloor.from_hook(hook)
    remaining = np.array([[total - position]])
    per_metre = np.array([[slope]])
    return float(glide_allowance(ground, np.array([0.0]), np.array([0]), np.array([position]), np.array([height]),
                                 remaining, per_metre, remaining * per_metre, np.array([FLOOR_M]))[0])


@settings(max_examples=40, deadline=None, suppress_health_check=[HealthCheck.function_scoped_fixture])
@given(slope=st.floats(1.0 / 60.0, 1.0 / 15.0), fraction=st.floats(0.0, 0.45))
def test_the_final_glide_requirement_is_the_contact_rule_s_threshold(hook, slope, fraction):
    # Source: the definition (the requirement is the least start height with no contact),
    # checked with the contact search the cruise glides use, on an analytic ridge.
    total = hook.profile.vertex_distance_m[-1]
    position = fraction * total  # before the crest (at about half way)
    pure = FLOOR_M + slope * (total - position)
    extra = float(hook.extra_required(np.array([position]), np.array([[slope]]), np.array([FLOOR_M]))[0])
    required = pure + extra
    assert required == pytest.approx(_least_start_by_walk(hook.profile, hook.clearance_m, np.array([slope]), FLOOR_M,
                                                          position), abs=1e-6)
    # From the required height (a millimetre over, for round-off) the glide never meets the floor ...
    assert _allowance(hook, position, required + 1e-3, slope) == np.inf
    # ... and from a metre lower it does, wherever the terrain raised the requirement.
    if extra > 1.0:
        assert _allowance(hook, position, required - 1.0, slope) < np.inf
