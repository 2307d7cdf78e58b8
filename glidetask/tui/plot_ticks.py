"""Axis ticks a pilot reads at a glance: round numbers, clock times, task times.

plotext places ticks at evenly split, unrounded values (``1696.3``, ``12.6`` hours); these
helpers give round values (1, 2 or 5 times a power of ten) and their labels.

Importing this module also makes plotext draw the same picture in every run: it removes
duplicate ticks and points through a ``set``, whose order follows Python's string hashing,
which is seeded afresh in every process (PYTHONHASHSEED). Ticks whose labels collide on a
small plot were then placed in a different order, moving a label by a column from run to
run (the Day view's plot at 80x24), and of two points on one cell a different one was drawn.
:func:`deterministic_plotext` keeps the first of each in the order given.
"""

from __future__ import annotations

import math

from glidetask import units as units_module


def _first_of_each(data) -> list:
    """The items of ``data`` without repeats, in their first order (plotext's own keeps a set's order)."""
    return list(dict.fromkeys(data))


def deterministic_plotext() -> None:
    """Make plotext's duplicate removal keep the order given (see the module's notes)."""
    import plotext._utility as utility

    utility.no_duplicates = _first_of_each  # read at each call by brush(), xticks() and the build


deterministic_plotext()


def nice_step(span: float, count: int) -> float:
    """A round step (1, 2, 2.5 or 5 times a power of ten) giving about ``count`` intervals over ``span``."""
    if not (span > 0 and math.isfinite(span)) or count < 1:
        return 1.0
    raw = span / count
    power = 10.0 ** math.floor(math.log10(raw))
    for factor in (1.0, 2.0, 2.5, 5.0, 10.0):
        if factor * power >= raw:
            return factor * power
    return 10.0 * power


def nice_ticks(low: float, high: float, count: int = 5) -> list[float]:
    """Round values from ``low`` to ``high`` (inclusive, within a small tolerance), about ``count`` intervals."""
    if not (math.isfinite(low) and math.isfinite(high)) or high <= low:
        return [low] if math.isfinite(low) else []
    step = nice_step(high - low, count)
    first = math.ceil(low / step - 1e-9) * step
    ticks, value = [], first
    while value <= high + 1e-9 * step:
        ticks.append(round(value, 10) + 0.0)
        value += step
    return ticks


def number_labels(ticks: list[float]) -> list[str]:
    """Labels with no more decimals than the step needs (``500``, ``1000`` or ``0.5``, ``1.0``)."""
    if len(ticks) < 2:
        return [f"{t:g}" for t in ticks]
    step = abs(ticks[1] - ticks[0])
    decimals = max(0, -math.floor(math.log10(step) + 1e-9)) if step < 1 else 0
    if decimals and any(abs(round(t, decimals) - t) > 1e-9 for t in ticks):
        decimals += 1
    return [f"{t:.{decimals}f}" for t in ticks]


def clock_ticks(first_s: float, last_s: float, count: int = 5) -> tuple[list[float], list[str]]:
    """Hours [h] on the whole hour or half hour, with ``HH:MM`` labels, over a clock span [s]."""
    span_h = (last_s - first_s) / 3600.0
    step_h = next((s for s in (0.25, 0.5, 1.0, 2.0, 3.0, 6.0) if span_h / s <= count), 12.0)
    first = math.ceil(first_s / 3600.0 / step_h - 1e-9) * step_h
    hours = []
    while first <= last_s / 3600.0 + 1e-9:
        hours.append(first)
        first += step_h
    return hours, [units_module.format_clock(h * 3600.0) for h in hours]


def duration_ticks(low_h: float, high_h: float, count: int = 5) -> tuple[list[float], list[str]]:
    """Task times [h] at round minutes (10, 15, 20, 30 min, 1 h, ...), with ``H:MM`` labels."""
    span_min = (high_h - low_h) * 60.0
    step_min = next((s for s in (5, 10, 15, 20, 30, 60, 120, 180) if span_min / s <= count), 360)
    first = math.ceil(low_h * 60.0 / step_min - 1e-9) * step_min
    minutes = []
    while first <= high_h * 60.0 + 1e-9:
        minutes.append(first)
        first += step_min
    return [m / 60.0 for m in minutes], [units_module.format_duration(m * 60.0) for m in minutes]
