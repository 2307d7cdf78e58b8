"""Fault tests: no everyday action overwrites or loses a user's file (shared/CONTRACT.md
section 7: written atomically; a save keeps comments, order and spelling, writes through a
symbolic link, and never replaces a file the task reads or one the user did not name)."""

from __future__ import annotations

import dataclasses
import os
import shutil
import signal
import subprocess
import sys
import time
from pathlib import Path

import pytest

from glidetask.cli import main
from glidetask.formats.atomic import TEMP_PREFIX, clean_stale_temporaries, write_atomic
from glidetask.formats.task_file import load_scenario, save_task

ROOT = Path(__file__).resolve().parents[2]
DEMO = ROOT / "demo_tasks"
TASK = "vardmoor-triangle-300.toml"


@pytest.fixture
def region(tmp_path) -> Path:
    """A copy of the demo region with its polars, as a pilot keeps it: task, turnpoints,
    terrain, airspace."""
    folder = tmp_path / "region"
    folder.mkdir()
    for name in (TASK, "vardmoor.geojson", "terrain.tif", "vardmoor-airspace.geojson"):
        shutil.copy(DEMO / name, folder / name)
    shutil.copytree(ROOT / "polars", tmp_path / "polars")
    return folder


def _temporaries(folder: Path) -> list[str]:
    return sorted(p.name for p in folder.iterdir() if p.name.startswith(TEMP_PREFIX))


# ---------------------------------------------------------------- export


def test_export_never_overwrites_the_tasks_own_turnpoint_file(capsys, region):
    # The report's case: the turnpoints in vardmoor.json, and an export --to vardmoor.json.
    (region / "vardmoor.geojson").rename(region / "vardmoor.json")
    task = region / TASK
    task.write_text(task.read_text(encoding="utf-8").replace('"vardmoor.geojson"', '"vardmoor.json"'),
                    encoding="utf-8")
    before = (region / "vardmoor.json").read_bytes()
    for extra in ([], ["--force"]):
        assert main(["export", str(task), "--to", str(region / "vardmoor.json"), *extra]) == 2
        err = capsys.readouterr().err
        assert "a file the task reads" in err and err.startswith("glidetask: error: command line: --to: ")
    assert (region / "vardmoor.json").read_bytes() == before
    load_scenario(task)  # the task still loads


def test_export_replaces_another_existing_file_only_with_force(capsys, region):
    target = region / "plan.json"
    target.write_text("keep me", encoding="utf-8")
    assert main(["export", str(region / TASK), "--to", str(target)]) == 2
    assert "exists; add --force" in capsys.readouterr().err
    assert target.read_text(encoding="utf-8") == "keep me"
    assert main(["export", str(region / TASK), "--to", str(target), "--force"]) == 0
    assert target.read_text(encoding="utf-8").startswith("{")


def test_export_through_a_symbolic_link_writes_its_target(capsys, region):
    real = region / "real.md"
    link = region / "link.md"
    link.symlink_to(real)
    assert main(["export", str(region / TASK), "--to", str(link), "--force"]) == 0
    assert link.is_symlink() and real.read_text(encoding="utf-8").startswith("# Pre-flight briefing")


def test_a_read_only_file_is_not_replaced_without_force(tmp_path, monkeypatch):
    target = tmp_path / "plan.md"
    target.write_text("old", encoding="utf-8")
    target.chmod(0o444)
    # As root every file is writable to os.access: answer as for an ordinary user.
    real_access = os.access
    monkeypatch.setattr(os, "access", lambda path, mode: real_access(path, mode) and Path(path) != target)
    with pytest.raises(PermissionError, match="read-only"):
        write_atomic(target, "new")
    assert target.read_text(encoding="utf-8") == "old"
    write_atomic(target, "new", replace_read_only=True)  # what --force does
    assert target.read_text(encoding="utf-8") == "new" and target.stat().st_mode & 0o777 == 0o444


def test_export_of_a_read_only_file_needs_force(capsys, region, monkeypatch):
    target = region / "plan.md"
    target.write_text("old", encoding="utf-8")
    monkeypatch.setattr(os, "access", lambda path, mode: False)
    assert main(["export", str(region / TASK), "--to", str(target)]) == 2
    assert target.read_text(encoding="utf-8") == "old"


@pytest.mark.parametrize("length", [255, 256])
def test_export_to_a_name_at_and_beyond_the_file_system_limit(capsys, tmp_path, length):
    limit = os.pathconf(tmp_path, "PC_NAME_MAX")
    if limit != 255:
        pytest.skip(f"this file system allows {limit}-byte names")
    target = tmp_path / ("p" * (length - 3) + ".md")
    status = main(["export", str(DEMO / TASK), "--to", str(target)])
    err = capsys.readouterr().err
    if length == 255:
        assert status == 0 and target.exists() and err == ""
    else:
        assert status == 2 and "internal error" not in err
        assert "the file name is 256 bytes; this file system allows at most 255" in err
    assert _temporaries(tmp_path) == []


def test_a_writer_killed_mid_write_leaves_nothing_the_next_write_does_not_clean(tmp_path):
    target = tmp_path / "plan.md"
    target.write_text("old", encoding="utf-8")
    script = (
        "import os, sys, time\n"
        "from glidetask.formats import atomic\n"
        "os.fsync = lambda fd: (print('writing', flush=True), time.sleep(60))\n"
        f"atomic.write_atomic({str(target)!r}, 'x' * 1_000_000)\n"
    )
    env = {**os.environ, "PYTHONPATH": str(ROOT)}
    writer = subprocess.Popen([sys.executable, "-c", script], stdout=subprocess.PIPE, text=True, env=env)
    try:
        assert writer.stdout.readline().strip() == "writing"
        os.kill(writer.pid, signal.SIGKILL)
        writer.wait(timeout=30)
    finally:
        if writer.poll() is None:
            writer.kill()
    assert target.read_text(encoding="utf-8") == "old"  # the old file, whole
    assert len(_temporaries(tmp_path)) == 1  # what kill -9 left behind
    write_atomic(target, "new")
    assert target.read_text(encoding="utf-8") == "new" and _temporaries(tmp_path) == []


def test_stale_temporaries_of_a_live_process_stay_until_old(tmp_path):
    mine = tmp_path / f"{TEMP_PREFIX}{os.getpid()}-abcd.tmp"
    mine.write_text("in progress", encoding="utf-8")
    other = tmp_path / ".someone-elses.tmp"
    other.write_text("not ours", encoding="utf-8")
    assert clean_stale_temporaries(tmp_path) == []
    assert clean_stale_temporaries(tmp_path, now=time.time() + 2 * 24 * 3600) == [mine]
    assert other.exists()


# ---------------------------------------------------------------- saving a task


COMMENTED = """\
# My own notes on this task: invented demo data.

[task]
name = "Evening triangle"   # named after the day
kind = "racing"
turnpoints = "vardmoor.geojson"

# the start: the long line, as the organisers set it
[[task.points]]
at = "Vardmoor Aerodrome"
zone = "line"
length_km = 10.0

[[task.points]]
at = "Kellow Hill"          # spelled out, not the code
zone = "cylinder"
radius_km = 0.5

[[task.points]]
at = "VAR"
zone = "cylinder"
radius_km = 3.0

# ---- glider and pilot ----
[glider]
polar = "../polars/club.toml"
pilot_kg = 85.0             # with parachute

[day]
start_time = "12:30"
band_top_m = 1800.0
band_bottom_m = 800.0
climb_ms = [["11:00", 1.0], ["13:00", 2.2], ["18:00", 0.0]]
lift_ends = "18:30"
# a note at the very end
"""


def test_saving_keeps_comments_order_and_spelling_of_what_did_not_change(region):
    path = region / "evening.toml"
    path.write_text(COMMENTED, encoding="utf-8")
    scenario = load_scenario(path)
    save_task(path, scenario)
    assert path.read_text(encoding="utf-8") == COMMENTED  # nothing changed: not a byte
    glider = dataclasses.replace(scenario.glider, pilot_kg=92.0)
    save_task(path, dataclasses.replace(scenario, glider=glider))
    expected = COMMENTED.replace("pilot_kg = 85.0             # with parachute",
                                 "pilot_kg = 92.0             # with parachute")
    assert path.read_text(encoding="utf-8") == expected
    assert load_scenario(path).glider.pilot_kg == 92.0


def test_saving_a_changed_zone_changes_only_that_zone(region):
    path = region / "evening.toml"
    path.write_text(COMMENTED, encoding="utf-8")
    scenario = load_scenario(path)
    from glidetask.engine.zones import Zone

    points = list(scenario.task.points)
    points[1] = dataclasses.replace(points[1], zone=Zone.cylinder(1500.0))
    save_task(path, dataclasses.replace(scenario, task=dataclasses.replace(scenario.task, points=tuple(points))))
    text = path.read_text(encoding="utf-8")
    assert text == COMMENTED.replace("radius_km = 0.5", "radius_km = 1.5")
    assert 'at = "Kellow Hill"' in text


def test_saving_a_removed_point_keeps_the_others_as_written(region):
    path = region / "evening.toml"
    text = COMMENTED.replace('[[task.points]]\nat = "VAR"',
                             '[[task.points]]\nat = "Brennick Airfield"\nzone = "cylinder"\nradius_km = 0.5\n\n'
                             '[[task.points]]\nat = "VAR"')
    path.write_text(text, encoding="utf-8")
    scenario = load_scenario(path)
    points = scenario.task.points[:2] + scenario.task.points[3:]
    save_task(path, dataclasses.replace(scenario, task=dataclasses.replace(scenario.task, points=points)))
    saved = path.read_text(encoding="utf-8")
    assert "Brennick" not in saved
    for kept in ("# My own notes", "# the start: the long line", 'at = "Kellow Hill"          # spelled out',
                 "# ---- glider and pilot ----", "# a note at the very end"):
        assert kept in saved
    assert [p.turnpoint.code for p in load_scenario(path).task.points] == [
        p.turnpoint.code for p in points]


def test_saving_through_a_symbolic_link_writes_the_target_with_its_paths(region, tmp_path):
    real = region / "evening.toml"
    real.write_text(COMMENTED, encoding="utf-8")
    elsewhere = tmp_path / "links"
    elsewhere.mkdir()
    link = elsewhere / "evening.toml"
    link.symlink_to(real)
    scenario = load_scenario(link)  # opened through the link: its files are next to the target
    assert Path(scenario.turnpoints_file) == region / "vardmoor.geojson"
    glider = dataclasses.replace(scenario.glider, pilot_kg=70.0)
    save_task(link, dataclasses.replace(scenario, glider=glider))
    assert link.is_symlink() and os.readlink(link) == str(real)
    text = real.read_text(encoding="utf-8")
    assert 'turnpoints = "vardmoor.geojson"' in text and 'polar = "../polars/club.toml"' in text
    assert "pilot_kg = 70.0" in text


def test_save_as_into_another_folder_rewrites_only_the_paths(region, tmp_path):
    path = region / "evening.toml"
    path.write_text(COMMENTED, encoding="utf-8")
    scenario = load_scenario(path)
    other = tmp_path / "copies"
    other.mkdir()
    save_task(other / "evening.toml", scenario)
    text = (other / "evening.toml").read_text(encoding="utf-8")
    assert text == COMMENTED.replace('"vardmoor.geojson"', '"../region/vardmoor.geojson"')
    assert load_scenario(other / "evening.toml").task == scenario.task


def test_saving_never_replaces_a_file_the_task_reads(region):
    path = region / TASK
    scenario = load_scenario(path)
    before = (region / "vardmoor.geojson").read_bytes()
    with pytest.raises(ValueError, match="a file the task reads"):
        save_task(region / "vardmoor.geojson", scenario)
    assert (region / "vardmoor.geojson").read_bytes() == before


def test_saving_over_a_read_only_task_is_refused(region, monkeypatch):
    path = region / "evening.toml"
    path.write_text(COMMENTED, encoding="utf-8")
    scenario = load_scenario(path)
    monkeypatch.setattr(os, "access", lambda p, mode: False)
    with pytest.raises(PermissionError):
        save_task(path, scenario)
    assert path.read_text(encoding="utf-8") == COMMENTED


def test_every_demo_task_saves_back_byte_for_byte(tmp_path):
    shutil.copytree(DEMO, tmp_path / "demo_tasks")
    shutil.copytree(ROOT / "polars", tmp_path / "polars")
    for task in sorted((tmp_path / "demo_tasks").glob("*.toml")):
        original = task.read_text(encoding="utf-8")
        save_task(task.with_name("copy.toml"), load_scenario(task))
        assert task.with_name("copy.toml").read_text(encoding="utf-8") == original, task.name


def test_the_ui_export_never_overwrites_a_file_the_task_reads(region):
    from glidetask.engine.plan import plan
    from glidetask.tui.exporting import export_plan

    (region / "vardmoor.geojson").rename(region / "vardmoor.json")
    task = region / TASK
    task.write_text(task.read_text(encoding="utf-8").replace('"vardmoor.geojson"', '"vardmoor.json"'),
                    encoding="utf-8")
    before = (region / "vardmoor.json").read_bytes()
    with pytest.raises(ValueError, match="a file the task reads"):
        export_plan(region / "vardmoor.json", plan(load_scenario(task)))
    assert (region / "vardmoor.json").read_bytes() == before
