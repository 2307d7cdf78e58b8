"""The final glide's terrain requirement is the ground rule of every glide, at its threshold.

The core's final-glide requirement (:meth:`PathTerrain.extra_required` on top of the pure
requirement) must be exactly the least height from which the contact search of
:mod:`glidetask.engine.flight_ground` (the rule cruise glides obey) finds no contact
before the finish: one rule, ``T(x_j) + C + height used from x to x_j`` for every sample
``x_j`` ahead. Checked on an analytic ridge (written to a GeoTIFF here) over random
glide slopes and start points.
"""

from __future__ import annotations

import numpy as np
import pytest
from hypothesis import HealthCheck, given, settings, strategies as st

pytest.importorskip("rasterio")

from glidetask.engine.flight_ground import GroundFloor, glide_allowance  # noqa: E402
from tests.engine.test_ground_rule import BASE_M, ridge_path  # noqa: E402

FLOOR_M = BASE_M + 200.0  # finish elevation plus the arrival margin


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
    total = hook.profile.vertex_distance_m[-1]
    position = fraction * total  # before the crest (at about half way)
    pure = FLOOR_M + slope * (total - position)
    extra = float(hook.extra_required(np.array([position]), np.array([[slope]]), np.array([FLOOR_M]))[0])
    required = pure + extra
    # From the required height (a millimetre over, for round-off) the glide never meets the floor ...
    assert _allowance(hook, position, required + 1e-3, slope) == np.inf
    # ... and from a metre lower it does, wherever the terrain raised the requirement.
    if extra > 1.0:
        assert _allowance(hook, position, required - 1.0, slope) < np.inf
