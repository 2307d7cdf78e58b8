"""Totals of the plan: distance, time, speed, finish, where the final glide starts.

Figures come from the plan's SI values (``engine.plan.Plan``), rounded once through
:mod:`glidetask.units` as ``glidetask plan`` rounds them.
"""

from __future__ import annotations

import math

from rich.console import Group
from rich.table import Table
from rich.text import Text
from textual.reactive import var
from textual.widgets import Static

from glidetask import cautions
from glidetask.tui import display
from glidetask.units import METRIC, UnitSystem

LABEL = "dim"
WARNING = "bold #e0b15a"
ALARM = "bold #e06c5a"


def _distance(units: UnitSystem, metres) -> str:
    return display.with_unit(display.distance(units, metres), units.distance_label)


def final_glide_text(plan, units: UnitSystem, width: int | None = None) -> str:
    """Where the final glide starts, how far out, how high, at which setting and the speed to
    fly on its first leg as indicated (``glidetask.engine.final_glide_speeds``). Where the
    line would not fit ``width`` (with its label), where it starts along the task is left out
    (how far out is kept: the pilot's figure)."""
    from glidetask.engine.final_glide_speeds import final_glide_speeds

    start = plan.final_glide_from_m
    if start is None or not math.isfinite(start):
        return "none: the plan does not reach a final glide"
    out = _distance(units, max(plan.planned_distance_m - start, 0.0))
    rest = (f" at {display.with_unit(display.height(units, plan.final_glide_height_m), units.height_label)}, "
            f"MacCready {display.with_unit(display.vertical(units, plan.final_glide_mc_ms), units.vertical_label)}")
    legs = [leg for leg in final_glide_speeds(plan) if math.isfinite(leg.indicated_airspeed_ms)]
    if legs:
        rest += f", fly {display.with_unit(display.speed(units, legs[0].indicated_airspeed_ms), units.speed_label)} IAS"
    text = f"from {_distance(units, start)} ({out} out)" + rest
    if width is not None and len(FINAL_GLIDE_LABEL) + len(text) > width:
        text = f"{out} out" + rest
    return text


FINAL_GLIDE_LABEL = "Final glide "


def particular_cautions(plan, units: UnitSystem) -> list[str]:
    """The plan's own cautions in ``units`` (the general, terrain and landable wording is
    always on screen)."""
    # the general wording is on f1 (and the airspace ones in Safety's airspace panel too)
    known = (set(cautions.GENERAL) | set(cautions.TERRAIN) | set(cautions.LANDABLES) | set(cautions.AIRSPACE)
             | {cautions.FLIGHT_LEVELS})
    return [c for c in cautions.plan_cautions(plan, units) if c not in known]


class PlanTotals(Static):
    """A compact block of the plan's totals and any caution particular to this plan.

    The view sets ``plan`` (the engine's SI ``Plan``, None while planning), ``units`` and
    ``stale`` (the inputs on screen are refused: this is the last good plan); the block is
    drawn in the watchers."""

    plan = var(None, always_update=True)
    units: var[UnitSystem] = var(METRIC, init=False)
    stale = var(False, init=False)

    def watch_plan(self) -> None:
        self._draw()

    def watch_units(self) -> None:
        self._draw()

    def watch_stale(self) -> None:
        self._draw()

    def on_resize(self) -> None:
        self._draw()  # the final glide's line is shortened to fit

    def _draw(self) -> None:
        plan, units, stale = self.plan, self.units, self.stale
        if plan is None:
            self.update(Text("planning …", style="dim"))
            return
        grid = Table.grid(padding=(0, 1))
        for _ in range(3):
            grid.add_column(style=LABEL, no_wrap=True)
            grid.add_column(no_wrap=True, min_width=10)
        finish = (Text(display.clock(plan.finish_time_s)) if plan.finished
                  else Text("not home", style=ALARM))
        area = plan.area
        # an area task leads with the distance planned through its areas, as the CLI does
        first = ("Planned", area.target_distance_m) if area is not None else ("Task", plan.optimized_distance_m)
        grid.add_row(first[0], _distance(units, first[1]),
                     "Time", display.duration(plan.total_time_s), "Finish", finish)
        grid.add_row("Nominal", _distance(units, plan.nominal_distance_m),
                     "Task speed", display.with_unit(display.speed(units, plan.task_speed_ms), units.speed_label),
                     "", "")
        if area is not None:
            grid.add_row("", "", "Min time", display.duration(area.min_time_s), "", "")
        parts: list = [grid]
        if area is not None:
            parts.append(Text.assemble(("Areas allow ", LABEL), _distance(units, area.min_distance_m),
                                       (" to ", LABEL), _distance(units, area.max_distance_m)))
        width = self.content_region.width or None
        parts.append(Text.assemble((FINAL_GLIDE_LABEL, LABEL), final_glide_text(plan, units, width)))
        if not plan.finished and plan.landout_m is not None and math.isfinite(plan.landout_m):
            parts.append(Text(f"Ends short {_distance(units, plan.landout_m)} along the task: {plan.reason}",
                              style=ALARM))
        for text in particular_cautions(plan, units):
            parts.append(Text(f"⚠ {text}", style=WARNING))
        if stale:
            parts.append(Text("showing the last good plan: the inputs above are not yet valid", style=ALARM))
        self.update(Group(*parts))
