"""A plan rendered as a file: GPX route, Markdown briefing, or the plan's JSON.

The one place the export formats are chosen and rendered; ``glidetask export``
(:mod:`glidetask.commands.export`) and the terminal UI's export
(:mod:`glidetask.tui.exporting`) both call :func:`render`, so they write the same file.
"""

from __future__ import annotations

import json

from glidetask.engine.sensitivity import plan_sensitivity
from glidetask.formats.briefing import plan_to_markdown
from glidetask.formats.gpx import plan_to_gpx
from glidetask.formats.plan_json import jsonable, plan_to_dict

#: The file suffixes :func:`render` knows (lower case).
SUFFIXES = (".gpx", ".md", ".json")


def render(plan, suffix: str, unit_name: str = "metric") -> str:
    """The file's text for a plan in the format of ``suffix`` (one of :data:`SUFFIXES`).

    The briefing and the JSON carry the sensitivity of the task time (computed here, so
    every caller gets the same file).
    """
    if suffix == ".gpx":
        return plan_to_gpx(plan)
    sensitivity = plan_sensitivity(plan)
    if suffix == ".md":
        return plan_to_markdown(plan, unit_name, sensitivity)
    return json.dumps(jsonable(plan_to_dict(plan, sensitivity)), indent=2, allow_nan=False) + "\n"
