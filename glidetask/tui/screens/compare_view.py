"""The Compare view: ballast against thermal strength for the task as planned
(engine/compare.py), computed in a worker thread whenever a new plan arrives.

A heat-map table of task time by strength and ballast (each row coloured from its
fastest time, the best ballast marked) with the best ballast in narrow, typical and broad
thermals side by side (issue 12: how much the answer rests on the thermal size), a plot of
task time against ballast for a few strengths, and the verdict: where ballast starts
paying, where full ballast is best, and where the forecast day sits.

The progress line is painted before the worker starts, and the day's own thermals are
swept first: their table is drawn while the narrow and broad thermals are swept.
"""

from __future__ import annotations

from rich.console import Group
from rich.text import Text
from textual import work
from textual.app import ComposeResult
from textual.containers import Horizontal, Vertical
from textual.widgets import Static

from glidetask.tui import display, messages
from glidetask.tui.screens.base import ViewScreen
from glidetask.tui.widgets.progress_notice import ProgressNotice
from glidetask.tui.widgets.strategy_sweep import SweepPlot, SweepTable

CLIMB_NOTE = ("Here each loading climbs as it would circle in the thermals the day's climbs imply; "
              "the Task view keeps the day's climbs whatever the ballast.")
TABLE_TITLE = "Task time (h:mm) by thermal strength and water ballast (kg); best ballast by thermal size"
TABLE_TITLE_NARROW = "Task time (h:mm) by strength and ballast (kg); best ballast by size"  # fits 80 columns
SWEEP_STEPS = 2  # the day's thermals, then the narrow and broad ones
WAITING = "Compare shows the task time for every water ballast against thermal strength, once the plan is ready."


class CompareView(ViewScreen):
    """Ballast against thermal strength: table, plot, verdict."""

    VIEW = "compare"
    DEFAULT_CSS = """
    #sweep-panel { height: auto; }
    #sweep-sizes-source { height: auto; color: $text-muted; }
    #compare-bottom { height: 1fr; min-height: 10; }
    #sweep-plot { width: 1fr; height: 1fr; }
    #sweep-summary { width: 46; height: 1fr; overflow-y: auto; }
    CompareView.-stale #sweep-panel, CompareView.-stale #compare-bottom { opacity: 50%; }
    /* small terminals: the table and the radii first, the plot and the verdict below; the view scrolls */
    CompareView.-short #view-body { overflow-y: auto; }
    CompareView.-short #compare-bottom { height: auto; }
    CompareView.-short #sweep-plot { height: 14; }
    CompareView.-short #sweep-summary { height: auto; }
    CompareView.-narrow #compare-bottom { layout: vertical; }
    CompareView.-narrow #sweep-plot, CompareView.-narrow #sweep-summary { width: 100%; }
    """

    def __init__(self):
        super().__init__()
        self.sweep = None
        self.sized = None  # the sweep with the narrow and broad thermals (engine.compare.sweep_by_thermal_size)
        self._computed_for = None
        self._token = 0

    def compose_body(self) -> ComposeResult:
        # the first frame holds the progress line only: the table and the plot (costly to
        # style and draw) are mounted just after it, so the key shows progress at once
        yield ProgressNotice(WAITING, id="compare-waiting")
        yield Vertical(id="sweep-panel", classes="panel")
        yield Horizontal(id="compare-bottom")

    _figures_mounted = False

    def on_mount(self) -> None:
        self.query_one("#sweep-panel").border_title = TABLE_TITLE
        self._show_parts(False)
        self.call_after_refresh(self._mount_figures)

    async def _mount_figures(self) -> None:
        await self.query_one("#sweep-panel").mount_all([SweepTable(id="sweep-table"),
                                                         Static(id="sweep-sizes-source", markup=False)])
        plot, summary = SweepPlot(id="sweep-plot", classes="panel"), Static(id="sweep-summary", classes="panel")
        await self.query_one("#compare-bottom").mount_all([plot, summary])
        plot.border_title = "Task time against ballast"
        summary.border_title = "Should I fill the tanks?"
        self._figures_mounted = True
        self._draw()

    def _show_parts(self, ready: bool) -> None:
        self.query_one("#compare-waiting").display = not ready
        self.query_one("#sweep-panel").display = ready
        self.query_one("#compare-bottom").display = ready

    # ------------------------------------------------------------ computing

    def show_plan(self, outcome) -> None:
        scenario = self.app.scenario
        name = scenario.task.name if scenario is not None else "the task"
        if outcome is None:  # a task opening or the first plan: nothing shown may be another task's
            self._computed_for = None
            self._token += 1
            self._show_parts(False)
            self.query_one(ProgressNotice).say(f"Waiting for the plan of {name} …", working=True)
            return
        if outcome is self._computed_for:
            return
        self._computed_for = outcome
        self._token += 1
        if self.sweep is not None and self.sweep.task_name == outcome.scenario.task.name:
            # the same task with new inputs: the old figures stay, dimmed and marked
            self.query_one("#sweep-panel").border_subtitle = "recomputing … (figures for the previous inputs)"
            self.add_class("-stale")
        else:
            self._show_parts(False)
        self.query_one(ProgressNotice).say(
            f"Computing the ballast sweep for {outcome.scenario.task.name}: task time for every water ballast "
            "and thermal strength …", working=True, steps=SWEEP_STEPS)
        self.query_one(ProgressNotice).display = True
        # the worker starts once the progress line is on screen: its imports and numpy would
        # otherwise hold the interpreter while the first frame is drawn
        self.call_after_refresh(self._start_sweep, outcome, self._token)

    def _start_sweep(self, outcome, token: int) -> None:
        if token == self._token:
            plan = outcome.plan
            self.sweep_in_background(outcome.scenario, plan.path, getattr(plan, "requirement", None), token)

    @work(thread=True, exclusive=True, group="compare")
    def sweep_in_background(self, scenario, path, requirement, token: int) -> None:
        from textual.worker import get_current_worker

        from glidetask.engine.compare import ballast_sweep, sweep_by_thermal_size

        worker = get_current_worker()
        try:
            sweep = ballast_sweep(scenario, path=path, requirement=requirement)
            self.app.call_from_thread(self._swept, token, sweep)
            if worker.is_cancelled:
                return
            sized = sweep_by_thermal_size(scenario, typical=sweep, path=path, requirement=requirement)
        except Exception as error:  # shown, never a crash; the last sweep stays
            self.app.call_from_thread(self._failed, token, f"{type(error).__name__}: {error}")
            return
        self.app.call_from_thread(self._sized, token, sized)

    def _swept(self, token: int, sweep) -> None:
        if token != self._token:
            return  # a newer plan is being swept
        self.sweep, self.sized = sweep, None
        self.remove_class("-stale")
        self.query_one(ProgressNotice).say(WAITING, working=False)
        self.query_one("#sweep-panel").border_subtitle = (
            f"{sweep.task_name} · {display.count(len(sweep.ballast_kg), 'ballast')} × "
            f"{display.count(len(sweep.thermal_strength_ms), 'strength')} · narrow and broad thermals …")
        self._draw()

    def _sized(self, token: int, sized) -> None:
        if token != self._token:
            return
        self.sized = sized
        self.query_one("#sweep-panel").border_subtitle = (
            f"{sized.task_name} · {display.count(len(sized.ballast_kg), 'ballast')} × "
            f"{display.count(len(sized.thermal_strength_ms), 'strength')} × 3 thermal sizes")
        self._draw()

    def _failed(self, token: int, message: str) -> None:
        if token == self._token:
            self.query_one("#sweep-panel").border_subtitle = "not computed"
            self.query_one(ProgressNotice).say(f"The ballast sweep could not be computed: {message}", working=False)
            self.post_message(messages.Notice(f"ballast sweep: {message}"))

    # ------------------------------------------------------------ drawing

    def show_units(self) -> None:
        self._draw()

    def on_resize(self, event) -> None:
        self._draw()  # the table shows as many ballast columns as fit

    def _radii_m(self) -> dict[str, float]:
        from glidetask.engine.compare import thermal_size_radii_m

        return thermal_size_radii_m(self._computed_for.scenario)

    def _draw(self) -> None:
        if not self._figures_mounted or self.sweep is None or self._computed_for is None or self.sweep.task_name != self._computed_for.scenario.task.name:
            return  # never another task's figures
        from glidetask import cautions
        from glidetask.formats.strategy_report import forecast_line, sweep_verdict, thermal_size_verdicts

        units, sweep, sized = self.app.units, self.sweep, self.sized
        scenario = self._computed_for.scenario
        self._show_parts(True)
        self.query_one("#sweep-panel").border_title = TABLE_TITLE if self.size.width >= 100 else TABLE_TITLE_NARROW
        table = self.query_one(SweepTable)
        table.units, table.width_available, table.radii_m = units, self.size.width - 4, self._radii_m()
        table.sizes = sized
        table.sweep = sweep
        self.query_one("#sweep-sizes-source", Static).update(sizes_source(scenario, units))
        plot = self.query_one(SweepPlot)
        plot.units = units
        plot.sweep = sweep
        lines = [Text(sweep_verdict(sweep, units), style="bold #8cc66d"), Text("")]
        if sized is not None:
            lines += [Text(line) for line in thermal_size_verdicts(sized, units)] + [Text("")]
        lines += [Text(forecast_line(sweep, units)), Text(""),
                  Text(f"Thermals {units.fmt_height(sweep.thermal_radius_m)} in radius ({sweep.thermal_radius_source}), "
                       "the same strength all day; "
                       f"times averaged over where the climbs fall ({sweep.phases} positions). The best is the "
                       "lightest ballast within 0.2 % of the fastest.", style="dim")]
        lines += [Text(f"⚠ {note}", style="#e0b15a") for note in cautions.notes_text(sweep.notes, units)]
        if scenario.day.climb is not None:
            lines.append(Text(CLIMB_NOTE, style="dim"))
        self.query_one("#sweep-summary", Static).update(Group(*lines))


def sizes_source(scenario, units) -> str:
    """Where the three thermal radii come from, in one line (two at 80 columns)."""
    from glidetask.engine.thermals import RADIUS_SPREAD

    day = scenario.day
    typical = units.fmt_height(day.effective_thermal_radius_m)
    origin = "given in the task" if day.thermal_radius_m is not None else "Allen (2006), the day's layer"
    return (f"Best ballast by thermal radius: typical {typical}, {origin}; "
            f"narrow ÷{RADIUS_SPREAD:g}, broad ×{RADIUS_SPREAD:g} (our choice)")
