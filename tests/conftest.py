"""Shared fixtures: where the bundled example data lives."""

from __future__ import annotations

from pathlib import Path

import pytest

ROOT = Path(__file__).resolve().parent.parent


@pytest.fixture
def polars_dir() -> Path:
    """The folder of bundled example polars (``polars/``)."""
    return ROOT / "polars"


@pytest.fixture
def demo_dir() -> Path:
    """The folder of the invented demo region (``demo_tasks/``)."""
    return ROOT / "demo_tasks"
