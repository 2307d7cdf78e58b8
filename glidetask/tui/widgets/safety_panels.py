"""The Safety view's panels, each drawn from the plan's own results (``Plan.landables``,
``Plan.terrain``, ``Plan.airspace``) in the words and rounding of ``glidetask plan``
(:mod:`glidetask.formats.safety_report`, :mod:`glidetask.cautions`).

Each takes the engine's SI ``Plan`` and the units on screen as reactive attributes (the
view sets ``units`` and the others before ``plan``) and draws in its watchers.
"""

from __future__ import annotations

from rich.console import Group
from rich.text import Text
from textual.reactive import var
from textual.widgets import Static

from glidetask import cautions
from glidetask.tui import display
from glidetask.tui.widgets.settled_table import SettledTable
from glidetask.units import METRIC, UnitSystem

GOOD, DOUBT, BAD = "bold #8cc66d", "bold #e0b15a", "bold #e06c5a"


def _checked(plan):
    """The plan's landable coverage, or None when there is no plan or no field marked landable."""
    coverage = None if plan is None else plan.landables
    return None if coverage is None or coverage.landable_count == 0 else coverage


class _PlanPanel:
    """The reactive inputs every panel shares: the plan, and the units it is shown in."""

    plan = var(None, always_update=True, init=False)  # the engine's SI Plan
    units: var[UnitSystem] = var(METRIC, init=False)

    def watch_plan(self) -> None:
        self._draw()

    def watch_units(self) -> None:
        self._draw()

    def _draw(self) -> None:
        raise NotImplementedError


class AirspacePanel(_PlanPanel, Static):
    """Conflicts first (a clearance or another route is needed), then the capped tops, each
    in the words of :mod:`glidetask.cautions`."""

    def _draw(self) -> None:
        if self.plan is None or self.plan.airspace is None:
            return
        units, check = self.units, self.plan.airspace
        lines = [Text(f"⛔ {cautions.airspace_conflict(c, units)}", style=BAD) for c in check.conflicts]
        lines += [Text(f"⚠ {cautions.airspace_cap(cap, units)}", style=DOUBT) for cap in check.caps]
        if not lines:
            lines.append(Text("no volume crossed and no band top capped along the planned path", style=GOOD))
        lines += [Text(f"⚠ {text}", style="dim") for text in cautions.AIRSPACE]
        lines.append(Text(f"airspace {check.source}" + (" · no conflict" if check.ok else
                                                         f" · {len(check.conflicts)} conflict"
                                                         f"{'s' if len(check.conflicts) != 1 else ''}"),
                          style="dim"))
        self.update(Group(*lines))


class CoverageSummary(_PlanPanel, Static):
    """How much of the task has a field in reach, the gaps, and from which height."""

    def _draw(self) -> None:
        if self.plan is None:
            return
        units, c = self.units, _checked(self.plan)
        if c is None:
            self.update(Text("no turnpoint is marked landable: coverage not checked", style="dim"))
            return
        terrain = f", clearing terrain by {units.fmt_height(c.clearance_m)}" if c.terrain_checked else ""
        self.update(Text.assemble(
            (f"{c.coverage_percent:.0f}% of the task has a field in reach", GOOD if not c.gaps else DOUBT),
            (f" · {len(c.gaps)} gap{'s' if len(c.gaps) != 1 else ''}", GOOD if not c.gaps else DOUBT),
            (f"  from {units.fmt_height(c.band_bottom_m)} at MacCready 0, arriving "
             f"{units.fmt_height(c.margin_m)} above the field{terrain}", "dim")))


class GapsTable(_PlanPanel, SettledTable):
    """The stretches of the task with no field in reach, and why."""

    def __init__(self, **kwargs):
        super().__init__(cursor_type="row", zebra_stripes=True, **kwargs)

    def _draw(self) -> None:
        from glidetask.formats.safety_report import gap_explanations

        if self.plan is None:
            return
        self.clear(columns=True)
        units, c = self.units, _checked(self.plan)
        if c is None:
            return
        d = units.distance_label
        for key, label in (("from", f"From {d}"), ("to", f"To {d}"), ("length", f"Length {d}"), ("why", "Why")):
            self.add_column(label, key=key)
        for index, ((start, end), why) in enumerate(zip(c.gaps, gap_explanations(c, units))):
            self.add_row(*(Text(display.distance(units, v), justify="right") for v in (start, end, end - start)),
                         why, key=f"gap-{index}")


class AlternatesTable(_PlanPanel, SettledTable):
    """The nearest field in reach leg by leg, how far off track, and the others."""

    codes: var[dict] = var(dict, init=False)  # turnpoint names -> short codes
    narrow = var(False, init=False)  # a narrow screen: fields by their codes, so the list fits

    def __init__(self, **kwargs):
        super().__init__(cursor_type="row", zebra_stripes=True, **kwargs)

    def watch_codes(self) -> None:
        self._draw()

    def watch_narrow(self) -> None:
        self._draw()

    def on_resize(self, event) -> None:
        if event.size.width != getattr(self, "_drawn_width", None):
            self._draw()  # full names where they fit, codes where they would be cut

    def _draw(self) -> None:
        plan = self.plan
        if plan is None:
            return
        self.clear(columns=True)
        units, c = self.units, _checked(plan)
        if c is None:
            return
        d = units.distance_label
        heads = ("Leg", "Nearest", f"Off track {d}", "Also")
        rows = self._rows(plan, c, short=self.narrow)
        room = self.scrollable_content_region.width
        if not self.narrow and room and self._width(heads, rows) > room:
            rows = self._rows(plan, c, short=True)  # the fields by their codes rather than cut mid-name
        self._drawn_width = self.size.width
        for key, label in zip(("leg", "nearest", "distance", "also"), heads):
            self.add_column(label, key=key)
        for index, (leg, nearest, distance, also) in enumerate(rows):
            self.add_row(leg, nearest or Text("none in reach", style=BAD), Text(distance, justify="right"), also,
                         key=f"alt-{index}")

    def _rows(self, plan, c, *, short: bool) -> list[tuple[str, str | None, str, str]]:
        """(leg, nearest field or None, off track, the others) for each leg; ``short``: fields
        by their codes."""
        units, codes = self.units, self.codes
        name_of = (lambda name: codes.get(name) or name) if short else (lambda name: name)
        rows = []
        for entry in c.by_leg:
            start, end = plan.legs[entry.leg].from_name, plan.legs[entry.leg].to_name
            leg = f"{entry.leg + 1} {codes.get(start) or start}→{codes.get(end) or end}"
            also = ", ".join(f"{name_of(name)} {display.distance(units, metres)}" for name, metres in entry.alternates[1:])
            rows.append((leg, name_of(entry.nearest) if entry.nearest else None,
                         display.distance(units, entry.distance_m), also))
        return rows

    def _width(self, heads, rows) -> int:
        """The characters the table needs: each column's widest cell and its padding."""
        cells = [heads] + [tuple(cell or "none in reach" for cell in row) for row in rows]
        return sum(max(len(row[i]) for row in cells) + 2 * self.cell_padding for i in range(len(heads)))


class TerrainSummary(_PlanPanel, Static):
    """The planned final glide over the elevation model: the verdict and its figures."""

    def _draw(self) -> None:
        from glidetask.formats.safety_report import terrain_facts

        plan, units = self.plan, self.units
        if plan is None:
            return
        source = plan.terrain_source
        if source is None:
            self.update(Text("no elevation model in this task ([terrain] file)", style="dim"))
            return
        terrain = plan.terrain
        if terrain is None:
            self.update(Group(Text("not checked: the plan has no final glide", style=DOUBT),
                              Text(f"model {source}", style="dim")))
            return
        lines = []
        for label, text in terrain_facts(terrain, units):
            style = "" if label != "verdict" else GOOD if terrain.ok else BAD
            lines.append(Text.assemble((f"{label:<16}", "dim"), (text, style)))
        lines.append(Text(f"model {source}", style="dim"))
        self.update(Group(*lines))
