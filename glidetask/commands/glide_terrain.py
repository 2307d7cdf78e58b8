"""The terrain check of ``glidetask glide --terrain FILE --from LAT,LON --to LAT,LON``.

Called by :mod:`glidetask.commands.glide` (imported only when ``--terrain`` is given, so a
plain glide check never loads rasterio). The glide line runs from the present height at
``--from`` down the straight geodesic to ``--to`` at the height used per metre of the
final glide just computed, and is checked over the elevation model with
:func:`glidetask.engine.clearance.final_glide_over_terrain`: the least clearance and where,
and the height needed to clear the terrain by ``--clearance-m`` all the way. Without
``--arrival-elevation-m`` the goal's elevation is the model's at ``--to``
(:func:`goal_elevation`), so the verdict and the terrain check agree on it.
"""

from __future__ import annotations

import argparse
import math

from glidetask import units as unit_systems
from glidetask.cli import CMDLINE
from glidetask.engine import geodesy
from glidetask.engine.clearance import final_glide_over_terrain
from glidetask.engine.terrain import TerrainError, load_terrain
from glidetask.errors import InputError
from glidetask.formats import safety_report

NOT_CHECKED = "The terrain was not checked: the goal is out of reach against this wind."
GOAL_DISAGREEMENT_M = 50.0  # caution when the given goal elevation and the model's differ by more [m]


def _load(path: str):
    try:
        return load_terrain(path)
    except TerrainError as error:
        raise InputError.one(path, "--terrain", error.what) from None


def goal_elevation(args: argparse.Namespace) -> tuple[float, float, list[str]]:
    """The goal's elevation for the glide, so the verdict and the terrain check agree on it.

    Without ``--arrival-elevation-m`` it is the model's elevation at ``--to``; with it, the
    value given, and a caution when the model differs by more than
    :data:`GOAL_DISAGREEMENT_M` (a wrong goal elevation moves the whole glide line).

    Returns
    -------
    elevation_m : float
        The goal elevation to use [m MSL].
    model_m : float
        The model's elevation at ``--to`` [m MSL] (NaN where it has no data).
    cautions : list of str
        In the units shown (metric under ``--json``).

    Raises
    ------
    InputError
        The model cannot be read, or it has no elevation at ``--to`` and none was given.
    """
    model = _load(args.terrain)
    model_m = float(model.sample(*args.to_latlon))
    units = unit_systems.METRIC if args.json else unit_systems.by_name(args.units)
    if args.arrival_elevation_m is None:
        if not math.isfinite(model_m):
            raise InputError.one(CMDLINE, "--arrival-elevation-m",
                                 f"needed: the elevation model {args.terrain} has no data at the goal (--to)")
        return model_m, model_m, []
    out = []
    if math.isfinite(model_m) and abs(args.arrival_elevation_m - model_m) > GOAL_DISAGREEMENT_M:
        out.append(f"The goal elevation given ({units.fmt_height(args.arrival_elevation_m)}) differs from the "
                   f"terrain model's at the goal ({units.fmt_height(model_m)}) by "
                   f"{units.fmt_height(abs(args.arrival_elevation_m - model_m))}: check it; the glide uses "
                   f"the one given.")
    return float(args.arrival_elevation_m), model_m, out


def check(args: argparse.Namespace, polar, result) -> tuple[dict, str]:
    """The terrain check of a final glide between two positions.

    Parameters
    ----------
    args : argparse.Namespace
        The ``glide`` command's options: ``terrain``, ``from_latlon``, ``to_latlon``
        (parsed positions), ``height_m``, ``arrival_elevation_m``, ``margin_m``,
        ``clearance_m``, ``units``, ``json``.
    polar : Polar
        The polar the glide was computed with (unused: the glide result carries the
        height it uses; kept for the caller's interface).
    result : FinalGlide
        The final glide from ``--from`` to ``--to``.

    Returns
    -------
    extra_json : dict
        ``{"terrain": {...}, "cautions": [...]}``: the contract-style ``terrain`` object
        (``source``, ``ok``, ``final_glide_min_clearance_m``, ``at_km`` from the start
        position, plus ``required_height_for_clearance_m``, ``clearance_margin_m`` and the
        extras of :func:`glidetask.formats.safety_report.terrain_to_dict`) and the terrain
        cautions to merge into the command's own.
    extra_text : str
        The readable section with a small profile.

    Raises
    ------
    InputError
        The terrain file is missing, not a raster, or has no CRS.
    """
    model = _load(args.terrain)
    shown = unit_systems.by_name(args.units)
    caution_units = unit_systems.METRIC if args.json else shown
    (lat0, lon0), (lat1, lon1) = args.from_latlon, args.to_latlon
    distance = geodesy.distance(lat0, lon0, lat1, lon1)
    used = float(result.height_used_m)
    per_metre = used / distance if distance > 0.0 else 0.0
    if not math.isfinite(per_metre):
        terrain = {"source": args.terrain, "ok": False, "final_glide_min_clearance_m": None, "at_km": None,
                   "reason": "out of reach against the wind"}
        return {"terrain": terrain, "cautions": [NOT_CHECKED]}, f"Final glide over the terrain\n  {NOT_CHECKED}"
    checked = final_glide_over_terrain(model, [lat0, lat1], [lon0, lon1], per_metre,
                                       args.arrival_elevation_m + args.margin_m, args.clearance_m,
                                       start_height_m=args.height_m)
    terrain = safety_report.terrain_to_dict(checked, source=args.terrain)
    terrain["required_height_for_clearance_m"] = terrain["required_start_height_m"]
    terrain["clearance_margin_m"] = safety_report._num(args.height_m - checked.required_start_m)
    text = "\n".join([safety_report.terrain_text(checked, shown), "",
                      safety_report.terrain_profile_ascii(checked, shown, width=60, height=10)])
    return {"terrain": terrain, "cautions": safety_report.terrain_cautions(checked, caution_units)}, text
