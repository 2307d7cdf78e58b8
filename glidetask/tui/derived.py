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
    speed_to_fly_ias_ms: np.ndarray | None = None  # the speed to fly as indicated at ``altitude_m`` [m/s IAS]
    mass_kg: float = float("nan")  # the flying mass of the set-up [kg]


def card_settings_ms(units: UnitSystem) -> np.ndarray:
    """MacCready settings of the card: 0-5 m/s by 0.5 (metric), 0-10 kt by 1 (aviation)."""
    if units.vertical_label == "m/s":
        return np.arange(0.0, 5.01, 0.5)
    return np.arange(0.0, 10.01, 1.0) * units.vertical_ms


def mid_band_m(scenario: Scenario) -> float:
    """The height at which the plan's legs take their density: the middle of the working band."""
    return scenario.day.band_middle_m


def glider_card(setup: GliderSetup, altitude_m: float, isa_deviation_c: float,
                units: UnitSystem) -> GliderCard:
    """Polars, figures and the still-air speed-to-fly card for a glider set-up."""
    from glidetask.engine.polar import scaled_polar
    from glidetask.engine.speedtofly import cruise_in_wind, speed_to_fly_still_air

    spec = setup.spec
    reference = scaled_polar(spec, spec.reference_mass_kg)
    current = setup.polar_at(altitude_m, isa_deviation_c)
    settings = card_settings_ms(units)
    speeds = np.asarray(speed_to_fly_still_air(current, settings), dtype=float)
    cruise = np.asarray(cruise_in_wind(current, settings, 0.0, 0.0).cruise_speed_ms, dtype=float)
    ratio = speeds / np.asarray(current.sink(speeds), dtype=float)
    from glidetask.engine.atmosphere import ias_from_tas

    ias = np.asarray(ias_from_tas(speeds, altitude_m, isa_deviation_c), dtype=float)
    return GliderCard(reference, current, float(altitude_m), settings, speeds, cruise, ratio, ias, float(setup.mass_kg))


@dataclass(frozen=True)
class GlideQuestion:
    """A final glide to check: from where, how high, at which setting, to which goal."""

    distance_m: float
    course_deg: float
    height_m: float
    mc_ms: float
    wind: object  # engine.scenario.Wind
    arrival_elevation_m: float
    margin_m: float
    start: tuple[float, float] | None = None  # (lat, lon) when the glide starts at a known place
    goal: tuple[float, float] | None = None


@dataclass(frozen=True)
class GlideAnswer:
    question: GlideQuestion
    glide: object  # engine.finalglide.FinalGlide
    altitude_m: float  # where the polar's density is taken [m MSL]
    terrain: object | None = None  # engine.clearance.FinalGlideTerrain
    terrain_note: str = ""
    speed_to_fly_ias_ms: float = float("nan")  # the speed to fly as indicated at ``altitude_m``


def glide_altitude_m(question: GlideQuestion) -> float:
    """The middle of the start height and the planned arrival height (contract section 3)."""
    from glidetask.engine.finalglide import density_height_m

    return density_height_m(question.height_m, question.arrival_elevation_m + question.margin_m)


def answer_glide(scenario: Scenario, question: GlideQuestion, *, with_terrain: bool = True) -> GlideAnswer:
    """The engine's final glide for the question, and its terrain check when a model is loaded."""
    from glidetask.engine.finalglide import final_glide

    altitude = glide_altitude_m(question)
    polar = scenario.glider.polar_at(altitude, scenario.day.isa_deviation_c)
    glide = final_glide(polar, question.distance_m, question.height_m, course_deg=question.course_deg,
                        wind=question.wind, mc_ms=question.mc_ms,
                        arrival_elevation_m=question.arrival_elevation_m, margin_m=question.margin_m,
                        airmass_ms=scenario.day.glide_airmass_ms)
    terrain, note = None, ""
    if with_terrain and scenario.terrain_file and question.start and question.goal and question.distance_m > 0:
        terrain, note = _terrain_check(scenario, question, glide)
    elif scenario.terrain_file is None:
        note = "no terrain model in this task ([terrain] file)"
    elif not (question.start and question.goal):
        note = "terrain profile: choose a start and a goal turnpoint"
    from glidetask.engine.atmosphere import ias_from_tas

    ias = float(ias_from_tas(glide.speed_to_fly_ms, altitude, scenario.day.isa_deviation_c))
    return GlideAnswer(question, glide, altitude, terrain, note, ias)


def _terrain_check(scenario: Scenario, question: GlideQuestion, glide):
    from glidetask.engine.clearance import final_glide_over_terrain
    from glidetask.engine.terrain import load_terrain

    per_metre = float(glide.height_used_m) / question.distance_m
    if not np.isfinite(per_metre):
        return None, "terrain profile: the goal is out of reach against this wind"
    try:
        model = load_terrain(scenario.terrain_file)
        check = final_glide_over_terrain(
            model, [question.start[0], question.goal[0]], [question.start[1], question.goal[1]], per_metre,
            question.arrival_elevation_m + question.margin_m, scenario.safety.terrain_clearance_m,
            start_height_m=question.height_m, landmarks=scenario.turnpoints)
    except (OSError, ValueError) as error:
        return None, f"terrain: {error}"
    return check, ""
