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


DAY_PLOT_TEXT = """
import numpy as np
import glidetask.tui.plot_ticks  # noqa: F401 - makes plotext keep the order given
from textual_plotext.plot import Plot
from glidetask import paths, units
from glidetask.tui import recompute
from glidetask.tui.plot_ticks import clock_ticks

day = recompute.load_task(paths.demo_task()).day
first = min(day.climb.times_s[0], day.start_time_s) - 1800.0
last = max(day.climb.times_s[-1], day.lift_ends_s) + 1800.0
times = np.linspace(first, last, 200)
plt = Plot()
plt.plot(times / 3600.0, units.METRIC.vertical(np.asarray(day.lift_profile_at(times), dtype=float)),
         color="cyan", marker="braille", label="achieved climb")
plt.vline(day.start_time_s / 3600.0, "green")
plt.vline(day.lift_ends_s / 3600.0, "red")
hours, labels = clock_ticks(first, last)
plt.xticks(hours, labels)
plt.xlim(first / 3600.0, last / 3600.0)
plt.plotsize(34, 8)
print(plt.build())
"""


def test_a_plot_draws_the_same_in_every_process():
    """The Day view's plot at its 80x24 size, drawn under different string-hash seeds: plotext
    removes duplicates through a set whose order follows the seed, which moved a clock label by
    a column from run to run; glidetask.tui.plot_ticks makes it keep the order given."""
    import os
    import subprocess
    import sys
    from pathlib import Path

    root = Path(__file__).resolve().parents[2]
    drawings = set()
    for seed in ("1", "3", "6"):  # seeds that drew three different pictures before
        env = {**os.environ, "PYTHONHASHSEED": seed, "PYTHONPATH": str(root)}
        result = subprocess.run([sys.executable, "-c", DAY_PLOT_TEXT], env=env, capture_output=True, text=True,
                                check=True, timeout=120)
        drawings.add(result.stdout)
    assert len(drawings) == 1 and "12:00" in drawings.pop()


def test_duplicates_keep_their_first_order():
    import plotext._utility as utility

    assert utility.no_duplicates([(2.0, "b"), (1.0, "a"), (2.0, "b"), (0.5, "c")]) == [(2.0, "b"), (1.0, "a"), (0.5, "c")]
