"""Read the contract form of a plan (shared/CONTRACT.md 5.3) back into SI for display.

The views read the plan through the same names and meanings the JSON output promises,
so what a pilot sees on screen is what ``glidetask plan --json`` says.
"""

from __future__ import annotations

from glidetask.units import KMH


def si(record: dict, key: str):
    """The value of ``key`` in SI (``_km`` -> m, ``_kmh`` -> m/s; others as they are); None stays None."""
    value = record.get(key)
    if value is None:
        return None
    if key.endswith("_km"):
        return float(value) * 1000.0
    if key.endswith("_kmh"):
        return float(value) * KMH
    return value
