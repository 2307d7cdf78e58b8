"""Reading and validating polar files (TOML, shared/CONTRACT.md 2.1).

Every problem found is collected with its place (a key path such as
``[glider] wing_area_m2`` or ``[polar] points[3]``, counting points from 1, or a line
for TOML syntax errors) so that a pilot can fix the whole file in one go.

Public helpers:

* :func:`load_polar_spec` - read a file, raise :class:`~glidetask.errors.InputError`
  with every problem;
* :func:`read_polar_spec` - the same, returning ``(spec or None, problems)``;
* :func:`polar_problems` - validate an already parsed TOML document;
* :func:`loading_problems` - check a pilot/ballast loading against a polar's limits.
"""

from __future__ import annotations

import math
from pathlib import Path
from typing import Any

from glidetask.engine.polar import PolarSpec, fit_quadratic
from glidetask.engine.scenario import Day, GliderSetup, Scenario, scenario_problems
from glidetask.errors import InputError, Problem
from glidetask.formats.toml_reader import TomlReader, as_float, is_number, read_toml, show
from glidetask.units import KMH

DEFAULT_PILOT_ALLOWANCE_KG = 90.0  # empty mass defaults to reference mass minus this
# A stall speed this many times below min_speed_kmh puts the circling speeds far below the
# polar's points (or is in the wrong unit): a polar is measured down to about 1.1-1.3 times
# the stall speed (common practice).
STALL_PLAUSIBLE_RATIO = 1.5

GLIDER_KEYS = ("label", "wing_area_m2", "reference_mass_kg", "empty_mass_kg", "max_ballast_kg",
               "max_mass_kg", "vne_kmh", "min_speed_kmh", "stall_speed_kmh")
POLAR_KEYS = ("points",)
# Bounds no sailplane comes near, so that a slip of the keyboard (or 1e300) is caught here
# and never reaches the fit (common practice: generous limits around every type flying).
SPEED_LIMIT_KMH = 600.0
SINK_LIMIT_MS = 30.0
MASS_LIMIT_KG = 5000.0
WING_AREA_LIMIT_M2 = 100.0
BEST_LD_LIMIT = 80.0  # beyond any sailplane built (the best open class reach about 1:70, from memory)
#: The engine's key for the loading (ballast and flying mass) in scenario_problems.
LOADING_KEY = "[glider] ballast_kg"
# A day scenario_problems finds nothing wrong with: loading_problems asks it only about the glider.
_ANY_DAY = Day(start_time_s=0.0, band_top_m=1.0, band_bottom_m=0.0, lift_ends_s=1.0)


def _points(checker: TomlReader, polar: dict, min_kmh: float | None, vne_kmh: float | None):
    """The ``[polar] points`` as (speed km/h, sink m/s) pairs, each one checked."""
    where = "[polar] points"
    if "points" not in polar:
        checker.add(where, "missing key")
        return None
    raw = polar["points"]
    if not isinstance(raw, list):
        checker.add(where, f"must be a list of [IAS km/h, sink m/s] pairs, got {raw!r}")
        return None
    if len(raw) < 3:
        checker.add(where, f"needs at least 3 points, got {len(raw)}")
    points, ok = [], True
    for number, point in enumerate(raw, start=1):
        here = f"{where}[{number}]"
        if not (isinstance(point, list) and len(point) == 2 and all(is_number(x) for x in point)):
            shown = f"[{', '.join(show(x) for x in point)}]" if isinstance(point, list) else show(point)
            checker.add(here, f"must be a pair [IAS km/h, sink m/s] of numbers, got {shown}")
            ok = False
            continue
        speed, sink = as_float(point[0]), as_float(point[1])
        if speed is None or sink is None or not (math.isfinite(speed) and math.isfinite(sink)):
            checker.add(here, f"must be finite numbers, got [{show(point[0])}, {show(point[1])}]")
            ok = False
            continue
        if sink <= 0.0:
            checker.add(here, f"sink rate must be positive (m/s downward), got {sink:g}")
            ok = False
        elif sink > SINK_LIMIT_MS:
            checker.add(here, f"sink rate {sink:g} m/s is beyond any sailplane (at most {SINK_LIMIT_MS:g})")
            ok = False
        if not 0.0 < speed <= SPEED_LIMIT_KMH:
            checker.add(here, f"speed {speed:g} km/h must be in (0, {SPEED_LIMIT_KMH:g}]")
            ok = False
            continue
        if min_kmh is not None and vne_kmh is not None and not min_kmh <= speed <= vne_kmh:
            checker.add(here, f"speed {speed:g} km/h is outside min_speed_kmh..vne_kmh "
                              f"({min_kmh:g}..{vne_kmh:g})")
            ok = False
        points.append((speed, sink))
    if len({speed for speed, _ in points}) < 3 and len(raw) >= 3 and ok:
        checker.add(where, "needs at least 3 points at different speeds")
        ok = False
    return points if ok and len(points) >= 3 else None


def _fit_problems(checker: TomlReader, points, min_kmh: float | None, vne_kmh: float | None) -> None:
    """An impossible fitted polar: curving the wrong way, or no sink somewhere in range
    (the valid speed range down to the stall, where the circling model flies, or the
    points' own range if the limits are unusable)."""
    a, b, c, _ = fit_quadratic([s * KMH for s, _ in points], [w for _, w in points])
    where = "[polar] points"
    if a <= 0.0:
        checker.add(where, f"the fitted polar sink = a*v^2 + b*v + c has a = {a:.3g} <= 0 "
                           "(sink must grow at high speed); check the points")
        return
    if min_kmh is None or vne_kmh is None:
        min_kmh, vne_kmh = min(s for s, _ in points), max(s for s, _ in points)
    lo, hi = min_kmh * KMH, vne_kmh * KMH
    vertex = min(max(-b / (2.0 * a), lo), hi)
    least = (a * vertex + b) * vertex + c
    if least <= 0.0:
        checker.add(where, f"the fitted polar's minimum sink is {least:.3g} m/s at "
                           f"{vertex / KMH:.0f} km/h; it must be positive")
        return
    speeds = [s for s, _ in points]
    slowest, fastest = min(speeds), max(speeds)
    least_sink_kmh = -b / (2.0 * a) / KMH
    if least_sink_kmh > fastest - 0.1 * (fastest - slowest):
        checker.add(where, f"the fitted minimum sink is at {least_sink_kmh:.0f} km/h, at or beyond the fastest "
                           f"point ({fastest:g} km/h): the sink falls over the measured speeds, so the "
                           "minimum sink lies outside the measured speeds; measure points on both sides of it")
        return
    if least_sink_kmh < slowest - 0.25 * (fastest - slowest):
        checker.add(where, f"the fitted minimum sink is at {least_sink_kmh:.0f} km/h, far below the slowest "
                           f"point ({slowest:g} km/h); check the points")
        return
    best_ld, best_kmh = _best_ld(a, b, c, lo, hi)
    if best_ld > BEST_LD_LIMIT:
        checker.add(where, f"the fitted polar glides 1:{best_ld:.0f} at {best_kmh:.0f} km/h, beyond any "
                           f"sailplane (at most 1:{BEST_LD_LIMIT:g}); check the points")


def _best_ld(a: float, b: float, c: float, lo: float, hi: float) -> tuple[float, float]:
    """Best glide ratio v/sink(v) for v in [lo, hi] m/s of the quadratic, and its speed [km/h].
    v/sink is largest where sink/v = a*v + b + c/v is least: at sqrt(c/a), or an end."""
    candidates = [lo, hi] + ([math.sqrt(c / a)] if c > 0.0 and lo < math.sqrt(c / a) < hi else [])
    ratios = [(v / ((a * v + b) * v + c), v) for v in candidates if (a * v + b) * v + c > 0.0]
    ratio, speed = max(ratios) if ratios else (math.inf, lo)
    return ratio, speed / KMH


def polar_problems(document: dict, file: str) -> tuple[PolarSpec | None, list[Problem]]:
    """Validate a parsed polar document (contract 2.1).

    Parameters
    ----------
    document : dict
        The TOML document as :mod:`tomllib` parses it.
    file : str
        The file name to put in each problem.

    Returns
    -------
    spec : PolarSpec or None
        The polar in SI units, or None if there was any problem.
    problems : list of Problem
        Every problem found (empty if ``spec`` is not None).
    """
    checker = TomlReader(str(file))
    for key in document:
        if key not in ("glider", "polar"):
            checker.add(key, "unknown table or key (expected [glider] and [polar])")
    glider = checker.table(document, "glider", required=True)
    polar = checker.table(document, "polar", required=True)
    values = _glider_values(checker, glider, file) if glider is not None else {}
    min_kmh, vne_kmh = values.get("min_speed_kmh"), values.get("vne_kmh")
    if min_kmh is not None and vne_kmh is not None and min_kmh >= vne_kmh:
        min_kmh = vne_kmh = None  # already reported; the points cannot be range-checked
    points = None
    if polar is not None:
        checker.unknown(polar, "[polar]", POLAR_KEYS)
        points = _points(checker, polar, min_kmh, vne_kmh)
        if points is not None and not checker.problems:  # a fit of bad numbers tells nothing new
            stall_kmh = values.get("stall_speed_kmh")
            low_kmh = min_kmh if stall_kmh is None or min_kmh is None else min(stall_kmh, min_kmh)
            _fit_problems(checker, points, low_kmh, vne_kmh)
    if checker.problems or glider is None or points is None:
        return None, checker.problems.problems
    return PolarSpec(
        label=values["label"],
        wing_area_m2=values["wing_area_m2"],
        reference_mass_kg=values["reference_mass_kg"],
        empty_mass_kg=values["empty_mass_kg"],
        max_ballast_kg=values["max_ballast_kg"],
        max_mass_kg=values["max_mass_kg"],
        vne_ias_ms=vne_kmh * KMH,
        min_speed_ias_ms=min_kmh * KMH,
        points=tuple((speed * KMH, sink) for speed, sink in points),
        stall_speed_ias_ms=None if values["stall_speed_kmh"] is None else values["stall_speed_kmh"] * KMH,
    ), []


def _glider_values(checker: TomlReader, glider: dict, file: str) -> dict[str, Any]:
    """The ``[glider]`` table's values, each checked (None where bad), with defaults."""
    checker.unknown(glider, "[glider]", GLIDER_KEYS)
    values: dict[str, Any] = {}
    label = glider.get("label", Path(file).stem)
    if not isinstance(label, str):
        checker.add("[glider] label", f"must be text, got {label!r}")
    values["label"] = str(label)
    limits = {"wing_area_m2": WING_AREA_LIMIT_M2, "reference_mass_kg": MASS_LIMIT_KG,
              "vne_kmh": SPEED_LIMIT_KMH, "min_speed_kmh": SPEED_LIMIT_KMH}
    for key, limit in limits.items():
        values[key] = checker.number(glider, "[glider]", key, required=True, positive=True, high=limit)
    values["empty_mass_kg"] = checker.number(glider, "[glider]", "empty_mass_kg", positive=True, high=MASS_LIMIT_KG)
    values["max_ballast_kg"] = checker.number(glider, "[glider]", "max_ballast_kg", low=0.0, high=MASS_LIMIT_KG)
    values["max_mass_kg"] = checker.number(glider, "[glider]", "max_mass_kg", positive=True, high=MASS_LIMIT_KG)
    values["stall_speed_kmh"] = checker.number(glider, "[glider]", "stall_speed_kmh", positive=True,
                                               high=SPEED_LIMIT_KMH)
    _limit_problems(checker, glider, values)
    return values


def _limit_problems(checker: TomlReader, glider: dict, values: dict[str, Any]) -> None:
    """Defaults and cross-checks of the masses and speed limits (fills ``values``)."""
    reference = values["reference_mass_kg"]
    if "empty_mass_kg" not in glider and reference is not None:
        values["empty_mass_kg"] = reference - DEFAULT_PILOT_ALLOWANCE_KG
        if values["empty_mass_kg"] <= 0.0:
            checker.add("[glider] empty_mass_kg", f"missing, and the default (reference_mass_kg - "
                                                  f"{DEFAULT_PILOT_ALLOWANCE_KG:g}) is not positive")
    if "max_ballast_kg" not in glider:
        values["max_ballast_kg"] = 0.0
    empty, max_mass = values["empty_mass_kg"], values["max_mass_kg"]
    if empty is not None and reference is not None and empty > reference:
        checker.add("[glider] empty_mass_kg", f"empty mass {empty:g} kg is above reference_mass_kg {reference:g} kg")
    if empty is not None and max_mass is not None and max_mass <= empty:
        checker.add("[glider] max_mass_kg", f"maximum mass {max_mass:g} kg is not above empty_mass_kg {empty:g} kg")
    low, high = values["min_speed_kmh"], values["vne_kmh"]
    if low is not None and high is not None and low >= high:
        checker.add("[glider] min_speed_kmh", f"must be below vne_kmh ({high:g}), got {low:g}")
    stall = values["stall_speed_kmh"]
    if stall is not None and low is not None:
        if stall >= low:
            checker.add("[glider] stall_speed_kmh", f"must be below min_speed_kmh ({low:g}): the polar "
                                                    f"is flown above the stall, got {stall:g}")
        elif stall * STALL_PLAUSIBLE_RATIO < low:
            checker.add("[glider] stall_speed_kmh", f"{stall:g} is below min_speed_kmh / {STALL_PLAUSIBLE_RATIO:g} "
                                                    f"({low / STALL_PLAUSIBLE_RATIO:.0f}): the polar would start "
                                                    "far above the stall; give the wings-level stall speed, "
                                                    "IAS in km/h")


def read_polar_spec(path: str | Path) -> tuple[PolarSpec | None, list[Problem]]:
    """Read and validate a polar file; ``(spec, [])`` or ``(None, problems)``."""
    file = str(path)
    document, problems = read_toml(Path(path), file)
    if document is None:
        return None, problems
    return polar_problems(document, file)


def load_polar_spec(path: str | Path) -> PolarSpec:
    """Read a polar file (contract 2.1) into a :class:`PolarSpec` in SI units.

    Raises
    ------
    InputError
        With every problem found, each as ``FILE: WHERE: WHAT``.
    """
    spec, problems = read_polar_spec(path)
    if problems:
        raise InputError(problems)
    return spec


def loading_problems(spec: PolarSpec, pilot_kg: float, ballast_kg: float, *, file: str,
                     pilot_where: str, ballast_where: str) -> list[Problem]:
    """Problems with a flight's loading against the polar's limits.

    Parameters
    ----------
    spec : PolarSpec
        The polar, with its empty mass, ballast and mass limits.
    pilot_kg, ballast_kg : float
        Pilot with parachute, and water ballast [kg].
    file, pilot_where, ballast_where : str
        Where to report: e.g. ``"command line"``, ``"--pilot-kg"``, ``"--ballast-kg"``,
        or a task file and ``"[glider] pilot_kg"``.

    Returns
    -------
    list of Problem
        Non-finite or negative values, no pilot; then the engine's own check of the
        loading (:func:`glidetask.engine.scenario.scenario_problems`, in its words):
        ballast above ``max_ballast_kg``, or else a flying mass above ``max_mass_kg``
        (reported at the ballast when there is any, else at the pilot). Empty if the
        loading is within the limits.
    """
    problems = []
    for value, where, name in ((pilot_kg, pilot_where, "pilot mass"), (ballast_kg, ballast_where, "ballast")):
        if not (isinstance(value, (int, float)) and math.isfinite(value)) or value < 0.0:
            problems.append(Problem(file, where, f"{name} must be a finite number >= 0, got {value!r}"))
    if problems:
        return problems
    if pilot_kg <= 0.0:
        return [Problem(file, pilot_where, f"pilot mass must be greater than 0, got {pilot_kg:g}")]
    glider = GliderSetup(spec, float(pilot_kg), float(ballast_kg))
    # With no ballast only the flying mass can be wrong, and then the pilot makes it so.
    where = {LOADING_KEY: ballast_where if ballast_kg > 0.0 else pilot_where}
    return [Problem(file, where[key], message) for key, message in scenario_problems(Scenario(None, glider, _ANY_DAY))
            if key in where]
