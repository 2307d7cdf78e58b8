"""``glidetask plan`` with an elevation model and landable fields: the contract's ``terrain``
and ``landables`` objects, the text and briefing sections, and bad terrain files."""

from __future__ import annotations

import json
import re
from pathlib import Path

import pytest

from glidetask import cautions
from glidetask.cli import main

ROOT = Path(__file__).resolve().parents[2]
DEMO = ROOT / "demo_tasks"
TRIANGLE = str(DEMO / "vardmoor-triangle-300.toml")
ERROR_LINE = re.compile(r"^glidetask: error: [^:]+: [^:]+: .+$")  # contract section 7
# shared/CONTRACT.md 5.3
TERRAIN_KEYS = {"source", "ok", "final_glide_min_clearance_m", "at_km"}
LANDABLE_KEYS = {"coverage_percent", "gaps", "by_leg"}


def _plan(capsys, *argv: str) -> dict:
    assert main(["plan", *argv, "--json"]) == 0
    return json.loads(capsys.readouterr().out)


def _task_copy(tmp_path: Path, source: str, terrain: str | None) -> Path:
    """A demo task in tmp_path with absolute paths to the demo files and the given model."""
    text = Path(source).read_text(encoding="utf-8")
    text = text.replace('turnpoints = "vardmoor.geojson"', f'turnpoints = "{DEMO / "vardmoor.geojson"}"')
    text = re.sub(r'polar = "\.\./polars/([^"]+)"', lambda m: f'polar = "{ROOT / "polars" / m.group(1)}"', text)
    text = text.replace('file = "terrain.tif"', f'file = "{terrain}"' if terrain else 'file = "terrain.tif"')
    text = text.replace('file = "vardmoor-airspace.geojson"', f'file = "{DEMO / "vardmoor-airspace.geojson"}"')
    task = tmp_path / "task.toml"
    task.write_text(text, encoding="utf-8")
    return task


@pytest.fixture(scope="module")
def landable_names():
    # Read with the standard library's JSON parser, not the project's reader (RFC 7946 layout).
    features = json.loads((DEMO / "vardmoor.geojson").read_text(encoding="utf-8"))["features"]
    return {f["properties"]["name"] for f in features if f["properties"].get("landable") is True}


@pytest.mark.parametrize("task", sorted(p.name for p in DEMO.glob("*.toml")))
def test_every_demo_task_has_the_contract_terrain_and_landables(capsys, task, landable_names):
    data = _plan(capsys, str(DEMO / task))
    terrain, landables = data["terrain"], data["landables"]
    assert TERRAIN_KEYS <= set(terrain) and LANDABLE_KEYS <= set(landables)
    total_km = data["planned_distance_km"]
    # terrain: the demo model, the final glide checked, the least clearance within it.
    assert Path(terrain["source"]).name == "terrain.tif"
    assert isinstance(terrain["ok"], bool)
    assert data["final_glide"]["from_km"] <= terrain["at_km"] <= total_km + 1e-9
    assert terrain["final_glide_from_km"] == data["final_glide"]["from_km"]
    if terrain["ok"]:
        # ok means the glide as planned clears the terrain by the clearance (less the
        # half-metre tolerance of the check) and the model covers the whole task.
        assert terrain["final_glide_min_clearance_m"] >= terrain["clearance_m"] - 0.5
        assert terrain["task_covered_percent"] == 100.0
    # landables: gaps inside the task and in order; the coverage is the share outside them.
    gaps = landables["gaps"]
    assert all(0.0 <= g["from_km"] < g["to_km"] <= total_km + 1e-9 for g in gaps)
    assert all(a["to_km"] <= b["from_km"] for a, b in zip(gaps, gaps[1:]))
    uncovered = sum(g["to_km"] - g["from_km"] for g in gaps)
    # Tolerance: the JSON rounds kilometres to 3 decimals and percentages to 2.
    assert landables["coverage_percent"] == pytest.approx(100.0 * (1.0 - uncovered / total_km), abs=0.01)
    # by_leg: one entry per leg, numbered from 1 as the pilot flies them; the nearest is a
    # field marked landable in the turnpoint file.
    assert [entry["leg"] for entry in landables["by_leg"]] == list(range(1, len(data["legs"]) + 1))
    for entry, leg in zip(landables["by_leg"], data["legs"]):
        assert (entry["from"], entry["to"]) == (leg["from"], leg["to"])
        assert entry["nearest"] is None or entry["nearest"] in landable_names
        assert entry["nearest"] is None or entry["distance_km"] >= 0.0
    assert landables["band_bottom_m"] == data["day"]["band_bottom_m"]
    if gaps:
        assert any("No landable field is in reach" in c for c in data["cautions"])
    assert cautions.TERRAIN[0] in data["cautions"] and cautions.LANDABLES[0] in data["cautions"]


def test_the_json_carries_the_sensitivity_of_the_task_time(capsys):
    data = _plan(capsys, TRIANGLE)
    rows = data["sensitivity"]["rows"]
    assert [row["what_if"] for row in rows][0] == "forecast"
    assert rows[0]["total_time_s"] == data["total_time_s"]  # the forecast row is the plan itself
    weaker = next(row for row in rows if row["what_if"] == "weaker_climbs")
    # MacCready theory: weaker climbs never make a task faster (Reichmann, from memory).
    assert weaker["change_s"] > 0.0


def test_text_plan_has_the_terrain_landables_and_sensitivity_sections(capsys):
    assert main(["plan", TRIANGLE]) == 0
    text = capsys.readouterr().out
    data = _plan(capsys, TRIANGLE)
    assert "Final glide over the terrain" in text and "# terrain, * glide" in text
    assert f"least clearance   {data['terrain']['final_glide_min_clearance_m']:.0f} m" in text
    assert f"coverage   {data['landables']['coverage_percent']:.0f}% of the task" in text
    for gap in data["landables"]["gaps"]:
        assert f"gap        {gap['from_km']:.1f} km to {gap['to_km']:.1f} km" in text
    for entry in data["landables"]["by_leg"]:
        if entry["nearest"]:
            assert f"leg {entry['leg']} {entry['from']} > {entry['to']}: {entry['nearest']}" in text
    assert "How the task time answers to the day" in text and "Climbs 0.5 m/s weaker" in text
    assert "clearing the terrain by 150 m" in text


def test_text_plan_in_aviation_units_shows_the_sections_in_feet_and_miles(capsys):
    assert main(["plan", TRIANGLE, "--units", "aviation"]) == 0
    text = capsys.readouterr().out
    section = text.split("Final glide over the terrain", 1)[1].split("Landable fields", 1)[0]
    assert " ft" in section and " NM" in section and " km" not in section


def test_the_briefing_has_the_safety_page(capsys, tmp_path):
    target = tmp_path / "brief.md"
    assert main(["export", str(DEMO / "vardmoor-ridge-final-glide.toml"), "--to", str(target)]) == 0
    text = target.read_text(encoding="utf-8")
    for heading in ("## Final glide over the terrain", "## Landable fields along the task",
                    "## How the task time answers to the day", "- **Terrain**:", "- **Fields**:"):
        assert heading in text
    assert "```" in text and "# terrain, * glide" in text  # the ASCII profile
    assert "| Gap from (km) |" in text and "| Leg | Nearest field in reach |" in text


# ---------------------------------------------------------------- bad terrain files


def _errors(capsys, task: Path) -> list[str]:
    assert main(["plan", str(task)]) == 2
    captured = capsys.readouterr()
    assert captured.out == "" and "Traceback" not in captured.err
    lines = captured.err.strip().splitlines()
    assert lines and all(ERROR_LINE.match(line) for line in lines)
    return lines


def test_a_missing_terrain_file_is_an_input_error_of_the_task(capsys, tmp_path):
    task = _task_copy(tmp_path, TRIANGLE, str(tmp_path / "nowhere.tif"))
    (line,) = _errors(capsys, task)
    assert line.startswith(f"glidetask: error: {task}: [terrain] file: ") and "nowhere.tif" in line


def test_a_terrain_file_that_is_not_a_raster_is_an_input_error_of_the_task(capsys, tmp_path):
    fake = tmp_path / "dem.tif"
    fake.write_text("this is not an elevation model\n", encoding="utf-8")
    task = _task_copy(tmp_path, TRIANGLE, str(fake))
    (line,) = _errors(capsys, task)
    assert line.startswith(f"glidetask: error: {task}: [terrain] file: {fake}: not a raster")
