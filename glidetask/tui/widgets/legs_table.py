"""The legs of the plan, one row per leg, in the units on screen (contract 5.3 fields)."""

from __future__ import annotations

from rich.text import Text
from textual.widgets import DataTable

from glidetask.tui import display
from glidetask.tui.contract import si
from glidetask.units import UnitSystem

COLUMNS = (  # key, header (unit appended from the unit system), kind
    ("leg", "Leg", None),
    ("distance_km", "Dist", "distance"),
    ("course_deg", "Crs°", "degrees"),
    ("climb_ms", "Climb", "vertical"),
    ("mc_ms", "MC", "vertical"),
    ("airspeed_kmh", "Fly", "speed"),
    ("heading_deg", "Hdg°", "degrees"),
    ("glide_ground_speed_kmh", "GS", "speed"),
    ("cruise_speed_kmh", "Cruise", "speed"),
    ("time_s", "Time", "duration"),
    ("required_height_m", "Need", "height"),
    ("arrival_height_m", "Arrive", "height"),
)


def cell_text(kind: str | None, value, units: UnitSystem) -> str:
    if kind == "distance":
        return display.distance(units, value)
    if kind == "speed":
        return display.speed(units, value)
    if kind == "vertical":
        return display.vertical(units, value)
    if kind == "height":
        return display.height(units, value)
    if kind == "degrees":
        return display.degrees(value)
    if kind == "duration":
        return display.duration(value)
    return str(value)


def header(label: str, kind: str | None, units: UnitSystem) -> str:
    unit = {"distance": units.distance_label, "speed": units.speed_label, "vertical": units.vertical_label,
            "height": units.height_label}.get(kind)
    return f"{label} {unit}" if unit else label


class LegsTable(DataTable):
    """Legs of the plan; the leg where the final glide starts is marked ◆."""

    def __init__(self, **kwargs):
        super().__init__(cursor_type="row", zebra_stripes=True, **kwargs)

    def show(self, summary: dict | None, units: UnitSystem, codes: dict[str, str] | None = None) -> None:
        """Fill the table; ``codes`` maps turnpoint names to short codes for the Leg column."""
        codes = codes or {}
        self.clear(columns=True)
        for key, label, kind in COLUMNS:
            self.add_column(header(label, kind, units), key=key)
        if summary is None:
            return
        final_from_m = si(summary.get("final_glide") or {}, "from_km")
        start_m = 0.0
        for index, leg in enumerate(summary["legs"], start=1):
            length = si(leg, "distance_km") or 0.0
            mark = "◆" if final_from_m is not None and start_m <= final_from_m < start_m + length else " "
            start, end = (codes.get(leg[k]) or leg[k][:8] for k in ("from", "to"))
            cells = [Text(f"{mark}{index} {start}→{end}", no_wrap=True)]
            for key, _, kind in COLUMNS[1:]:
                cells.append(Text(cell_text(kind, si(leg, key), units), justify="right"))
            self.add_row(*cells, key=f"leg-{index}")
            start_m += length

    def cell(self, row: int, key: str) -> str:
        """The text in leg ``row`` (0-based), column ``key`` (for tests and screen readers)."""
        value = self.get_cell(f"leg-{row + 1}", key)
        return value.plain if isinstance(value, Text) else str(value)
