"""Safety over the ground for a plan: the terrain under its path and the fields in reach.

When the task names an elevation model (``[terrain] file``), :func:`terrain_requirement`
gives :func:`glidetask.engine.plan.plan` the clearance rule as the flight core's
requirement hook (:func:`glidetask.engine.clearance_hook.path_terrain`) for every path it
flies; :func:`with_safety` adds to the flown plan the final glide checked over the
terrain from the same samples and the landable coverage along the planned path from the
band bottom (:func:`glidetask.engine.reach_coverage.coverage`), whose cautions :mod:`glidetask.cautions` words.

Sampling a path and searching fields are the slow parts of a replan. The engine keeps
no cache of them: it names what each result depends on (the path's vertices, the
elevation model's file identity, the polar, the wind, the margins; values, never object
identities) and hands that key to the caller's ``memo``, if any. The terminal UI, which
replans on every edit, keeps the results (:mod:`glidetask.tui.recompute`).
"""

from __future__ import annotations

import dataclasses
import math
import os
from pathlib import Path
from typing import Any, Callable

import numpy as np

from glidetask.engine import reach, reach_coverage
from glidetask.engine.clearance_hook import path_terrain
from glidetask.engine.final_glide_speeds import flown_final_glide
from glidetask.engine.flight import Flown
from glidetask.engine.scenario import Scenario
from glidetask.engine.terrain import TerrainError, load_terrain
from glidetask.errors import InputError, Problem

COVERAGE_SPACING_M = 1000.0  # landable coverage sampled along the path at least this often [m]

# ``memo(kind, key, compute)``: the result of ``compute()`` for the value ``key``, which the
# caller may remember (kind: "path_terrain" or "coverage"); None: computed every time
Memo = Callable[[str, tuple, Callable[[], Any]], Any]


def load_terrain_for(scenario: Scenario):
    """The task's elevation model (cached by :func:`glidetask.engine.terrain.load_terrain`), or None.

    Raises
    ------
    InputError
        The model cannot be used (missing, not a raster, no CRS), named by the task
        file's ``[terrain] file``.
    """
    if not scenario.terrain_file:
        return None
    try:
        return load_terrain(scenario.terrain_file)
    except TerrainError as error:
        raise InputError([Problem(scenario.source or "task", "[terrain] file", f"{error.path}: {error.what}")]) from None


def terrain_requirement(model, memo: Memo | None = None):
    """``requirement_for`` of :func:`plan` for an elevation model: the terrain sampled along
    each path flown (every 250 m), at the scenario's terrain clearance.

    The samples depend on the path, the model file (:attr:`Terrain.file_key`) and the
    clearance: with a ``memo`` keeping them, a replan after an edit that leaves the path
    alone (the day, the glider, the margins) samples nothing again. A model built in
    memory has no file key and is sampled every time.
    """
    def requirement_for(scenario: Scenario, path):
        clearance = scenario.safety.terrain_clearance_m

        def sample():
            return path_terrain(model, path.lats, path.lons, clearance)

        if memo is None or model.file_key is None:
            return sample()
        return memo("path_terrain", (model.file_key, model.source, _vertices(path), clearance), sample)

    return requirement_for


def _vertices(path) -> tuple[bytes, bytes]:
    """A path's vertices as a cache key (their exact float64 bytes)."""
    return np.asarray(path.lats, dtype=float).tobytes(), np.asarray(path.lons, dtype=float).tobytes()


def check_model_covers(scenario: Scenario, model, hook) -> None:
    """A model that covers none of the planned path is the wrong file: an input error."""
    profile = getattr(hook, "profile", None)
    if profile is not None and not np.any(np.isfinite(profile.elevation_m)):
        raise InputError([Problem(scenario.source or "task", "[terrain] file",
                                  f"{model.source}: the elevation model covers none of the task's planned path")])


def final_glide_per_metre(scenario: Scenario, path, flown: Flown) -> np.ndarray:
    """Height used per metre on each leg [m/m] by the plan's final glide, shape (L,).

    The final glide's own polar (at its density, ``flown.final_glide_sigma``) and setting
    (``flown.final_glide_mc_ms``) in each leg's wind, exactly as the flight core flew it;
    NaN without a final glide.
    """
    solved = flown_final_glide(scenario, path, flown)
    if solved is None:
        return np.full(len(path.legs), np.nan)
    glide, day = solved[0], scenario.day
    detour = 1.0 + day.detour_percent / 100.0  # per metre of the planned path, flown this much longer
    return np.broadcast_to(np.asarray(glide.height_per_metre, dtype=float) * detour, (len(path.legs),)).copy()


def landable_coverage(scenario: Scenario, path, model=None, memo: Memo | None = None):
    """Landable coverage along a planned path from the band bottom, or None without landables.

    Every :data:`COVERAGE_SPACING_M` along the path (and at every turnpoint), the fields
    of the turnpoint collection marked ``landable`` in reach at MacCready 0 in the day's
    wind, arriving with the arrival margin, clearing the terrain by the terrain clearance
    when a model is given (:func:`glidetask.engine.reach_coverage.coverage`).

    Notes
    -----
    The polar is the glider's as loaded at the density of the middle of the band bottom
    and the arrival floor (finish elevation plus margin): the heights glided through on
    the way down to a field. Air rising in the glides is not counted on (a glide to a
    field plans with ``min(glide_airmass_ms, 0)``): a pilot low and looking for a field
    cannot rely on it. The key handed to ``memo`` holds everything the result depends
    on, so with a memo an edit that changes none of it (a climb, a start time, a
    MacCready setting) costs nothing here.
    """
    fields = tuple((p.name, p.lat, p.lon, p.elevation_m) for p in scenario.turnpoints if getattr(p, "landable", False))
    if not fields:
        return None
    day, safety = scenario.day, scenario.safety
    floor = scenario.task.points[-1].turnpoint.elevation_m + safety.arrival_margin_m
    polar = scenario.glider.polar_at(0.5 * (day.band_bottom_m + floor), day.isa_deviation_c)
    airmass = min(day.glide_airmass_ms, 0.0)
    reach_wind = day.wind_at(day.band_bottom_m)  # the glides to a field start at the band bottom
    model_key = None if model is None else (model.file_key, model.source, safety.terrain_clearance_m)
    key = (_vertices(path), fields,
           tuple(float(x) for x in (polar.a, polar.b, polar.c, polar.min_speed_ms, polar.vne_ms)),
           reach_wind, day.band_bottom_m, safety.arrival_margin_m, airmass,
           model_key)

    def search():
        lats, lons, along = path.sample(COVERAGE_SPACING_M)
        leg = np.clip(np.searchsorted(path.cumulative_m, along, side="right") - 1, 0, len(path.legs) - 1)
        return reach_coverage.coverage(lats, lons, along, leg, reach.landable_index(scenario.turnpoints), polar,
                                       reach_wind, day.band_bottom_m, safety.arrival_margin_m, model,
                                       safety.terrain_clearance_m, airmass_ms=airmass)

    if memo is None or (model is not None and model.file_key is None):
        return search()
    return memo("coverage", key, search)


def shown_terrain_source(scenario: Scenario) -> str | None:
    """The elevation model's file as the task names it, for pilots and scripts; None without one.

    Relative to the task file's folder (POSIX separators), the form task files use and the
    one a saved task file writes, so ``terrain.tif`` for a model beside the task; the whole
    path only when no relative path leads there (another drive). Without a task file (a
    scenario built in memory) the file name alone. The absolute path stays in
    ``scenario.terrain_file``.
    """
    if not scenario.terrain_file:
        return None
    target = os.path.abspath(scenario.terrain_file)
    if not scenario.source:
        return os.path.basename(target)
    folder = os.path.realpath(os.path.dirname(os.path.abspath(scenario.source)))
    try:
        return Path(os.path.relpath(target, folder)).as_posix()
    except ValueError:  # on another drive
        return Path(target).as_posix()


def with_safety(plan, hook, model, memo: Memo | None = None):
    """The plan (a :class:`glidetask.engine.plan.Plan`) with its terrain check and landable
    coverage (facts :func:`glidetask.cautions.plan_cautions` words); the model named as the
    task names it (:func:`shown_terrain_source`) wherever the plan shows it; ``memo`` as
    for :func:`landable_coverage`."""
    terrain = None
    source = None if model is None else shown_terrain_source(plan.scenario)
    if hasattr(hook, "final_glide") and math.isfinite(plan.final_glide_from_m):
        landmarks = plan.scenario.turnpoints or tuple(p.turnpoint for p in plan.scenario.task.points)
        terrain = hook.final_glide(plan.final_glide_from_m, final_glide_per_metre(plan.scenario, plan.path, plan.flown),
                                   plan.arrival_floor_m, start_height_m=plan.final_glide_height_m, landmarks=landmarks)
        terrain = dataclasses.replace(terrain, source=source)
    return dataclasses.replace(plan, terrain=terrain, landables=landable_coverage(plan.scenario, plan.path, model, memo),
                               requirement=hook, terrain_source=source)
