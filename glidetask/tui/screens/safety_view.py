"""The Safety view: landable coverage along the task, alternates per leg, and the final
glide over the terrain, from the plan's own results (``Plan.landables``, ``Plan.terrain``)
in the words and rounding of ``glidetask plan`` (:mod:`glidetask.formats.safety_report`)."""

from __future__ import annotations

from rich.console import Group
from rich.text import Text
from textual.app import ComposeResult
from textual.containers import Horizontal, Vertical
from textual.widgets import DataTable, Static

from glidetask import cautions
from glidetask.tui import display
from glidetask.tui.screens.base import ViewScreen
from glidetask.tui.widgets.coverage_strip import CoverageStrip
from glidetask.tui.widgets.needs_engine import NeedsNotice
from glidetask.tui.widgets.terrain_profile import TerrainProfile

NEEDS = ("Safety shows the landable fields in reach along the task and the final glide over the "
         "terrain. This task has neither: mark fields `landable = true` in the turnpoint file and "
         "name an elevation model in the task's [terrain] section.")
GOOD, DOUBT, BAD = "bold #8cc66d", "bold #e0b15a", "bold #e06c5a"


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
        yield Static(id="safety-airspace", classes="panel", markup=False)
        with Horizontal(id="safety-terrain"):
            yield Static(id="terrain-summary", classes="panel")
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
        if has_airspace:
            self._show_airspace(plan)
        if not has_report:
            return
        self._show_landables(plan)
        self._show_terrain(plan)

    # ------------------------------------------------------------ airspace

    def _show_airspace(self, plan) -> None:
        """Conflicts first (a clearance or another route is needed), then the capped tops,
        each in the words of :mod:`glidetask.cautions` and the units on screen."""
        units, check = self.app.units, plan.airspace
        lines = [Text(f"⛔ {cautions.airspace_conflict(c, units)}", style=BAD) for c in check.conflicts]
        lines += [Text(f"⚠ {cautions.airspace_cap(cap, units)}", style=DOUBT) for cap in check.caps]
        if not lines:
            lines.append(Text("no volume crossed and no band top capped along the planned path", style=GOOD))
        lines += [Text(f"⚠ {text}", style="dim") for text in cautions.AIRSPACE]
        lines.append(Text(f"airspace {check.source}" + (" · no conflict" if check.ok else
                                                         f" · {len(check.conflicts)} conflict"
                                                         f"{'s' if len(check.conflicts) != 1 else ''}"),
                          style="dim"))
        self.query_one("#safety-airspace", Static).update(Group(*lines))

    # ------------------------------------------------------------ landables

    def _codes(self) -> dict[str, str]:
        scenario = self.app.scenario
        return {t.name: t.code for t in scenario.turnpoints if t.code} if scenario is not None else {}

    def _show_landables(self, plan) -> None:
        from glidetask.formats.safety_report import gap_explanations

        units, c = self.app.units, plan.landables
        summary = self.query_one("#coverage-summary", Static)
        gaps_table = self.query_one("#gaps-table", DataTable)
        alternates = self.query_one("#alternates-table", DataTable)
        gaps_table.clear(columns=True)
        alternates.clear(columns=True)
        if c is None or c.landable_count == 0:
            summary.update(Text("no turnpoint is marked landable: coverage not checked", style="dim"))
            self.query_one(CoverageStrip).plan = plan  # nothing to draw
            return
        terrain = f", clearing terrain by {units.fmt_height(c.clearance_m)}" if c.terrain_checked else ""
        summary.update(Text.assemble(
            (f"{c.coverage_percent:.0f}% of the task has a field in reach", GOOD if not c.gaps else DOUBT),
            (f" · {len(c.gaps)} gap{'s' if len(c.gaps) != 1 else ''}", GOOD if not c.gaps else DOUBT),
            (f"  from {units.fmt_height(c.band_bottom_m)} at MacCready 0, arriving "
             f"{units.fmt_height(c.margin_m)} above the field{terrain}", "dim")))
        self.query_one(CoverageStrip).plan = plan
        d = units.distance_label
        for key, label in (("from", f"From {d}"), ("to", f"To {d}"), ("length", f"Length {d}"), ("why", "Why")):
            gaps_table.add_column(label, key=key)
        for index, ((start, end), why) in enumerate(zip(c.gaps, gap_explanations(c, units))):
            gaps_table.add_row(*(Text(display.distance(units, v), justify="right") for v in (start, end, end - start)),
                               why, key=f"gap-{index}")
        codes = self._codes()
        for key, label in (("leg", "Leg"), ("nearest", "Nearest"), ("distance", f"Off track {d}"), ("also", "Also")):
            alternates.add_column(label, key=key)
        for index, entry in enumerate(c.by_leg):
            start, end = plan.legs[entry.leg].from_name, plan.legs[entry.leg].to_name
            leg = f"{entry.leg + 1} {codes.get(start) or start}→{codes.get(end) or end}"
            # narrow: fields by their codes, so the list fits the width instead of running off it
            short = (lambda name: codes.get(name) or name) if self._narrow else (lambda name: name)
            also = ", ".join(f"{short(name)} {display.distance(units, metres)}" for name, metres in entry.alternates[1:])
            nearest = short(entry.nearest) if entry.nearest else None
            alternates.add_row(leg, nearest or Text("none in reach", style=BAD),
                               Text(display.distance(units, entry.distance_m), justify="right"), also,
                               key=f"alt-{index}")

    # ------------------------------------------------------------ terrain

    def _show_terrain(self, plan) -> None:
        from glidetask.formats.safety_report import terrain_facts

        units = self.app.units
        widget = self.query_one("#terrain-summary", Static)
        profile = self.query_one(TerrainProfile)
        profile.units = units
        source = plan.terrain_source
        if source is None:
            widget.update(Text("no elevation model in this task ([terrain] file)", style="dim"))
            profile.note = "no elevation model in this task"
            profile.check = None
            return
        terrain = plan.terrain
        if terrain is None:
            widget.update(Group(Text("not checked: the plan has no final glide", style=DOUBT),
                                Text(f"model {source}", style="dim")))
            profile.note = "no final glide in this plan"
            profile.check = None
            return
        lines = []
        for label, text in terrain_facts(terrain, units):
            style = "" if label != "verdict" else GOOD if terrain.ok else BAD
            lines.append(Text.assemble((f"{label:<16}", "dim"), (text, style)))
        lines.append(Text(f"model {source}", style="dim"))
        widget.update(Group(*lines))
        profile.note = ""
        profile.check = terrain
