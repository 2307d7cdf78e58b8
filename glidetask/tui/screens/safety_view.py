"""The Safety view: landable coverage along the task, alternates per leg, and the final
glide over the terrain, from the plan's own results (``Plan.landables``, ``Plan.terrain``)
in the words and rounding of ``glidetask plan`` (:mod:`glidetask.formats.safety_report`)."""

from __future__ import annotations

from textual.app import ComposeResult
from textual.containers import Horizontal, Vertical
from textual.widgets import Static

from glidetask import cautions
from glidetask.tui.screens.base import ViewScreen
from glidetask.tui.widgets.coverage_strip import CoverageStrip
from glidetask.tui.widgets.needs_engine import NeedsNotice
from glidetask.tui.widgets.safety_panels import (AirspacePanel, AlternatesTable, CoverageSummary, GapsTable,
                                                 TerrainSummary)
from glidetask.tui.widgets.terrain_profile import TerrainProfile

NEEDS = ("Safety shows the landable fields in reach along the task and the final glide over the "
         "terrain. This task has neither: mark fields `landable = true` in the turnpoint file and "
         "name an elevation model in the task's [terrain] section.")


class SafetyView(ViewScreen):
    """Gaps in landable coverage, alternates per leg, terrain clearance on the final glide."""

    VIEW = "safety"

    def compose_body(self) -> ComposeResult:
        yield NeedsNotice(NEEDS, id="safety-needs")
        with Vertical(id="coverage-panel", classes="panel"):
            yield CoverageSummary(id="coverage-summary")
            yield CoverageStrip(id="coverage-strip")
        with Horizontal(id="safety-tables"):
            yield GapsTable(id="gaps-table", classes="panel")
            yield AlternatesTable(id="alternates-table", classes="panel")
        yield AirspacePanel(id="safety-airspace", classes="panel", markup=False)
        with Horizontal(id="safety-terrain"):
            yield TerrainSummary(id="terrain-summary", classes="panel")
            yield TerrainProfile(id="safety-profile", classes="panel")
        yield Static("\n".join(f"⚠ {c}" for c in (*cautions.TERRAIN, *cautions.LANDABLES)), id="safety-cautions",
                     markup=False)

    def on_mount(self) -> None:
        self.query_one("#coverage-panel").border_title = "Landable fields in reach from the band bottom"
        self.query_one("#gaps-table").border_title = "Gaps: no field in reach"
        self.query_one("#alternates-table").border_title = "Fields in reach, leg by leg"
        self.query_one("#safety-airspace").border_title = "Airspace along the task"
        self.query_one("#terrain-summary").border_title = "Final glide over the terrain"
        self.query_one("#safety-profile").border_title = "The planned final glide"
        self.query_one("#safety-cautions").border_title = "Cautions"  # shown on a narrow screen's rule

    _narrow = False

    def on_resize(self, event) -> None:
        narrow = event.size.width < 100
        if narrow != self._narrow:
            self._narrow = narrow
            self.show_plan(self.app.plan)

    def show_plan(self, outcome) -> None:
        plan = outcome.plan if outcome is not None else None
        has_report = plan is not None and (plan.landables is not None or plan.terrain_source is not None)
        has_airspace = plan is not None and plan.airspace is not None
        self.query_one("#safety-needs").display = not (has_report or has_airspace)
        for widget_id in ("#coverage-panel", "#safety-tables", "#safety-terrain"):
            self.query_one(widget_id).display = bool(has_report)
        self.query_one("#safety-airspace").display = bool(has_airspace)
        units = self.app.units
        if has_airspace:
            self._show(self.query_one(AirspacePanel), plan, units)
        if not has_report:
            return
        alternates = self.query_one(AlternatesTable)
        alternates.codes, alternates.narrow = self._codes(), self._narrow
        for panel in (CoverageSummary, GapsTable, AlternatesTable, TerrainSummary):
            self._show(self.query_one(panel), plan, units)
        self.query_one(CoverageStrip).plan = plan
        self._show_terrain_profile(plan, units)

    @staticmethod
    def _show(panel, plan, units) -> None:
        panel.units = units
        panel.plan = plan

    def _codes(self) -> dict[str, str]:
        scenario = self.app.scenario
        return {t.name: t.code for t in scenario.turnpoints if t.code} if scenario is not None else {}

    # ------------------------------------------------------------ terrain

    def _show_terrain_profile(self, plan, units) -> None:
        profile = self.query_one(TerrainProfile)
        profile.units = units
        if plan.terrain_source is None:
            profile.note = "no elevation model in this task"
        elif plan.terrain is None:
            profile.note = "no final glide in this plan"
        else:
            profile.note = ""
        profile.check = plan.terrain if plan.terrain_source is not None else None
