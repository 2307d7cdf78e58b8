"""The engine is pure: importing it pulls in no UI toolkit and no raster library.

Checked in a fresh interpreter, since this test process may already have imported them.
"""

from __future__ import annotations

import os
import subprocess
import sys
from pathlib import Path

ROOT = Path(__file__).resolve().parent.parent
ENGINE = ROOT / "glidetask" / "engine"


def _engine_modules() -> list[str]:
    return sorted(f"glidetask.engine.{p.stem}" for p in ENGINE.glob("*.py") if p.stem != "__init__")


def test_importing_every_engine_module_imports_no_textual_and_no_rasterio():
    modules = _engine_modules()
    assert "glidetask.engine.polar" in modules
    script = (
        "import importlib, sys\n"
        f"for name in {modules!r}:\n"
        "    importlib.import_module(name)\n"
        "bad = sorted(m for m in sys.modules if m.split('.')[0] in ('textual', 'rasterio'))\n"
        "print(','.join(bad))\n"
    )
    result = subprocess.run([sys.executable, "-c", script], cwd=ROOT, capture_output=True, text=True,
                            env={**os.environ, "PYTHONPATH": str(ROOT)}, timeout=120)
    assert result.returncode == 0, result.stderr
    assert result.stdout.strip() == "", f"engine imports pulled in: {result.stdout.strip()}"


def test_polar_and_glide_engine_need_no_scipy():
    # The polar and glide commands have whole-process time budgets: their engine path
    # must not import scipy (a solver that needs it imports it inside the function).
    script = (
        "import sys\n"
        "import glidetask.engine.finalglide, glidetask.engine.circling, glidetask.engine.atmosphere\n"
        "print('scipy' in sys.modules)\n"
    )
    result = subprocess.run([sys.executable, "-c", script], cwd=ROOT, capture_output=True, text=True,
                            env={**os.environ, "PYTHONPATH": str(ROOT)}, timeout=120)
    assert result.returncode == 0, result.stderr
    assert result.stdout.strip() == "False"
