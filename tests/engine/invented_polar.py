"""The invented 15 m polar the engine tests share (not any real aircraft)."""

from glidetask.engine.polar import PolarSpec, scaled_polar

KMH = 1 / 3.6
SPEC = PolarSpec(
    label="test 15 m", wing_area_m2=10.5, reference_mass_kg=350.0, empty_mass_kg=260.0,
    max_ballast_kg=170.0, max_mass_kg=525.0, vne_ias_ms=270 * KMH, min_speed_ias_ms=70 * KMH,
    points=((80 * KMH, 0.62), (100 * KMH, 0.64), (120 * KMH, 0.80), (150 * KMH, 1.20), (180 * KMH, 1.85)),
)
POLAR = scaled_polar(SPEC, 420.0)
