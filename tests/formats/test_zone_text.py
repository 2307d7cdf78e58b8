"""A zone in words (glidetask.formats.zone_text): one wording for the UI, GPX and check."""

from __future__ import annotations

from glidetask.engine.zones import Zone
from glidetask.formats.zone_text import zone_text
from glidetask.units import AVIATION, METRIC


def test_zones_in_words_in_either_unit_system():
    # 1 NM = 1852 m exactly (international definition, from memory): 10 km = 5.40 NM.
    assert zone_text(Zone.line(10_000.0), METRIC) == "line 10.0 km"
    assert zone_text(Zone.line(10_000.0), AVIATION) == "line 5.4 NM"
    assert zone_text(Zone.cylinder(500.0), METRIC) == "cylinder 0.5 km"
    assert zone_text(Zone.keyhole(10_000.0, 90.0, 500.0), METRIC) == "keyhole 10.0 km 90° + 0.5 km"
