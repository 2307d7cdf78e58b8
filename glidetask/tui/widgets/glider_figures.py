"""The glider's derived figures: mass, wing loading, minimum sink, best glide."""

from __future__ import annotations

from rich.table import Table
from textual.reactive import var
from textual.widgets import Static

from glidetask.tui import display
from glidetask.units import METRIC, UnitSystem


class GliderFigures(Static):
    """A two-column card of figures for the current loading and altitude.

    The view sets ``units`` before ``card``; each watcher draws the card again."""

    card = var(None, always_update=True, init=False)  # a derived.GliderCard
    units: var[UnitSystem] = var(METRIC, init=False)

    def watch_card(self) -> None:
        self._draw()

    def watch_units(self) -> None:
        self._draw()

    def _draw(self) -> None:
        card, units = self.card, self.units
        if card is None:
            return
        polar = card.current
        table = Table.grid(padding=(0, 2))
        table.add_column(style="dim")
        table.add_column(justify="right")
        rows = [
            ("Flying mass", f"{display.kilograms(card.mass_kg)} kg"),
            ("Wing loading", f"{float(polar.wing_loading_kgm2):.1f} kg/m²"),
            ("Minimum sink", display.with_unit(display.vertical(units, polar.min_sink_ms), units.vertical_label)),
            ("  at", display.with_unit(display.speed(units, polar.min_sink_speed_ms), units.speed_label)),
            ("Best glide", display.ratio(polar.best_ld)),
            ("  at", display.with_unit(display.speed(units, polar.best_ld_speed_ms), units.speed_label)),
            ("Lowest speed", display.with_unit(display.speed(units, polar.min_speed_ms), units.speed_label)),
            ("Never exceed (TAS)", display.with_unit(display.speed(units, polar.vne_ms), units.speed_label)),
            ("Figures at", f"{display.with_unit(display.height(units, card.altitude_m), units.height_label)}, true airspeed"),
        ]
        for label, value in rows:
            table.add_row(label, value)
        self.update(table)
