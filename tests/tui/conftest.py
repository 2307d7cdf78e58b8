"""Fixtures for the terminal UI tests: a private config folder, the cautions already
acknowledged (unless a test asks for the first start), and helpers to let workers finish."""

from __future__ import annotations

import sys
from pathlib import Path

import pytest

sys.path.insert(0, str(Path(__file__).resolve().parent))  # tests/tui/scenarios.py


@pytest.fixture(autouse=True)
def config_home(tmp_path, monkeypatch) -> Path:
    """XDG_CONFIG_HOME in the test's own folder, so no test reads or writes the user's."""
    home = tmp_path / "config"
    monkeypatch.setenv("XDG_CONFIG_HOME", str(home))
    return home


@pytest.fixture
def acknowledged(config_home) -> Path:
    from glidetask.tui import config

    assert config.acknowledge_cautions()
    return config_home


@pytest.fixture
def synthetic():
    from scenarios import synthetic_scenario

    return synthetic_scenario()


async def settle(pilot, rounds: int = 3) -> None:
    """Let workers finish and their results reach the screen."""
    for _ in range(rounds):
        await pilot.pause()
        await pilot.app.workers.wait_for_complete()
    await pilot.pause()


def text_of(widget, width: int = 120) -> str:
    """The plain text a Static-like widget shows (its rich content rendered without colour)."""
    from rich.console import Console

    console = Console(width=width, record=True, color_system=None, file=open("/dev/null", "w"))
    console.print(widget.content)
    return console.export_text()
