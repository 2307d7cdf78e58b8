"""The Task view: the legs of the plan, its totals, the task's points and a sketch."""

from __future__ import annotations

from functools import partial

from textual import on
from textual.app import ComposeResult
from textual.containers import Horizontal, Vertical

from glidetask.tui import messages, task_edits
from glidetask.tui.screens.base import ViewScreen
from glidetask.tui.widgets.legs_table import LEGEND, LEGEND_NARROW, LegsTable
from glidetask.tui.widgets.plan_totals import PlanTotals
from glidetask.tui.widgets.points_table import PointsTable, role
from glidetask.tui.widgets.task_sketch import TaskSketch
from glidetask.tui.widgets.view_bar import NARROW

FULL_NAMES = 160  # from this width the legs table names the turnpoints in full (the codes need a key)


def point_along(lats, lons, distance_m: float) -> tuple[float, float] | None:
    """The point ``distance_m`` along a polyline of geodesics (None if beyond its end)."""
    from glidetask.engine import geodesy

    remaining = float(distance_m)
    for i in range(len(lats) - 1):
        length, azimuth, _ = geodesy.inverse(lats[i], lons[i], lats[i + 1], lons[i + 1])
        if remaining <= float(length):
            lat, lon = geodesy.destination(lats[i], lons[i], azimuth, remaining)
            return float(lat), float(lon)
        remaining -= float(length)
    return None


class TaskView(ViewScreen):
    """Legs, totals, points (editable) and the sketch."""

    VIEW = "task"
    AUTO_FOCUS = "#points-table"  # the place to edit the task: its keys work from the first key press
    _compact = False  # a narrow screen: the points table leaves out codes and elevations
    _stale = False  # the totals say the plan on screen is the last good one
    _shown = None  # what the points table and the sketch show: (task, turnpoints, units, compact)

    def compose_body(self) -> ComposeResult:
        yield LegsTable(id="legs-table", classes="panel")
        yield PlanTotals(id="plan-totals", classes="panel")
        with Horizontal(id="task-bottom"):
            yield PointsTable(id="points-table", classes="panel")
            with Vertical(id="sketch-panel", classes="panel"):
                yield TaskSketch(id="task-sketch")

    def on_mount(self) -> None:
        self.query_one("#legs-table").border_title = "Legs"
        self.query_one("#legs-table").border_subtitle = LEGEND
        self.query_one("#plan-totals").border_title = "Plan"
        self.query_one("#points-table").border_title = "Task points"
        self.query_one("#points-table").border_subtitle = "a add · r replace · x remove · ⇧↑↓ move · z zone"
        self.query_one("#sketch-panel").border_title = "Sketch"
        legs = self.query_one(LegsTable)
        legs.units = self.app.units
        legs.plan = None  # the headers, in the units on screen
        # a refused input marks the plan on screen as the last good one
        self.watch(self.app, "invalid_fields", self._stale_changed, init=False)

    # ------------------------------------------------------------ showing

    def on_resize(self, event) -> None:
        self.query_one(LegsTable).full_names = event.size.width >= FULL_NAMES
        compact = event.size.width < NARROW
        # the whole legend only where the border holds it: never cut mid-word
        self.query_one("#legs-table").border_subtitle = LEGEND if event.size.width >= len(LEGEND) + 8 else LEGEND_NARROW
        if compact != self._compact:
            self._compact = compact
            if self.app.scenario is not None:
                self.show_scenario(self.app.scenario)
                self.show_plan(self.app.plan)

    def show_scenario(self, scenario) -> None:
        shown = (scenario.task, scenario.turnpoints, self.app.units, self._compact)
        if shown == self._shown:
            return  # the glider or the day changed: the points and the sketch wait for the plan
        self._shown = shown
        points = self.query_one(PointsTable)
        points.units, points.compact = self.app.units, self._compact
        points.shown_task = scenario.task
        self.query_one("#points-table").border_title = f"Task points · {scenario.task.name} ({scenario.task.kind})"
        self._draw_sketch()

    def _stale_changed(self, invalid) -> None:
        if bool(invalid) != self._stale:
            self._stale = bool(invalid)
            self.query_one(PlanTotals).stale = self._stale  # the totals redraw in their watcher

    def show_plan(self, outcome) -> None:
        units = self.app.units
        plan = outcome.plan if outcome is not None else None
        scenario = self.app.scenario
        codes = {t.name: t.code for t in scenario.turnpoints if t.code} if scenario is not None else {}
        legs = self.query_one(LegsTable)
        legs.units, legs.codes, legs.compact = units, codes, self._compact
        legs.plan = plan
        self._stale = bool(self.app.invalid_fields)
        totals = self.query_one(PlanTotals)
        totals.units, totals.stale = units, self._stale
        totals.plan = plan
        self._draw_sketch()

    def _draw_sketch(self) -> None:
        from glidetask.tui.sketch_geometry import build_sketch

        scenario, outcome = self.app.scenario, self.app.plan
        if scenario is None:
            return
        path, final_at, check = None, None, None
        if outcome is not None and outcome.scenario.task is scenario.task:
            check = getattr(outcome.plan, "airspace", None)
            plan_path = getattr(outcome.plan, "path", None)
            if plan_path is not None:
                path = (plan_path.lats, plan_path.lons)
                from_m = outcome.plan.final_glide_from_m
                if from_m is not None and from_m == from_m:
                    final_at = point_along(plan_path.lats, plan_path.lons, from_m)
        landables = [t for t in scenario.turnpoints if t.landable]
        try:
            sketch = build_sketch(scenario.task, path=path, landables=landables, final_glide_at=final_at,
                                  airspace=scenario.airspace, check=check)
        except Exception as error:  # a drawing problem never takes the view down
            self.post_message(messages.Notice(f"sketch: {error}"))
            return
        drawing = self.query_one(TaskSketch)
        drawing.units = self.app.units
        drawing.sketch = sketch

    # ------------------------------------------------------------ editing

    @on(PointsTable.EditRequested)
    def _edit_requested(self, message: PointsTable.EditRequested) -> None:
        message.stop()
        scenario = self.app.scenario
        if scenario is None:
            return
        index, count = message.index, len(scenario.task.points)
        action = message.action
        if action in ("add", "replace"):
            from glidetask.tui.screens.turnpoint_picker import TurnpointPicker

            title = "Add a turn point after " + role(index, count) if action == "add" else f"Replace {role(index, count)}"
            self.app.push_screen(TurnpointPicker(scenario.turnpoints, self.app.units, title),
                                 partial(self._picked, action, index))
        elif action == "remove":
            self._post(partial(task_edits.remove_point, index=index), f"{role(index, count)} removed")
        elif action in ("up", "down"):
            step = -1 if action == "up" else 1
            self._post(partial(task_edits.move_point, index=index, step=step), "point moved")
            self.query_one(PointsTable).move_cursor(row=min(max(index + step, 0), count - 1))
        elif action == "zone":
            from glidetask.tui.screens.zone_modal import ZoneModal, allowed_kinds

            point = scenario.task.points[index]
            kinds = allowed_kinds(scenario.task.kind, index, count)
            self.app.push_screen(ZoneModal(point.zone, kinds, self.app.units, f"Zone of {role(index, count)}: {point.name}"),
                                 partial(self._zone_chosen, index))

    def _picked(self, action: str, index: int, turnpoint) -> None:
        if turnpoint is None:
            return
        if action == "add":
            self._post(lambda s: task_edits.insert_point(s, index + 1, turnpoint), f"{turnpoint.name} added")
            self.query_one(PointsTable).move_cursor(row=index + 1)
        else:
            self._post(lambda s: task_edits.replace_turnpoint(s, index, turnpoint), f"{turnpoint.name} placed")

    def _zone_chosen(self, index: int, zone) -> None:
        if zone is not None:
            self._post(lambda s: task_edits.set_zone(s, index, zone), "zone")

    def _post(self, change, what: str) -> None:
        self.post_message(messages.ScenarioEdit(lambda s: change(s), what, field_id="points-table"))
