"""A small invented scenario built in code, for tests that should not depend on the
file readers: three points of the invented Vardmoor region and an illustrative polar
(not any real aircraft)."""

from __future__ import annotations

from glidetask.engine.polar import PolarSpec
from glidetask.engine.scenario import Day, GliderSetup, Profile, Safety, Scenario, Wind
from glidetask.engine.task import Task, TaskPoint, Turnpoint
from glidetask.engine.zones import Zone
from glidetask.units import KMH

POLAR = PolarSpec(
    label="illustrative 15 m example",
    wing_area_m2=10.5,
    reference_mass_kg=350.0,
    empty_mass_kg=260.0,
    max_ballast_kg=170.0,
    max_mass_kg=525.0,
    vne_ias_ms=270.0 * KMH,
    min_speed_ias_ms=75.0 * KMH,
    points=((80.0 * KMH, 0.62), (120.0 * KMH, 0.80), (180.0 * KMH, 1.85)),
)

HOME = Turnpoint("Vardmoor Aerodrome", "VAR", 46.20, -33.60, 320.0, True, "airfield")
NORTH = Turnpoint("Skarren Gap", "SKG", 46.90, -33.20, 410.0, False, "waypoint")
EAST = Turnpoint("Tolland Cross", "TOL", 46.00, -32.50, 280.0, True, "field")
FIELD = Turnpoint("Brenna Field", "BRF", 46.55, -33.00, 300.0, True, "field")
TURNPOINTS = (HOME, NORTH, EAST, FIELD)


def synthetic_scenario() -> Scenario:
    task = Task("Invented triangle", "racing", (
        TaskPoint(HOME, Zone.line(10_000.0)),
        TaskPoint(NORTH, Zone.cylinder(500.0)),
        TaskPoint(EAST, Zone.sector(10_000.0)),
        TaskPoint(HOME, Zone.cylinder(3_000.0)),
    ))
    day = Day(start_time_s=12.5 * 3600, band_top_m=1800.0, band_bottom_m=800.0, lift_ends_s=18.5 * 3600,
              wind=Wind(270.0, 20.0 * KMH),
              climb=Profile((11 * 3600.0, 13 * 3600.0, 17 * 3600.0, 18.5 * 3600.0), (1.0, 2.2, 2.2, 0.0)))
    return Scenario(task=task, glider=GliderSetup(POLAR, pilot_kg=85.0), day=day,
                    safety=Safety(arrival_margin_m=200.0), turnpoints=TURNPOINTS)
