"""Totals of the plan: distance, time, speed, finish, where the final glide starts."""

from __future__ import annotations

from rich.table import Table
from rich.text import Text
from textual.widgets import Static

from glidetask import cautions
from glidetask.tui import display
from glidetask.tui.contract import si
from glidetask.units import UnitSystem


def final_glide_text(summary: dict, units: UnitSystem) -> str:
    """Where the final glide starts: along the task, and how far out from the finish."""
    start = si(summary.get("final_glide") or {}, "from_km")
    if start is None:
        return display.DASH
    total = sum(si(leg, "distance_km") or 0.0 for leg in summary["legs"])
    return (f"{display.with_unit(display.distance(units, start), units.distance_label)} "
            f"({display.distance(units, max(total - start, 0.0))} out)")


class PlanTotals(Static):
    """A compact block of the plan's totals and any caution particular to this plan."""

    def show(self, summary: dict | None, units: UnitSystem, *, stale: bool = False) -> None:
        if summary is None:
            self.update(Text("planning …", style="dim"))
            return
        task = summary["task"]
        grid = Table.grid(padding=(0, 1), expand=True)
        for _ in range(4):
            grid.add_column(style="dim", no_wrap=True)
            grid.add_column(no_wrap=True)
        fg = summary.get("final_glide") or {}
        finished = summary.get("finished", False)
        finish = summary.get("finish_time") or "–"
        grid.add_row(
            "Task", display.with_unit(display.distance(units, si(task, "optimized_distance_km")), units.distance_label),
            "Time", display.duration(summary.get("total_time_s")),
            "Speed", display.with_unit(display.speed(units, si(summary, "task_speed_kmh")), units.speed_label),
            "Finish", Text(finish if finished else "not home", style="" if finished else "bold red"),
        )
        grid.add_row(
            "Nominal", display.with_unit(display.distance(units, si(task, "nominal_distance_km")), units.distance_label),
            "Final glide at", final_glide_text(summary, units),
            "at", display.with_unit(display.height(units, fg.get("start_height_m")), units.height_label),
            "MC", display.with_unit(display.vertical(units, fg.get("mc_ms")), units.vertical_label),
        )
        if task.get("kind") == "area":
            grid.add_row(
                "Area min", display.with_unit(display.distance(units, si(task, "min_distance_km")), units.distance_label),
                "max", display.with_unit(display.distance(units, si(task, "max_distance_km")), units.distance_label),
                "target", display.with_unit(display.distance(units, si(task, "target_distance_km")), units.distance_label),
                "min time", display.duration(task.get("min_time_s")),
            )
        if not finished and summary.get("landout_km") is not None:
            grid.add_row("Lands out", Text(display.with_unit(display.distance(units, si(summary, "landout_km")),
                                                             units.distance_label), style="bold red"), "", "", "", "", "", "")
        known = set(cautions.GENERAL) | set(cautions.TERRAIN) | set(cautions.LANDABLES)
        particular = [c for c in summary.get("cautions", []) if c not in known]
        parts: list = [grid]
        for text in particular:
            parts.append(Text(f"⚠ {text}", style="bold #e0b15a"))
        if stale:
            parts.append(Text("showing the last good plan: the inputs above are not yet valid", style="bold red"))
        from rich.console import Group

        self.update(Group(*parts))
