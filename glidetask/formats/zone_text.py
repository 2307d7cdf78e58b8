"""A zone in words, in the chosen units: one wording for the UI, the GPX route and
``glidetask check`` (``line 10.0 km``, ``sector 10.0 km 90°``, ``area sector 20.0 km 045-135°``)."""

from __future__ import annotations

from glidetask.units import UnitSystem


def _radial(value_deg: float) -> str:
    """A radial as three digits (``045``), 360 shown as 000."""
    return f"{int(round(float(value_deg))) % 360:03d}"


def zone_text(zone, units: UnitSystem) -> str:
    """A :class:`glidetask.engine.zones.Zone` in words, distances in ``units``."""
    kind = zone.kind
    if kind == "line":
        return f"line {units.fmt_distance(zone.length_m)}"
    if kind == "cylinder":
        return f"cylinder {units.fmt_distance(zone.radius_m)}"
    if kind == "sector":
        return f"sector {units.fmt_distance(zone.radius_m)} {zone.angle_deg:g}°"
    if kind == "keyhole":
        return (f"keyhole {units.fmt_distance(zone.radius_m)} {zone.angle_deg:g}° "
                f"+ {units.fmt_distance(zone.cylinder_radius_m)}")
    if kind == "area_cylinder":
        return f"area circle {units.fmt_distance(zone.radius_m)}"
    if kind == "area_sector":
        inner = f"{units.distance(zone.inner_radius_m):g}-" if zone.inner_radius_m else ""
        return (f"area sector {inner}{units.fmt_distance(zone.radius_m)} "
                f"{_radial(zone.radial_from_deg)}-{_radial(zone.radial_to_deg)}°")
    return kind
