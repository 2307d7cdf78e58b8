"""A valid polar file's text (invented, not any real aircraft), shared by the reader and
command tests, which edit it into each kind of bad input."""

GOOD = """\
[glider]
label = "test example"
wing_area_m2 = 10.5
reference_mass_kg = 350.0
empty_mass_kg = 255.0
max_ballast_kg = 170.0
max_mass_kg = 525.0
vne_kmh = 270.0
min_speed_kmh = 75.0
[polar]
points = [[80.0, 0.62], [120.0, 0.80], [180.0, 1.85]]
"""
