"""The simulated days shown: finishing odds as bars, task-time percentiles, land-outs by
leg and why (engine/simulate.py).

Each widget holds the engine's ``Odds`` in a reactive attribute set by the Odds view (its
other inputs first, ``odds`` last) and draws it in ``watch_`` methods. The bars and the percentiles also draw a partial result
(the ballast choices flown so far) with the choices still to come marked as computing.
"""

from __future__ import annotations

import numpy as np
from rich.text import Text
from textual.reactive import var
from textual.widgets import DataTable, Static
from textual_plotext import PlotextPlot

from glidetask.formats.strategy_report import probability_bar, reason_words
from glidetask.tui import display
from glidetask.tui.plot_ticks import duration_ticks

BAR_WIDTH = 24
PLOT_COLOURS = ("cyan", "green", "orange", "magenta", "red")
COMPUTING = "…"


def odds_style(p: float) -> str:
    """Green for good odds, amber for doubtful, red for poor (common practice: a task most
    pilots finish nine days in ten is a fair task)."""
    return "#8cc66d" if p >= 0.9 else "#e0b15a" if p >= 0.7 else "#e06c5a"


class ProbabilityBars(Static):
    """One bar per ballast choice: the share of simulated days the task is finished."""

    DEFAULT_CSS = """
    ProbabilityBars { height: auto; }
    """

    odds = var(None, always_update=True, init=False)  # the engine's Odds (None: nothing yet)
    pending: var[tuple[float, ...]] = var((), init=False)  # ballast choices [kg] still being flown

    def on_resize(self) -> None:
        self._draw()

    def watch_odds(self) -> None:
        self._draw()

    def watch_pending(self) -> None:
        self._draw()

    def _draw(self) -> None:
        odds = self.odds
        if odds is None:
            return
        # "1234 kg " bar " 100.0 % ± 0.1": the bar takes what the figures leave
        width = self.content_size.width
        bar = BAR_WIDTH if not width else max(6, min(BAR_WIDTH, width - 22))
        text = Text()
        for index, choice in enumerate(odds.choices):
            p = choice.finish_probability
            if index:
                text.append("\n")
            text.append(f"{choice.ballast_kg:>4.0f} kg ")
            text.append(probability_bar(p, bar), style=odds_style(p))
            text.append(f" {100 * p:5.1f} %", style="bold")
            text.append(f" ± {100 * choice.finish_probability_se:.1f}", style="dim")
        for ballast in self.pending:
            text.append(f"\n{ballast:>4.0f} kg ")
            text.append(f"{COMPUTING} flying the days", style="dim")
        self.update(text)


class OddsTable(DataTable):
    """Per ballast choice: finishing odds, task-time percentiles among the finishers, the
    forecast day's time."""

    DEFAULT_CSS = """
    OddsTable { height: auto; }
    """

    COLUMNS = (("ballast", "Water kg"), ("finish", "Finish %"), ("se", "± %"), ("p10", "10 %"),
               ("p50", "50 %"), ("p90", "90 %"), ("forecast", "Forecast"))

    odds = var(None, always_update=True, init=False)  # the engine's Odds (None: nothing yet)
    pending: var[tuple[float, ...]] = var((), init=False)  # ballast choices [kg] still being flown

    def __init__(self, **kwargs):
        super().__init__(cursor_type="row", zebra_stripes=True, **kwargs)

    def watch_odds(self) -> None:
        self._draw()

    def watch_pending(self) -> None:
        self._draw()

    def _draw(self) -> None:
        odds = self.odds
        if odds is None or not self.is_mounted:
            return
        self.clear(columns=True)
        for key, label in self.COLUMNS:
            self.add_column(label, key=key)
        for index, c in enumerate(odds.choices):
            p10, p50, p90 = (display.duration(t) for t in c.task_time_s)
            forecast = display.duration(c.forecast_time_s) if c.forecast_finished else "lands out"
            cells = (f"{c.ballast_kg:.0f}", f"{100 * c.finish_probability:.1f}", f"{100 * c.finish_probability_se:.1f}",
                     p10, p50, p90, forecast)
            self.add_row(*(Text(cell, justify="right") for cell in cells), key=f"choice-{index}")
        for index, ballast in enumerate(self.pending, start=len(odds.choices)):
            self.add_row(Text(f"{ballast:.0f}", justify="right"),
                         *(Text(COMPUTING, justify="right", style="dim") for _ in self.COLUMNS[1:]), key=f"choice-{index}")


class LandoutsTable(DataTable):
    """Land-outs by leg (days out of the runs) for each ballast choice, then why."""

    DEFAULT_CSS = """
    LandoutsTable { height: auto; }
    """

    odds = var(None, always_update=True, init=False)  # the engine's Odds (None: nothing yet)
    codes: var[dict] = var(dict, init=False)  # turnpoint names -> short codes for the Leg column

    def __init__(self, **kwargs):
        super().__init__(cursor_type="row", zebra_stripes=True, **kwargs)

    def watch_odds(self) -> None:
        self._draw()

    def watch_codes(self) -> None:
        self._draw()

    def _draw(self) -> None:
        odds = self.odds
        if odds is None or not self.is_mounted:
            return
        codes = self.codes
        self.clear(columns=True)
        self.add_column("Leg", key="leg")
        for index, c in enumerate(odds.choices):
            self.add_column(f"{c.ballast_kg:.0f} kg", key=f"choice-{index}")
        for i, (start, end) in enumerate(odds.legs):
            self.add_row(f"{i + 1} {codes.get(start) or start}→{codes.get(end) or end}",
                         *(Text(str(c.landouts_by_leg[i]), justify="right") for c in odds.choices), key=f"leg-{i}")
        reasons = sorted({key for c in odds.choices for key, _ in c.landouts_by_reason})
        for key in reasons:
            self.add_row(Text(f"why: {reason_words(key)}", style="dim"),
                         *(Text(str(dict(c.landouts_by_reason).get(key, 0)), justify="right", style="dim")
                           for c in odds.choices), key=f"why-{key}")


class FinishPlot(PlotextPlot):
    """Share of the simulated days on which the task is finished within a given task time,
    one curve per ballast choice (it levels off at the finishing odds)."""

    odds = var(None, always_update=True, init=False)  # the engine's Odds (None: nothing yet)

    def watch_odds(self, odds) -> None:
        if odds is None:
            return
        plt = self.plt
        plt.clear_data()
        plt.clear_figure()
        hours = []
        for colour, choice in zip(PLOT_COLOURS, odds.choices):
            times = np.asarray(choice.finish_times_s) / 3600.0
            if times.size < 2:
                continue
            hours += [float(times.min()), float(times.max())]
            share = 100.0 * np.arange(1, times.size + 1) / choice.runs
            step = max(times.size // 200, 1)  # a few hundred points draw the same curve
            plt.plot(times[::step], share[::step], color=colour, marker="braille", label=f"{choice.ballast_kg:.0f} kg")
        if hours:
            ticks, labels = duration_ticks(min(hours), max(hours), 4)
            plt.xticks(ticks, labels)
        plt.yticks([0, 25, 50, 75, 100], ["0", "25", "50", "75", "100"])
        plt.xlabel("task time (h:mm)")
        plt.ylabel("finished (%)")
        plt.ylim(0, 100)
        self.refresh()
