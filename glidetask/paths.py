"""Where the bundled demo data lives, in a source checkout and in an installed wheel."""

from __future__ import annotations

from pathlib import Path

_PACKAGE = Path(__file__).resolve().parent


def _data_root() -> Path:
    checkout = _PACKAGE.parent
    if (checkout / "demo_tasks").is_dir() and (checkout / "polars").is_dir():
        return checkout
    return _PACKAGE / "_data"


def demo_tasks_dir() -> Path:
    return _data_root() / "demo_tasks"


def polars_dir() -> Path:
    return _data_root() / "polars"


DEMO_TASK_NAME = "vardmoor-triangle-300.toml"


def demo_task() -> Path:
    """The task ``glidetask`` opens when it is given no file."""
    return demo_tasks_dir() / DEMO_TASK_NAME
