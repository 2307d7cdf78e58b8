"""Export the plan exactly as ``glidetask export`` does (:func:`glidetask.formats.export.render`): a GPX route,
a Markdown briefing in the units on screen, or the plan's JSON, written atomically."""

from __future__ import annotations

from pathlib import Path

FORMATS = {".gpx": "GPX 1.1 route", ".md": "pre-flight briefing (Markdown)", ".json": "plan (JSON, contract 5.3)"}


def export_plan(path: str | Path, plan, unit_name: str = "metric") -> Path:
    """Write ``plan`` to ``path``; the suffix picks the format.

    Raises ValueError for an unknown suffix or a file the task reads (never replaced), and
    OSError when the file cannot be written (a read-only file included).
    """
    from glidetask.formats.export import protected_target_problem, render
    from glidetask.formats.atomic import write_atomic

    target = Path(path).expanduser()
    suffix = target.suffix.lower()
    if suffix not in FORMATS:
        raise ValueError(f"unknown export format {suffix or '(none)'}: use .gpx, .md or .json")
    protected = protected_target_problem(target, plan.scenario)
    if protected:
        raise ValueError(protected)
    write_atomic(target, render(plan, suffix, unit_name))
    return target
