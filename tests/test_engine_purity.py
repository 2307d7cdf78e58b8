"""The engine is pure: importing it, or planning a task with it, pulls in no UI toolkit, no
raster library it does not need, and nothing of the file formats, the commands or the UI.

Checked in a fresh interpreter, since this test process may already have imported them.
"""

from __future__ import annotations

import json
import os
import subprocess
import sys
from pathlib import Path

import pytest

ROOT = Path(__file__).resolve().parent.parent
ENGINE = ROOT / "glidetask" / "engine"
DEMO = ROOT / "demo_tasks"
# What the engine must never import (DEVELOPERS.md, "Rules"): packages and their submodules.
FORBIDDEN = ("glidetask.formats", "glidetask.commands", "glidetask.tui", "glidetask.cli", "textual")


def _engine_modules() -> list[str]:
    return sorted(f"glidetask.engine.{p.stem}" for p in ENGINE.glob("*.py") if p.stem != "__init__")


def _run(script: str) -> str:
    result = subprocess.run([sys.executable, "-c", script], cwd=ROOT, capture_output=True, text=True,
                            env={**os.environ, "PYTHONPATH": str(ROOT)}, timeout=120)
    assert result.returncode == 0, result.stderr
    return result.stdout.strip()


_MATCHES = (
    "def matches(name, roots):\n"
    "    return any(name == root or name.startswith(root + '.') for root in roots)\n"
)


def test_importing_every_engine_module_imports_no_ui_no_formats_and_no_rasterio():
    modules = _engine_modules()
    assert "glidetask.engine.polar" in modules and "glidetask.engine.plan" in modules
    script = (
        "import importlib, sys\n" + _MATCHES +
        f"for name in {modules!r}:\n"
        "    importlib.import_module(name)\n"
        f"bad = sorted(m for m in sys.modules if matches(m, {FORBIDDEN + ('rasterio',)!r}))\n"
        "print(','.join(bad))\n"
    )
    assert _run(script) == "", "engine imports pulled in other layers"


@pytest.mark.parametrize("task, terrain", [
    ("vardmoor-triangle-300.toml", True),
    ("vardmoor-triangle-300.toml", False),
    ("vardmoor-area-3h.toml", True),
])
def test_planning_a_demo_task_imports_no_formats_commands_or_ui(task, terrain):
    # The task file is read by its reader (a format, loaded before the plan); what plan()
    # itself imports is what it adds to sys.modules: none of the forbidden layers, and
    # without an elevation model no rasterio either. The plan's terrain and landable
    # cautions are worded without the formats.
    script = (
        "import dataclasses, json, sys\n" + _MATCHES +
        "from glidetask.formats.task_file import load_scenario\n"
        f"scenario = load_scenario({str(DEMO / task)!r})\n"
        f"if not {terrain!r}:\n"
        "    scenario = dataclasses.replace(scenario, terrain_file=None)\n"
        "before = set(sys.modules)\n"
        "import glidetask.engine.plan as planning\n"
        "result = planning.plan(scenario)\n"
        "added = sorted(set(sys.modules) - before)\n"
        f"forbidden = {FORBIDDEN + (() if terrain else ('rasterio',))!r}\n"
        "print(json.dumps({'bad': [m for m in added if matches(m, forbidden)],\n"
        "                  'rasterio': 'rasterio' in sys.modules, 'terrain': result.terrain is not None,\n"
        "                  'landables': result.landables is not None, 'cautions': list(result.cautions)}))\n"
    )
    outcome = json.loads(_run(script))
    assert outcome["bad"] == []
    assert outcome["terrain"] is terrain and outcome["rasterio"] is terrain
    assert outcome["landables"]  # the demo region has landable fields: their cautions were worded
    from glidetask import cautions

    assert set(cautions.LANDABLES) <= set(outcome["cautions"])
    assert (set(cautions.TERRAIN) <= set(outcome["cautions"])) is terrain


def test_polar_and_glide_engine_need_no_scipy():
    # The polar and glide commands have whole-process time budgets: their engine path
    # must not import scipy (a solver that needs it imports it inside the function).
    script = (
        "import sys\n"
        "import glidetask.engine.finalglide, glidetask.engine.circling, glidetask.engine.atmosphere\n"
        "print('scipy' in sys.modules)\n"
    )
    assert _run(script) == "False"


def test_the_cautions_module_imports_nothing_heavy():
    # One source of safety wording for the CLI, the briefing, the JSON, the UI and the plan:
    # importing it costs nothing and drags in no numpy, engine or formats.
    script = (
        "import sys\n"
        "import glidetask.cautions\n"
        "print(','.join(sorted(m for m in sys.modules if m.split('.')[0] in ('numpy', 'scipy', 'textual')\n"
        "                      or m.startswith('glidetask.engine') or m.startswith('glidetask.formats'))))\n"
    )
    assert _run(script) == ""
