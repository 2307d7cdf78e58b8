"""The Odds view: the task over simulated days around the forecast (engine/simulate.py),
computed in a worker thread whenever a new plan arrives or the pilot changes the runs,
the seed or the ballast choices.

Finishing odds as bars, task-time percentiles among the finishers, land-outs by leg and
why, and the spread of days assumed (planning assumptions of our own, not a forecast).

The progress line is painted before the worker starts. The worker flies the days for the
first ballast choice, whose bar and percentiles are drawn at once, then for the others
(the same days for each, so the figures are those of one simulation of every choice);
the land-outs and the plot follow with the last.
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
        self.odds = None  # the engine's Odds for the current inputs, every choice flown
        self.partial = None  # the choices flown so far while the rest are being flown
        self._computed_for = None
        self._token = 0

    def compose_body(self) -> ComposeResult:
        with Vertical(id="odds-left"):
            yield ProgressNotice(WAITING, id="odds-waiting")
            yield Vertical(id="odds-inputs", classes="panel")  # its fields come with the figures
            yield ProbabilityBars(id="odds-bars", classes="panel")
            yield Static(id="odds-assumptions", classes="panel")
        # the inputs, the tables and the plot (costly to style and draw) are mounted just after
        # the first frame, so the key shows the progress line at once
        yield Vertical(id="odds-right")

    _figures_mounted = False

    async def _mount_figures(self) -> None:
        await self.query_one("#odds-inputs").mount_all(
            [FormField(field_id, label, unit, placeholder="empty, half, full" if "ballast" in field_id else "")
             for field_id, label, unit in FIELDS])
        self._field("odds-runs").show(str(self.runs), force=True)
        self._field("odds-seed").show(str(self.seed), force=True)
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
        self._show_parts(False)
        self.call_after_refresh(self._mount_figures)

    def _show_parts(self, ready: bool, partial: bool = False) -> None:
        """``ready``: figures to show; ``partial``: only some ballast choices flown yet."""
        self.query_one("#odds-waiting").display = not ready or partial
        for widget_id in ("#odds-bars", "#odds-assumptions", "#odds-right"):
            self.query_one(widget_id).display = ready
        if self._figures_mounted:
            for widget_id in ("#landouts-table", "#finish-plot"):
                self.query_one(widget_id).display = ready and not partial

    # ------------------------------------------------------------ inputs

    def _field(self, field_id: str) -> FormField:
        return self.query_one(f"#{field_id}").parent

    def _default_choices(self) -> int:
        from glidetask.engine.simulate import default_ballasts_kg

        scenario = self.app.scenario
        return len(default_ballasts_kg(scenario)) if scenario is not None else 1

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
        notice.say(f"Flying {name} over {self.runs} simulated days for each ballast choice …", working=True,
                   steps=len(self.ballasts) if self.ballasts is not None else self._default_choices())
        notice.display = True
        self.partial = None
        # the worker starts once the progress line is on screen: the engine's numpy would
        # otherwise hold the interpreter while the first frame is drawn
        self.call_after_refresh(self._start_simulation, outcome, self._token)

    def _start_simulation(self, outcome, token: int) -> None:
        if token == self._token:
            plan = outcome.plan
            self.simulate_in_background(outcome.scenario, (plan.path, getattr(plan, "requirement", None)), self.runs,
                                        self.seed, self.ballasts, token)

    @work(thread=True, exclusive=True, group="odds")
    def simulate_in_background(self, scenario, route, runs: int, seed: int, ballasts, token: int) -> None:
        import dataclasses

        from textual.worker import get_current_worker

        from glidetask.engine.simulate import default_ballasts_kg, simulate_days

        worker = get_current_worker()
        path, requirement = route
        try:
            choices = tuple(default_ballasts_kg(scenario) if ballasts is None else ballasts)
            # the first choice alone, drawn as soon as it is flown, then the others together (each
            # call of the engine has a cost of its own: one per choice made the whole 15 % slower);
            # the same seed flies the same days for every choice, so the parts are one simulation
            flown = []
            for group in (choices[:1], choices[1:]):
                if not group:
                    continue
                part = simulate_days(scenario, runs=runs, seed=seed, ballasts_kg=group, path=path,
                                     requirement=requirement)
                flown += part.choices
                odds = dataclasses.replace(part, choices=tuple(flown))
                if len(flown) < len(choices):
                    self.app.call_from_thread(self._flown_so_far, token, odds, choices[len(flown):])
                    if worker.is_cancelled:
                        return
        except Exception as error:  # shown, never a crash; the last result stays
            self.app.call_from_thread(self._failed, token, f"{type(error).__name__}: {error}")
            return
        self.app.call_from_thread(self._simulated, token, odds)

    def _flown_so_far(self, token: int, partial, pending: tuple[float, ...]) -> None:
        if token != self._token or (self.odds is not None and self.odds.task_name == partial.task_name):
            return  # superseded; or the previous figures stay, dimmed, until every choice is flown
        self.partial = partial
        done, total = len(partial.choices), len(partial.choices) + len(pending)
        self.query_one(ProgressNotice).say(
            f"Flying {partial.task_name} over {partial.runs} simulated days: {done} of {total} ballast choices "
            "flown …", working=True, done=done, steps=total)
        self._draw_partial(pending)

    def _simulated(self, token: int, odds) -> None:
        if token != self._token:
            return
        self.odds, self.partial = odds, None
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

    def _draw_partial(self, pending: tuple[float, ...]) -> None:
        odds = self.partial
        if not self._figures_mounted or odds is None or self._computed_for is None \
                or odds.task_name != self._computed_for.scenario.task.name:
            return
        self._show_parts(True, partial=True)
        self.query_one("#odds-bars").border_subtitle = f"{odds.runs} days · seed {odds.seed}"
        self._show_odds(odds, pending)
        self._draw_assumptions(odds)

    def _draw(self) -> None:
        odds = self.odds
        if not self._figures_mounted or odds is None or self._computed_for is None or odds.task_name != self._computed_for.scenario.task.name:
            return  # never another task's figures
        self._show_parts(True)
        self._field("odds-ballasts").show(", ".join(f"{c.ballast_kg:g}" for c in odds.choices))
        self.query_one("#odds-bars").border_subtitle = f"{odds.runs} days · seed {odds.seed}"
        self._show_odds(odds)
        scenario = self.app.scenario
        landouts = self.query_one(LandoutsTable)
        landouts.codes = {t.name: t.code for t in scenario.turnpoints if t.code} if scenario is not None else {}
        landouts.odds = odds
        self.query_one(FinishPlot).odds = odds
        self._draw_assumptions(odds)

    def _show_odds(self, odds, pending: tuple[float, ...] = ()) -> None:
        """The bars and the table: the ballasts still being flown first, then the odds so far."""
        for widget in (self.query_one(ProbabilityBars), self.query_one(OddsTable)):
            widget.pending = tuple(pending)
            widget.odds = odds

    def _draw_assumptions(self, odds) -> None:
        from glidetask.formats.strategy_report import assumption_text

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
