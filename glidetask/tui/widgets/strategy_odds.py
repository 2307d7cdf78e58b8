"""The simulated days shown: finishing odds as bars, task-time percentiles, land-outs by
leg and why (engine/simulate.py)."""

from __future__ import annotations

import numpy as np
from rich.text import Text
from textual.widgets import DataTable, Static
from textual_plotext import PlotextPlot

from glidetask.formats.strategy_report import probability_bar, reason_words
from glidetask.tui import display

BAR_WIDTH = 24
PLOT_COLOURS = ("cyan", "green", "orange", "magenta", "red")


def odds_style(p: float) -> str:
    """Green for good odds, amber for doubtful, red for poor (common practice: a task most
    pilots finish nine days in ten is a fair task)."""
    return "#8cc66d" if p >= 0.9 else "#e0b15a" if p >= 0.7 else "#e06c5a"


class ProbabilityBars(Static):
    """One bar per ballast choice: the share of simulated days the task is finished."""

    DEFAULT_CSS = """
    ProbabilityBars { height: auto; }
    """

    def show(self, odds) -> None:
        text = Text()
        for index, choice in enumerate(odds.choices):
            p = choice.finish_probability
            if index:
                text.append("\n")
            text.append(f"{choice.ballast_kg:>4.0f} kg ")
            text.append(probability_bar(p, BAR_WIDTH), style=odds_style(p))
            text.append(f" {100 * p:5.1f} %", style="bold")
            text.append(f" ± {100 * choice.finish_probability_se:.1f}", style="dim")
        self.update(text)


class OddsTable(DataTable):
    """Per ballast choice: finishing odds, task-time percentiles among the finishers, the
    forecast day's time."""

    DEFAULT_CSS = """
    OddsTable { height: auto; }
    """

    def __init__(self, **kwargs):
        super().__init__(cursor_type="row", zebra_stripes=True, **kwargs)

    def show(self, odds) -> None:
        self.clear(columns=True)
        for key, label in (("ballast", "Ballast kg"), ("finish", "Finish %"), ("se", "± %"), ("p10", "10 %"),
                           ("p50", "50 %"), ("p90", "90 %"), ("forecast", "Forecast day")):
            self.add_column(label, key=key)
        for index, c in enumerate(odds.choices):
            p10, p50, p90 = (display.duration(t) for t in c.task_time_s)
            forecast = display.duration(c.forecast_time_s) if c.forecast_finished else "lands out"
            cells = (f"{c.ballast_kg:.0f}", f"{100 * c.finish_probability:.1f}", f"{100 * c.finish_probability_se:.1f}",
                     p10, p50, p90, forecast)
            self.add_row(*(Text(cell, justify="right") for cell in cells), key=f"choice-{index}")


class LandoutsTable(DataTable):
    """Land-outs by leg (days out of the runs) for each ballast choice, then why."""

    DEFAULT_CSS = """
    LandoutsTable { height: auto; }
    """

    def __init__(self, **kwargs):
        super().__init__(cursor_type="row", zebra_stripes=True, **kwargs)

    def show(self, odds) -> None:
        self.clear(columns=True)
        self.add_column("Leg", key="leg")
        for index, c in enumerate(odds.choices):
            self.add_column(f"{c.ballast_kg:.0f} kg", key=f"choice-{index}")
        for i, (start, end) in enumerate(odds.legs):
            self.add_row(f"{i + 1} {start} > {end}",
                         *(Text(str(c.landouts_by_leg[i]), justify="right") for c in odds.choices), key=f"leg-{i}")
        reasons = sorted({key for c in odds.choices for key, _ in c.landouts_by_reason})
        for key in reasons:
            self.add_row(Text(f"why: {reason_words(key)}", style="dim"),
                         *(Text(str(dict(c.landouts_by_reason).get(key, 0)), justify="right", style="dim")
                           for c in odds.choices), key=f"why-{key}")


class FinishPlot(PlotextPlot):
    """Share of the simulated days on which the task is finished within a given task time,
    one curve per ballast choice (it levels off at the finishing odds)."""

    def show(self, odds) -> None:
        plt = self.plt
        plt.clear_data()
        plt.clear_figure()
        for colour, choice in zip(PLOT_COLOURS, odds.choices):
            times = np.asarray(choice.finish_times_s) / 3600.0
            if times.size < 2:
                continue
            share = 100.0 * np.arange(1, times.size + 1) / choice.runs
            step = max(times.size // 200, 1)  # a few hundred points draw the same curve
            plt.plot(times[::step], share[::step], color=colour, marker="braille", label=f"{choice.ballast_kg:.0f} kg")
        plt.xlabel("task time (h)")
        plt.ylabel("finished (%)")
        plt.ylim(0, 100)
        self.refresh()
