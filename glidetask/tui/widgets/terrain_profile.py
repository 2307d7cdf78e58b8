"""The ground under a final glide: terrain, the glide as planned, the height needed."""

from __future__ import annotations

import numpy as np
from textual.reactive import var
from textual_plotext import PlotextPlot

from glidetask.tui.plot_ticks import nice_ticks, number_labels
from glidetask.units import METRIC, UnitSystem


class TerrainProfile(PlotextPlot):
    """Terrain (brown), the glide line (cyan) and terrain plus clearance (red dots).

    The view sets ``units`` and ``note`` before ``check``; each watcher draws again."""

    check = var(None, always_update=True, init=False)  # an engine.clearance.FinalGlideTerrain; None: ``note``
    units: var[UnitSystem] = var(METRIC, init=False)
    note = var("", init=False)  # what to say instead of a drawing

    def watch_check(self) -> None:
        self._draw()

    def watch_units(self) -> None:
        self._draw()

    def watch_note(self) -> None:
        self._draw()

    def _draw(self) -> None:
        check, units, note = self.check, self.units, self.note
        plt = self.plt
        plt.clear_data()
        plt.clear_figure()
        if check is None:
            self.border_subtitle = ""
            plt.title(note or "no terrain under this glide")
            self.refresh()
            return
        x = units.distance(np.asarray(check.distance_m, dtype=float))
        terrain = np.asarray(check.terrain_m, dtype=float)
        glide = np.asarray(check.glide_m, dtype=float)
        known = np.isfinite(terrain)
        # the key sits on the border: a legend inside would cover the start of the glide
        self.border_subtitle = "[orange]━ terrain[/]  [red]━ terrain + clearance[/]  [cyan]━ glide[/]"
        plt.plot(x[known], units.height(terrain[known]), color="orange", marker="braille")
        plt.plot(x[known], units.height(terrain[known] + check.clearance_m), color="red", marker="braille")
        # a glide that ends below the ground is drawn down to a little under the lowest terrain,
        # not to wherever its line would go: the ground stays readable
        ground = terrain[known]
        floor = float(np.min(ground)) if ground.size else float(np.nanmin(glide))
        top = float(np.nanmax([np.nanmax(glide), np.max(ground + check.clearance_m) if ground.size else floor]))
        low = floor - 0.1 * max(top - floor, 1.0)
        seen = glide >= low
        plt.plot(x[seen], units.height(glide[seen]), color="cyan", marker="braille")
        y_low, y_high = units.height(low), units.height(top)
        y_ticks = nice_ticks(y_low, y_high, 4)
        plt.ylim(y_low, y_high)
        plt.yticks(y_ticks, number_labels(y_ticks))
        x_ticks = nice_ticks(float(x.min()), float(x.max()), 4)
        plt.xticks(x_ticks, number_labels(x_ticks))
        plt.xlabel(f"distance ({units.distance_label})")
        plt.ylabel(units.height_label)
        self.refresh()
