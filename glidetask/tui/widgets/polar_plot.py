"""The polar drawn: the reference curve against the flight's (mass, bugs, altitude)."""

from __future__ import annotations

import numpy as np
from textual_plotext import PlotextPlot

from glidetask.units import UnitSystem


class PolarPlot(PlotextPlot):
    """Sink against true airspeed, within each polar's valid speed range."""

    def show(self, reference, current, units: UnitSystem) -> None:
        plt = self.plt
        plt.clear_data()
        plt.clear_figure()
        for polar, label, colour in ((reference, "reference", "gray"), (current, "this flight", "cyan")):
            speeds = np.linspace(float(polar.min_speed_ms), float(polar.vne_ms), 60)
            plt.plot(units.speed(speeds), -units.vertical(np.asarray(polar.sink(speeds))),
                     label=label, color=colour, marker="braille")
        best = float(current.best_ld_speed_ms)
        plt.scatter([units.speed(best)], [-units.vertical(float(current.sink(best)))], color="orange",
                    marker="●", label="best glide")
        plt.xlabel(f"airspeed ({units.speed_label} TAS)")
        plt.ylabel(f"sink ({units.vertical_label})")
        self.refresh()
