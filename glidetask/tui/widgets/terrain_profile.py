"""The ground under a final glide: terrain, the glide as planned, the height needed."""

from __future__ import annotations

import numpy as np
from textual_plotext import PlotextPlot

from glidetask.units import UnitSystem


class TerrainProfile(PlotextPlot):
    """Terrain (brown), the glide line (cyan) and terrain plus clearance (red dots)."""

    def show(self, check, units: UnitSystem) -> None:
        plt = self.plt
        plt.clear_data()
        plt.clear_figure()
        if check is None:
            plt.title("terrain profile: needs a terrain model and a glide between two turnpoints")
            self.refresh()
            return
        x = units.distance(np.asarray(check.distance_m, dtype=float))
        terrain = np.asarray(check.terrain_m, dtype=float)
        known = np.isfinite(terrain)
        plt.plot(x[known], units.height(terrain[known]), label="terrain", color="orange", marker="braille")
        plt.plot(x[known], units.height(terrain[known] + check.clearance_m), label="+ clearance", color="red",
                 marker="braille")
        plt.plot(x, units.height(np.asarray(check.glide_m, dtype=float)), label="glide", color="cyan", marker="braille")
        plt.xlabel(f"distance ({units.distance_label})")
        plt.ylabel(units.height_label)
        self.refresh()
