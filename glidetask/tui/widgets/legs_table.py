"""The legs of the plan, one row per leg, in the units on screen (contract 5.3 fields).

The cells are made from the plan's own SI figures (``engine.plan.LegPlan``), rounded
once by :mod:`glidetask.units` as ``glidetask plan`` rounds them, never from the rounded
JSON form (rounding twice can move a figure by one).
"""

from __future__ import annotations

import math

from rich.text import Text
from textual.reactive import var

from glidetask.tui import display
from glidetask.tui.widgets.settled_table import SettledTable
from glidetask.units import METRIC, UnitSystem

COLUMNS = (  # key (the contract's name where it has one), LegPlan attribute, header, kind;
    # the words are those of `glidetask plan` and the briefing (see glidetask.tui.glossary)
    ("leg", None, "Leg", None),
    ("distance_km", "distance_m", "Dist", "distance"),
    ("course_deg", "course_deg", "Crs", "degrees"),
    ("climb_ms", "climb_ms", "Climb", "vertical"),
    ("mc_ms", "mc_ms", "MC", "vertical"),
    ("indicated_airspeed_kmh", "indicated_airspeed_ms", "IAS", "speed"),  # what the pilot flies
    ("airspeed_kmh", "airspeed_ms", "TAS", "speed"),  # the same airspeed, true
    ("heading_deg", "heading_deg", "Hdg", "degrees"),
    ("glide_ground_speed_kmh", "glide_ground_speed_ms", "Glide", "speed"),
    ("average_speed_kmh", "average_speed_ms", "Avg", "speed"),  # distance / time
    ("time_s", "time_s", "Time", "duration"),
    ("start_clock", "start_time_s", "At", "clock"),
    ("required_height_m", "required_height_m", "Need", "msl"),
    ("arrival_height_m", "arrival_height_m", "Arrive", "msl"),
)
LEGEND = "◆ final glide · IAS, TAS, Hdg, Glide: in the glides · Avg: dist/time · At: leg start · h heights · f1 words"
LEGEND_NARROW = "◆ final glide · h heights · f1 the words"


def cell_text(kind: str | None, value, units: UnitSystem) -> str:
    if kind == "distance":
        return display.distance(units, value)
    if kind == "speed":
        return display.speed(units, value)
    if kind == "vertical":
        return display.vertical(units, value)
    if kind in ("height", "msl"):
        return display.height(units, value)
    if kind == "clock":
        return display.clock(value)
    if kind == "degrees":
        return display.degrees(value)
    if kind == "duration":
        return display.duration(value)
    return str(value)


def unit_of(kind: str | None, units: UnitSystem) -> str:
    return {"distance": units.distance_label, "speed": units.speed_label, "vertical": units.vertical_label,
            "height": units.height_label, "msl": f"{units.height_label} MSL", "degrees": "°", "duration": "h:mm",
            "clock": "h:mm"}.get(kind, "")


def header(label: str, kind: str | None, units: UnitSystem, gap: str = "") -> Text:
    """Two lines, the name over its unit, as in ``glidetask plan``'s table."""
    return Text(f"{gap}{label}\n{gap}{unit_of(kind, units)}", justify="left" if kind is None else "right")


NARROW_LEAVES_OUT = ("airspeed_kmh",)  # narrow: IAS only, what the pilot flies
UNFLOWN = ("time_s", "arrival_height_m", "average_speed_kmh")  # figures a leg never completed has not got


def landout_leg(plan) -> int | None:
    """The index of the leg on which an unfinished plan ends short (None if it finishes)."""
    landout = getattr(plan, "landout_m", None)
    if plan.finished or landout is None or not math.isfinite(landout):
        return None
    start = 0.0
    for index, leg in enumerate(plan.legs):
        if landout < start + leg.distance_m:
            return index
        start += leg.distance_m
    return len(plan.legs) - 1


def final_glide_leg(legs, final_from_m: float | None) -> int | None:
    """The index of the leg on which the final glide starts (None without one)."""
    if final_from_m is None or not math.isfinite(final_from_m):
        return None
    start = 0.0
    for index, leg in enumerate(legs):
        if start <= final_from_m < start + leg.distance_m:
            return index
        start += leg.distance_m
    return len(legs) - 1 if legs and final_from_m >= start - 1e-6 else None


class LegsTable(SettledTable):
    """Legs of the plan; the leg where the final glide starts is marked ◆."""

    def __init__(self, **kwargs):
        # the leg's name stays in view when a narrow screen scrolls the figures sideways
        super().__init__(cursor_type="row", zebra_stripes=True, header_height=2, fixed_columns=1, **kwargs)
        self._units: UnitSystem | None = None  # the unit system of the headers shown
        self._compact_drawn = False

    # what the table shows, set by the view (the others before ``plan``): each watcher draws
    plan = var(None, always_update=True)  # the engine's SI Plan (None: headers only)
    units: var[UnitSystem] = var(METRIC, init=False)
    codes: var[dict] = var(dict, init=False)  # turnpoint names -> short codes for the Leg column
    compact = var(False, init=False)  # a narrow screen: IAS is left out (the Glider view's card and the calculator show it)
    full_names = var(False, init=False)  # a wide screen: the Leg column names the turnpoints in full, as the CLI does

    def shown_columns(self) -> tuple:
        return tuple(c for c in COLUMNS if not (self.compact and c[0] in NARROW_LEAVES_OUT))

    def watch_units(self) -> None:
        self._draw()

    def watch_codes(self) -> None:
        self._draw()

    def watch_compact(self) -> None:
        self._draw()

    def watch_full_names(self) -> None:
        self._draw()

    def watch_plan(self) -> None:
        self._draw()

    def _draw(self) -> None:
        if not self.is_mounted:
            return
        plan, units, codes = self.plan, self.units, self.codes
        if self._compact_drawn != self.compact:
            self._compact_drawn, self._units = self.compact, None  # the columns change
            # narrow: no padding around cells, one space before each instead (every column fits 80)
            self.cell_padding = 0 if self.compact else 1
        gap = " " if self.compact else ""
        if self._units is units:
            self.clear()  # rows only: the columns stay, and with them the layout
        else:
            self.clear(columns=True)
            for key, _, label, kind in self.shown_columns():
                self.add_column(header(label, kind, units, gap if kind else ""), key=key)
            self._units = units
        if plan is None:
            return
        marked = final_glide_leg(plan.legs, plan.final_glide_from_m)
        short = landout_leg(plan)
        for index, leg in enumerate(plan.legs):
            mark = "◆" if index == marked else " "
            start, end = ((name if self.full_names else codes.get(name) or name[:8])
                          for name in (leg.from_name, leg.to_name))
            arrow = " → " if self.full_names else "→"
            cells = [Text(f"{mark}{index + 1} {start}{arrow}{end}", no_wrap=True)]
            for key, attribute, _, kind in self.shown_columns()[1:]:
                value = getattr(leg, attribute)
                above = attribute == "required_height_m" and value > plan.scenario.day.band_top_m + 1e-6
                if kind == "speed" and value is not None and value == value and value <= 0.0:
                    # no headway against the wind: never a negative ground speed on screen
                    cells.append(Text(gap + "none", justify="right", style="bold #e06c5a"))
                elif short is not None and index >= short and key in UNFLOWN:
                    cells.append(Text(gap + ("out" if index == short and key == "time_s" else display.DASH),
                                      justify="right", style="#e06c5a"))
                else:
                    cells.append(Text(gap + ("above" if above else cell_text(kind, value, units)), justify="right"))
            self.add_row(*cells, key=f"leg-{index + 1}")

    def cell(self, row: int, key: str) -> str:
        """The text in leg ``row`` (0-based), column ``key`` (for tests and screen readers)."""
        value = self.get_cell(f"leg-{row + 1}", key)
        return (value.plain if isinstance(value, Text) else str(value)).strip()
