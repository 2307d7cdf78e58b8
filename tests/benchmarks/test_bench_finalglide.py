"""Speed budget: 100,000 final-glide checks with wind in one vectorised call.

Budget: under 0.2 s for the whole call (timed only with ``--benchmark-enable``; the normal
run executes it once, untimed, and checks the results).
"""

from __future__ import annotations

import numpy as np

from glidetask.engine.finalglide import final_glide
from glidetask.engine.polar import PolarSpec, scaled_polar
from glidetask.engine.scenario import Wind

CASES = 100_000
BUDGET_S = 0.2
KMH = 1 / 3.6
# An invented polar, not any real aircraft.
SPEC = PolarSpec(
    label="bench", wing_area_m2=10.5, reference_mass_kg=350.0, empty_mass_kg=255.0, max_ballast_kg=170.0,
    max_mass_kg=525.0, vne_ias_ms=270 * KMH, min_speed_ias_ms=72 * KMH,
    points=((80 * KMH, 0.62), (100 * KMH, 0.64), (120 * KMH, 0.80), (150 * KMH, 1.20), (180 * KMH, 1.85)),
)


def _cases():
    rng = np.random.default_rng(2026)
    return dict(
        distance_m=rng.uniform(0.0, 120e3, CASES),
        height_m=rng.uniform(300.0, 3500.0, CASES),
        course_deg=rng.uniform(0.0, 360.0, CASES),
        wind=Wind(from_deg=rng.uniform(0.0, 360.0, CASES), speed_ms=rng.uniform(0.0, 15.0, CASES)),
        mc_ms=rng.uniform(0.0, 4.0, CASES),
    )


def test_bench_final_glide_100k_cases_with_wind(benchmark):
    cases = _cases()
    polar = scaled_polar(SPEC, 430.0)

    def run():
        return final_glide(polar, cases["distance_m"], cases["height_m"], course_deg=cases["course_deg"],
                           wind=cases["wind"], mc_ms=cases["mc_ms"], arrival_elevation_m=120.0, margin_m=200.0)

    result = benchmark(run)
    assert result.required_height_m.shape == (CASES,)
    assert np.all(np.isfinite(result.required_height_m))  # winds up to 15 m/s: every goal reachable
    assert np.all(result.margin_m == cases["height_m"] - result.required_height_m)
    benchmark.extra_info.update(cases=CASES, budget_s=BUDGET_S)
    if not benchmark.disabled:
        median = benchmark.stats.stats.median
        benchmark.extra_info.update(median_s=median, share_of_budget=median / BUDGET_S)
        assert median < BUDGET_S, f"{CASES} final glides took {median:.3f} s (budget {BUDGET_S} s)"
