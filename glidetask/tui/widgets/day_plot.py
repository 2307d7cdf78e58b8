"""The lift through the day drawn: the profile, the start, the end of lift, the finish."""

from __future__ import annotations

import numpy as np
from textual.reactive import var
from textual_plotext import PlotextPlot

from glidetask.tui.plot_ticks import clock_ticks, nice_ticks, number_labels
from glidetask.units import METRIC, UnitSystem


class DayPlot(PlotextPlot):
    """Achieved climb (or thermal strength) against the clock, with the day's marks.

    The view sets ``units`` and ``finish_s`` before ``day``; each watcher draws again."""

    day = var(None, always_update=True, init=False)  # the engine's Day
    units: var[UnitSystem] = var(METRIC, init=False)
    finish_s = var(None, init=False)  # the planned finish [s after midnight], None: not home or no plan

    def watch_day(self) -> None:
        self._draw()

    def watch_units(self) -> None:
        self._draw()

    def watch_finish_s(self) -> None:
        self._draw()

    def _draw(self) -> None:
        day, units, finish_s = self.day, self.units, self.finish_s
        if day is None:
            return
        plt = self.plt
        plt.clear_data()
        plt.clear_figure()
        profile = day.climb if day.climb is not None else day.thermal_strength
        if profile is None:
            self.refresh()
            return
        first = min(profile.times_s[0], day.start_time_s) - 1800.0
        last = max(profile.times_s[-1], day.lift_ends_s) + 1800.0
        times = np.linspace(first, last, 200)
        values = units.vertical(np.asarray(day.lift_profile_at(times), dtype=float))
        label = "achieved climb" if day.climb is not None else "thermal strength"
        plt.plot(times / 3600.0, values, label=label, color="cyan", marker="braille")
        plt.vline(day.start_time_s / 3600.0, "green")
        plt.vline(day.lift_ends_s / 3600.0, "red")
        if finish_s is not None:
            plt.vline(finish_s / 3600.0, "orange")
        hours, labels = clock_ticks(first, last)
        compact = self.size.width and self.size.width < 40
        # a small plot: the ticks bare and the hours named in the axis label (the library's
        # placement of tick labels on so few columns shifts by a column from draw to draw)
        plt.xticks(hours, [""] * len(hours) if compact else labels)
        plt.xlim(first / 3600.0, last / 3600.0)  # the axis pinned to the day: the same columns every draw
        top = max(float(np.nanmax(values)) * 1.15, 0.5)
        y_ticks = nice_ticks(0.0, top, 5)
        plt.yticks(y_ticks, number_labels(y_ticks))
        if compact:
            plt.xlabel(f"ticks {labels[0]} to {labels[-1]} local")
        else:
            plt.xlabel("local time · green start · red lift ends · orange planned finish")
        plt.ylabel(units.vertical_label)
        plt.ylim(0, top)
        self.refresh()
