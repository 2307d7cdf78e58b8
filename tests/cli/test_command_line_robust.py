"""The command line never opens the UI for a mistyped command, has --version, and takes
negative option values (shared/CONTRACT.md section 4: "An argument that is neither a command
nor an existing task file: exit 2 with the list of commands, never the UI. Negative numbers
are accepted as option values")."""

from __future__ import annotations

import json
import os
import subprocess
import sys
from pathlib import Path

import pytest

from glidetask import __version__
from glidetask.cli import COMMANDS, main

ROOT = Path(__file__).resolve().parents[2]


@pytest.fixture
def no_ui(monkeypatch):
    """Fail if anything tries to open the terminal UI."""
    import glidetask.cli as cli

    def opened(args):
        raise AssertionError(f"the UI was opened for {args.task!r}")

    monkeypatch.setattr(cli, "_run_ui", opened)


@pytest.mark.parametrize("argv, hint", [
    (["frobnicate"], None),
    (["help"], "did you mean --help?"),
    (["polars"], "did you mean 'polar'?"),
    (["chek", "x.toml"], "did you mean 'check'?"),
    (["plan.toml"], "did you mean 'plan'?"),
    (["--units", "aviation", "frob"], None),
])
def test_neither_a_command_nor_a_task_file_is_exit_2_with_the_commands(capsys, no_ui, tmp_path, monkeypatch,
                                                                      argv, hint):
    monkeypatch.chdir(tmp_path)
    assert main(argv) == 2
    err = capsys.readouterr().err.splitlines()
    assert err and all(line.startswith("glidetask: error: ") for line in err)
    assert all(command in err[-1] for command in COMMANDS)
    if hint:
        assert hint in err[0]


def test_the_ui_is_never_opened_for_a_mistyped_command_even_without_a_terminal():
    # Whole process, stdin at /dev/null: it must end at once with exit 2, not wait in the UI.
    env = {**os.environ, "PYTHONPATH": str(ROOT)}
    result = subprocess.run([sys.executable, "-m", "glidetask", "frobnicate"], stdin=subprocess.DEVNULL,
                            capture_output=True, text=True, timeout=60, env=env, cwd=ROOT)
    assert result.returncode == 2 and "no such command or task file" in result.stderr


def test_an_existing_task_file_still_opens_the_ui(monkeypatch):
    import glidetask.cli as cli

    opened = []
    monkeypatch.setattr(cli, "_run_ui", lambda args: opened.append(args.task) or 0)
    task = str(ROOT / "demo_tasks" / "vardmoor-triangle-300.toml")
    assert main([task]) == 0 and opened == [task]
    assert main([]) == 0 and opened[-1] is None


def test_version(capsys, no_ui):
    assert main(["--version"]) == 0
    assert capsys.readouterr().out.strip() == f"glidetask {__version__}"


@pytest.mark.parametrize("position", ["-31.2,145.8", "-31.2,-145.8", "-.5,-0.5"])
def test_negative_positions_are_taken_as_values(capsys, position):
    from glidetask.cli import build_parser, join_negative_values

    argv = ["glide", "--polar", "p.toml", "--height-m", "-5", "--from", position, "--to", "1,2"]
    args = build_parser().parse_args(join_negative_values(build_parser(), argv))
    assert args.from_pos == position and args.height_m == -5.0


def test_a_southern_western_glide_is_planned(capsys):
    # Positions given the natural way; the distance is the geodesic between them.
    # Source: geographiclib (Karney 2013) for the reference distance.
    from geographiclib.geodesic import Geodesic

    status = main(["glide", "--polar", str(ROOT / "polars" / "club.toml"), "--height-m", "1500",
                   "--from", "-31.2,-145.8", "--to", "-31.3,-145.9", "--json"])
    captured = capsys.readouterr()
    assert status == 0 and captured.err == ""
    data = json.loads(captured.out)
    reference_m = Geodesic.WGS84.Inverse(-31.2, -145.8, -31.3, -145.9)["s12"]
    assert data["time_s"] * data["ground_speed_kmh"] / 3.6 == pytest.approx(reference_m, rel=1e-3)


def test_check_json_lists_the_non_files_too(capsys, tmp_path):
    fifo = tmp_path / "p.geojson"
    os.mkfifo(fifo)
    assert main(["check", str(fifo), "--json"]) == 2
    captured = capsys.readouterr()
    (result,) = json.loads(captured.out)
    assert result["problems"][0]["what"] == "is a named pipe (FIFO), not a regular file"
