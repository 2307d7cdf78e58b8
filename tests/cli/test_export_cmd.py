"""``glidetask export``: GPX, briefing and JSON files written atomically; bad targets."""

from __future__ import annotations

import json
import xml.etree.ElementTree as ET
from pathlib import Path

import pytest

from glidetask import cautions
from glidetask.cli import main

ROOT = Path(__file__).resolve().parents[2]
TASK = str(ROOT / "demo_tasks" / "vardmoor-out-and-return.toml")


def test_json_export_equals_plan_json(capsys, tmp_path):
    target = tmp_path / "plan.json"
    assert main(["export", TASK, "--to", str(target), "--wind", "270/25"]) == 0
    assert "Wrote" in capsys.readouterr().out
    assert main(["plan", TASK, "--wind", "270/25", "--json"]) == 0
    assert json.loads(target.read_text(encoding="utf-8")) == json.loads(capsys.readouterr().out)


def test_gpx_export_is_a_gpx_route(capsys, tmp_path):
    target = tmp_path / "route.GPX"  # the suffix is matched without regard to case
    assert main(["export", TASK, "--to", str(target)]) == 0
    root = ET.parse(target).getroot()
    assert root.tag == "{http://www.topografix.com/GPX/1/1}gpx" and root.get("version") == "1.1"
    assert len(root.findall("{http://www.topografix.com/GPX/1/1}rte")) == 1


def test_markdown_export_is_the_briefing_in_the_chosen_units(capsys, tmp_path):
    target = tmp_path / "brief.md"
    assert main(["export", TASK, "--to", str(target), "--units", "aviation", "--ballast-kg", "0"]) == 0
    text = target.read_text(encoding="utf-8")
    assert text.startswith("# Pre-flight briefing")
    assert "Need ft" in text
    for caution in cautions.GENERAL:
        assert caution in text


def test_export_overwrites_atomically_and_leaves_no_temporary_files(capsys, tmp_path):
    target = tmp_path / "plan.md"
    target.write_text("old", encoding="utf-8")
    assert main(["export", TASK, "--to", str(target)]) == 2  # an existing file needs --force
    assert target.read_text(encoding="utf-8") == "old"
    assert main(["export", TASK, "--to", str(target), "--force"]) == 0
    assert target.read_text(encoding="utf-8").startswith("# Pre-flight briefing")
    assert sorted(p.name for p in tmp_path.iterdir()) == ["plan.md"]


def test_json_output_of_export_says_what_was_written(capsys, tmp_path):
    target = tmp_path / "r.gpx"
    assert main(["export", TASK, "--to", str(target), "--json"]) == 0
    data = json.loads(capsys.readouterr().out)
    assert data["file"] == str(target) and data["format"].startswith("GPX")
    assert data["cautions"][:len(cautions.GENERAL)] == list(cautions.GENERAL)


@pytest.mark.parametrize("name, what", [("plan.txt", "unknown file type '.txt'"), ("plan", "unknown file type")])
def test_unknown_suffix_is_an_input_error_naming_the_option(capsys, tmp_path, name, what):
    target = tmp_path / name
    assert main(["export", TASK, "--to", str(target)]) == 2
    captured = capsys.readouterr()
    assert captured.err.startswith("glidetask: error: command line: --to: ") and what in captured.err
    assert not target.exists()


def test_missing_folder_and_bad_what_ifs_are_reported_together(capsys, tmp_path):
    target = tmp_path / "no" / "plan.gpx"
    assert main(["export", TASK, "--to", str(target), "--ballast-kg", "50"]) == 2
    lines = capsys.readouterr().err.strip().splitlines()
    assert lines[0] == f"glidetask: error: command line: --to: no such folder: '{tmp_path / 'no'}'"
    assert lines[1].startswith("glidetask: error: command line: --ballast-kg: this glider carries no water ballast")
