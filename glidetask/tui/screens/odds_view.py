"""The Odds view: the task over simulated days around the forecast (engine/simulate.py),
computed in a worker thread whenever a new plan arrives or the pilot changes the runs,
the seed or the ballast choices.

Finishing odds as bars, task-time percentiles among the finishers, land-outs by leg and
why, and the spread of days assumed (planning assumptions of our own, not a forecast).
"""

from __future__ import annotations

import math
import re

from rich.text import Text
from textual import on, work
from textual.app import ComposeResult
from textual.containers import Vertical
from textual.widgets import Static

from glidetask import cautions
from glidetask.tui import messages
from glidetask.tui.screens.base import ViewScreen
from glidetask.tui.widgets.form_field import FormField
from glidetask.tui.widgets.progress_notice import ProgressNotice
from glidetask.tui.widgets.strategy_odds import FinishPlot, LandoutsTable, OddsTable, ProbabilityBars

WAITING = "Odds flies the task over many simulated days around the forecast, once the plan is ready."
DEFAULT_RUNS = 2000
MAX_RUNS = 20_000  # keeps a recompute in the view under a few seconds
MAX_CHOICES = 5
FIELDS = (("odds-runs", "Simulated days", "runs"), ("odds-seed", "Random seed", ""),
          ("odds-ballasts", "Ballast choices", "kg"))


def parse_runs(text: str) -> int:
    value = int(text.strip())
    if not 1 <= value <= MAX_RUNS:
        raise ValueError(f"simulated days: 1 to {MAX_RUNS}")
    return value


def parse_seed(text: str) -> int:
    value = int(text.strip())
    if value < 0:
        raise ValueError("seed: 0 or more")
    return value


def parse_ballasts(text: str, most_kg: float) -> tuple[float, ...] | None:
    """``"0, 85, 170"`` -> the choices [kg]; empty -> None (empty, half, full)."""
    parts = [p for p in re.split(r"[,\s]+", text.strip()) if p]
    if not parts:
        return None
    values = tuple(dict.fromkeys(float(p) for p in parts))
    if len(values) > MAX_CHOICES or any(not math.isfinite(v) or not 0.0 <= v <= most_kg + 1e-9 for v in values):
        raise ValueError(f"ballast choices: up to {MAX_CHOICES} values of 0-{most_kg:g} kg")
    return values


class OddsView(ViewScreen):
    """How likely is the task today, empty, half or full?"""

    VIEW = "odds"
    AUTO_FOCUS = ""  # no field takes the keys: the view keys (1-7, u) work until the pilot picks one
    DEFAULT_CSS = """
    #view-body { layout: horizontal; }
    #odds-left { width: 52; }
    #odds-inputs { height: auto; }
    #odds-bars { height: auto; }
    #odds-assumptions { height: auto; color: $text-muted; }
    #odds-right { width: 1fr; }
    #odds-table { height: auto; }
    #landouts-table { height: auto; max-height: 16; }
    #finish-plot { height: 1fr; min-height: 8; }
    OddsView.-stale #odds-bars, OddsView.-stale #odds-right { opacity: 50%; }
    """

    def __init__(self):
        super().__init__()
        self.runs, self.seed, self.ballasts = DEFAULT_RUNS, 1, None
        self.odds = None
        self._computed_for = None
        self._token = 0

    def compose_body(self) -> ComposeResult:
        with Vertical(id="odds-left"):
            yield ProgressNotice(WAITING, id="odds-waiting")
            with Vertical(id="odds-inputs", classes="panel"):
                for field_id, label, unit in FIELDS:
                    yield FormField(field_id, label, unit, placeholder="empty, half, full" if "ballast" in field_id
                                    else "")
            yield ProbabilityBars(id="odds-bars", classes="panel")
            yield Static(id="odds-assumptions", classes="panel")
        # the tables and the plot (costly to style and draw) are mounted just after the first
        # frame, so the key shows the progress line at once
        yield Vertical(id="odds-right")

    _figures_mounted = False

    async def _mount_figures(self) -> None:
        parts = [OddsTable(id="odds-table", classes="panel"), LandoutsTable(id="landouts-table", classes="panel"),
                 FinishPlot(id="finish-plot", classes="panel")]
        await self.query_one("#odds-right").mount_all(parts)
        for part, title in zip(parts, ("Task time of the finishers (h:mm)", "Land-outs by leg (days)",
                                       "Days finished within a task time")):
            part.border_title = title
        self._figures_mounted = True
        self._draw()

    def on_mount(self) -> None:
        self.query_one("#odds-inputs").border_title = "Simulation"
        self.query_one("#odds-bars").border_title = "Odds of finishing"
        self.query_one("#odds-assumptions").border_title = "The spread of days assumed"
        self._field("odds-runs").show(str(self.runs), force=True)
        self._field("odds-seed").show(str(self.seed), force=True)
        self._show_parts(False)
        self.call_after_refresh(self._mount_figures)

    def _show_parts(self, ready: bool) -> None:
        self.query_one("#odds-waiting").display = not ready
        for widget_id in ("#odds-bars", "#odds-assumptions", "#odds-right"):
            self.query_one(widget_id).display = ready

    # ------------------------------------------------------------ inputs

    def _field(self, field_id: str) -> FormField:
        return self.query_one(f"#{field_id}").parent

    def _most_kg(self) -> float:
        from glidetask.engine.compare import usable_ballast_kg

        scenario = self.app.scenario
        return usable_ballast_kg(scenario) if scenario is not None else 0.0

    @on(messages.FieldEdited)
    def _field_edited(self, message: messages.FieldEdited) -> None:
        if not message.field_id.startswith("odds-"):
            return  # the app's fields go up to the app
        message.stop()
        field = self.query_one(f"#{message.field_id}")
        try:
            if message.field_id == "odds-runs":
                self.runs = parse_runs(message.text)
            elif message.field_id == "odds-seed":
                self.seed = parse_seed(message.text)
            else:
                self.ballasts = parse_ballasts(message.text, self._most_kg())
        except ValueError as error:
            field.add_class("-invalid")
            self.post_message(messages.Notice(str(error) if "invalid literal" not in str(error) else "odds: expected a number"))
            return
        field.remove_class("-invalid")
        self._simulate(self.app.plan)

    # ------------------------------------------------------------ computing

    def show_plan(self, outcome) -> None:
        if outcome is None:  # a task opening or the first plan: nothing shown may be another task's
            scenario = self.app.scenario
            self._computed_for = None
            self._token += 1
            self._show_parts(False)
            name = scenario.task.name if scenario is not None else "the task"
            self.query_one(ProgressNotice).say(f"Waiting for the plan of {name} …", working=True)
        elif outcome is not self._computed_for:
            self._simulate(outcome)

    def _simulate(self, outcome) -> None:
        if outcome is None:
            return
        if self.ballasts is not None and max(self.ballasts) > self._most_kg() + 1e-9:
            self.ballasts = None  # the glider changed: back to empty, half, full
            self.post_message(messages.Notice("ballast choices reset: the glider carries less water"))
        self._computed_for = outcome
        self._token += 1
        name = outcome.scenario.task.name
        if self.odds is not None and self.odds.task_name == name:
            self.query_one("#odds-bars").border_subtitle = "recomputing … (figures for the previous inputs)"
            self.add_class("-stale")
        else:
            self._show_parts(False)
        notice = self.query_one(ProgressNotice)
        notice.say(f"Flying {name} over {self.runs} simulated days for each ballast choice …", working=True)
        notice.display = True
        plan = outcome.plan
        self.simulate_in_background(outcome.scenario, (plan.path, getattr(plan, "requirement", None)), self.runs,
                                    self.seed, self.ballasts, self._token)

    @work(thread=True, exclusive=True, group="odds")
    def simulate_in_background(self, scenario, route, runs: int, seed: int, ballasts, token: int) -> None:
        from glidetask.engine.simulate import simulate_days

        path, requirement = route
        try:
            odds = simulate_days(scenario, runs=runs, seed=seed, ballasts_kg=ballasts, path=path,
                                 requirement=requirement)
        except Exception as error:  # shown, never a crash; the last result stays
            self.app.call_from_thread(self._failed, token, f"{type(error).__name__}: {error}")
            return
        self.app.call_from_thread(self._simulated, token, odds)

    def _simulated(self, token: int, odds) -> None:
        if token != self._token:
            return
        self.odds = odds
        self.remove_class("-stale")
        self.query_one(ProgressNotice).say(WAITING, working=False)
        self._draw()

    def _failed(self, token: int, message: str) -> None:
        if token == self._token:
            self.query_one("#odds-bars").border_subtitle = "not computed"
            self.query_one(ProgressNotice).say(f"The simulated days could not be computed: {message}", working=False)
            self.post_message(messages.Notice(f"odds: {message}"))

    # ------------------------------------------------------------ drawing

    def show_units(self) -> None:
        self._draw()

    def _draw(self) -> None:
        odds = self.odds
        if not self._figures_mounted or odds is None or self._computed_for is None or odds.task_name != self._computed_for.scenario.task.name:
            return  # never another task's figures
        from glidetask.formats.strategy_report import assumption_text

        self._show_parts(True)
        self._field("odds-ballasts").show(", ".join(f"{c.ballast_kg:g}" for c in odds.choices))
        self.query_one("#odds-bars").border_subtitle = f"{odds.runs} days · seed {odds.seed}"
        self.query_one(ProbabilityBars).show(odds)
        self.query_one(OddsTable).show(odds)
        scenario = self.app.scenario
        codes = {t.name: t.code for t in scenario.turnpoints if t.code} if scenario is not None else {}
        self.query_one(LandoutsTable).show(odds, codes)
        self.query_one(FinishPlot).show(odds)
        text = Text(assumption_text(odds, self.app.units) + ".")
        text.append("\nPlanning assumptions of glidetask, not a forecast. The same days for each ballast.",
                    style="italic")
        for note in cautions.notes_text(odds.notes[1:], self.app.units):
            text.append(f"\n⚠ {note}", style="#e0b15a")
        scenario = self.app.scenario
        if scenario is not None and scenario.day.climb is not None:
            from glidetask.tui.screens.compare_view import CLIMB_NOTE

            text.append("\n" + CLIMB_NOTE, style="dim")
        self.query_one("#odds-assumptions", Static).update(text)
