"""The cautions every output a pilot may act on carries.

One source of truth: the command line, the briefing, the JSON and the terminal
UI all take their wording from here.
"""

GENERAL = (
    "glidetask is a planning aid, not a navigation or collision-avoidance instrument.",
    "The pilot in command decides; re-check every figure before and during the flight.",
    "Performance figures must come from the aircraft's flight manual; the bundled polars "
    "are illustrative examples, not data for any real aircraft.",
    "Airspace, weather minima and competition rules follow local regulations and the organisers.",
    "Margins are estimates: keep more in sinking air, rain, or over unfamiliar terrain.",
)

TERRAIN = (
    "Terrain data has errors and gaps; obstacles (masts, trees, cables) are not in it.",
)

LANDABLES = (
    "Fields change with crops and seasons: check landables in person or with the local club.",
)

COMPACT = (
    "Planning aid only - not a navigation instrument. The pilot in command decides; "
    "use the flight manual's figures; follow local rules and the organisers."
)


def general() -> list[str]:
    """The general cautions as a fresh list (callers may append their own)."""
    return list(GENERAL)
