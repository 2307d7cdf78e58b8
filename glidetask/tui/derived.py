"""Figures a view derives from the engine directly (not through the plan): the glider's
card and the final-glide calculator. Plain functions over engine calls, no Textual, so
tests compare the UI with the engine for the same inputs.
"""

from __future__ import annotations

from dataclasses import dataclass

import numpy as np

from glidetask.engine.scenario import GliderSetup, Scenario
from glidetask.units import UnitSystem


@dataclass(frozen=True)
class GliderCard:
    """What the Glider view shows: the polars, the figures, the speed-to-fly card."""

    reference: object  # Polar at the reference mass, sea level, clean
    current: object  # Polar at the flight's mass, bugs and the chosen altitude
    altitude_m: float
    mc_ms: np.ndarray  # MacCready settings of the card [m/s]
    speed_to_fly_ms: np.ndarray  # still-air speed to fly [m/s TAS]
    cruise_speed_ms: np.ndarray  # still-air average speed with climbs at the setting [m/s]
    glide_ratio: np.ndarray  # still-air glide ratio at the speed to fly [-]


def card_settings_ms(units: UnitSystem) -> np.ndarray:
    """MacCready settings of the card: 0-5 m/s by 0.5 (metric), 0-10 kt by 1 (aviation)."""
    if units.vertical_label == "m/s":
        return np.arange(0.0, 5.01, 0.5)
    return np.arange(0.0, 10.01, 1.0) * units.vertical_ms


def mid_band_m(scenario: Scenario) -> float:
    """The height at which the plan's legs take their density: the middle of the working band."""
    return 0.5 * (scenario.day.band_top_m + scenario.day.band_bottom_m)


def glider_card(setup: GliderSetup, altitude_m: float, isa_deviation_c: float,
                units: UnitSystem) -> GliderCard:
    """Polars, figures and the still-air speed-to-fly card for a glider set-up."""
    from glidetask.engine.polar import polar_for, scaled_polar
    from glidetask.engine.speedtofly import cruise_in_wind, speed_to_fly_still_air

    spec = setup.spec
    reference = scaled_polar(spec, spec.reference_mass_kg)
    current = polar_for(setup, altitude_m, isa_deviation_c)
    settings = card_settings_ms(units)
    speeds = np.asarray(speed_to_fly_still_air(current, settings), dtype=float)
    cruise = np.asarray(cruise_in_wind(current, settings, 0.0, 0.0).cruise_speed_ms, dtype=float)
    ratio = speeds / np.asarray(current.sink(speeds), dtype=float)
    return GliderCard(reference, current, float(altitude_m), settings, speeds, cruise, ratio)
