"""The plan's route as GPX 1.1 (glidetask.formats.gpx)."""

from __future__ import annotations

import xml.etree.ElementTree as ET
from pathlib import Path

import pytest

from glidetask import cautions
from glidetask.engine.plan import plan
from glidetask.formats.gpx import plan_to_gpx
from glidetask.formats.task_file import load_scenario

ROOT = Path(__file__).resolve().parents[2]
GPX = "{http://www.topografix.com/GPX/1/1}"
# Source: GPX 1.1 schema (TopoGrafix, gpx.xsd, from memory): the order of a wptType's children.
WPT_ORDER = ("ele", "time", "magvar", "geoidheight", "name", "cmt", "desc", "src", "link", "sym", "type")
RTE_ORDER = ("name", "cmt", "desc", "src", "link", "number", "type", "extensions", "rtept")
GPX_ORDER = ("metadata", "wpt", "rte", "trk", "extensions")


def _local(tag: str) -> str:
    assert tag.startswith(GPX), f"{tag} is not in the GPX 1.1 namespace"
    return tag[len(GPX):]


def _in_schema_order(children, order) -> bool:
    ranks = [order.index(_local(c.tag)) for c in children]
    return ranks == sorted(ranks)


@pytest.fixture(scope="module", params=["vardmoor-triangle-300.toml", "vardmoor-area-3h.toml"])
def planned(request):
    p = plan(load_scenario(ROOT / "demo_tasks" / request.param))
    return p, plan_to_gpx(p)


def test_gpx_has_the_1_1_structure(planned):
    p, text = planned
    assert text.startswith('<?xml version="1.0" encoding="UTF-8"?>')
    root = ET.fromstring(text.encode("utf-8"))
    assert root.tag == GPX + "gpx"
    assert root.get("version") == "1.1" and root.get("creator") == "glidetask"
    assert _in_schema_order(list(root), GPX_ORDER)
    routes = root.findall(GPX + "rte")
    assert len(routes) == 1
    route = routes[0]
    assert _in_schema_order(list(route), RTE_ORDER)
    points = route.findall(GPX + "rtept")
    assert len(points) == len(p.scenario.task.points)
    for point in points:
        lat, lon = float(point.get("lat")), float(point.get("lon"))
        assert -90.0 <= lat <= 90.0 and -180.0 <= lon < 180.0  # latitudeType, longitudeType
        assert _in_schema_order(list(point), WPT_ORDER)
        assert point.find(GPX + "ele") is not None and point.find(GPX + "name").text
    assert cautions.COMPACT in route.find(GPX + "desc").text


def test_route_points_are_the_turnpoints_or_the_area_targets(planned):
    p, text = planned
    points = ET.fromstring(text.encode("utf-8")).find(GPX + "rte").findall(GPX + "rtept")
    for i, (point, task_point) in enumerate(zip(points, p.scenario.task.points)):
        want = (p.path.lats[i], p.path.lons[i]) if task_point.zone.is_area else (task_point.lat, task_point.lon)
        # Tolerance: 7 decimals of a degree (1 cm).
        assert float(point.get("lat")) == pytest.approx(want[0], abs=1e-7)
        assert float(point.get("lon")) == pytest.approx(want[1], abs=1e-7)
        assert float(point.find(GPX + "ele").text) == pytest.approx(task_point.turnpoint.elevation_m, abs=0.05)
        assert task_point.name in point.find(GPX + "name").text


def test_gpx_round_trips_through_a_general_xml_parser(planned):
    _, text = planned
    first = ET.fromstring(text.encode("utf-8"))
    again = ET.fromstring(ET.tostring(first, encoding="utf-8"))

    def walk(element):
        return [(e.tag, dict(e.attrib), (e.text or "").strip()) for e in element.iter()]

    assert walk(first) == walk(again)


def test_names_with_markup_characters_are_escaped():
    import dataclasses

    p = plan(load_scenario(ROOT / "demo_tasks" / "vardmoor-triangle-300.toml"))
    task = dataclasses.replace(p.scenario.task, name='Tom & Jerry <"300">')
    text = plan_to_gpx(dataclasses.replace(p, scenario=dataclasses.replace(p.scenario, task=task)))
    root = ET.fromstring(text.encode("utf-8"))
    assert root.find(GPX + "rte").find(GPX + "name").text == 'Tom & Jerry <"300">'
