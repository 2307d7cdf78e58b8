"""The ballast sweep drawn: a heat-map table of task time by strength and ballast with the
best ballast in narrow, typical and broad thermals beside it, and a plot of task time
against ballast for a few strengths (engine/compare.py)."""

from __future__ import annotations

import math

import numpy as np
from rich.text import Text
from textual.reactive import var
from textual.widgets import DataTable
from textual_plotext import PlotextPlot

from glidetask.tui import display
from glidetask.tui.plot_ticks import duration_ticks, nice_ticks, number_labels
from glidetask.units import METRIC, UnitSystem

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
SIZE_CELL = 8  # a best-ballast column of the thermal sizes (" typical", "  170 kg")
SIZES = 3  # narrow, typical, broad
WAITING_CELL = "…"  # a best ballast still being computed


def shown_columns(count: int, width: int | None) -> list[int]:
    """Which of ``count`` ballast columns fit in ``width`` characters (every one if None)
    beside the strength and the three best-ballast columns: evenly every second, third, ...
    and always the last (full tanks)."""
    if width is None:
        return list(range(count))
    room = max((width - LABEL - SIZES * SIZE_CELL - 1) // CELL, 2)
    stride = max(1, -(-count // room))
    picked = list(range(0, count, stride))
    if picked[-1] != count - 1:
        picked.append(count - 1)
    return picked


def size_heads(radii_m: dict[str, float], units: UnitSystem) -> list[tuple[str, str]]:
    """(name, radius) header lines of the best-ballast columns, narrow first."""
    return [(name, units.fmt_height(radius)) for name, radius in radii_m.items()]


class SweepTable(DataTable):
    """Task time (H:MM) by thermal strength (rows) and water ballast (columns, kg) in the
    day's thermals; each row coloured from its fastest time, the best ballast marked ``*``
    on green; then the best ballast in narrow, typical and broad thermals side by side
    (:func:`glidetask.formats.strategy_report.thermal_size_cells`; on a narrow screen only
    every second or third ballast of the times is shown).

    The view sets what to show (the inputs first, ``sweep`` last); each watcher draws it.
    """

    DEFAULT_CSS = """
    SweepTable { height: auto; max-height: 15; }
    """

    sweep = var(None, always_update=True, init=False)  # the engine's BallastSweep of the day's thermals (None: nothing yet)
    units: var[UnitSystem] = var(METRIC, init=False)
    width_available: var[int | None] = var(None, init=False)  # characters for the table (None: every column)
    radii_m: var[dict] = var(dict, init=False)  # thermal size -> radius [m] (engine.compare.thermal_size_radii_m)
    sizes = var(None, always_update=True, init=False)  # the sweep with by_thermal_size set (None: still computing)

    def __init__(self, **kwargs):
        super().__init__(cursor_type="row", cell_padding=0, zebra_stripes=False, header_height=2, **kwargs)

    def watch_sweep(self) -> None:
        self._draw()

    def watch_units(self) -> None:
        self._draw()

    def watch_width_available(self) -> None:
        self._draw()

    def watch_radii_m(self) -> None:
        self._draw()

    def watch_sizes(self) -> None:
        self._draw()

    def size_cells(self) -> list[list[str]]:
        """The best-ballast cells by thermal size as shown, one list per strength (for tests)."""
        keys = [f"size-{name}" for name in self.radii_m]
        return [[self._plain(self.get_cell(f"s{i}", key)) for key in keys] for i in range(self.row_count)]

    @staticmethod
    def _plain(value) -> str:
        return (value.plain if isinstance(value, Text) else str(value)).strip()

    def _draw(self) -> None:
        sweep, units = self.sweep, self.units
        if not self.is_mounted or sweep is None:
            return
        from glidetask.formats.strategy_report import DASH as REPORT_DASH, thermal_size_cells

        self.clear(columns=True)
        columns = shown_columns(len(sweep.ballast_kg), self.width_available)
        self.add_column(Text("thermal\n", justify="left"), key="strength")
        for j in columns:
            self.add_column(Text(f"\n{sweep.ballast_kg[j]:.0f}".rjust(CELL), justify="right"), key=f"b{j}")
        for name, radius in size_heads(self.radii_m, units):
            self.add_column(Text(f"{name.rjust(SIZE_CELL)}\n{radius.rjust(SIZE_CELL)}", justify="right"),
                            key=f"size-{name}")
        size_rows = thermal_size_cells(self.sizes, units)[1] if self.sizes is not None else []
        for i, strength in enumerate(sweep.thermal_strength_ms):
            row = sweep.task_time_s[i]
            fastest = np.nanmin(row) if np.isfinite(row).any() else math.nan
            cells = [Text(strength_label(units, strength) + " ")]
            for j in columns:
                cells.append(self._cell(row[j], fastest, sweep.ballast_kg[j] == sweep.best_ballast_kg[i]))
            best = size_rows[i][1:] if size_rows else [WAITING_CELL] * len(self.radii_m)
            for name, text in zip(self.radii_m, best):
                text = display.DASH if text == REPORT_DASH else text  # not finished: the UI's dash
                cells.append(Text(text.rjust(SIZE_CELL), justify="right",
                                  style="bold" if name == "typical" else "", no_wrap=True))
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
    """Task time [h] against ballast [kg] for a few thermal strengths; the best marked.
    The view sets what to show (``units`` first, ``sweep`` last); each watcher draws it."""

    sweep = var(None, always_update=True, init=False)  # the engine's BallastSweep (None: nothing yet)
    units: var[UnitSystem] = var(METRIC, init=False)

    def watch_sweep(self) -> None:
        self._draw()

    def watch_units(self) -> None:
        self._draw()

    def _draw(self) -> None:
        sweep, units = self.sweep, self.units
        if sweep is None:
            return
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
