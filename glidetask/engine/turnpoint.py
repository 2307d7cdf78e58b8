"""A turnpoint: a named place from a turnpoint file (shared/CONTRACT.md 2.2).

On its own, without numpy or the geodesy, so that reading and checking a turnpoint file of
200,000 points pays for nothing else; :mod:`glidetask.engine.task` re-exports it.
"""

from __future__ import annotations

from dataclasses import dataclass

TURNPOINT_KINDS = ("airfield", "field", "waypoint")


@dataclass(frozen=True)
class Turnpoint:
    """A named point from a turnpoint file (shared/CONTRACT.md 2.2).

    Attributes
    ----------
    name : str
        Unique name.
    code : str or None
        Optional unique short code.
    lat, lon : float
        Position [deg], longitude in [-180, 180).
    elevation_m : float
        Ground elevation [m MSL].
    landable : bool
        Whether a glider may land there (airfields, fields).
    kind : str
        ``airfield``, ``field`` or ``waypoint``.
    runway_heading_deg, runway_length_m : float or None
        Main runway or landing direction [deg] and length [m], if known.
    note : str
        Free text.
    """

    name: str
    code: str | None
    lat: float
    lon: float
    elevation_m: float
    landable: bool = False
    kind: str = "waypoint"
    runway_heading_deg: float | None = None
    runway_length_m: float | None = None
    note: str = ""
