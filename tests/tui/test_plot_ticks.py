"""Round axis ticks and the sketch's scale bar."""

from __future__ import annotations

import pytest
from hypothesis import given, settings
from hypothesis import strategies as st

from glidetask.tui.plot_ticks import clock_ticks, duration_ticks, nice_ticks, number_labels
from glidetask.tui.widgets.task_sketch import scale_bar
from glidetask.units import AVIATION, METRIC


def test_heights_tick_on_round_hundreds():
    # Source: the 1-2-5 series of round chart steps (common practice)
    assert nice_ticks(250.0, 2200.0, 4) == [500.0, 1000.0, 1500.0, 2000.0]
    assert number_labels([500.0, 1000.0, 1500.0, 2000.0]) == ["500", "1000", "1500", "2000"]


def test_small_steps_keep_the_decimals_they_need():
    assert nice_ticks(0.0, 2.3, 5) == [0.0, 0.5, 1.0, 1.5, 2.0]
    assert number_labels([0.0, 0.5, 1.0]) == ["0.0", "0.5", "1.0"]
    assert number_labels([0.0, 0.25, 0.5]) == ["0.00", "0.25", "0.50"]


@settings(max_examples=100)
@given(st.floats(-1e4, 1e4), st.floats(0.01, 1e4), st.integers(2, 8))
def test_ticks_are_evenly_spaced_inside_the_range(low, span, count):
    ticks = nice_ticks(low, low + span, count)
    assert ticks and all(low - 1e-6 * span <= t <= low + span * (1 + 1e-6) for t in ticks)
    steps = {round(b - a, 9) for a, b in zip(ticks, ticks[1:])}
    assert len(steps) <= 1
    assert len(ticks) <= 2 * count + 1


def test_clock_ticks_fall_on_whole_hours():
    hours, labels = clock_ticks(10.5 * 3600, 18.75 * 3600)
    assert labels == ["12:00", "14:00", "16:00", "18:00"]
    assert hours == [12.0, 14.0, 16.0, 18.0]


def test_task_time_ticks_read_as_hours_and_minutes():
    hours, labels = duration_ticks(2.6, 6.0, 4)
    assert labels == ["3:00", "4:00", "5:00", "6:00"]
    _, short = duration_ticks(2.5, 3.4, 4)
    assert short == ["2:30", "2:45", "3:00", "3:15"]


@pytest.mark.parametrize("units,longest_m,expected", [
    (METRIC, 60_000.0, "50 km"),
    # Source: 1 NM = 1852 m exactly (international nautical mile): 60 km = 32.4 NM, so 20 NM
    (AVIATION, 60_000.0, "20 NM"),
    (AVIATION, 10_000.0, "5 NM"),  # 5.4 NM
])
def test_scale_bar_is_a_round_length_in_the_units_on_screen(units, longest_m, expected):
    length_m, label = scale_bar(units, longest_m)
    assert label == expected
    assert length_m <= longest_m
    assert units.distance(length_m) == pytest.approx(float(expected.split()[0]))
