"""The Safety view: landable coverage along the task, alternates per leg, and the
final glide's clearance over the terrain, as the plan reports them (contract 5.3)."""

from __future__ import annotations

from rich.console import Group
from rich.text import Text
from textual.app import ComposeResult
from textual.containers import Horizontal, Vertical
from textual.widgets import DataTable, Static

from glidetask import cautions
from glidetask.tui import display
from glidetask.tui.contract import si
from glidetask.tui.screens.base import ViewScreen
from glidetask.tui.widgets.coverage_strip import CoverageStrip
from glidetask.tui.widgets.needs_engine import NeedsNotice

NEEDS = ("Safety shows what the plan reports about landable fields and terrain. This plan has no "
         "such report yet: mark fields `landable = true` in the turnpoint file, add a [terrain] "
         "file to the task, and use a planner that reports `landables` and `terrain` "
         "(contract section 5.3).")


class SafetyView(ViewScreen):
    """Gaps in landable coverage, alternates per leg, terrain clearance on the final glide."""

    VIEW = "safety"

    def compose_body(self) -> ComposeResult:
        yield NeedsNotice(NEEDS, id="safety-needs")
        with Vertical(id="coverage-panel", classes="panel"):
            yield Static(id="coverage-summary")
            yield CoverageStrip(id="coverage-strip")
        with Horizontal(id="safety-tables"):
            yield DataTable(id="gaps-table", classes="panel", cursor_type="row", zebra_stripes=True)
            yield DataTable(id="alternates-table", classes="panel", cursor_type="row", zebra_stripes=True)
        yield Static(id="terrain-summary", classes="panel")
        yield Static("\n".join(f"⚠ {c}" for c in (*cautions.TERRAIN, *cautions.LANDABLES)), id="safety-cautions",
                     markup=False)

    def on_mount(self) -> None:
        self.query_one("#coverage-panel").border_title = "Landable fields in reach from the band bottom"
        self.query_one("#gaps-table").border_title = "Gaps (no field in reach)"
        self.query_one("#alternates-table").border_title = "Nearest reachable field per leg"
        self.query_one("#terrain-summary").border_title = "Final glide over the terrain"

    def show_plan(self, outcome) -> None:
        summary = outcome.summary if outcome is not None else None
        has_report = summary is not None and (summary.get("landables") or summary.get("terrain"))
        self.query_one("#safety-needs").display = not has_report
        for widget_id in ("#coverage-panel", "#safety-tables", "#terrain-summary"):
            self.query_one(widget_id).display = bool(has_report)
        if not has_report:
            return
        self._show_landables(summary)
        self._show_terrain(summary)

    def _show_landables(self, summary: dict) -> None:
        units = self.app.units
        landables = summary.get("landables") or {}
        coverage = landables.get("coverage_percent")
        gaps = landables.get("gaps", [])
        text = Text()
        if coverage is None:
            text.append("no landable fields in the turnpoint file", style="dim")
        else:
            style = "bold #8cc66d" if not gaps else "bold #e0b15a"
            text.append(f"{coverage:.0f}% of the task has a landable field in reach", style=style)
            text.append(f" · {len(gaps)} gap{'s' if len(gaps) != 1 else ''}", style=style)
        self.query_one("#coverage-summary", Static).update(text)
        self.query_one(CoverageStrip).show(summary)
        d = units.distance_label
        table = self.query_one("#gaps-table", DataTable)
        table.clear(columns=True)
        for key, label in (("from", f"From {d}"), ("to", f"To {d}"), ("length", f"Length {d}")):
            table.add_column(label, key=key)
        for index, gap in enumerate(gaps):
            start, end = si(gap, "from_km"), si(gap, "to_km")
            table.add_row(*(Text(display.distance(units, v), justify="right") for v in (start, end, end - start)),
                          key=f"gap-{index}")
        alternates = self.query_one("#alternates-table", DataTable)
        alternates.clear(columns=True)
        for key, label in (("leg", "Leg"), ("nearest", "Field"), ("distance", f"Off track {d}")):
            alternates.add_column(label, key=key)
        for index, entry in enumerate(landables.get("by_leg", [])):
            alternates.add_row(str(entry.get("leg")), entry.get("nearest") or "none in reach",
                               Text(display.distance(units, si(entry, "distance_km")), justify="right"),
                               key=f"alt-{index}")

    def _show_terrain(self, summary: dict) -> None:
        units = self.app.units
        terrain = summary.get("terrain")
        widget = self.query_one("#terrain-summary", Static)
        if not terrain:
            widget.update(Text("no terrain model in this task ([terrain] file)", style="dim"))
            return
        ok = terrain.get("ok")
        clearance = terrain.get("final_glide_min_clearance_m")
        at = si(terrain, "at_km")
        lines = [Text(("✓ clears the terrain" if ok else "✗ does not clear the terrain (or the model does not cover it)"),
                      style="bold #8cc66d" if ok else "bold #e06c5a"),
                 Text(f"least clearance {display.with_unit(display.height(units, clearance), units.height_label)}"
                      f" at {display.with_unit(display.distance(units, at), units.distance_label)} along the task"),
                 Text(f"model: {terrain.get('source', '')}", style="dim")]
        widget.update(Group(*lines))
