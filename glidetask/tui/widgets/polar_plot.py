"""The polar drawn: the reference curve against the flight's (mass, bugs, altitude)."""

from __future__ import annotations

import numpy as np
from textual.reactive import var
from textual_plotext import PlotextPlot

from glidetask.tui.plot_ticks import nice_ticks, number_labels
from glidetask.units import METRIC, UnitSystem


class PolarPlot(PlotextPlot):
    """Sink against true airspeed, within each polar's valid speed range: the card's
    reference polar and this flight's (a ``derived.GliderCard``).

    The view sets ``units`` before ``card``; each watcher draws again."""

    card = var(None, always_update=True, init=False)  # a derived.GliderCard
    units: var[UnitSystem] = var(METRIC, init=False)

    def watch_card(self) -> None:
        self._draw()

    def watch_units(self) -> None:
        self._draw()

    def _draw(self) -> None:
        if self.card is None:
            return
        reference, current, units = self.card.reference, self.card.current, self.units
        plt = self.plt
        plt.clear_data()
        plt.clear_figure()
        xs, ys = [], []
        # the key sits on the border: a legend inside would cover the slow end of the curves
        self.border_subtitle = "[gray]━ reference[/]  [cyan]━ this flight[/]  [orange]● best glide[/]"
        for polar, colour in ((reference, "gray"), (current, "cyan")):
            speeds = np.linspace(float(polar.min_speed_ms), float(polar.vne_ms), 60)
            x, y = units.speed(speeds), -units.vertical(np.asarray(polar.sink(speeds)))
            plt.plot(x, y, color=colour, marker="braille")
            xs += [float(x.min()), float(x.max())]
            ys += [float(y.min()), float(y.max())]
        best = float(current.best_ld_speed_ms)
        plt.scatter([units.speed(best)], [-units.vertical(float(current.sink(best)))], color="orange", marker="●")
        x_ticks = nice_ticks(min(xs), max(xs))
        plt.xticks(x_ticks, number_labels(x_ticks))
        # sink is drawn downward (as a polar is drawn) and labelled as the positive rate it is
        y_ticks = nice_ticks(min(ys), max(ys), 6)
        plt.yticks(y_ticks, number_labels([abs(t) for t in y_ticks]))
        plt.xlabel(f"airspeed ({units.speed_label} TAS)")
        plt.ylabel(f"sink ↓ ({units.vertical_label})")
        self.refresh()
