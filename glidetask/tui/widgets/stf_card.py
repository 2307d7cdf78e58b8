"""The speed-to-fly card: MacCready setting, speed to fly, cruise speed, glide ratio."""

from __future__ import annotations

from textual.widgets import DataTable

from glidetask.tui import display
from glidetask.units import UnitSystem


class SpeedToFlyCard(DataTable):
    """One row per MacCready setting, still air."""

    def __init__(self, **kwargs):
        super().__init__(cursor_type="row", zebra_stripes=True, **kwargs)

    def show(self, card, units: UnitSystem) -> None:
        self.clear(columns=True)
        self.add_column(f"MC {units.vertical_label}", key="mc")
        self.add_column(f"Fly {units.speed_label}", key="speed")
        self.add_column(f"Cruise {units.speed_label}", key="cruise")
        self.add_column("L/D", key="ld")
        for mc, speed, cruise, ratio in zip(card.mc_ms, card.speed_to_fly_ms, card.cruise_speed_ms, card.glide_ratio):
            self.add_row(display.vertical(units, mc), display.speed(units, speed), display.speed(units, cruise),
                         display.ratio(ratio), key=f"{mc:.3f}")
