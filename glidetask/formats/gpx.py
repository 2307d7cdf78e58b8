"""A plan's route as GPX 1.1 (the open GPS Exchange Format of TopoGrafix).

One ``<rte>`` with a ``<rtept>`` per task point: for a racing task the turnpoints
themselves, for an area task the planned target point in each area (and the start and
finish turnpoints). Each point carries its elevation (``<ele>``, metres; for an area
target the elevation of the area's turnpoint, said so in its ``<desc>``), its name, and
a description of its zone and of the plan there. The route's ``<desc>`` carries the
short caution.

References
----------
.. [1] TopoGrafix, "GPX 1.1 Schema Documentation", http://www.topografix.com/GPX/1/1/
   (element order of ``gpxType``, ``rteType`` and ``wptType``; from memory).
"""

from __future__ import annotations

import math
import xml.etree.ElementTree as ET

from glidetask import cautions
from glidetask.formats.zone_text import zone_text
from glidetask.units import METRIC, format_clock

GPX_NS = "http://www.topografix.com/GPX/1/1"
XSI_NS = "http://www.w3.org/2001/XMLSchema-instance"
SCHEMA_LOCATION = f"{GPX_NS} {GPX_NS}/gpx.xsd"


def _route_points(plan):
    """(lat, lon, elevation, name, desc) per task point."""
    task = plan.scenario.task
    last = len(task.points) - 1
    out = []
    for i, point in enumerate(task.points):
        role = "start" if i == 0 else "finish" if i == last else f"turn {i}"
        tp = point.turnpoint
        desc = f"{role}: {zone_text(point.zone, METRIC)}"
        lat, lon, name = tp.lat, tp.lon, tp.name
        if point.zone.is_area:
            lat, lon = float(plan.path.lats[i]), float(plan.path.lons[i])
            name = f"{tp.name} target"
            desc += f"; planned target (elevation of {tp.name})"
        if i < len(plan.legs):
            leg = plan.legs[i]
            if math.isfinite(leg.required_height_m):
                desc += f"; need {leg.required_height_m:.0f} m to get home"
            if math.isfinite(leg.start_time_s):
                desc += f"; planned {format_clock(leg.start_time_s)}"
        elif plan.finished:
            desc += f"; planned {format_clock(plan.finish_time_s)}"
        out.append((lat, lon, tp.elevation_m, name, desc))
    return out


def plan_to_gpx(plan) -> str:
    """The plan's route as a GPX 1.1 document (UTF-8 text with its XML declaration).

    Parameters
    ----------
    plan : glidetask.engine.plan.Plan

    Returns
    -------
    str
        ``<gpx version="1.1" creator="glidetask">`` with ``<metadata>`` and one ``<rte>``.
    """
    ET.register_namespace("", GPX_NS)
    ET.register_namespace("xsi", XSI_NS)
    root = ET.Element(f"{{{GPX_NS}}}gpx", {"version": "1.1", "creator": "glidetask",
                                           f"{{{XSI_NS}}}schemaLocation": SCHEMA_LOCATION})
    task = plan.scenario.task

    def child(parent, tag, text=None, attrib=None):
        element = ET.SubElement(parent, f"{{{GPX_NS}}}{tag}", attrib or {})
        if text is not None:
            element.text = text
        return element

    metadata = child(root, "metadata")
    child(metadata, "name", task.name)
    child(metadata, "desc", cautions.COMPACT)
    route = child(root, "rte")
    child(route, "name", task.name)
    summary = (f"{task.kind} task, {plan.planned_distance_m / 1000:.1f} km planned. " + cautions.COMPACT)
    child(route, "desc", summary)
    child(route, "src", "glidetask plan")
    for lat, lon, elevation, name, desc in _route_points(plan):
        lon = (lon + 180.0) % 360.0 - 180.0  # GPX longitudes are in [-180, 180)
        point = child(route, "rtept", attrib={"lat": f"{lat:.7f}", "lon": f"{lon:.7f}"})
        child(point, "ele", f"{elevation:.1f}")
        child(point, "name", name)
        child(point, "desc", desc)
    ET.indent(root, space="  ")
    body = ET.tostring(root, encoding="unicode")
    return '<?xml version="1.0" encoding="UTF-8"?>\n' + body + "\n"
