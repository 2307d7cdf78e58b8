"""Shared fixtures (where the bundled example data lives) and the property tests' CI profile."""

from __future__ import annotations

import os
from pathlib import Path

import pytest
from hypothesis import settings

# CI runs the property tests on a fixed sequence of examples, so a red run is the same run
# again when repeated; a local run keeps exploring new examples every time (and keeps any
# failing one in .hypothesis/ until it is fixed).
settings.register_profile("ci", derandomize=True, database=None)
if os.environ.get("CI"):
    settings.load_profile("ci")

ROOT = Path(__file__).resolve().parent.parent


@pytest.fixture
def polars_dir() -> Path:
    """The folder of bundled example polars (``polars/``)."""
    return ROOT / "polars"


@pytest.fixture
def demo_dir() -> Path:
    """The folder of the invented demo region (``demo_tasks/``)."""
    return ROOT / "demo_tasks"
