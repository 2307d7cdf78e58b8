"""Export the plan as the command line does (``glidetask export``): a GPX route, a
Markdown briefing or the plan's JSON, written atomically by the planner's own writers."""

from __future__ import annotations

import json
from pathlib import Path

FORMATS = {".gpx": "GPX 1.1 route", ".md": "pre-flight briefing (Markdown)", ".json": "plan (JSON, contract 5.3)"}


def export_plan(path: str | Path, scenario, plan) -> Path:
    """Write ``plan`` of ``scenario`` to ``path``; the suffix picks the format.

    Raises ValueError for an unknown suffix and OSError when the file cannot be written.
    """
    from glidetask.formats.atomic import write_atomic

    target = Path(path).expanduser()
    suffix = target.suffix.lower()
    if suffix not in FORMATS:
        raise ValueError(f"unknown export format {suffix or '(none)'}: use .gpx, .md or .json")
    write_atomic(target, render(suffix, scenario, plan))
    return target


def render(suffix: str, scenario, plan) -> str:
    """The text of the export in the format named by ``suffix``."""
    if suffix == ".json":
        from glidetask.commands._output import jsonable
        from glidetask.formats.plan_json import plan_to_dict

        return json.dumps(jsonable(plan_to_dict(plan)), indent=2, allow_nan=False) + "\n"
    if suffix == ".gpx":
        from glidetask.formats import gpx

        return gpx.plan_to_gpx(plan, scenario)
    from glidetask.formats import briefing

    return briefing.briefing_markdown(plan, scenario)
