"""The flight core's faster paths give what the plain definitions give, to the bit.

The airspace ceiling (:meth:`glidetask.engine.flight_ground.Ceiling.top`) evaluates only the
lowered samples that can lower a climb's top; here it is checked against the definition
evaluated at every lowered sample in reach. The ground contact
(:meth:`glidetask.engine.flight_ground.GroundFloor.contact`) is checked on a glide nearly
parallel to a falling floor against a walk of the glide. The final-glide tables solve only
the legs a glide home flies; here the requirement they give is checked against tables solved
over every leg.
"""

from __future__ import annotations

import numpy as np
from hypothesis import given, settings, strategies as st

from glidetask.engine.flight_ground import Ceiling, GroundFloor, height_used_after


def _ceiling_by_definition(ceiling: Ceiling, position, band_top, per_metre):
    """``min(band top, top_k + hpm max(s_k - x, 0))`` over every lowered sample from one
    spacing behind the climb to ``(band top - lowest top) / hpm`` ahead, one flight at a time."""
    out = np.array(band_top, dtype=float)
    for i, (x, top, slope) in enumerate(zip(position, band_top, per_metre)):
        reach = max(top - ceiling.top_m.min(), 0.0) / slope if slope > 0.0 else np.inf
        for s, t in zip(ceiling.distance, ceiling.top_m):
            if x - ceiling.spacing <= s <= x + reach:
                out[i] = min(out[i], t + slope * max(s - x, 0.0))
    return out


@settings(max_examples=60, deadline=None)
@given(seed=st.integers(0, 2**32 - 1), repeated=st.booleans(), levels=st.integers(1, 5))
def test_the_ceiling_is_the_lowest_limit_of_every_sample_in_reach(seed, repeated, levels):
    # Source: the definition (Ceiling's notes), evaluated at every lowered sample in reach.
    rng = np.random.default_rng(seed)
    count = int(rng.integers(1, 40))
    distance = np.sort(rng.uniform(0.0, 30_000.0, count))
    if repeated:  # samples sharing a position, as where two airspaces meet
        distance = np.round(distance / 250.0) * 250.0
    tops = rng.choice(np.linspace(900.0, 1500.0, levels), count) + rng.uniform(0.0, 1.0, count) * (seed % 2)
    ceiling = Ceiling(distance, tops, 250.0)
    position = rng.uniform(-1_000.0, 31_000.0, 50)
    position[:10] = rng.choice(distance, 10)  # climbs right at a sample
    band_top = rng.uniform(800.0, 2_500.0, 50)
    per_metre = rng.choice([1 / 45, 1 / 30, 0.05, 1e-6], 50)
    got = ceiling.top(position, band_top, per_metre)
    want = _ceiling_by_definition(ceiling, position, band_top, per_metre)
    assert got.tobytes() == want.tobytes()


def test_a_glide_nearly_parallel_to_a_falling_floor_meets_it_where_it_starts():
    # Source: brute force (a 0.5 m walk of the straight glide over the floor, linear between
    # samples). A glide starting on the floor and sinking a little faster than the floor falls
    # is below it at once, although the stretch's far end is below the glide's own stop.
    distance = np.array([0.0, 7718.82099460592, 9142.624518546416, 10318.543100615552])
    floor = np.array([300.0, 207.3110807126675, 158.80123270194298, 421.9887218887179])
    ground = GroundFloor(distance, floor)
    start, slope = 8113.875, 0.034072568386741886
    height = float(ground.at(start))
    limit = 922.03125
    found = ground.contact(np.array([start]), np.array([height]), np.array([slope]), np.array([limit]),
                           np.array([height - slope * limit]))
    walk = np.arange(start, start + limit, 0.5)
    below = walk[height - slope * (walk - start) < np.interp(walk, distance, floor) - 1e-9]
    assert below.size and below[0] - start <= 0.5
    assert 0.0 <= found[0] <= below[0] - start


def test_final_glide_tables_give_the_requirement_of_tables_over_every_leg():
    # Source: the requirement's definition (contract section 3): the floor plus the height used
    # from the point to the finish, each leg at its own height per metre; tables over every leg
    # (the pure requirement of flight_requirement, without the speed-up) give the same bits.
    from glidetask import paths
    from glidetask.engine.flight import course_for, flights_for
    from glidetask.engine.flight_requirement import polar_rows
    from glidetask.engine.flight_simulation import Simulation
    from glidetask.engine.plan import plan
    from glidetask.engine.polar import scaled_polar
    from glidetask.engine.speedtofly import glide_in_wind
    from glidetask.formats.task_file import load_scenario

    scenario = load_scenario(paths.demo_task())
    planned = plan(scenario)
    course = course_for(planned.path, scenario.day.detour_percent)
    core = Simulation(course, flights_for(scenario), None, None)
    legs = course.legs
    rows = np.zeros(3 * legs, dtype=int)
    leg = np.repeat(np.arange(legs), 3)
    pos = np.column_stack([np.zeros(legs), np.full(legs, 1234.5), 0.75 * core.leg_length]).ravel()
    mc = np.full(rows.size, 1.5)
    hpm, gs, tail, sigma = core.final_table(rows, leg, pos, mc)
    # every leg, at the same density as the table's
    inputs = core.inputs
    polar = scaled_polar(core.spec, inputs["mass_kg"][rows], inputs["bugs_percent"][rows], sigma)
    full = glide_in_wind(polar_rows(polar, np.arange(rows.size)), mc[:, None], core.wind_along[rows],
                         core.wind_across[rows], core.airmass[rows, None])
    every = np.broadcast_to(full.height_per_metre, hpm.shape)
    every_gs = np.broadcast_to(full.ground_speed_ms, gs.shape)
    j = np.arange(legs)[None, :]
    flown = (j >= leg[:, None]) | ((j == leg[:, None] - 1) & (pos == 0.0)[:, None])  # and the leg before at its start
    assert (hpm[flown] == every[flown]).all() and (gs[flown] == every_gs[flown]).all()
    assert (hpm[~flown] == 0.0).all() and np.isnan(gs[~flown]).all()  # legs behind: no height, no speed
    line = np.arange(rows.size)
    want = core.floor[rows] + every[line, leg] * (core.leg_length[leg] - pos) + \
        height_used_after(every, core.leg_length)[line, leg + 1]
    assert (core.required(rows, leg, pos, hpm, tail) == want).all()
