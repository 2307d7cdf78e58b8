"""glidetask.formats.export.input_files: every file a task reads, the sounding its day is
derived from included, so neither the CLI's export nor the UI's ever writes over one
(shared/CONTRACT.md section 7: a file the task reads is never replaced)."""

from __future__ import annotations

import os
import shutil
from pathlib import Path

import pytest

from glidetask.cli import main
from glidetask.formats.export import input_files, protected_target_problem
from glidetask.formats.task_file import files_named_by, load_scenario

ROOT = Path(__file__).resolve().parents[2]
DEMO = ROOT / "demo_tasks"
TASK = "vardmoor-forecast-day.toml"  # the demo day derived from a sounding
SOUNDING = "vardmoor-sounding.csv"


@pytest.fixture
def region(tmp_path) -> Path:
    """A copy of the demo folder with its polars: the forecast-day task reads the sounding."""
    shutil.copytree(DEMO, tmp_path / "demo_tasks")
    shutil.copytree(ROOT / "polars", tmp_path / "polars")
    return tmp_path / "demo_tasks"


def test_input_files_name_the_sounding_and_every_file_the_task_names(region):
    scenario = load_scenario(region / TASK)
    files = {os.path.realpath(f) for f in input_files(scenario)}
    assert os.path.realpath(region / SOUNDING) in files
    # the task file reader's own list of what the task names (formats.task_file) is covered
    assert {os.path.realpath(f) for f in files_named_by(region / TASK)} <= files
    assert os.path.realpath(region / TASK) in files


def test_a_task_without_a_sounding_names_none(region):
    scenario = load_scenario(region / "vardmoor-triangle-300.toml")
    assert scenario.day_source is None or scenario.day_source.sounding_file is None
    assert not any(f.endswith(".csv") and "sounding" in f for f in input_files(scenario))


@pytest.mark.parametrize("force", [[], ["--force"]])
def test_export_refuses_to_overwrite_the_sounding_from_the_cli(capsys, region, force):
    sounding = region / SOUNDING
    sounding_link = region / "sounding-link.md"
    sounding_link.symlink_to(sounding)  # an export's suffix, written through the link to the sounding
    before = sounding.read_bytes()
    assert main(["export", str(region / TASK), "--to", str(sounding_link), *force]) == 2
    err = capsys.readouterr().err
    assert err.startswith("glidetask: error: command line: --to: ")
    assert "a file the task reads" in err and SOUNDING in err
    assert sounding.read_bytes() == before and sounding_link.is_symlink()
    load_scenario(region / TASK)  # the task still loads


def test_the_problem_names_the_sounding(region):
    scenario = load_scenario(region / TASK)
    problem = protected_target_problem(region / SOUNDING, scenario)
    assert problem is not None and SOUNDING in problem and "a file the task reads" in problem


def test_the_uis_export_refuses_the_sounding_through_the_same_list(region):
    from glidetask.tui.exporting import export_problem, files_the_task_reads

    scenario = load_scenario(region / TASK)
    assert files_the_task_reads(scenario) == input_files(scenario)  # one list, no second rule
    (region / "sounding-link.md").symlink_to(region / SOUNDING)
    problem = export_problem(region / "sounding-link.md", scenario)
    assert problem is not None and SOUNDING in problem and "a file the task reads" in problem
