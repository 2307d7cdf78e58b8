"""The ballast sweep drawn: a heat-map table of task time by strength and ballast, and a
plot of task time against ballast for a few strengths (engine/compare.py)."""

from __future__ import annotations

import math

import numpy as np
from rich.text import Text
from textual.widgets import DataTable
from textual_plotext import PlotextPlot

from glidetask.tui import display
from glidetask.tui.plot_ticks import duration_ticks, nice_ticks, number_labels
from glidetask.units import UnitSystem

# Cell backgrounds from the row's fastest (green) through amber to red at SLOWEST_SHARE slower.
HEAT = ((0x2e, 0x5e, 0x3a), (0x6e, 0x5e, 0x22), (0x74, 0x2c, 0x28))
SLOWEST_SHARE = 0.15
BEST_STYLE = "bold #12161c on #8cc66d"
PLOT_STRENGTHS = 4  # curves in the plot
PLOT_COLOURS = ("cyan", "green", "orange", "magenta")
KEY_COLOURS = {"cyan": "ansi_cyan", "green": "ansi_green", "orange": "darkorange", "magenta": "ansi_magenta"}


def heat_colour(share: float) -> str:
    """Background for a time ``share`` slower than the row's fastest (0 = the fastest)."""
    x = min(max(share / SLOWEST_SHARE, 0.0), 1.0) * (len(HEAT) - 1)
    i = min(int(x), len(HEAT) - 2)
    w = x - i
    r, g, b = (round(a + (c - a) * w) for a, c in zip(HEAT[i], HEAT[i + 1]))
    return f"#{r:02x}{g:02x}{b:02x}"


def strength_label(units: UnitSystem, strength_ms: float) -> str:
    return f"{units.vertical(strength_ms):.1f} {units.vertical_label}"


CELL = 5  # characters of a time column
LABEL = 8  # the strength column


def shown_columns(count: int, width: int | None) -> list[int]:
    """Which of ``count`` ballast columns fit in ``width`` characters (every one if None):
    evenly every second, third, ... and always the last (full tanks)."""
    if width is None:
        return list(range(count))
    room = max((width - LABEL - 2 * CELL) // CELL, 2)
    stride = max(1, -(-count // room))
    picked = list(range(0, count, stride))
    if picked[-1] != count - 1:
        picked.append(count - 1)
    return picked


class SweepTable(DataTable):
    """Task time (H:MM) by thermal strength (rows) and water ballast (columns, kg); each
    row coloured from its fastest time, the best ballast marked ``*`` on green and named
    in the last column (on a narrow screen only every second or third ballast is shown)."""

    DEFAULT_CSS = """
    SweepTable { height: auto; max-height: 14; }
    """

    def __init__(self, **kwargs):
        super().__init__(cursor_type="row", cell_padding=0, zebra_stripes=False, **kwargs)

    def show(self, sweep, units: UnitSystem, width: int | None = None) -> None:
        """Fill the table; ``width``: the characters available (None: every column)."""
        self.clear(columns=True)
        columns = shown_columns(len(sweep.ballast_kg), width)
        self.add_column(Text("thermal ", justify="left"), key="strength")
        for j in columns:
            self.add_column(Text(f"{sweep.ballast_kg[j]:.0f}".rjust(CELL), justify="right"), key=f"b{j}")
        self.add_column(Text(" best".rjust(CELL + 1), justify="right"), key="best")
        for i, strength in enumerate(sweep.thermal_strength_ms):
            row = sweep.task_time_s[i]
            fastest = np.nanmin(row) if np.isfinite(row).any() else math.nan
            cells = [Text(strength_label(units, strength) + " ")]
            for j in columns:
                cells.append(self._cell(row[j], fastest, sweep.ballast_kg[j] == sweep.best_ballast_kg[i]))
            best = sweep.best_ballast_kg[i]
            cells.append(Text((f"{best:.0f}" if math.isfinite(best) else display.DASH).rjust(CELL + 1),
                              justify="right", style="bold"))
            self.add_row(*cells, key=f"s{i}")

    @staticmethod
    def _cell(time: float, fastest: float, best: bool) -> Text:
        if not math.isfinite(time):
            return Text(display.DASH.rjust(5), justify="right", style="dim")
        text = display.duration(time)
        if best:
            return Text(f"*{text}".rjust(5), justify="right", style=BEST_STYLE)
        text = text.rjust(5)
        return Text(text, justify="right", style=f"#d8dde6 on {heat_colour(time / fastest - 1.0)}")


def plotted_strengths(sweep, count: int = PLOT_STRENGTHS) -> list[int]:
    """Rows to draw: up to ``count`` strengths with at least two finished ballasts, spread
    evenly from the weakest to the strongest of them."""
    usable = [i for i in range(len(sweep.thermal_strength_ms)) if np.isfinite(sweep.task_time_s[i]).sum() >= 2]
    if len(usable) <= count:
        return usable
    picks = np.unique(np.round(np.linspace(0, len(usable) - 1, count)).astype(int))
    return [usable[k] for k in picks]


class SweepPlot(PlotextPlot):
    """Task time [h] against ballast [kg] for a few thermal strengths; the best marked."""

    def show(self, sweep, units: UnitSystem) -> None:
        plt = self.plt
        plt.clear_data()
        plt.clear_figure()
        hours, key = [], []
        for colour, i in zip(PLOT_COLOURS, plotted_strengths(sweep)):
            row = sweep.task_time_s[i]
            finite = np.isfinite(row)
            hours += [float(row[finite].min()) / 3600.0, float(row[finite].max()) / 3600.0]
            plt.plot(sweep.ballast_kg[finite], row[finite] / 3600.0, color=colour, marker="braille")
            key.append(f"[{KEY_COLOURS[colour]}]━ {strength_label(units, sweep.thermal_strength_ms[i])}[/]")
            best = sweep.best_ballast_kg[i]
            if math.isfinite(best):
                plt.scatter([best], [row[sweep.ballast_kg == best][0] / 3600.0], color=colour, marker="●")
        if hours:
            ticks, labels = duration_ticks(min(hours), max(hours), 4)
            plt.yticks(ticks, labels)
        x_ticks = nice_ticks(float(np.min(sweep.ballast_kg)), float(np.max(sweep.ballast_kg)), 4)
        plt.xticks(x_ticks, number_labels(x_ticks))
        # the key sits on the border: a legend inside would cover the slowest, weakest day
        self.border_subtitle = "  ".join(key) + "  ● best"
        plt.xlabel("water ballast (kg)")
        plt.ylabel("task time (h:mm)")
        self.refresh()
